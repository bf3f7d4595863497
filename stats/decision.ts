/**
 * Decision numbers for a grower: break-even response and the chance a new site-year pays.
 *
 * These summarise the trials in the analysis; a field can differ, seed-placed fertilizer can
 * injure a stand, and local recommendations and licensed advisers have the last word.
 */
import { tCdf } from "@/stats/distributions";

/**
 * Break-even yield response B = (product + application cost, $/ac) ÷ (grain price, $/bu).
 * @example breakEvenResponse(24, 4.8) // 5 (bu/ac)
 */
export function breakEvenResponse(costPerAcre: number, pricePerBushel: number): number {
  if (!Number.isFinite(costPerAcre) || costPerAcre < 0) throw new RangeError(`breakEvenResponse: cost must be >= 0, got ${costPerAcre}`);
  if (!(pricePerBushel > 0)) throw new RangeError(`breakEvenResponse: price must be > 0, got ${pricePerBushel}`);
  return costPerAcre / pricePerBushel;
}

/**
 * Probability that the response on a new site-year exceeds x, from the random-effects model.
 *
 * P(θ_new > x) ≈ 1 − T_{k−2}((x − μ̂)/√(τ̂² + SE²)), the predictive distribution behind the
 * Higgins–Thompson–Spiegelhalter (2009, J R Stat Soc A 172:137–159) prediction interval.
 * Needs k ≥ 3; otherwise the probability is null and the note says why.
 * @example probabilityNewResponseAbove({ x: 5, estimate: 8, se: 1, tau2: 8, k: 12 }).probability // ≈ 0.8372
 */
export function probabilityNewResponseAbove(input: { x: number; estimate: number; se: number; tau2: number; k: number }): {
  probability: number | null;
  note: string | null;
} {
  const { x, estimate, se, tau2, k } = input;
  if (k < 3) return { probability: null, note: `Needs at least 3 site-years for a t(k − 2) predictive distribution; k = ${k}.` };
  const spread = Math.sqrt(tau2 + se * se);
  if (!(spread > 0)) return { probability: null, note: "No spread (τ² = 0 and SE = 0): the predictive distribution is degenerate." };
  return {
    probability: 1 - tCdf((x - estimate) / spread, k - 2),
    note: k < 5 ? `Only ${k} site-years: this probability is imprecise.` : null,
  };
}

/**
 * Shares of site-years whose observed response exceeds 0 and exceeds the break-even B.
 * @example empiricalShares([-1, 2, 6, 8], 5) // { aboveZero: 0.75, aboveBreakEven: 0.5, k: 4 }
 */
export function empiricalShares(responses: readonly number[], breakEven: number): { aboveZero: number; aboveBreakEven: number; k: number } {
  const k = responses.length;
  if (k === 0) throw new RangeError("empiricalShares: no site-year responses");
  return {
    aboveZero: responses.filter((value) => value > 0).length / k,
    aboveBreakEven: responses.filter((value) => value > breakEven).length / k,
    k,
  };
}

/**
 * Share of site-years whose own ANOVA found the treatment significant at alpha (p < alpha).
 * Site-years without a p-value (no error df) are left out of the denominator and counted.
 * @example shareSignificant([0.01, 0.2, 0.04, null], 0.05) // { share: 0.6666…, significant: 2, tested: 3, untested: 1 }
 */
export function shareSignificant(
  pValues: readonly (number | null)[],
  alpha = 0.05,
): { share: number | null; significant: number; tested: number; untested: number } {
  const tested = pValues.filter((value): value is number => value !== null && Number.isFinite(value));
  const significant = tested.filter((value) => value < alpha).length;
  return { share: tested.length > 0 ? significant / tested.length : null, significant, tested: tested.length, untested: pValues.length - tested.length };
}
