/**
 * Decision numbers for a grower: break-even response and the chance a new site-year pays.
 *
 * These summarise the trials in the analysis; a field can differ, seed-placed fertilizer can
 * injure a stand, and local recommendations and licensed advisers have the last word.
 */
// The tails come from their jStat-free home: the browser computes these numbers at the grower's own prices.
import { normalCdf, tCdf } from "@/stats/tail-probabilities";

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
 * The random-effects predictive distribution of a new site-year's response: centred at the estimate μ̂ with scale
 * √(τ̂² + SE²), Student t with `df` degrees of freedom, or normal when `df` is null.
 */
export interface PredictiveDistribution {
  estimate: number;
  se: number;
  tau2: number;
  df: number | null;
}

/**
 * Predictive probability that a new site-year's response exceeds x: 1 − T_df((x − μ̂)/√(τ̂² + SE²)), or with Φ when
 * df is null. Null when the distribution has no spread (τ² = 0 and SE = 0). Reference: Higgins, Thompson &
 * Spiegelhalter (2009), J R Stat Soc A 172:137–159; metafor's `predict()` uses the same scale for its interval.
 * @example predictiveProbabilityAbove({ estimate: 8, se: 1, tau2: 8, df: 10 }, 5) // ≈ 0.8296 (R: 1 - pt(-1, 10))
 */
export function predictiveProbabilityAbove(distribution: PredictiveDistribution, x: number): number | null {
  const { estimate, se, tau2, df } = distribution;
  const spread = Math.sqrt(tau2 + se * se);
  if (!(spread > 0)) return null;
  const z = (x - estimate) / spread;
  return 1 - (df === null ? normalCdf(z) : tCdf(z, df));
}

/**
 * Probability that the response on a new site-year exceeds x, from the random-effects model.
 *
 * P(θ_new > x) ≈ 1 − T_{k−2}((x − μ̂)/√(τ̂² + SE²)), the predictive distribution behind the
 * Higgins–Thompson–Spiegelhalter (2009, J R Stat Soc A 172:137–159) prediction interval.
 * Needs k ≥ 3; otherwise the probability is null and the note says why.
 * @example probabilityNewResponseAbove({ x: 5, estimate: 8, se: 1, tau2: 8, k: 12 }).probability // ≈ 0.8296 (R: 1 - pt(-1, 10))
 */
export function probabilityNewResponseAbove(input: { x: number; estimate: number; se: number; tau2: number; k: number }): {
  probability: number | null;
  note: string | null;
} {
  const { x, estimate, se, tau2, k } = input;
  if (k < 3) return { probability: null, note: `Needs at least 3 site-years for a t(k − 2) predictive distribution; k = ${k}.` };
  const probability = predictiveProbabilityAbove({ estimate, se, tau2, df: k - 2 }, x);
  if (probability === null) return { probability: null, note: "No spread (τ² = 0 and SE = 0): the predictive distribution is degenerate." };
  return { probability, note: k < 5 ? `Only ${k} site-years: this probability is imprecise.` : null };
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
  return {
    share: tested.length > 0 ? significant / tested.length : null,
    significant,
    tested: tested.length,
    untested: pValues.length - tested.length,
  };
}

/**
 * Share of responses above x, by binary search in responses sorted ascending (the API sends them so).
 * @example shareAbove([-1, 2, 6, 8], 5) // 0.5
 */
export function shareAbove(sortedResponses: readonly number[], x: number): number {
  const k = sortedResponses.length;
  if (k === 0) throw new RangeError("shareAbove: no site-year responses");
  let low = 0;
  let high = k;
  while (low < high) {
    const middle = (low + high) >> 1;
    if (sortedResponses[middle]! > x) high = middle;
    else low = middle + 1;
  }
  return (k - low) / k;
}

/** A grower's prices: grain price $/bu, product and application cost $/ac. */
export interface GrowerPrices {
  price?: number;
  productCost?: number;
  applicationCost?: number;
}

/**
 * The decision numbers at a grower's prices, from what an analysis answer carries: B = (product + application cost)
 * ÷ price, converted to the response's units; the predictive chance that a new site-year beats B; and the share of
 * the observed site-years that did. Pure, so the Evidence screen computes them on the device and the prices are
 * never sent. Null where an input is missing (no price, no predictive distribution, no observed responses).
 * @example pricedDecision({ price: 4.8, productCost: 18, applicationCost: 6 }, { unitsPerBushel: 1, predictive: { estimate: 8, se: 1, tau2: 8, df: 10 }, observedResponses: [-1, 2, 6, 8] })
 * // { costPerAcre: 24, pricePerBushel: 4.8, breakEven: 5, probabilityAboveBreakEven: ≈ 0.8296, shareAboveBreakEven: 0.5 }
 */
export function pricedDecision(
  prices: GrowerPrices,
  analysis: { unitsPerBushel: number | null; predictive: PredictiveDistribution | null; observedResponses: readonly number[] | null },
): {
  costPerAcre: number | null;
  pricePerBushel: number | null;
  breakEven: number | null;
  probabilityAboveBreakEven: number | null;
  shareAboveBreakEven: number | null;
} {
  const price = prices.price !== undefined && prices.price > 0 ? prices.price : null;
  const anyCost = prices.productCost !== undefined || prices.applicationCost !== undefined;
  const costPerAcre = anyCost ? (prices.productCost ?? 0) + (prices.applicationCost ?? 0) : null;
  const breakEven =
    price !== null && costPerAcre !== null && analysis.unitsPerBushel !== null
      ? breakEvenResponse(costPerAcre, price) * analysis.unitsPerBushel
      : null;
  return {
    costPerAcre,
    pricePerBushel: price,
    breakEven,
    probabilityAboveBreakEven:
      breakEven !== null && analysis.predictive ? predictiveProbabilityAbove(analysis.predictive, breakEven) : null,
    shareAboveBreakEven:
      breakEven !== null && analysis.observedResponses?.length ? shareAbove(analysis.observedResponses, breakEven) : null,
  };
}
