import type { Router } from "express";
import { z } from "zod";
import { soilTestScheme } from "@/schemas/soil-test-schemes";
import { builtInSchemes } from "@/server/services/soil-test-schemes";
import { datasetList } from "@/schemas/dataset";
import { tableSchemaDescriptor } from "@/schemas/table-schema";
import { datasetDetail, noQuery, versionDetail, versionList } from "@/schemas/public";
import { cacheable, strongEtag } from "@/server/caching";
import type { AppContext } from "@/server/context";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponses } from "@/server/openapi/registry";
import { listPublishedDatasets } from "@/server/services/catalogue";
import * as publicVersions from "@/server/services/public/versions";
import { datasetPathParams, metadataHeaders, readResponses, versionPathParams } from "./rows-doc";

/** The catalogue and each dataset's public versions (withdrawn ones as tombstones), metadata only. */
export function datasetRoutes({ db, registry }: AppContext): Router {
  const { router, defineRoute } = routeModule(registry);

  defineRoute(
    {
      method: "get",
      path: "/api/v1/datasets",
      operationId: "listDatasets",
      tags: ["Datasets"],
      summary: "Published datasets, each with its latest published version",
      query: noQuery,
      responses: {
        200: { description: "The catalogue", content: { "application/json": { schema: datasetList } } },
        ...problemResponses(400, 429),
      },
    },
    async (_input, _req, res) => {
      res.set("Cache-Control", "public, max-age=60");
      res.json({ items: await listPublishedDatasets(db) });
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/soil-test-schemes",
      operationId: "listSoilTestSchemes",
      tags: ["Datasets"],
      summary:
        "The built-in soil-test interpretation schemes a soil_tests row can name in `interpretation` (a version's data dictionary may add its own)",
      query: noQuery,
      responses: {
        200: {
          description: "The built-in schemes",
          content: { "application/json": { schema: z.object({ items: z.array(soilTestScheme) }) } },
        },
        ...problemResponses(400, 429),
      },
    },
    async (_input, _req, res) => {
      res.set("Cache-Control", "public, max-age=3600");
      res.json({ items: builtInSchemes });
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/datasets/{slug}",
      operationId: "getDataset",
      tags: ["Datasets"],
      summary: "A dataset's metadata and its versions, withdrawn ones included as tombstones with their reason",
      params: datasetPathParams,
      query: noQuery,
      responses: {
        200: { description: "The dataset", content: { "application/json": { schema: datasetDetail } } },
        ...problemResponses(404, 429),
      },
    },
    async ({ params: { slug } }, _req, res) => {
      res.set("Cache-Control", "public, max-age=60");
      res.json(await publicVersions.datasetDetail(db, slug));
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/datasets/{slug}/versions",
      operationId: "listVersions",
      tags: ["Datasets"],
      summary: "A dataset's published and withdrawn versions, newest first",
      params: datasetPathParams,
      query: noQuery,
      responses: {
        200: { description: "The versions", content: { "application/json": { schema: versionList } } },
        ...problemResponses(404, 429),
      },
    },
    async ({ params: { slug } }, _req, res) => {
      res.set("Cache-Control", "public, max-age=60");
      res.json({ items: await publicVersions.versionSummaries(db, slug) });
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/datasets/{slug}/versions/{semver}",
      operationId: "getVersion",
      tags: ["Datasets"],
      summary: "One version: metadata, row counts and links; a withdrawn version answers with its reason and no rows",
      params: versionPathParams,
      query: noQuery,
      responses: {
        200: { description: "The version", headers: metadataHeaders, content: { "application/json": { schema: versionDetail } } },
        ...readResponses,
      },
    },
    async ({ params: { slug, semver } }, req, res) => {
      const v = await publicVersions.pathVersion(db, slug, semver);
      // Unlike its rows, a published version's metadata may still gain a DOI or a withdrawal: cached briefly, and
      // those fields are part of its validator.
      if (cacheable(req, res, strongEtag(["version", v.versionId, v.state, v.row.doi, v.row.withdrawnAt?.toISOString()]), "moving")) return;
      res.json(await publicVersions.versionDetail(db, v));
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/datasets/{slug}/versions/{semver}/schema",
      operationId: "getVersionSchema",
      tags: ["Datasets"],
      summary: "The version's data dictionary: a Frictionless Table Schema per resource",
      params: versionPathParams,
      query: noQuery,
      responses: {
        200: {
          description: "Table Schemas by resource",
          headers: metadataHeaders,
          content: { "application/json": { schema: tableSchemaDescriptor } },
        },
        ...readResponses,
      },
    },
    async ({ params: { slug, semver } }, req, res) => {
      const v = await publicVersions.pathVersion(db, slug, semver);
      if (cacheable(req, res, strongEtag(["schema", v.versionId]), v.pinned ? "pinned" : "moving")) return;
      res.json(v.row.tableSchema);
    },
  );

  return router;
}
