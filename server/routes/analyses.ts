import type { Router } from "express";
import { metaAnalysisResult, metaQuery } from "@/schemas/analysis";
import type { AppContext } from "@/server/context";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponses } from "@/server/openapi/registry";
import { cacheable, strongEtag } from "@/server/caching";
import { resolveVersions } from "@/server/services/trial-filter";
import { forestRowsCsv } from "@/server/services/analysis/forest-csv";
import { runMetaAnalysis } from "@/server/services/analysis/run-meta-analysis";
import { seedSafety } from "@/server/services/analysis/seed-safety";
import { seedSafetyQuery, seedSafetyResult } from "@/schemas/seed-safety";

export function analysisRoutes({ db, registry, config }: AppContext): Router {
  const { router, defineRoute } = routeModule(registry);

  defineRoute(
    {
      method: "get",
      path: "/api/v1/analyses/meta",
      operationId: "runMetaAnalysis",
      tags: ["Analyses"],
      summary: "Random-effects meta-analysis of yield response over the filtered site-years",
      description:
        "Takes the same filters as the responses and rows endpoints, so a screen's numbers come from one URL. Each " +
        "site-year enters once: several matching treatments of one site-year are combined first, using the covariance " +
        "their shared check induces (MSE/r). τ² by REML (default), DL or PM, or the fixed-effect model; CI by " +
        "Hartung–Knapp–Sidik–Jonkman (default) or Wald; the prediction interval uses t(k − 2). With price and cost, the " +
        "decision block gives the break-even response and the chance a new site-year exceeds it. `format=csv` returns " +
        'the per-site-year rows (reproduce in R: `rma(yi = estimate, sei = se, data = d, method = "REML", test = "knha")`). ' +
        "k = 0 is an answer (200), not an error. `measure=` pools another measure (stand, vigour, test-weight, moisture, or " +
        "one a data dictionary adds) in its own unit; the decision block's break-even applies to yield only. Results " +
        "summarise these trials; a field can differ. " +
        "`moderator=` adds a meta-regression on a continuous moderator (slope, R², residual heterogeneity, the fitted line and its " +
        "band, and for the soil test its critical level); it is refused with 422 when the site-years are on different scales. " +
        "`include=heterogeneityIntervals` and `subgroupTau2=separate` add heterogeneity detail; a default answer has none of these.",
      query: metaQuery,
      responses: {
        200: {
          description: "The analysis with its provenance",
          content: { "application/json": { schema: metaAnalysisResult }, "text/csv": { schema: { type: "string" } } },
        },
        304: { description: "Not modified: the copy named by If-None-Match is current (the same versions and query)" },
        ...problemResponses(400, 404, 422, 429),
      },
    },
    async ({ query }, req, res) => {
      // An analysis is a function of the versions it reads, the query and this server's code: its ETag is known before
      // any response is read, so a revalidation (If-None-Match) is a 304 without the analysis, and counts against no
      // quota. A named version is immutable, so its answer is cached as such.
      const versionIds = (await resolveVersions(db, query)).map((v) => v.versionId).sort();
      const etag = strongEtag(["meta", config.version, versionIds, Object.entries(query).sort(([a], [b]) => a.localeCompare(b))]);
      const pinned = !!query.dataset && !!query.version && query.version !== "latest";
      if (cacheable(req, res, etag, pinned ? "pinned" : "moving")) return;
      const result = await runMetaAnalysis(db, query);
      if (query.format === "csv") {
        res
          .type("text/csv; charset=utf-8")
          .set("Content-Disposition", 'inline; filename="meta-analysis-site-years.csv"')
          .send(forestRowsCsv(result));
        return;
      }
      res.json(result);
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/analyses/seed-safety",
      operationId: "seedSafety",
      tags: ["Analyses"],
      summary: "Did seed-placed (in-furrow) treatments reduce the stand or early growth?",
      description:
        "Takes the shared filters but placement: the stand (or early-growth) response of treatments with an in-furrow " +
        "application against their checks, pooled per site-year (REML, HKSJ) as a difference and as a relative change, " +
        "beside treatments placed away from the seed; how many site-year tests found a loss (Fisher's protected LSD); every " +
        "contrast with the N + K2O placed with the seed; and the caution rules tested on the seed-placed treatments. " +
        'Reproduce a pooled value in R with `rma(yi = md, sei = se, method = "REML", test = "knha")` on /api/v1/responses?measure=stand&placement=in-furrow ' +
        "after combining each site-year's treatments. Local recommendations and licensed advisers have the last word.",
      query: seedSafetyQuery,
      responses: {
        200: { description: "The seed-safety evidence", content: { "application/json": { schema: seedSafetyResult } } },
        ...problemResponses(400, 404, 429),
      },
    },
    async ({ query }, _req, res) => {
      const result = await seedSafety(db, query);
      res.set("Cache-Control", "public, max-age=60");
      res.json(result);
    },
  );

  return router;
}
