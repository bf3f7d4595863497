import type { Router } from "express";
import { metaAnalysisResult, metaQuery } from "@/schemas/analysis";
import type { AppContext } from "@/server/context";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponses } from "@/server/openapi/registry";
import { cacheable, strongEtag } from "@/server/caching";
import { resolveVersions } from "@/server/services/trial-filter";
import { forestRowsCsv } from "@/server/services/analysis/forest-csv";
import { runMetaAnalysis } from "@/server/services/analysis/run-meta-analysis";

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
        "k = 0 is an answer (200), not an error. Results summarise these trials; a field can differ.",
      query: metaQuery,
      responses: {
        200: {
          description: "The analysis with its provenance",
          content: { "application/json": { schema: metaAnalysisResult }, "text/csv": { schema: { type: "string" } } },
        },
        304: { description: "Not modified: the copy named by If-None-Match is current (the same versions and query)" },
        ...problemResponses(400, 404, 429),
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

  return router;
}
