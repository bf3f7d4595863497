import type { Router } from "express";
import { z } from "zod";
import { resourceName } from "@/schemas/table-schema";
import type { AppContext } from "@/server/context";
import { requireUser } from "@/server/auth/guards";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponses } from "@/server/openapi/registry";
import { assertCanView, versionById } from "@/server/services/curation/access";
import { csvTemplate, templateReadme, workbookTemplate } from "@/server/services/curation/templates";

const idParams = z.object({ id: z.uuid() });
const xlsxType = "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet";

/** Upload templates of a version, made from its data dictionary (so they follow every dictionary edit). */
export function curationTemplateRoutes(ctx: AppContext): Router {
  const { db, registry } = ctx;
  const { router, defineRoute } = routeModule(registry);

  /** The version, for those who may see it, and the label its templates carry. */
  async function templated(id: string, user: Express.User | undefined) {
    const { version, dataset } = await versionById(db, id);
    await assertCanView(db, user, dataset, version);
    return { version, dataset, label: `${dataset.title} ${version.semver}`, base: `${dataset.slug}-${version.semver}` };
  }

  defineRoute(
    {
      method: "get",
      path: "/api/v1/curation/versions/{id}/templates/{resource}.csv",
      operationId: "getCsvTemplate",
      tags: ["Curation"],
      summary: "A resource's CSV upload template: the data dictionary's columns (the curator's own fields included) and two example rows",
      description:
        "The file uploads as it is; replace the example rows with your own. What each column means is in README.txt and in the workbook template.",
      guards: [requireUser],
      params: idParams.extend({ resource: resourceName }),
      responses: { 200: { description: "The CSV", content: { "text/csv": { schema: z.string() } } }, ...problemResponses(401, 404) },
    },
    async ({ params: { id, resource } }, req, res) => {
      const { version, base } = await templated(id, req.user);
      res.type("text/csv; charset=utf-8").attachment(`${base}-${resource}-template.csv`).send(csvTemplate(version.tableSchema, resource));
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/curation/versions/{id}/templates/workbook.xlsx",
      operationId: "getWorkbookTemplate",
      tags: ["Curation"],
      summary:
        "The .xlsx upload template: a README sheet (each column's meaning, unit and allowed values) and one sheet per resource with two example rows",
      guards: [requireUser],
      params: idParams,
      responses: { 200: { description: "The workbook", content: { [xlsxType]: { schema: z.string() } } }, ...problemResponses(401, 404) },
    },
    async ({ params: { id } }, req, res) => {
      const { version, label, base } = await templated(id, req.user);
      res
        .type(xlsxType)
        .attachment(`${base}-template.xlsx`)
        .send(await workbookTemplate(version.tableSchema, label));
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/curation/versions/{id}/templates/README.txt",
      operationId: "getTemplateReadme",
      tags: ["Curation"],
      summary: "What every column of the CSV templates means: type, unit, whether it is required, allowed values",
      guards: [requireUser],
      params: idParams,
      responses: { 200: { description: "The notes", content: { "text/plain": { schema: z.string() } } }, ...problemResponses(401, 404) },
    },
    async ({ params: { id } }, req, res) => {
      const { version, label, base } = await templated(id, req.user);
      res.type("text/plain; charset=utf-8").attachment(`${base}-templates-README.txt`).send(templateReadme(version.tableSchema, label));
    },
  );

  return router;
}
