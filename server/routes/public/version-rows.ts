import type { Router } from "express";
import {
  observationPage,
  responsePage,
  sitePage,
  siteYearPage,
  treatmentPage,
  versionSiteQuery,
  versionSiteYearQuery,
  versionTreatmentQuery,
  versionResponseQuery,
  versionYieldQuery,
} from "@/schemas/public";
import type { AppContext } from "@/server/context";
import { routeModule } from "@/server/openapi/define-route";
import { observationResource } from "@/server/services/public/observations";
import { responseResource } from "@/server/services/public/responses";
import { resolveMeasure } from "@/server/services/measures";
import { siteResource } from "@/server/services/public/sites";
import { siteYearResource } from "@/server/services/public/site-years";
import { treatmentResource } from "@/server/services/public/treatments";
import { assertRowsServed, pathVersion } from "@/server/services/public/versions";
import { rowsRoute, versionPathParams } from "./rows-doc";
import { serveRows } from "./serve-rows";

const base = "/api/v1/datasets/{slug}/versions/{semver}";

/** The rows of one version. A pinned (semantic) version is immutable and cached for a year; `latest` for a minute. */
export function versionRowRoutes({ db, registry }: AppContext): Router {
  const { router, defineRoute } = routeModule(registry);

  async function versionOf({ slug, semver }: { slug: string; semver: string }) {
    const v = await pathVersion(db, slug, semver);
    assertRowsServed(v);
    return v;
  }

  defineRoute(
    rowsRoute({
      path: `${base}/sites`,
      operationId: "listVersionSites",
      tag: "Version rows",
      summary: "Sites of a version",
      query: versionSiteQuery,
      params: versionPathParams,
      page: sitePage,
      gone: true,
    }),
    async ({ params, query }, req, res) => {
      const v = await versionOf(params);
      await serveRows(req, res, { db, resource: siteResource, versions: [v], query, freshness: v.pinned ? "pinned" : "moving" });
    },
  );

  defineRoute(
    rowsRoute({
      path: `${base}/site-years`,
      operationId: "listVersionSiteYears",
      tag: "Version rows",
      summary: "Site-years of a version, with their soil tests",
      description: "Treatment filters (nutrient, placement, rates, soilTestClass) keep the site-years that have a matching response.",
      query: versionSiteYearQuery,
      params: versionPathParams,
      page: siteYearPage,
      gone: true,
    }),
    async ({ params, query }, req, res) => {
      const v = await versionOf(params);
      await serveRows(req, res, { db, resource: siteYearResource, versions: [v], query, freshness: v.pinned ? "pinned" : "moving" });
    },
  );

  defineRoute(
    rowsRoute({
      path: `${base}/treatments`,
      operationId: "listVersionTreatments",
      tag: "Version rows",
      summary: "Treatments of a version, with their applications",
      query: versionTreatmentQuery,
      params: versionPathParams,
      page: treatmentPage,
      gone: true,
    }),
    async ({ params, query }, req, res) => {
      const v = await versionOf(params);
      await serveRows(req, res, { db, resource: treatmentResource, versions: [v], query, freshness: v.pinned ? "pinned" : "moving" });
    },
  );

  defineRoute(
    rowsRoute({
      path: `${base}/observations`,
      operationId: "listVersionObservations",
      tag: "Version rows",
      summary: "Plot observations of a version",
      query: versionYieldQuery,
      params: versionPathParams,
      page: observationPage,
      gone: true,
    }),
    async ({ params, query }, req, res) => {
      const v = await versionOf(params);
      await serveRows(req, res, { db, resource: observationResource, versions: [v], query, freshness: v.pinned ? "pinned" : "moving" });
    },
  );

  defineRoute(
    rowsRoute({
      path: `${base}/responses`,
      operationId: "listVersionResponses",
      tag: "Version rows",
      summary: "Site-year responses of a version: each treatment against its check",
      query: versionResponseQuery,
      params: versionPathParams,
      page: responsePage,
      gone: true,
    }),
    async ({ params, query }, req, res) => {
      const v = await versionOf(params);
      await resolveMeasure(db, query.measure, [v.versionId]);
      await serveRows(req, res, { db, resource: responseResource, versions: [v], query: query, freshness: v.pinned ? "pinned" : "moving" });
    },
  );

  return router;
}
