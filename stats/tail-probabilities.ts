/**
 * Tail probabilities of Student's t and the standard normal, from the double-precision special functions alone.
 *
 * They import no jStat, so the browser can compute the chance of a profitable response from the predictive
 * distribution the API returns without bundling a distribution library (the Evidence screen's first-screen budget).
 * `distributions.ts` re-exports them beside the quantiles; tests/stats/distributions.test.ts checks them against
 * the mpmath references of /work/shared/checks/distribution_check_values.json.
 */
import { regularizedIncompleteBeta, regularizedIncompleteGamma } from "@/stats/special-functions";

/** Upper tail P(T >= x) of Student t with df degrees of freedom. @example tUpperTail(1, 1) // 0.25 */
export function tUpperTail(x: number, df: number): number {
  if (!(df > 0) || !Number.isFinite(df)) throw new RangeError(`tUpperTail: degrees of freedom must be > 0, got ${df}`);
  if (x === 0) return 0.5;
  const squared = x * x;
  // P(|T| >= |x|) = I_{ν/(ν+x²)}(ν/2, 1/2); pass both arguments to avoid forming 1 − x.
  const { lower: twoSided } = regularizedIncompleteBeta(df / (df + squared), squared / (df + squared), df / 2, 0.5);
  return x > 0 ? twoSided / 2 : 1 - twoSided / 2;
}

/**
 * Cumulative distribution function of Student's t, P(T <= x).
 *
 * Reference: Abramowitz & Stegun (1964) 26.7.1 via the incomplete beta function; R `pt(x, df)`.
 * @example tCdf(1.5, 10) // 0.9177463367772799 (R: pt(1.5, 10))
 */
export function tCdf(x: number, df: number): number {
  return tUpperTail(-x, df);
}

/** Upper tail P(Z >= x) = ½·erfc(x/√2) = ½·Q(½, x²/2) for x >= 0. @example normalUpperTail(0) // 0.5 */
export function normalUpperTail(x: number): number {
  if (x < 0) return 1 - normalUpperTail(-x);
  return 0.5 * regularizedIncompleteGamma(0.5, (x * x) / 2).upper;
}

/**
 * Standard normal cumulative distribution function Φ(x). R `pnorm(x)`.
 * @example normalCdf(-1.96) // 0.024997895148220435
 */
export function normalCdf(x: number): number {
  return normalUpperTail(-x);
}
