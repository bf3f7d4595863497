/**
 * Meta-regression on one continuous moderator, y = b₀ + b₁x (metafor `rma(yi, vi, mods = ~ x)`), with what a reader
 * needs beside the coefficients: R² against the model without the moderator, the fitted line with its confidence band
 * and prediction interval at a grid of x (metafor `predict(res, newmods = x)`), and optionally the Q-profile interval
 * of the residual τ² and I² (metafor `confint(res)`).
 */
import { normalQuantile, tQuantile } from "@/stats/distributions";
import { qProfileHeterogeneityInterval, type HeterogeneityInterval } from "@/stats/meta/heterogeneity-interval";
import { linePoint, type LineCoefficients } from "@/stats/meta/line-crossing";
import { metaRegression, type MetaRegressionResult } from "@/stats/meta/meta-regression";
import { estimateTauSquared } from "@/stats/meta/tau-squared";
import type { ConfidenceIntervalMethod, IterationControl, TauSquaredMethod } from "@/stats/meta/types";

export interface ContinuousModeratorInput {
  yi: readonly number[];
  vi: readonly number[];
  x: readonly number[];
  method?: TauSquaredMethod;
  ci?: ConfidenceIntervalMethod;
  level?: number;
  control?: IterationControl;
  /** Points of the fitted line, evenly spaced from the smallest to the largest x (default 25). */
  gridSize?: number;
  /** Q-profile interval of the residual τ², τ, I², H² (default false). */
  heterogeneityInterval?: boolean;
  /**
   * τ² of the model without the moderator on these same effects, by the same method, when the caller has fitted it
   * already (the pooled estimate on the same site-years); it is then not fitted again.
   */
  tau2WithoutModerator?: number;
}

export interface FittedLinePoint {
  x: number;
  fitted: number;
  se: number;
  ciLower: number;
  ciUpper: number;
  /** metafor's prediction interval: fitted ± c·√(se² + τ²); null for FE. */
  piLower: number | null;
  piUpper: number | null;
}

export interface ContinuousModeratorResult {
  fit: MetaRegressionResult;
  line: LineCoefficients;
  /** R² (%) = max(0, 100(τ²₀ − τ²)/τ²₀), τ²₀ of the model without the moderator; null for FE or τ²₀ = 0. */
  r2Percent: number | null;
  tau2WithoutModerator: number | null;
  range: { min: number; max: number };
  grid: FittedLinePoint[];
  heterogeneityInterval: HeterogeneityInterval | null;
}

/**
 * Fits `~ x` and evaluates the line on a grid.
 * @example
 * // Curtis & Wang (1998) biomass ratios by days of exposure; metafor 3.8-1: rma(yi, vi, mods = ~ time, test = "knha")
 * continuousModeratorRegression({ yi, vi, x: time }).fit.coefficients[1].estimate // -6.45046271992477e-05
 */
export function continuousModeratorRegression(input: ContinuousModeratorInput): ContinuousModeratorResult {
  const { yi, vi, x } = input;
  if (x.length !== yi.length) throw new RangeError(`continuousModeratorRegression: ${x.length} moderator values for ${yi.length} effects`);
  x.forEach((value, index) => {
    if (!Number.isFinite(value)) throw new RangeError(`continuousModeratorRegression: moderator at row ${index + 1} is not finite`);
  });
  const method = input.method ?? "REML";
  const ci = input.ci ?? "hksj";
  const level = input.level ?? 0.95;
  const design = x.map((value) => [1, value]);
  const fit = metaRegression({ yi, vi, design, coefficientNames: ["intrcpt", "x"], method, ci, level, control: input.control });
  let tau2WithoutModerator: number | null = null;
  let r2Percent: number | null = null;
  if (method !== "FE") {
    tau2WithoutModerator =
      input.tau2WithoutModerator ??
      estimateTauSquared(
        yi,
        vi,
        yi.map(() => [1]),
        method,
        input.control,
      ).tau2;
    r2Percent = tau2WithoutModerator > 0 ? Math.max(0, (100 * (tau2WithoutModerator - fit.tau2)) / tau2WithoutModerator) : null;
  }
  const critical = fit.ci === "hksj" ? tQuantile(1 - (1 - level) / 2, fit.residualDf) : normalQuantile(1 - (1 - level) / 2);
  const line: LineCoefficients = {
    intercept: fit.coefficients[0]!.estimate,
    slope: fit.coefficients[1]!.estimate,
    covariance: fit.covariance,
    critical,
  };
  let min = Number.POSITIVE_INFINITY;
  let max = Number.NEGATIVE_INFINITY;
  for (const value of x) {
    if (value < min) min = value;
    if (value > max) max = value;
  }
  const size = Math.max(2, input.gridSize ?? 25);
  const grid = Array.from({ length: size }, (_, i) => {
    const at = i === size - 1 ? max : min + ((max - min) * i) / (size - 1);
    const point = linePoint(line, at);
    const spread = method === "FE" ? null : critical * Math.sqrt(point.se * point.se + fit.tau2);
    return {
      ...point,
      piLower: spread === null ? null : point.fitted - spread,
      piUpper: spread === null ? null : point.fitted + spread,
    };
  });
  const heterogeneityInterval =
    input.heterogeneityInterval && method !== "FE" && fit.typicalWithinVariance !== null
      ? qProfileHeterogeneityInterval(yi, vi, design, fit.tau2, fit.typicalWithinVariance, level, input.control)
      : null;
  return { fit, line, r2Percent, tau2WithoutModerator, range: { min, max }, grid, heterogeneityInterval };
}
