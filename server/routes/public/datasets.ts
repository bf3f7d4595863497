import { Router } from "express";
import { z } from "zod";
import { soilTestScheme } from "@/schemas/soil-test-schemes";
import { builtInSchemes } from "@/server/services/soil-test-schemes";
import { datasetList } from "@/schemas/dataset";
import { tableSchemaDescriptor } from "@/schemas/table-schema";
import { datasetDetail, noQuery, versionDetail, versionList } from "@/schemas/public";
import { cacheable, strongEtag } from "@/server/caching";
import type { AppContext } from "@/server/context";
import { problemResponses } from "@/server/openapi/registry";
import { listPublishedDatasets } from "@/server/services/catalogue";
import * as publicVersions from "@/server/services/public/versions";
import { parseParams, parseQuery } from "@/server/validate";
import { datasetPathParams, metadataHeaders, readResponses, versionPathParams } from "./rows-doc";

/** The catalogue and each dataset's public versions (withdrawn ones as tombstones), metadata only. */
export function datasetRoutes({ db, registry }: AppContext): Router {
  const router = Router();

  registry.registerPath({
    method: "get",
    path: "/api/v1/datasets",
    tags: ["Datasets"],
    summary: "Published datasets, each with its latest published version",
    responses: { 200: { description: "The catalogue", content: { "application/json": { schema: datasetList } } }, ...problemResponses(400, 429) },
  });
  router.get("/datasets", async (req, res) => {
    parseQuery(noQuery, req);
    res.set("Cache-Control", "public, max-age=60");
    res.json({ items: await listPublishedDatasets(db) });
  });

  registry.registerPath({
    method: "get",
    path: "/api/v1/soil-test-schemes",
    tags: ["Datasets"],
    summary: "The built-in soil-test interpretation schemes a soil_tests row can name in `interpretation` (a version's data dictionary may add its own)",
    responses: { 200: { description: "The built-in schemes", content: { "application/json": { schema: z.object({ items: z.array(soilTestScheme) }) } } }, ...problemResponses(400, 429) },
  });
  router.get("/soil-test-schemes", (req, res) => {
    parseQuery(noQuery, req);
    res.set("Cache-Control", "public, max-age=3600");
    res.json({ items: builtInSchemes });
  });

  registry.registerPath({
    method: "get",
    path: "/api/v1/datasets/{slug}",
    tags: ["Datasets"],
    summary: "A dataset's metadata and its versions, withdrawn ones included as tombstones with their reason",
    request: { params: datasetPathParams },
    responses: { 200: { description: "The dataset", content: { "application/json": { schema: datasetDetail } } }, ...problemResponses(404, 429) },
  });
  router.get("/datasets/:slug", async (req, res) => {
    const { slug } = parseParams(datasetPathParams, req);
    parseQuery(noQuery, req);
    res.set("Cache-Control", "public, max-age=60");
    res.json(await publicVersions.datasetDetail(db, slug));
  });

  registry.registerPath({
    method: "get",
    path: "/api/v1/datasets/{slug}/versions",
    tags: ["Datasets"],
    summary: "A dataset's published and withdrawn versions, newest first",
    request: { params: datasetPathParams },
    responses: { 200: { description: "The versions", content: { "application/json": { schema: versionList } } }, ...problemResponses(404, 429) },
  });
  router.get("/datasets/:slug/versions", async (req, res) => {
    const { slug } = parseParams(datasetPathParams, req);
    parseQuery(noQuery, req);
    res.set("Cache-Control", "public, max-age=60");
    res.json({ items: await publicVersions.versionSummaries(db, slug) });
  });

  registry.registerPath({
    method: "get",
    path: "/api/v1/datasets/{slug}/versions/{semver}",
    tags: ["Datasets"],
    summary: "One version: metadata, row counts and links; a withdrawn version answers with its reason and no rows",
    request: { params: versionPathParams },
    responses: {
      200: { description: "The version", headers: metadataHeaders, content: { "application/json": { schema: versionDetail } } },
      ...readResponses,
    },
  });
  router.get("/datasets/:slug/versions/:semver", async (req, res) => {
    const { slug, semver } = parseParams(versionPathParams, req);
    parseQuery(noQuery, req);
    const v = await publicVersions.pathVersion(db, slug, semver);
    // Unlike its rows, a published version's metadata may still gain a DOI or a withdrawal: cached briefly, and
    // those fields are part of its validator.
    if (cacheable(req, res, strongEtag(["version", v.versionId, v.state, v.row.doi, v.row.withdrawnAt?.toISOString()]), "moving")) return;
    res.json(await publicVersions.versionDetail(db, v));
  });

  registry.registerPath({
    method: "get",
    path: "/api/v1/datasets/{slug}/versions/{semver}/schema",
    tags: ["Datasets"],
    summary: "The version's data dictionary: a Frictionless Table Schema per resource",
    request: { params: versionPathParams },
    responses: {
      200: {
        description: "Table Schemas by resource",
        headers: metadataHeaders,
        content: { "application/json": { schema: tableSchemaDescriptor } },
      },
      ...readResponses,
    },
  });
  router.get("/datasets/:slug/versions/:semver/schema", async (req, res) => {
    const { slug, semver } = parseParams(versionPathParams, req);
    parseQuery(noQuery, req);
    const v = await publicVersions.pathVersion(db, slug, semver);
    if (cacheable(req, res, strongEtag(["schema", v.versionId]), v.pinned ? "pinned" : "moving")) return;
    res.json(v.row.tableSchema);
  });

  return router;
}
