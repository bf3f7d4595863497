import type { Router } from "express";
import {
  crossDatasetResponseQuery,
  crossDatasetSiteYearQuery,
  crossDatasetYieldQuery,
  observationPage,
  responsePage,
  siteYearPage,
} from "@/schemas/public";
import type { AppContext } from "@/server/context";
import { routeModule } from "@/server/openapi/define-route";
import { observationResource } from "@/server/services/public/observations";
import { responseResource } from "@/server/services/public/responses";
import { siteYearResource } from "@/server/services/public/site-years";
import { resolveVersions } from "@/server/services/trial-filter";
import { resolveMeasure } from "@/server/services/measures";
import { rowsRoute } from "./rows-doc";
import { serveRows } from "./serve-rows";

const resolution =
  "Reads the latest published version of every dataset, or with `dataset` (and `version`) just that one; " +
  "every row names its dataset and version, and `versions` lists them with their licences.";

/** Rows across datasets with the shared filters: the same query string as the analyses, so numbers can be re-derived. */
export function crossDatasetRoutes({ db, registry }: AppContext): Router {
  const { router, defineRoute } = routeModule(registry);

  defineRoute(
    rowsRoute({
      path: "/api/v1/responses",
      operationId: "listResponses",
      tag: "Rows across datasets",
      summary: "Site-year responses across datasets",
      description: resolution,
      query: crossDatasetResponseQuery,
      page: responsePage,
      gone: true,
    }),
    async ({ query }, req, res) => {
      const versions = await resolveVersions(db, query);
      const { dataset: _d, version: _v, ...rest } = query;
      await resolveMeasure(
        db,
        query.measure,
        versions.map((v) => v.versionId),
      );
      await serveRows(req, res, { db, resource: responseResource, versions, query: rest, freshness: "moving" });
    },
  );

  defineRoute(
    rowsRoute({
      path: "/api/v1/observations",
      operationId: "listObservations",
      tag: "Rows across datasets",
      summary: "Plot observations across datasets",
      description: resolution,
      query: crossDatasetYieldQuery,
      page: observationPage,
      gone: true,
    }),
    async ({ query }, req, res) => {
      const versions = await resolveVersions(db, query);
      const { dataset: _d, version: _v, ...rest } = query;
      await serveRows(req, res, { db, resource: observationResource, versions, query: rest, freshness: "moving" });
    },
  );

  defineRoute(
    rowsRoute({
      path: "/api/v1/site-years",
      operationId: "listSiteYears",
      tag: "Rows across datasets",
      summary: "Site-years across datasets, with their soil tests",
      description: `${resolution} Treatment filters keep the site-years that have a matching response.`,
      query: crossDatasetSiteYearQuery,
      page: siteYearPage,
      gone: true,
    }),
    async ({ query }, req, res) => {
      const versions = await resolveVersions(db, query);
      const { dataset: _d, version: _v, ...rest } = query;
      await serveRows(req, res, { db, resource: siteYearResource, versions, query: rest, freshness: "moving" });
    },
  );

  return router;
}
