import { and, asc, eq, isNotNull, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { plots, responses, siteYears, sites, treatments, versions } from "@/db/schema";
import type { ReviewFlagCode, ReviewSummary, SiteYearResult } from "@/schemas/review";
import { computeResponses } from "@/server/services/ingest/recompute-responses";
import { latestPublishedOf } from "@/server/services/latest-version";
import { testedNutrients } from "@/server/services/tested-nutrients";
import { rcbdAnova, studentizedResiduals } from "@/stats";
import { assertEditorOrReviewer, canComment, versionById, type User } from "./access";
import { commentCounts } from "./review-comments";

/**
 * The rules behind the review screen's flags. Each says what it looks at, its cut-off and where that comes from; a
 * flag asks the reviewer to look, it never blocks a version.
 */
const reviewRules: { code: ReviewFlagCode; title: string; rule: string; source: string }[] = [
  {
    code: "outlier-plot",
    title: "Outlying plot",
    rule: "A plot whose externally studentised residual t in its site-year's fit yield ~ block + treatment fails the Bonferroni outlier test: n · 2 · P(T > |t|) < 0.05, T on the error df − 1, n the plots.",
    source:
      "Cook & Weisberg (1982), Residuals and Influence in Regression, section 2.2.2 (R's rstudent); Weisberg (2005), Applied Linear Regression, 3rd ed., section 9.1.3 (the Bonferroni outlier test).",
  },
  {
    code: "unbalanced",
    title: "Unbalanced site-year",
    rule: "Not every treatment has the same number of plots in every block (missing plots): the ANOVA is the least-squares fit and the means are block-adjusted.",
    source: "Definition of a complete block design; Steel, Torrie & Dickey (1997), Principles and Procedures of Statistics, ch. 9.",
  },
  {
    code: "check-off",
    title: "Check unlike its neighbours",
    rule: "The check mean's modified z-score 0.6745·(x − median)/MAD against the checks of the version's other site-years of the same crop and year is beyond ±3.5 (needs 4 or more other site-years).",
    source: "Iglewicz & Hoaglin (1993), How to Detect and Handle Outliers (ASQC), the modified z-score and its 3.5 cut-off.",
  },
  {
    code: "response-implausible",
    title: "Implausible response",
    rule: "A treatment differs from its check by more than half the check mean, or a mean is zero or negative.",
    source: "Common practice, no source: starter and fertility responses are rarely above half the check's yield.",
  },
  {
    code: "high-cv",
    title: "Imprecise trial",
    rule: "The site-year's CV (100·√MSE / grand mean) is above 20 %.",
    source: "Common practice, no source: well-run yield trials usually have a CV of 5–15 %.",
  },
  {
    code: "no-responses",
    title: "No responses",
    rule: "No response could be computed for the site-year (no check, no plots with yields, no error df …); it does not enter the analysis.",
    source: "Plotbank's ingest (the reason is the one it gave).",
  },
];

const outlierAlpha = 0.05;
const modifiedZCutoff = 3.5;
const implausibleShare = 0.5;
const highCvPct = 20;

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = Math.floor(s.length / 2);
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
};

/** The modified z-score of x against others (Iglewicz & Hoaglin 1993); null with fewer than 4 others or MAD 0. */
function modifiedZScore(x: number, others: number[]): number | null {
  if (others.length < 4) return null;
  const med = median(others);
  const mad = median(others.map((o) => Math.abs(o - med)));
  return mad > 0 ? (0.6745 * (x - med)) / mad : null;
}

function groupBy<T, K>(items: T[], key: (item: T) => K): Map<K, T[]> {
  const out = new Map<K, T[]>();
  for (const item of items) {
    const k = key(item);
    const list = out.get(k);
    if (list) list.push(item);
    else out.set(k, [item]);
  }
  return out;
}

const kg = (v: number) => `${Math.round(v).toLocaleString("en-US")} kg/ha`;

interface Plot {
  siteYearId: number;
  plot: string;
  block: number;
  treatment: string;
  y: number;
}

/** The site-year's own ANOVA from its plots, and its outlying plots. */
function plotAnalysis(list: Plot[]) {
  try {
    const anova = rcbdAnova(list.map((p) => ({ block: String(p.block), treatment: p.treatment, y: p.y })));
    const fit = studentizedResiduals({
      response: list.map((p) => p.y),
      factors: { block: { values: list.map((p) => String(p.block)) }, treatment: { values: list.map((p) => p.treatment) } },
      terms: [["block"], ["treatment"]],
    });
    const outliers = list.flatMap((p, i) => {
      const r = fit.external[i];
      const pValue = fit.bonferroniP[i];
      return r != null && pValue != null && pValue < outlierAlpha ? [{ plot: p, r, pValue }] : [];
    });
    return { f: anova.treatment.fStatistic, dfTreatment: anova.treatment.df, dfError: anova.error.df, outliers };
  } catch {
    return null;
  }
}

/**
 * What a reviewer reads before approving: every site-year with its responses, its own ANOVA (F, p, LSD, CV) and the
 * flags of `reviewRules`, paged; and the latest published version the diff compares against.
 */
export async function reviewSummary(
  db: Db,
  user: User | undefined,
  versionId: string,
  { page, limit, flagged }: { page: number; limit: number; flagged?: "true" | "false" },
): Promise<ReviewSummary> {
  const { version, dataset } = await versionById(db, versionId);
  await assertEditorOrReviewer(db, user, dataset);
  const [all, resp, plotRows, published, comments] = await Promise.all([
    db
      .select({ id: siteYears.id, code: siteYears.code, site: sites.code, crop: siteYears.crop, year: siteYears.year })
      .from(siteYears)
      .innerJoin(sites, eq(sites.id, siteYears.siteId))
      .where(eq(siteYears.versionId, versionId))
      .orderBy(sql`${siteYears.code} COLLATE "C"`),
    db
      .select({
        siteYearId: responses.siteYearId,
        treatment: responses.treatmentCode,
        checkMeanKgHa: responses.checkMeanKgHa,
        treatedMeanKgHa: responses.treatedMeanKgHa,
        mdKgHa: responses.mdKgHa,
        seKgHa: responses.seKgHa,
        dfError: responses.dfError,
        pValue: responses.pValue,
        lsd05KgHa: responses.lsd05KgHa,
        cvPct: responses.cvPct,
        replicates: responses.replicates,
        balanced: responses.balanced,
        fromSummary: responses.fromSummary,
        placements: responses.placements,
        testedNutrientsStated: responses.testedNutrientsStated,
        nLbAc: responses.nLbAc,
        p2o5LbAc: responses.p2o5LbAc,
        k2oLbAc: responses.k2oLbAc,
        sLbAc: responses.sLbAc,
      })
      .from(responses)
      // The reviewer's table is of yield responses; other measures are read on the Evidence screen's draft preview.
      .where(and(eq(responses.versionId, versionId), eq(responses.measure, "yield")))
      .orderBy(sql`${responses.treatmentCode} COLLATE "C"`),
    db
      .select({ siteYearId: plots.siteYearId, plot: plots.plot, block: plots.block, treatment: treatments.code, y: plots.yieldKgHa })
      .from(plots)
      .innerJoin(treatments, eq(treatments.id, plots.treatmentId))
      .where(and(eq(plots.versionId, versionId), isNotNull(plots.yieldKgHa)))
      .orderBy(asc(plots.id)),
    db
      .select()
      .from(versions)
      .where(and(eq(versions.datasetId, dataset.id), eq(versions.state, "published"))),
    commentCounts(db, versionId),
  ]);
  const responsesOf = groupBy(resp, (r) => r.siteYearId);
  const plotsOf = groupBy(plotRows as Plot[], (p) => p.siteYearId);
  const missing = all.filter((s) => !responsesOf.has(s.id));
  const reasons = new Map<string, string>();
  if (missing.length) {
    const computed = await computeResponses(db, versionId, { siteYearCodes: missing.map((m) => m.code) });
    for (const u of computed.uncomputed) reasons.set(u.siteYear, u.reason);
  }
  // The check mean of each site-year, for the comparison with its crop-and-year neighbours.
  const checkOf = new Map(all.flatMap((s) => (responsesOf.get(s.id)?.[0] ? [[s.id, responsesOf.get(s.id)![0]!.checkMeanKgHa]] : [])));

  const results: SiteYearResult[] = all.map((s) => {
    const rs = responsesOf.get(s.id) ?? [];
    const ps = plotsOf.get(s.id) ?? [];
    const first = rs[0];
    const fromPlots = first && !first.fromSummary && ps.length ? plotAnalysis(ps) : null;
    const flags: SiteYearResult["flags"] = [];
    for (const o of fromPlots?.outliers ?? [])
      flags.push({
        code: "outlier-plot",
        message: `Plot ${o.plot.plot} (block ${o.plot.block}, ${o.plot.treatment}, ${kg(o.plot.y)}): studentised residual ${o.r.toFixed(1)}, Bonferroni p ${o.pValue < 0.001 ? "< 0.001" : o.pValue.toFixed(3)}`,
      });
    if (first && !first.balanced)
      flags.push({ code: "unbalanced", message: "Unbalanced: some treatment lacks a plot in some block (least-squares fit)." });
    if (first) {
      const neighbours = all.filter((o) => o.id !== s.id && o.crop === s.crop && o.year === s.year && checkOf.has(o.id));
      const z = modifiedZScore(
        first.checkMeanKgHa,
        neighbours.map((o) => checkOf.get(o.id)!),
      );
      if (z !== null && Math.abs(z) > modifiedZCutoff)
        flags.push({
          code: "check-off",
          message: `Check mean ${kg(first.checkMeanKgHa)} against a median of ${kg(median(neighbours.map((o) => checkOf.get(o.id)!)))} over ${neighbours.length} other ${s.crop} site-years of ${s.year} (modified z ${z.toFixed(1)})`,
        });
      for (const r of rs) {
        if (r.checkMeanKgHa <= 0 || r.treatedMeanKgHa <= 0 || Math.abs(r.mdKgHa) > implausibleShare * r.checkMeanKgHa)
          flags.push({
            code: "response-implausible",
            message: `${r.treatment}: ${r.mdKgHa >= 0 ? "+" : "−"}${kg(Math.abs(r.mdKgHa))} over a check of ${kg(r.checkMeanKgHa)}`,
          });
      }
      if (first.cvPct !== null && first.cvPct > highCvPct)
        flags.push({ code: "high-cv", message: `CV ${first.cvPct.toFixed(1)} % (above ${highCvPct} %)` });
    } else {
      flags.push({ code: "no-responses", message: reasons.get(s.code) ?? "No response could be computed." });
    }
    return {
      siteYear: s.code,
      site: s.site,
      crop: s.crop,
      year: s.year,
      plots: ps.length,
      fromSummary: first?.fromSummary ?? false,
      balanced: first?.balanced ?? null,
      replicates: first?.replicates ?? null,
      anova: first
        ? {
            f: fromPlots?.f ?? null,
            dfTreatment: fromPlots?.dfTreatment ?? null,
            dfError: first.dfError,
            pValue: first.pValue,
            lsd05KgHa: first.lsd05KgHa,
            cvPct: first.cvPct,
          }
        : null,
      responses: rs.map((r) => ({
        treatment: r.treatment,
        checkMeanKgHa: r.checkMeanKgHa,
        treatedMeanKgHa: r.treatedMeanKgHa,
        mdKgHa: r.mdKgHa,
        seKgHa: r.seKgHa,
      })),
      uncomputedReason: first ? null : (reasons.get(s.code) ?? "No response could be computed."),
      flags,
      comments: comments.get(s.code) ?? 0,
    };
  });
  const shown = flagged === "true" ? results.filter((r) => r.flags.length) : results;
  const latest = latestPublishedOf(published.filter((p) => p.id !== version.id)) ?? null;
  return {
    version: { id: version.id, semver: version.semver, state: version.state },
    comparedTo: latest ? { id: latest.id, semver: latest.semver, state: latest.state } : null,
    page,
    limit,
    total: shown.length,
    flaggedSiteYears: results.filter((r) => r.flags.length).length,
    siteYears: shown.slice((page - 1) * limit, page * limit),
    rules: reviewRules,
    placements: [...new Set(resp.flatMap((r) => r.placements))].sort(),
    nutrients: [...new Set(resp.flatMap((r) => testedNutrients(r)))].sort(),
    canComment: canComment(user, version),
  };
}
