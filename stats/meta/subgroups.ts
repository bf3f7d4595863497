/**
 * Subgroup analysis of site-year effects by a categorical moderator (soil-test class, placement…).
 *
 * Two views, as metafor users report them:
 * 1. A mixed-effects model with the moderator, one residual τ² shared by all levels:
 *    `rma(yi, vi, mods = ~ group)` (QM tests equality of the level means; QE is residual
 *    heterogeneity) and `rma(yi, vi, mods = ~ 0 + group)` for the per-level estimates.
 * 2. A separate meta-analysis within each level, then Q_between = Σ (est_j − est_w)²/se_j² with
 *    df = levels − 1 (the usual "test for subgroup differences"; Borenstein et al. 2009, ch. 19).
 */
import { chiSquareSurvival } from "@/stats/distributions";
import { metaAnalysis, type MetaAnalysisResult } from "@/stats/meta/meta-analysis";
import { metaRegression, type MetaRegressionResult } from "@/stats/meta/meta-regression";
import type { ConfidenceIntervalMethod, IterationControl, TauSquaredMethod } from "@/stats/meta/types";

export interface SubgroupInput {
  yi: readonly number[];
  vi: readonly number[];
  /** Level of the moderator for each site-year. */
  groups: readonly string[];
  /** Level order; the first is the reference of the `~ group` coefficients (default: sorted). */
  levels?: readonly string[];
  method?: TauSquaredMethod;
  ci?: ConfidenceIntervalMethod;
  level?: number;
  control?: IterationControl;
  /** Fit the model without the moderator for R² (default true); the live analysis has its own overall fit. */
  r2?: boolean;
}

export interface CommonTauSquaredSubgroups {
  /** `~ group`: intercept = reference level, `g<Level>` = level minus reference; QM tests all levels equal. */
  differences: MetaRegressionResult;
  /** `~ 0 + group`: one estimate per level (same τ²); its QM tests all level means = 0. */
  perLevel: MetaRegressionResult;
  /** R² (%) = max(0, 100(τ²_RE − τ²_ME)/τ²_RE), τ²_RE from the model without the moderator; null when not asked. */
  r2Percent: number | null;
}

export interface SeparateSubgroups {
  perLevel: Record<string, MetaAnalysisResult>;
  qBetween: { statistic: number; df: number; pValue: number };
}

export interface SubgroupResult {
  levels: string[];
  countPerLevel: Record<string, number>;
  commonTau2: CommonTauSquaredSubgroups;
  separate: SeparateSubgroups;
  notes: string[];
}

const naturalOrder = new Intl.Collator("en", { numeric: true }).compare;

/**
 * Mixed-effects model with a categorical moderator (common τ²), for `~ group` and `~ 0 + group`.
 * @example
 * // Michael et al. (2013); metafor 3.8-1: rma(yi, vi, mods = ~ included_critique, method = "DL")$QM
 * commonTauSquaredSubgroups({ yi, vi, groups, method: "DL", ci: "wald" }).differences.qm?.statistic // 0.79985613883568
 */
export function commonTauSquaredSubgroups(input: SubgroupInput): CommonTauSquaredSubgroups {
  const levels = input.levels ? [...input.levels] : [...new Set(input.groups)].sort(naturalOrder);
  const method = input.method ?? "REML";
  const options = { method, ci: input.ci ?? "hksj", level: input.level, control: input.control } as const;
  const differences = metaRegression({
    yi: input.yi,
    vi: input.vi,
    design: input.groups.map((group) => [1, ...levels.slice(1).map((level) => (group === level ? 1 : 0))]),
    coefficientNames: ["intrcpt", ...levels.slice(1).map((level) => `g${level}`)],
    ...options,
  });
  const perLevel = metaRegression({
    yi: input.yi,
    vi: input.vi,
    design: input.groups.map((group) => levels.map((level) => (group === level ? 1 : 0))),
    coefficientNames: levels,
    testedCoefficients: levels.map((_, index) => index),
    ...options,
    // Same column space as `~ group`, so the same residual τ² (metafor estimates it again and gets it to 1e-10).
    tau2Estimate: {
      tau2: differences.tau2,
      seTau2: differences.seTau2,
      converged: differences.converged,
      iterations: differences.iterations,
      message: null,
    },
  });
  let r2Percent: number | null = null;
  if (method !== "FE" && input.r2 !== false) {
    const overall = metaRegression({
      yi: input.yi,
      vi: input.vi,
      design: input.yi.map(() => [1]),
      coefficientNames: ["intrcpt"],
      ...options,
    });
    r2Percent = overall.tau2 > 0 ? Math.max(0, (100 * (overall.tau2 - differences.tau2)) / overall.tau2) : null;
  }
  return { differences, perLevel, r2Percent };
}

/**
 * A separate meta-analysis within each level (each with its own τ²), then Q_between over the level estimates.
 * @example
 * // Michael et al. (2013) by critique; metafor 3.8-1: rma(yi, vi, subset = g == level, method = "REML", test = "knha")
 * separateSubgroupFits({ yi, vi, groups, method: "REML", ci: "hksj" }).qBetween.statistic // 1.26083028007404
 */
export function separateSubgroupFits(input: SubgroupInput): SeparateSubgroups {
  const { yi, vi, groups } = input;
  const levels = input.levels ? [...input.levels] : [...new Set(groups)].sort(naturalOrder);
  const perLevel: Record<string, MetaAnalysisResult> = {};
  for (const level of levels) {
    const indices = groups.flatMap((group, index) => (group === level ? [index] : []));
    perLevel[level] = metaAnalysis({
      yi: indices.map((index) => yi[index] ?? Number.NaN),
      vi: indices.map((index) => vi[index] ?? Number.NaN),
      method: input.method ?? "REML",
      ci: input.ci ?? "hksj",
      level: input.level,
      control: input.control,
      heterogeneityInterval: false,
    });
  }
  const fits = levels.map((level) => perLevel[level] as MetaAnalysisResult);
  const weights = fits.map((fit) => 1 / (fit.se * fit.se));
  const totalWeight = weights.reduce((sum, w) => sum + w, 0);
  const pooled = fits.reduce((sum, fit, index) => sum + (weights[index] ?? 0) * fit.estimate, 0) / totalWeight;
  const statistic = fits.reduce((sum, fit, index) => sum + (weights[index] ?? 0) * (fit.estimate - pooled) ** 2, 0);
  const df = levels.length - 1;
  return { perLevel, qBetween: { statistic, df, pValue: chiSquareSurvival(statistic, df) } };
}

/**
 * Subgroup analysis: common-τ² moderator model plus separate fits per level with Q_between.
 * @example
 * // Curtis & Wang (1998) by functional group; metafor: rma(yi, vi, mods = ~ fungrp, method = "REML", test = "knha")
 * subgroupAnalysis({ yi, vi, groups: fungrp, method: "REML", ci: "hksj" }).commonTau2.differences.qm?.pValue // 0.933521492178781
 */
export function subgroupAnalysis(input: SubgroupInput): SubgroupResult {
  const { yi, groups } = input;
  if (groups.length !== yi.length) throw new RangeError(`subgroupAnalysis: ${groups.length} group labels for ${yi.length} site-years`);
  groups.forEach((group, index) => {
    if (typeof group !== "string" || group === "") throw new RangeError(`subgroupAnalysis: site-year ${index + 1} has no group`);
  });
  const levels = input.levels ? [...input.levels] : [...new Set(groups)].sort(naturalOrder);
  if (levels.length < 2) throw new RangeError("subgroupAnalysis: the moderator needs at least two levels");
  const notes: string[] = [];
  const countPerLevel: Record<string, number> = {};
  for (const level of levels) countPerLevel[level] = groups.filter((group) => group === level).length;
  for (const level of levels) {
    const count = countPerLevel[level] ?? 0;
    if (count === 0) throw new RangeError(`subgroupAnalysis: level "${level}" has no site-years`);
    if (count < 5) notes.push(`Level "${level}" has only ${count} site-year(s): its estimate and τ² are imprecise.`);
  }
  const commonTau2 = commonTauSquaredSubgroups({ ...input, levels });
  const separate = separateSubgroupFits({ ...input, levels });
  return {
    levels,
    countPerLevel,
    commonTau2,
    separate,
    notes,
  };
}
