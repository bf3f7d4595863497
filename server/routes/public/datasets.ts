import { Router } from "express";
import { datasetList } from "@/schemas/dataset";
import type { AppContext } from "@/server/context";
import { problemResponses } from "@/server/openapi/registry";
import { listPublishedDatasets } from "@/server/services/catalogue";

export function datasetRoutes({ db, registry }: AppContext): Router {
  const router = Router();

  registry.registerPath({
    method: "get",
    path: "/api/v1/datasets",
    tags: ["Datasets"],
    summary: "Published datasets, each with its latest published version",
    responses: { 200: { description: "The catalogue", content: { "application/json": { schema: datasetList } } }, ...problemResponses(400, 429) },
  });
  router.get("/datasets", async (_req, res) => {
    res.set("Cache-Control", "public, max-age=60");
    res.json({ items: await listPublishedDatasets(db) });
  });

  return router;
}
