import type { Router } from "express";
import { z } from "zod";
import type { AppContext } from "@/server/context";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponses } from "@/server/openapi/registry";
import { dcatCatalog } from "@/server/services/linked-data/dcat-catalog";

export function catalogRoutes(ctx: AppContext): Router {
  const { router, defineRoute } = routeModule(ctx.registry);

  defineRoute(
    {
      method: "get",
      path: "/api/v1/catalog",
      operationId: "getCatalog",
      tags: ["Datasets"],
      summary: "The catalogue as W3C DCAT 3 (JSON-LD)",
      description:
        "Every published version as a dcat:Dataset (under dcat:dataset), chained by dcat:previousVersion, with its downloads as " +
        "dcat:Distribution (media type, format, byte size and SHA-256 checksum as spdx:checksum), theme and contact point; each " +
        "dataset as a whole under dcat:resource, naming its versions with dcat:hasVersion and the newest with dcat:hasCurrentVersion. " +
        "The @context is inline, so it expands without fetching anything.",
      responses: {
        200: { description: "A dcat:Catalog", content: { "application/ld+json": { schema: z.record(z.string(), z.unknown()) } } },
        ...problemResponses(429),
      },
    },
    async (_input, _req, res) => {
      const catalog = await dcatCatalog(ctx);
      res.set("Cache-Control", "public, max-age=60").type("application/ld+json; charset=utf-8").send(JSON.stringify(catalog));
    },
  );

  return router;
}
