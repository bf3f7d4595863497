/**
 * Mean-separation numbers of an ANOVA: standard errors, Fisher's LSD and the coefficient of variation.
 */
import { tQuantile } from "@/stats/distributions";

export interface MeanSeparation {
  mse: number;
  dfError: number;
  /** Observations behind each mean. */
  replicates: number;
  rootMse: number;
  /** Standard error of a mean, √(MSE/r). */
  sem: number;
  /** Standard error of a difference of two means, √(2·MSE/r). */
  sed: number;
  /** t(1 − α/2, df_error) for α = 0.05 and 0.10. */
  tCritical: { alpha05: number; alpha10: number };
  /** Fisher's protected LSD t(1 − α/2, df_error)·√(2·MSE/r) for α = 0.05 and 0.10. */
  lsd: { alpha05: number; alpha10: number };
  grandMean: number;
  /** 100·√MSE / grand mean. */
  cvPercent: number;
}

/**
 * Fisher's least significant difference at level alpha.
 *
 * LSD = t(1 − α/2, df_e)·√(2·MSE/r). Reference: Steel, Torrie & Dickey (1997) Principles and
 * Procedures of Statistics, 3rd ed., §8.4; R `qt(1 - alpha/2, df) * sqrt(2 * MSE / r)`.
 * @example leastSignificantDifference(16.0123333333333, 15, 12, 0.05) // 3.48198377196367 (npk, aov(yield ~ block + N + P + K))
 */
export function leastSignificantDifference(mse: number, dfError: number, replicates: number, alpha: number): number {
  if (!(dfError > 0)) throw new RangeError(`leastSignificantDifference: error df must be > 0, got ${dfError}`);
  return tQuantile(1 - alpha / 2, dfError) * Math.sqrt((2 * mse) / replicates);
}

/**
 * Coefficient of variation of an experiment, 100·√MSE / grand mean (%).
 * @example coefficientOfVariationPercent(16.0123333333333, 54.875) // 7.29210272380702
 */
export function coefficientOfVariationPercent(mse: number, grandMean: number): number {
  return (100 * Math.sqrt(mse)) / grandMean;
}

/**
 * All mean-separation numbers for means of r observations: SEM, SED, LSD(0.05), LSD(0.10), CV%.
 * @example meanSeparation({ mse: 20.2228431372549, dfError: 17, replicates: 12, grandMean: 54.875 }).lsd.alpha05 // 3.87337884277776
 */
export function meanSeparation(input: { mse: number; dfError: number; replicates: number; grandMean: number }): MeanSeparation {
  const { mse, dfError, replicates, grandMean } = input;
  const sed = Math.sqrt((2 * mse) / replicates);
  const tCritical = { alpha05: tQuantile(0.975, dfError), alpha10: tQuantile(0.95, dfError) };
  return {
    mse,
    dfError,
    replicates,
    rootMse: Math.sqrt(mse),
    sem: Math.sqrt(mse / replicates),
    sed,
    tCritical,
    lsd: { alpha05: tCritical.alpha05 * sed, alpha10: tCritical.alpha10 * sed },
    grandMean,
    cvPercent: coefficientOfVariationPercent(mse, grandMean),
  };
}
