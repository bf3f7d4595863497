/**
 * Effect of a treatment against the check within one site-year, with its sampling variance.
 *
 * The meta-analysis takes one effect per site-year per treatment group. When several treatments
 * of one site-year share its check and enter one pooled estimate (e.g. "any P source"), their
 * contrasts are correlated (covariance MSE/r through the shared check), so they are first
 * combined within the site-year by `combineWithinSiteYear`, which uses that covariance; the
 * combined effect then enters the meta-analysis as a single site-year.
 */
import type { RcbdAnovaResult } from "@/stats/rcbd-anova";

export interface SiteYearEffect {
  /** Effect: mean difference (treatment − check) or ln(treatment/check). */
  yi: number;
  /** Its sampling variance. */
  vi: number;
}

export interface SiteYearSummary {
  treatmentMean: number;
  checkMean: number;
  /** Error mean square of the site-year ANOVA (or a pooled SD squared). */
  mse: number;
  /** Replicates per mean. */
  replicates: number;
}

function assertSummary(summary: SiteYearSummary, name: string): void {
  for (const field of ["treatmentMean", "checkMean", "mse", "replicates"] as const) {
    if (!Number.isFinite(summary[field])) throw new RangeError(`${name}: field "${field}" is not a finite number`);
  }
  if (!(summary.mse >= 0)) throw new RangeError(`${name}: field "mse" must be >= 0`);
  if (!(summary.replicates > 0)) throw new RangeError(`${name}: field "replicates" must be > 0`);
}

/**
 * Mean difference (yield response) of a treatment over the check, balanced RCBD.
 *
 * yi = mean_t − mean_c; vi = 2·MSE/r (the squared SED). Reference: Steel, Torrie & Dickey (1997) §8.4.
 * @example meanDifferenceEffect({ treatmentMean: 57.68, checkMean: 52.07, mse: 20.2228431372549, replicates: 12 })
 * // { yi: 5.61, vi: 3.3704738562 }
 */
export function meanDifferenceEffect(summary: SiteYearSummary): SiteYearEffect {
  assertSummary(summary, "meanDifferenceEffect");
  return { yi: summary.treatmentMean - summary.checkMean, vi: (2 * summary.mse) / summary.replicates };
}

/**
 * Log response ratio ln(mean_t/mean_c) with its delta-method variance.
 *
 * vi = (MSE/r)·(1/mean_t² + 1/mean_c²). Reference: Hedges, Gurevitch & Curtis (1999) Ecology
 * 80:1150–1156, eq. 3 (with a common MSE for both means).
 * @example logResponseRatioEffect({ treatmentMean: 60, checkMean: 50, mse: 16, replicates: 4 })
 * // { yi: 0.1823215567939546, vi: 0.0027111111111111113 }
 */
export function logResponseRatioEffect(summary: SiteYearSummary): SiteYearEffect {
  assertSummary(summary, "logResponseRatioEffect");
  if (!(summary.treatmentMean > 0 && summary.checkMean > 0)) {
    throw new RangeError("logResponseRatioEffect: both means must be > 0 for a log response ratio");
  }
  const sem2 = summary.mse / summary.replicates;
  return {
    yi: Math.log(summary.treatmentMean / summary.checkMean),
    vi: sem2 * (1 / summary.treatmentMean ** 2 + 1 / summary.checkMean ** 2),
  };
}

/**
 * Covariance of two mean-difference contrasts that share the same check: MSE/r (the check mean's variance).
 * @example sharedCheckCovariance(16, 4) // 4
 */
export function sharedCheckCovariance(mse: number, replicates: number): number {
  return mse / replicates;
}

/**
 * Covariance of two log response ratios sharing the check: (MSE/r)/mean_c² (delta method).
 * @example sharedCheckLogRatioCovariance(16, 4, 50) // 0.0016
 */
export function sharedCheckLogRatioCovariance(mse: number, replicates: number, checkMean: number): number {
  return mse / replicates / (checkMean * checkMean);
}

/**
 * Treatment-vs-check contrasts from an RCBD ANOVA, balanced or not, with their covariance matrix.
 *
 * Uses the least-squares (block-adjusted) means and their covariance from the fitted model, so
 * missing plots give the right contrast variances; balanced, vi reduces to 2·MSE/r and the
 * covariance to MSE/r. Reference: Searle (1971) Linear Models, ch. 7; R `emmeans::contrast(..., "trt.vs.ctrl")`.
 * @example treatmentVersusCheckContrasts(rcbdAnova(plots), "check").effects[0]?.vi
 */
export function treatmentVersusCheckContrasts(
  anova: RcbdAnovaResult,
  check: string,
): { treatments: string[]; effects: SiteYearEffect[]; covariance: number[][] } {
  const checkIndex = anova.treatments.indexOf(check);
  if (checkIndex < 0) throw new RangeError(`treatmentVersusCheckContrasts: check "${check}" is not a treatment of this site-year`);
  const covariance = anova.adjustedMeanCovariance;
  if (!covariance) throw new RangeError("treatmentVersusCheckContrasts: the ANOVA has no error df, so contrasts have no variance");
  const others = anova.treatments.flatMap((treatment, index) => (index === checkIndex ? [] : [{ treatment, index }]));
  const v = (i: number, j: number) => covariance[i]?.[j] ?? Number.NaN;
  const checkMean = anova.treatmentMeans[checkIndex]?.adjustedMean ?? Number.NaN;
  const effects = others.map(({ index }) => ({
    yi: (anova.treatmentMeans[index]?.adjustedMean ?? Number.NaN) - checkMean,
    vi: v(index, index) + v(checkIndex, checkIndex) - 2 * v(index, checkIndex),
  }));
  const contrastCovariance = others.map(({ index: a }) =>
    others.map(({ index: b }) => v(a, b) - v(a, checkIndex) - v(checkIndex, b) + v(checkIndex, checkIndex)),
  );
  return { treatments: others.map(({ treatment }) => treatment), effects, covariance: contrastCovariance };
}

/**
 * Combines m correlated contrasts of one site-year into one effect: their mean, with
 * var = (1/m²)·Σᵢⱼ Cov(i, j).
 *
 * Reference: Borenstein, Hedges, Higgins & Rothstein (2009) Introduction to Meta-Analysis, ch. 24
 * (multiple comparisons within a study).
 * @example combineWithinSiteYear([{ yi: 4, vi: 8 }, { yi: 6, vi: 8 }], [[8, 4], [4, 8]]) // { yi: 5, vi: 6 }
 */
export function combineWithinSiteYear(effects: readonly SiteYearEffect[], covariance: readonly (readonly number[])[]): SiteYearEffect {
  const m = effects.length;
  if (m === 0) throw new RangeError("combineWithinSiteYear: no contrasts to combine");
  if (covariance.length !== m || covariance.some((row) => row.length !== m)) {
    throw new RangeError(`combineWithinSiteYear: covariance must be ${m}×${m}`);
  }
  effects.forEach((effect, index) => {
    if (Math.abs((covariance[index]?.[index] ?? Number.NaN) - effect.vi) > 1e-12 * Math.max(1, Math.abs(effect.vi))) {
      throw new RangeError(`combineWithinSiteYear: covariance[${index}][${index}] differs from effect ${index + 1}'s vi`);
    }
  });
  let total = 0;
  for (const row of covariance) for (const value of row) total += value;
  return { yi: effects.reduce((sum, effect) => sum + effect.yi, 0) / m, vi: total / (m * m) };
}
