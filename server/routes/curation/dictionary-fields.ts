import type { Router } from "express";
import { z } from "zod";
import { fieldAddBody, fieldChangeBody, versionDetail } from "@/schemas/curation";
import { resourceName } from "@/schemas/table-schema";
import type { AppContext } from "@/server/context";
import { currentUser, requireWriteScope } from "@/server/auth/guards";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponses } from "@/server/openapi/registry";
import { addField, changeField, removeField } from "@/server/services/curation/dictionary-fields";
import { versionDetail as describe } from "@/server/services/curation/versions";
import { json } from "./docs";

const idParams = z.object({ id: z.uuid() });
const fieldParams = z.object({ id: z.uuid(), resource: resourceName, name: z.string().min(1).max(64) });

/** One field at a time in a draft's data dictionary: the same rules as replacing the whole dictionary. */
export function curationDictionaryRoutes(ctx: AppContext): Router {
  const { db, registry } = ctx;
  const { router, defineRoute } = routeModule(registry);

  defineRoute(
    {
      method: "post",
      path: "/api/v1/curation/versions/{id}/table-schema/fields",
      operationId: "addTableSchemaField",
      tags: ["Curation"],
      summary: "Add a field of the curator's own to one resource of a draft's data dictionary (or put back a dropped optional one)",
      description:
        "The field is checked by the shared field schema; its name must be new to the resource. Uploads then read a column of that " +
        "name, exports and templates carry it, and its values are kept with each row.",
      guards: [requireWriteScope],
      params: idParams,
      body: { json: fieldAddBody },
      responses: { 200: json(versionDetail, "The draft"), ...problemResponses(400, 401, 403, 404, 409) },
    },
    async ({ params: { id }, body }, req, res) => {
      await addField(db, currentUser(req), id, body.resource, body.field);
      res.json(await describe(ctx, req.user, id));
    },
  );

  defineRoute(
    {
      method: "patch",
      path: "/api/v1/curation/versions/{id}/table-schema/fields/{resource}/{name}",
      operationId: "changeTableSchemaField",
      tags: ["Curation"],
      summary: "Rename a field of the curator's own (its stored values follow the new name) or change a field's definition",
      guards: [requireWriteScope],
      params: fieldParams,
      body: { json: fieldChangeBody },
      responses: { 200: json(versionDetail, "The draft"), ...problemResponses(400, 401, 403, 404, 409) },
    },
    async ({ params: { id, resource, name }, body }, req, res) => {
      await changeField(db, currentUser(req), id, resource, name, body);
      res.json(await describe(ctx, req.user, id));
    },
  );

  defineRoute(
    {
      method: "delete",
      path: "/api/v1/curation/versions/{id}/table-schema/fields/{resource}/{name}",
      operationId: "removeTableSchemaField",
      tags: ["Curation"],
      summary: "Remove a field from a draft's data dictionary; a field of the curator's own takes its values with it",
      guards: [requireWriteScope],
      params: fieldParams,
      responses: { 200: json(versionDetail, "The draft"), ...problemResponses(400, 401, 403, 404, 409) },
    },
    async ({ params: { id, resource, name } }, req, res) => {
      await removeField(db, currentUser(req), id, resource, name);
      res.json(await describe(ctx, req.user, id));
    },
  );

  return router;
}
