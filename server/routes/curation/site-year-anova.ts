import type { Router } from "express";
import { z } from "zod";
import { siteYearAnova, siteYearAnovaQuery, siteYearCodeParam } from "@/schemas/site-year-anova";
import type { AppContext } from "@/server/context";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponses } from "@/server/openapi/registry";
import { anovaDescription } from "@/server/routes/public/site-year-anova";
import { assertCanView, versionById } from "@/server/services/curation/access";
import { siteYearAnova as analyse } from "@/server/services/site-year-anova";
import { json } from "./docs";

const params = z.object({ id: z.uuid(), code: siteYearCodeParam });

/** A draft's (or a version in review's) site-year ANOVA, for its editors and reviewers: the reviewer's screen reads it. */
export function curationSiteYearAnovaRoutes({ db, registry }: AppContext): Router {
  const { router, defineRoute } = routeModule(registry);

  defineRoute(
    {
      method: "get",
      path: "/api/v1/curation/versions/{id}/site-years/{code}/anova",
      operationId: "getCurationSiteYearAnova",
      tags: ["Curation"],
      summary: "One site-year's ANOVA in any version; drafts and versions in review only for their dataset's editors and reviewers",
      description: `${anovaDescription} To anyone else a draft is a 404, as if it did not exist.`,
      params,
      query: siteYearAnovaQuery,
      responses: { 200: json(siteYearAnova, "The site-year's ANOVA"), ...problemResponses(400, 404) },
    },
    async ({ params: { id, code }, query }, req, res) => {
      const { version, dataset } = await versionById(db, id);
      await assertCanView(db, req.user, dataset, version);
      // A draft changes with every upload: never kept by a cache.
      res.set("Cache-Control", "private, no-store");
      res.json(
        await analyse(db, { versionId: version.id, datasetSlug: dataset.slug, semver: version.semver, state: version.state }, code, query),
      );
    },
  );

  return router;
}
