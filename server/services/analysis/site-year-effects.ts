import type { EffectMeasure, YieldUnit } from "@/schemas/analysis";
import {
  combineWithinSiteYear,
  cropStandards,
  kilogramsPerHectarePerBushelPerAcre,
  logResponseRatioEffect,
  normalQuantile,
  sharedCheckCovariance,
  sharedCheckLogRatioCovariance,
  tQuantile,
  tTwoSidedP,
  type SiteYearEffect,
  type StandardCrop,
} from "@/stats";
import type { EstimationContrast } from "./load-contrasts";

/** One site-year (or one site-year × group level) as it enters a meta-analysis. */
export interface AnalysisUnit {
  key: string;
  siteYearId: number;
  contrasts: EstimationContrast[];
  group: string | null;
  yi: number;
  vi: number;
  df: number;
  /** Check mean in the reported units (bu/ac or kg/ha for yield, else the measure's unit). */
  checkMean: number;
}

export interface ExcludedContrast {
  contrast: EstimationContrast;
  reason: string;
}

/**
 * kg/ha → the requested units for one crop (bu/ac with the crop's own bushel weight). `null` units: a measure other
 * than yield, answered in its own unit as stored.
 */
function yieldFactor(crop: string, units: YieldUnit | null): number | null {
  if (units === null || units === "kg/ha") return 1;
  const standard = cropStandards[crop as StandardCrop];
  return standard ? 1 / kilogramsPerHectarePerBushelPerAcre(standard.poundsPerBushel) : null;
}

/** A contrast's effect in the requested scale, or why it cannot enter. */
function contrastEffect(row: EstimationContrast, effect: EffectMeasure, units: YieldUnit | null): SiteYearEffect | { reason: string } {
  if (!(Number.isFinite(row.seKgHa) && row.seKgHa > 0)) {
    return { reason: "No within-site-year error: the SE of the response is 0 or missing, so the site-year cannot be weighted." };
  }
  if (effect === "lnrr") {
    if (row.lnrr !== null && row.lnrrVar !== null && row.lnrrVar > 0) return { yi: row.lnrr, vi: row.lnrrVar };
    if (!(row.treatedMeanKgHa > 0 && row.checkMeanKgHa > 0)) return { reason: "No log response ratio: a mean is not positive." };
    // MSE/r from the balanced identity SE² = 2·MSE/r.
    return logResponseRatioEffect({
      treatmentMean: row.treatedMeanKgHa,
      checkMean: row.checkMeanKgHa,
      mse: (row.seKgHa ** 2 * row.replicates) / 2,
      replicates: row.replicates,
    });
  }
  const factor = yieldFactor(row.crop, units);
  if (factor === null) return { reason: `No standard bushel weight for the crop "${row.crop}"; ask for units=kg/ha.` };
  return { yi: row.mdKgHa * factor, vi: (row.seKgHa * factor) ** 2 };
}

/**
 * Several treatments of one site-year against its one check enter as one effect: their mean, with the variance from
 * the covariance MSE/r that the shared check induces (Borenstein et al. 2009, ch. 24). MSE/r is recovered as SE²/2,
 * exact for a balanced RCBD; for unbalanced site-years the smallest contrast's SE²/2 is used, a close approximation.
 */
function combineUnit(
  contrasts: EstimationContrast[],
  effects: SiteYearEffect[],
  effect: EffectMeasure,
  units: YieldUnit | null,
): SiteYearEffect {
  if (effects.length === 1) return effects[0]!;
  const sems = contrasts.map((c) => c.seKgHa ** 2 / 2);
  const first = contrasts[0]!;
  const checkVariance = Math.min(...sems);
  const off =
    effect === "lnrr"
      ? sharedCheckLogRatioCovariance(checkVariance * first.replicates, first.replicates, first.checkMeanKgHa)
      : sharedCheckCovariance(checkVariance * first.replicates, first.replicates) * (yieldFactor(first.crop, units) ?? 1) ** 2;
  const covariance = effects.map((a, i) => effects.map((_, j) => (i === j ? a.vi : off)));
  return combineWithinSiteYear(effects, covariance);
}

/** Group contrasts into analysis units by site-year (and group level), leaving out what cannot be computed. */
export function buildUnits(
  rows: EstimationContrast[],
  options: { effect: EffectMeasure; units: YieldUnit | null; levelOf?: (row: EstimationContrast) => string },
): { units: AnalysisUnit[]; excluded: ExcludedContrast[] } {
  const excluded: ExcludedContrast[] = [];
  // Keyed by site-year id alone when ungrouped: at 20,000 site-years string keys were a visible share of the time.
  const buckets = new Map<number | string, { contrasts: EstimationContrast[]; effects: SiteYearEffect[]; group: string | null }>();
  for (const row of rows) {
    const e = contrastEffect(row, options.effect, options.units);
    if ("reason" in e) {
      excluded.push({ contrast: row, reason: e.reason });
      continue;
    }
    const group = options.levelOf ? options.levelOf(row) : null;
    const key = group === null ? row.siteYearId : `${row.siteYearId}:${group}`;
    const bucket = buckets.get(key);
    if (bucket) {
      bucket.contrasts.push(row);
      bucket.effects.push(e);
    } else buckets.set(key, { contrasts: [row], effects: [e], group });
  }
  const units: AnalysisUnit[] = [];
  for (const [key, b] of buckets) {
    const first = b.contrasts[0]!;
    const combined = combineUnit(b.contrasts, b.effects, options.effect, options.units);
    let df = first.dfError;
    for (const c of b.contrasts) if (c.dfError < df) df = c.dfError;
    units.push({
      key: String(key),
      siteYearId: first.siteYearId,
      contrasts: b.contrasts,
      group: b.group,
      yi: combined.yi,
      vi: combined.vi,
      df,
      checkMean: first.checkMeanKgHa * (yieldFactor(first.crop, options.units) ?? 1),
    });
  }
  return { units, excluded };
}

const criticalByDf = new Map<number, number>();
/** t(0.975, df), or z(0.975) when df is unknown; site-years share a handful of error dfs, so each is computed once. */
function critical975(df: number): number {
  let value = criticalByDf.get(df);
  if (value === undefined) {
    value = df > 0 ? tQuantile(0.975, df) : normalQuantile(0.975);
    criticalByDf.set(df, value);
  }
  return value;
}

/** The site-year's own test of its (combined) contrast, with its error df; normal when df is unknown. */
export function ownTest(unit: Pick<AnalysisUnit, "yi" | "vi" | "df">) {
  const se = Math.sqrt(unit.vi);
  const critical = critical975(unit.df);
  const pValue = unit.df > 0 && se > 0 ? tTwoSidedP(unit.yi / se, unit.df) : null;
  return {
    se,
    ciLower: unit.yi - critical * se,
    ciUpper: unit.yi + critical * se,
    pValue,
    significant: pValue === null ? null : pValue < 0.05,
  };
}
