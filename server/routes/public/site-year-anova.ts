import type { Router } from "express";
import { z } from "zod";
import { crossDatasetAnovaQuery, siteYearAnova, siteYearAnovaQuery, siteYearCodeParam } from "@/schemas/site-year-anova";
import { cacheable, strongEtag } from "@/server/caching";
import type { AppContext } from "@/server/context";
import { badRequest, notFound } from "@/server/errors";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponse } from "@/server/openapi/registry";
import { assertRowsServed, pathVersion } from "@/server/services/public/versions";
import { siteYearAnova as analyse, siteYearVersionsWithCode } from "@/server/services/site-year-anova";
import { resolveVersions } from "@/server/services/trial-filter";
import { metadataHeaders, readResponses, versionPathParams } from "./rows-doc";

/** What the answer holds, said once for both routes (and the draft route). */
export const anovaDescription =
  "The site-year's own RCBD analysis of variance, as R's `anova(lm(y ~ block + treatment))` gives it: SS, df, MS, F and p of block, " +
  "treatment (adjusted for blocks when plots are missing) and the residual; the MSE, CV% and LSD(0.05). A balanced site-year has one LSD, " +
  "t(0.975, df)·√(2·MSE/r); with missing plots each pair of treatments has its own, t(0.975, df)·√(v_i + v_j − 2c_ij) from the " +
  'least-squares means\' covariance (R: `emmeans::pairs(emmeans(fit, "treatment"), adjust = "none")`). LS-means are averaged over ' +
  "blocks, with their SEs. A site-year published as means only answers with its means, MSE and df, and `computed: false`.";

const codeParams = z.object({ code: siteYearCodeParam });

export function siteYearAnovaRoutes({ db, registry }: AppContext): Router {
  const { router, defineRoute } = routeModule(registry);
  const answer = {
    description: "The site-year's ANOVA",
    headers: metadataHeaders,
    content: { "application/json": { schema: siteYearAnova } },
  };

  defineRoute(
    {
      method: "get",
      path: "/api/v1/datasets/{slug}/versions/{semver}/site-years/{code}/anova",
      operationId: "getVersionSiteYearAnova",
      tags: ["Version rows"],
      summary: "One site-year's ANOVA table, LSDs and least-squares means, on yield or another plot measure",
      description: anovaDescription,
      params: versionPathParams.extend(codeParams.shape),
      query: siteYearAnovaQuery,
      responses: { 200: answer, ...readResponses, ...problemResponse(410, "The version was withdrawn; its rows are not served") },
    },
    async ({ params: { slug, semver, code }, query }, req, res) => {
      const v = await pathVersion(db, slug, semver);
      assertRowsServed(v);
      if (cacheable(req, res, strongEtag(["anova", v.versionId, code, query]), v.pinned ? "pinned" : "moving")) return;
      res.json(await analyse(db, v, code, query));
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/site-years/{code}/anova",
      operationId: "getSiteYearAnova",
      tags: ["Rows across datasets"],
      summary: "One site-year's ANOVA, found by its code in the latest published version of each dataset (or in `dataset`)",
      description: `${anovaDescription} A code found in more than one dataset is a 400 that names them; send \`dataset\`.`,
      params: codeParams,
      query: crossDatasetAnovaQuery,
      responses: { 200: answer, ...readResponses, ...problemResponse(410, "The version was withdrawn; its rows are not served") },
    },
    async ({ params: { code }, query }, req, res) => {
      const { dataset, version, ...rest } = query;
      if (version && !dataset) throw badRequest("version needs dataset.", [{ field: "query.version", message: "needs dataset" }]);
      const versions = await resolveVersions(db, { dataset, version });
      const found = await siteYearVersionsWithCode(
        db,
        versions.map((v) => v.versionId),
        code,
      );
      const matches = versions.filter((v) => found.includes(v.versionId));
      if (matches.length === 0) throw notFound(`No published site-year is called "${code}"${dataset ? ` in dataset "${dataset}"` : ""}.`);
      if (matches.length > 1) {
        const names = matches.map((v) => v.datasetSlug).join(", ");
        throw badRequest(`Site-year "${code}" is in ${matches.length} datasets (${names}); name one with dataset=.`, [
          { field: "query.dataset", message: `one of ${names}` },
        ]);
      }
      const v = matches[0]!;
      if (cacheable(req, res, strongEtag(["anova", v.versionId, code, rest]), "moving")) return;
      res.json(await analyse(db, v, code, rest));
    },
  );

  return router;
}
