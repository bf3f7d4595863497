import { inArray, sql } from "drizzle-orm";
import { breakEvenWhat, describeCrossing, describeSlope } from "@/components/evidence/moderator-words";
import type { Db } from "@/db/client";
import { soilTests } from "@/db/schema";
import type { MetaQuery } from "@/schemas/analysis";
import type { TrialFilters } from "@/schemas/filters";
import type { HeterogeneityIntervalShape, Moderator, ModeratorRegressionShape, SeparateSubgroupsShape } from "@/schemas/meta-regression";
import { HttpProblem } from "@/server/errors";
import { criticalLevelCaution } from "@/server/services/cautions";
import { filterNutrientsOf } from "@/server/services/tested-nutrients";
import {
  continuousModeratorRegression,
  separateSubgroupFits,
  type CoefficientEstimate,
  type HeterogeneityInterval,
  type MetaAnalysisResult,
  qProfileHeterogeneityInterval,
} from "@/stats";
import { contrastTestedNutrients, relevantSoilTest } from "./grouping";
import type { Contrast, EstimationContrast, ResolvedVersion } from "./load-contrasts";
import type { AnalysisUnit } from "./site-year-effects";

/** A soil test's scale: its unit and extractant, by analyte and then by site-year id. */
export type SoilScales = Map<string, Map<number, { unit: string; extractant: string | null }>>;

/**
 * The units and extractants of the P, K and S soil tests of the versions read, one row per analyte × unit × extractant
 * with its site-year ids: at 20,000 site-years on one scale that is one short row rather than 20,000, and no join
 * with the filtered responses (a site-year the filters leave out is simply never looked up).
 */
export async function readSoilScales(db: Db, versionIds: string[]): Promise<SoilScales> {
  const scales: SoilScales = new Map();
  if (versionIds.length === 0) return scales;
  const result =
    await db.execute(sql`SELECT ${soilTests.analyte} AS analyte, ${soilTests.unit} AS unit, ${soilTests.extractant} AS extractant,
      json_agg(${soilTests.siteYearId} ORDER BY ${soilTests.id})::text AS ids
    FROM ${soilTests}
    WHERE ${inArray(soilTests.versionId, versionIds)} AND ${inArray(soilTests.analyte, ["P", "K", "S"])}
    GROUP BY 1, 2, 3
    ORDER BY min(${soilTests.id})`);
  const groups = (result as unknown as { rows: { analyte: string; unit: string; extractant: string | null; ids: string }[] }).rows;
  for (const { analyte, unit, extractant, ids } of groups) {
    const scale = { unit, extractant };
    const bySiteYear = scales.get(analyte) ?? new Map<number, { unit: string; extractant: string | null }>();
    scales.set(analyte, bySiteYear);
    for (const id of JSON.parse(ids) as number[]) bySiteYear.set(id, scale);
  }
  return scales;
}

/** The rate column of each tested nutrient, in label units. */
const rateOf: Record<string, { column: "nLbAc" | "p2o5LbAc" | "k2oLbAc" | "sLbAc"; label: string }> = {
  N: { column: "nLbAc", label: "N" },
  P: { column: "p2o5LbAc", label: "P2O5" },
  K: { column: "k2oLbAc", label: "K2O" },
  S: { column: "sLbAc", label: "S" },
};

/** Day of the year, 1 January = 1, of a YYYY-MM-DD date. */
function dayOfYear(date: string): number {
  const [y, m, d] = date.slice(0, 10).split("-").map(Number) as [number, number, number];
  return Math.round((Date.UTC(y, m - 1, d) - Date.UTC(y, 0, 1)) / 86_400_000) + 1;
}

/** One site-year's moderator value and the scale it is on, or why it has none. */
type Reading = { value: number; scale: Scale } | { value: null; reason: string };
interface Scale {
  key: string;
  /** The scale in words, for a refusal: "Bray-P1 (ppm)", "corn", "P". */
  words: string;
  label: string;
  unit: string;
  analyte: string | null;
  extractant: string | null;
  nutrient: string | null;
}

function readModerator(unit: AnalysisUnit, moderator: Moderator, filters: TrialFilters, units: string, scales: SoilScales): Reading {
  const first = unit.contrasts[0]!;
  switch (moderator) {
    case "soilTestValue": {
      const soil = relevantSoilTest(first, filters);
      if (!soil.analyte) return { value: null, reason: "tests no soil-tested nutrient (P, K, S)" };
      if (soil.value === null || !Number.isFinite(soil.value)) return { value: null, reason: `no ${soil.analyte} soil-test value` };
      const scale = scales.get(soil.analyte)?.get(unit.siteYearId);
      const extractant = scale?.extractant ?? null;
      const u = scale?.unit ?? "unit not recorded";
      const by = extractant ?? "extractant not recorded";
      return {
        value: soil.value,
        scale: {
          key: `${soil.analyte}|${u}|${extractant ?? ""}`,
          words: `${by} (${u})`,
          label: `Soil-test ${soil.analyte} (${by}, ${u})`,
          unit: u,
          analyte: soil.analyte,
          extractant,
          nutrient: null,
        },
      };
    }
    case "checkYield":
      return {
        value: unit.checkMean,
        scale: {
          key: first.crop,
          words: first.crop,
          label: `Check yield (${units})`,
          unit: units,
          analyte: null,
          extractant: null,
          nutrient: null,
        },
      };
    case "plantingDayOfYear":
      if (!first.plantingDate) return { value: null, reason: "no planting date" };
      return {
        value: dayOfYear(first.plantingDate),
        scale: {
          key: "day",
          words: "day of year",
          label: "Planting day of year",
          unit: "day of year",
          analyte: null,
          extractant: null,
          nutrient: null,
        },
      };
    case "rate": {
      const filterNutrients = filterNutrientsOf(filters);
      const nutrientsOf = (c: EstimationContrast) => {
        const tested = contrastTestedNutrients(c);
        const narrowed = tested.filter((n) => filterNutrients.includes(n));
        return (narrowed.length ? narrowed : tested).join(" + ");
      };
      const named = [...new Set(unit.contrasts.map(nutrientsOf))];
      const nutrient = named.length === 1 && named[0] && rateOf[named[0]] ? named[0] : null;
      if (!nutrient) {
        const words = named.join("; ") || "no tested nutrient";
        return {
          value: 0,
          scale: { key: `mixed:${words}`, words, label: "", unit: "", analyte: null, extractant: null, nutrient: null },
        };
      }
      const { column, label } = rateOf[nutrient]!;
      // Several treatments of one site-year enter as their mean response, so at their mean rate (the line is linear).
      const value = unit.contrasts.reduce((s, c) => s + (c[column] ?? 0), 0) / unit.contrasts.length;
      return {
        value,
        scale: {
          key: nutrient,
          words: nutrient,
          label: `${label} rate (lb/ac)`,
          unit: `lb/ac ${label}`,
          analyte: null,
          extractant: null,
          nutrient,
        },
      };
    }
  }
}

/** Why several scales cannot share one line, and what to filter on. */
function mixedScalesProblem(moderator: Moderator, counts: { scale: Scale; count: number; datasets: Set<string> }[]): HttpProblem {
  const sorted = [...counts].sort((a, b) => b.count - a.count);
  const list = (parts: string[]) => (parts.length > 1 ? `${parts.slice(0, -1).join(", ")} and ${parts.at(-1)}` : (parts[0] ?? ""));
  const at = (c: (typeof sorted)[number], i: number) => `${c.scale.words} at ${c.count}${i === 0 ? " site-years" : ""}`;
  const where = sorted.map((c) => `${c.scale.words}: ${[...c.datasets].sort().slice(0, 3).join(", ")}`).join("; ");
  let detail: string;
  const analytes = new Set(sorted.map((c) => c.scale.analyte));
  if (moderator === "soilTestValue" && analytes.size > 1) {
    detail = `The soil test that counts is ${list(sorted.map((c, i) => `${c.scale.analyte} by ${c.scale.words}${i === 0 ? ` at ${c.count} site-years` : ` at ${c.count}`}`))}; filter to one nutrient with nutrient=.`;
  } else if (moderator === "soilTestValue") {
    detail = `${sorted[0]!.scale.analyte} soil tests use ${list(sorted.map(at))}; filter to one extractant and unit (by dataset: ${where}).`;
  } else if (moderator === "checkYield") {
    detail = `Check yields of several crops are not one yield scale: ${list(sorted.map(at))}; filter to one crop with crop=.`;
  } else {
    detail = `Rates of different nutrients are not one scale: the treatments test ${list(sorted.map(at))}; filter to treatments that test one nutrient with nutrient=.`;
  }
  return new HttpProblem(422, "Unprocessable content", detail, {
    errors: [{ field: "query.moderator", value: moderator, message: detail }],
  });
}

function coefficientOut(c: CoefficientEstimate, df: number | null) {
  return { estimate: c.estimate, se: c.se, statistic: c.statistic, df, pValue: c.pValue, ciLower: c.ciLower, ciUpper: c.ciUpper };
}

export function intervalOut(h: HeterogeneityInterval, level = 0.95): HeterogeneityIntervalShape {
  return { method: "Q-profile", level, tau2: h.tau2, tau: h.tau, i2Percent: h.i2Percent, h2: h.h2, converged: h.converged };
}

const excludedListed = 50;

/**
 * The meta-regression of the site-years' responses on one continuous moderator: one scale or a 422, site-years
 * without a value left out and counted, the line with its band, and for the soil test its critical level.
 */
export async function moderatorBlock(input: {
  units: AnalysisUnit[];
  moderator: Moderator;
  filters: TrialFilters;
  options: Pick<MetaQuery, "method" | "ci" | "include">;
  unitLabel: string;
  breakEven: number | null;
  slugOf: (row: EstimationContrast) => string;
  versionOf: Map<string, ResolvedVersion>;
  soilScales: () => Promise<SoilScales>;
  /** τ² of the pooled fit on all `units` (same method), reused for R² when no site-year is left out of the line. */
  pooledTau2: number | null;
  labelsOf: (rows: EstimationContrast[]) => Promise<Map<number, Contrast>>;
}): Promise<ModeratorRegressionShape> {
  const { units, moderator, filters, options, unitLabel } = input;
  const scales = moderator === "soilTestValue" ? await input.soilScales() : new Map();
  const readings = units.map((u) => readModerator(u, moderator, filters, unitLabel, scales));
  const byScale = new Map<string, { scale: Scale; count: number; datasets: Set<string> }>();
  const excluded: { unit: AnalysisUnit; reason: string }[] = [];
  const yi: number[] = [];
  const vi: number[] = [];
  const x: number[] = [];
  readings.forEach((r, i) => {
    const unit = units[i]!;
    if (r.value === null) {
      excluded.push({ unit, reason: r.reason });
      return;
    }
    const entry = byScale.get(r.scale.key) ?? { scale: r.scale, count: 0, datasets: new Set<string>() };
    entry.count++;
    entry.datasets.add(input.slugOf(unit.contrasts[0]!));
    byScale.set(r.scale.key, entry);
    yi.push(unit.yi);
    vi.push(unit.vi);
    x.push(r.value);
  });
  const present = [...byScale.values()];
  if (present.length > 1 || present.some((p) => p.scale.key.startsWith("mixed:"))) throw mixedScalesProblem(moderator, present);
  const scale: Scale | null = present[0]?.scale ?? null;

  const listed = excluded.slice(0, excludedListed);
  const labels = listed.length ? await input.labelsOf(listed.map((e) => e.unit.contrasts[0]!)) : new Map<number, Contrast>();
  const excludedOut = {
    count: excluded.length,
    siteYears: listed.map(({ unit, reason }) => {
      const first = unit.contrasts[0]!;
      const version = input.versionOf.get(first.versionId);
      return {
        siteYearCode: labels.get(first.id)?.siteYearCode ?? "",
        dataset: version?.datasetSlug ?? "",
        version: version?.semver ?? "",
        reason,
      };
    }),
  };
  const notes: string[] = [];
  if (excluded.length)
    notes.push(`${excluded.length} of ${units.length} site-years have no ${moderatorNoun(moderator)} and are left out of the line.`);
  if (moderator === "rate" && units.some((u) => u.contrasts.length > 1))
    notes.push(
      "A site-year with several matching treatments enters once, at the mean rate of its treatments (its response is their mean).",
    );

  const base = {
    moderator,
    label: scale?.label ?? defaultLabel(moderator, unitLabel),
    unit: scale?.unit ?? defaultUnit(moderator, unitLabel),
    analyte: scale?.analyte ?? null,
    extractant: scale?.extractant ?? null,
    nutrient: scale?.nutrient ?? null,
    k: x.length,
    range: x.length ? { min: Math.min(...x), max: Math.max(...x) } : null,
    excluded: excludedOut,
  };
  const distinct = new Set(x).size;
  if (x.length < 3 || distinct < 2) {
    const why =
      x.length < 3
        ? `A line needs at least 3 site-years with a ${moderatorNoun(moderator)}; ${x.length} have one.`
        : `Every site-year has the same ${moderatorNoun(moderator)}: there is no line to fit.`;
    return { ...base, fit: null, criticalLevel: null, plainWords: why, notes: [...notes, why] };
  }

  const intervals = options.include?.includes("heterogeneityIntervals") ?? false;
  const result = continuousModeratorRegression({
    yi,
    vi,
    x,
    method: options.method,
    ci: options.ci,
    heterogeneityInterval: intervals,
    ...(excluded.length === 0 && input.pooledTau2 !== null ? { tau2WithoutModerator: input.pooledTau2 } : {}),
  });
  const { fit, line } = result;
  for (const n of fit.notes) if (!notes.includes(n)) notes.push(n);
  const df = fit.ci === "hksj" ? fit.residualDf : null;
  const slope = coefficientOut(fit.coefficients[1]!, df);
  const unit = scale!.unit;
  const fitOut = {
    model: `rma(yi, vi, mods = ~ x, method = "${options.method}"${fit.ci === "hksj" ? ', test = "knha"' : ""})`,
    intercept: coefficientOut(fit.coefficients[0]!, df),
    slope,
    covariance: fit.covariance.map((row) => [...row]),
    critical: line.critical,
    r2Percent: result.r2Percent,
    tau2: fit.tau2,
    tau: fit.tau,
    i2Percent: fit.i2Percent,
    residualHeterogeneity: { qe: fit.qe.statistic, df: fit.qe.df, pValue: fit.qe.pValue },
    line: result.grid,
    ...(intervals && result.heterogeneityInterval ? { heterogeneityInterval: intervalOut(result.heterogeneityInterval) } : {}),
  };
  const range = result.range;
  const criticalLevel =
    moderator === "soilTestValue"
      ? {
          zero: describeCrossing(line, 0, { what: "zero", unit, range }),
          breakEven:
            input.breakEven === null
              ? null
              : describeCrossing(line, input.breakEven, { what: breakEvenWhat(input.breakEven, unitLabel), unit, range }),
          caution: criticalLevelCaution,
        }
      : null;
  const noun = moderator === "soilTestValue" ? `soil-test ${scale!.analyte}` : `the ${moderatorNoun(moderator)}`;
  const plainWords = describeSlope({ slope, r2Percent: result.r2Percent, k: x.length, units: unitLabel, noun, unit });
  return { ...base, fit: fitOut, criticalLevel, plainWords, notes };
}

function moderatorNoun(moderator: Moderator): string {
  return { soilTestValue: "soil-test value", checkYield: "check yield", plantingDayOfYear: "planting date", rate: "rate" }[moderator];
}
function defaultLabel(moderator: Moderator, units: string): string {
  return {
    soilTestValue: "Soil-test value",
    checkYield: `Check yield (${units})`,
    plantingDayOfYear: "Planting day of year",
    rate: "Rate (lb/ac)",
  }[moderator];
}
function defaultUnit(moderator: Moderator, units: string): string {
  return { soilTestValue: "as reported", checkYield: units, plantingDayOfYear: "day of year", rate: "lb/ac" }[moderator];
}

/** The site-year effects of grouped units as the subgroup fits take them. */
export function subgroupInputOf(units: AnalysisUnit[], levels: string[], options: Pick<MetaQuery, "method" | "ci">) {
  return {
    yi: units.map((u) => u.yi),
    vi: units.map((u) => u.vi),
    groups: units.map((u) => u.group ?? ""),
    levels,
    method: options.method,
    ci: options.ci,
  };
}

/** subgroupTau2=separate: each level fitted on its own, with its own τ², and Q_between over the level means. */
export function separateBlock(
  units: AnalysisUnit[],
  levels: string[],
  options: Pick<MetaQuery, "method" | "ci" | "include">,
  describeTest: (t: { statistic: number; df: number; df2: null; distribution: "chi-square"; pValue: number }) => string,
): SeparateSubgroupsShape {
  const intervals = options.include?.includes("heterogeneityIntervals") ?? false;
  const model = `Each level fitted on its own, with its own between-site-year variance τ² (${options.method}, ${options.ci === "hksj" ? "HKSJ t(k − 1)" : "Wald z"}); Q_between compares the level means.`;
  if (levels.length === 0) return { model, levels: [], betweenGroupTest: null };
  const separate = separateSubgroupFits(subgroupInputOf(units, levels, options));
  const levelOut = (level: string, f: MetaAnalysisResult) => {
    const yi = units.filter((u) => u.group === level);
    const h =
      intervals && options.method !== "FE" && f.k >= 2 && f.typicalWithinVariance !== null
        ? qProfileHeterogeneityInterval(
            yi.map((u) => u.yi),
            yi.map((u) => u.vi),
            yi.map(() => [1]),
            f.tau2,
            f.typicalWithinVariance,
          )
        : null;
    return {
      level,
      k: f.k,
      estimate: f.estimate,
      se: f.se,
      ciLower: f.ciLower,
      ciUpper: f.ciUpper,
      pValue: f.pValue,
      df: f.df,
      tau2: f.tau2,
      tau: f.tau,
      i2Percent: f.i2Percent,
      q: { statistic: f.q.statistic, df: f.q.df, pValue: f.q.pValue },
      ...(intervals ? { heterogeneityInterval: h ? intervalOut(h) : null } : {}),
    };
  };
  const q = separate.qBetween;
  const test =
    levels.length > 1 ? { statistic: q.statistic, df: q.df, df2: null, distribution: "chi-square" as const, pValue: q.pValue } : null;
  return {
    model,
    levels: levels.map((l) => levelOut(l, separate.perLevel[l]!)),
    betweenGroupTest: test
      ? {
          statistic: test.statistic,
          df: test.df,
          distribution: test.distribution,
          pValue: test.pValue,
          text: describeTest(test).replace("Between-group test", "Between-group test (separate τ²)"),
        }
      : null,
  };
}
