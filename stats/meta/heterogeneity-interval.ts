/**
 * Q-profile confidence intervals for τ², τ, I² and H² (Viechtbauer 2007, Stat Med 26:37–52).
 *
 * The bounds are the τ² at which the generalised Q, y'P(τ²)y, equals the upper and lower
 * χ²(k − p) quantiles; I² and H² bounds follow from the τ² bounds with the typical within-study
 * variance. Matches metafor's `confint(rma(...))` for the heterogeneity parameters.
 */
import { chiSquareQuantile } from "@/stats/distributions";
import { defaultIterationControl, solveGeneralisedQ } from "@/stats/meta/tau-squared";
import type { IterationControl } from "@/stats/meta/types";

export interface IntervalWithEstimate {
  estimate: number;
  lower: number;
  upper: number;
}

export interface HeterogeneityInterval {
  tau2: IntervalWithEstimate;
  tau: IntervalWithEstimate;
  i2Percent: IntervalWithEstimate;
  h2: IntervalWithEstimate;
  converged: boolean;
}

/**
 * Q-profile interval for the heterogeneity of an intercept-only or moderator model.
 * @example
 * // Normand (1999), metafor 3.8-1: confint(rma(yi, vi, method = "REML"))
 * qProfileHeterogeneityInterval(yi, vi, design, 684.646, 7.11633819100102).tau2.lower // 292.918121653344
 */
export function qProfileHeterogeneityInterval(
  yi: readonly number[],
  vi: readonly number[],
  design: readonly (readonly number[])[],
  tau2: number,
  typicalWithinVariance: number,
  level = 0.95,
  control: IterationControl = {},
): HeterogeneityInterval | null {
  const residualDf = yi.length - (design[0]?.length ?? 0);
  if (residualDf <= 0) return null;
  const fullControl = { ...defaultIterationControl, ...control };
  const alpha = 1 - level;
  const lowerBound = solveGeneralisedQ(yi, vi, design, chiSquareQuantile(1 - alpha / 2, residualDf), fullControl);
  const upperBound = solveGeneralisedQ(yi, vi, design, chiSquareQuantile(alpha / 2, residualDf), fullControl);
  const toI2 = (value: number) => (100 * value) / (value + typicalWithinVariance);
  const toH2 = (value: number) => 1 + value / typicalWithinVariance;
  return {
    tau2: { estimate: tau2, lower: lowerBound.tau2, upper: upperBound.tau2 },
    tau: { estimate: Math.sqrt(tau2), lower: Math.sqrt(lowerBound.tau2), upper: Math.sqrt(upperBound.tau2) },
    i2Percent: { estimate: toI2(tau2), lower: toI2(lowerBound.tau2), upper: toI2(upperBound.tau2) },
    h2: { estimate: toH2(tau2), lower: toH2(lowerBound.tau2), upper: toH2(upperBound.tau2) },
    converged: lowerBound.converged && upperBound.converged,
  };
}
