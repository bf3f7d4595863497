import type { Router } from "express";
import { z } from "zod";
import { noQuery, viewTableSchema } from "@/schemas/public";
import type { AppContext } from "@/server/context";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponses } from "@/server/openapi/registry";
import { rowViewNames, viewTableSchema as tableSchemaOf } from "@/server/services/public/view-schema";

const viewParams = z.object({ view: z.enum(rowViewNames).describe("A row view: the last path segment of its endpoint") });

/** The Table Schemas that the CSV answers of the row views point at with `Link: rel="describedby"`. */
export function viewSchemaRoutes({ registry }: AppContext): Router {
  const { router, defineRoute } = routeModule(registry);

  defineRoute(
    {
      method: "get",
      path: "/api/v1/schemas/{view}",
      operationId: "getViewTableSchema",
      tags: ["Datasets"],
      summary: "The Table Schema of a row view's CSV (its columns, types and descriptions); CSV answers link to it as describedby",
      params: viewParams,
      query: noQuery,
      responses: {
        200: { description: "A Table Schema (v2)", content: { "application/json": { schema: viewTableSchema } } },
        ...problemResponses(400, 404, 429),
      },
    },
    async ({ params: { view } }, _req, res) => {
      res.set("Cache-Control", "public, max-age=3600").json(tableSchemaOf(view));
    },
  );

  return router;
}
