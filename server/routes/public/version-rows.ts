import { Router } from "express";
import {
  observationPage,
  responsePage,
  sitePage,
  siteYearPage,
  treatmentPage,
  versionSiteQuery,
  versionSiteYearQuery,
  versionTreatmentQuery,
  versionYieldQuery,
} from "@/schemas/public";
import type { AppContext } from "@/server/context";
import { observationResource } from "@/server/services/public/observations";
import { responseResource } from "@/server/services/public/responses";
import { siteResource } from "@/server/services/public/sites";
import { siteYearResource } from "@/server/services/public/site-years";
import { treatmentResource } from "@/server/services/public/treatments";
import { assertRowsServed, pathVersion } from "@/server/services/public/versions";
import { parseParams, parseQuery } from "@/server/validate";
import { rowsRoute, versionPathParams } from "./rows-doc";
import { serveRows } from "./serve-rows";

const base = "/api/v1/datasets/{slug}/versions/{semver}";

/** The rows of one version. A pinned (semantic) version is immutable and cached for a year; `latest` for a minute. */
export function versionRowRoutes({ db, registry }: AppContext): Router {
  const router = Router();

  async function versionOf(req: Parameters<Parameters<typeof router.get>[1]>[0]) {
    const { slug, semver } = parseParams(versionPathParams, req);
    const v = await pathVersion(db, slug, semver);
    assertRowsServed(v);
    return v;
  }

  registry.registerPath(rowsRoute({ path: `${base}/sites`, tag: "Version rows", summary: "Sites of a version", query: versionSiteQuery, params: versionPathParams, page: sitePage, gone: true }));
  router.get("/datasets/:slug/versions/:semver/sites", async (req, res) => {
    const query = parseQuery(versionSiteQuery, req);
    const v = await versionOf(req);
    await serveRows(req, res, { db, resource: siteResource, versions: [v], query, freshness: v.pinned ? "pinned" : "moving" });
  });

  registry.registerPath(
    rowsRoute({
      path: `${base}/site-years`,
      tag: "Version rows",
      summary: "Site-years of a version, with their soil tests",
      description: "Treatment filters (nutrient, placement, rates, soilTestClass) keep the site-years that have a matching response.",
      query: versionSiteYearQuery,
      params: versionPathParams,
      page: siteYearPage,
      gone: true,
    }),
  );
  router.get("/datasets/:slug/versions/:semver/site-years", async (req, res) => {
    const query = parseQuery(versionSiteYearQuery, req);
    const v = await versionOf(req);
    await serveRows(req, res, { db, resource: siteYearResource, versions: [v], query, freshness: v.pinned ? "pinned" : "moving" });
  });

  registry.registerPath(
    rowsRoute({ path: `${base}/treatments`, tag: "Version rows", summary: "Treatments of a version, with their applications", query: versionTreatmentQuery, params: versionPathParams, page: treatmentPage, gone: true }),
  );
  router.get("/datasets/:slug/versions/:semver/treatments", async (req, res) => {
    const query = parseQuery(versionTreatmentQuery, req);
    const v = await versionOf(req);
    await serveRows(req, res, { db, resource: treatmentResource, versions: [v], query, freshness: v.pinned ? "pinned" : "moving" });
  });

  registry.registerPath(
    rowsRoute({ path: `${base}/observations`, tag: "Version rows", summary: "Plot observations of a version", query: versionYieldQuery, params: versionPathParams, page: observationPage, gone: true }),
  );
  router.get("/datasets/:slug/versions/:semver/observations", async (req, res) => {
    const query = parseQuery(versionYieldQuery, req);
    const v = await versionOf(req);
    await serveRows(req, res, { db, resource: observationResource, versions: [v], query, freshness: v.pinned ? "pinned" : "moving" });
  });

  registry.registerPath(
    rowsRoute({
      path: `${base}/responses`,
      tag: "Version rows",
      summary: "Site-year responses of a version: each treatment against its check",
      query: versionYieldQuery,
      params: versionPathParams,
      page: responsePage,
      gone: true,
    }),
  );
  router.get("/datasets/:slug/versions/:semver/responses", async (req, res) => {
    const query = parseQuery(versionYieldQuery, req);
    const v = await versionOf(req);
    await serveRows(req, res, { db, resource: responseResource, versions: [v], query: query, freshness: v.pinned ? "pinned" : "moving" });
  });

  return router;
}
