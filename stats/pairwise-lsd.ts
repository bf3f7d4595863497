/**
 * Fisher's least significant difference for every pair of treatments of one site-year, from the least-squares
 * means' covariance: the one way to give an LSD when plots are missing, where it differs from pair to pair.
 */
import { tQuantile } from "@/stats/distributions";
import type { RcbdAnovaResult } from "@/stats/rcbd-anova";

/** One pair of treatments: b − a of their least-squares means, the SE of that difference and its LSD. */
export interface PairwiseLsd {
  a: string;
  b: string;
  /** LS-mean of b minus LS-mean of a. */
  difference: number;
  /** SE of the difference, √(v_a + v_b − 2·c_ab). */
  standardError: number;
  /** t(1 − α/2, df_error) · SE. */
  lsd: number;
  /** |difference| > LSD: the pair differs at level α (Fisher's LSD; read it after a significant treatment F). */
  differs: boolean;
}

/**
 * Pairwise least significant differences from the covariance of a site-year's least-squares means.
 *
 * For treatments i < j (in `anova.treatments` order): LSD_ij = t(1 − α/2, df_e)·√(V_ii + V_jj − 2·V_ij), with V the
 * covariance of the adjusted means (already × MSE). Balanced, every pair has the textbook LSD t·√(2·MSE/r).
 * Reference: Searle (1971) Linear Models, ch. 7 (estimable contrasts); Steel, Torrie & Dickey (1997) §8.4;
 * R `emmeans::pairs(emmeans(lm(y ~ block + trt), "trt"), adjust = "none")` gives the same SEs.
 * Returns null when the ANOVA has no error df (no covariance).
 * @example
 * // npk (Yates 1935), treatment = N×P, plot 10 deleted: N0P0 vs N1P1
 * pairwiseLeastSignificantDifferences(rcbdAnova(plots))?.[2] // { a: "N0P0", b: "N1P1", difference: 6.1, standardError: 2.6056…, lsd: 5.5885…, differs: true }
 */
export function pairwiseLeastSignificantDifferences(anova: RcbdAnovaResult, alpha = 0.05): PairwiseLsd[] | null {
  if (!(alpha > 0 && alpha < 1)) throw new RangeError(`pairwiseLeastSignificantDifferences: alpha must be in (0, 1), got ${alpha}`);
  const covariance = anova.adjustedMeanCovariance;
  if (!covariance || !(anova.error.df > 0)) return null;
  const t = tQuantile(1 - alpha / 2, anova.error.df);
  const v = (i: number, j: number) => covariance[i]?.[j] ?? Number.NaN;
  const pairs: PairwiseLsd[] = [];
  for (let i = 0; i < anova.treatments.length; i++) {
    for (let j = i + 1; j < anova.treatments.length; j++) {
      // Round-off can leave a tiny negative variance for an exact fit; it is zero.
      const standardError = Math.sqrt(Math.max(0, v(i, i) + v(j, j) - 2 * v(i, j)));
      const difference = (anova.treatmentMeans[j]?.adjustedMean ?? Number.NaN) - (anova.treatmentMeans[i]?.adjustedMean ?? Number.NaN);
      const lsd = t * standardError;
      pairs.push({ a: anova.treatments[i]!, b: anova.treatments[j]!, difference, standardError, lsd, differs: Math.abs(difference) > lsd });
    }
  }
  return pairs;
}
