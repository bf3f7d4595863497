/**
 * Distribution functions for the statistics engine: Student t, F, chi-square and standard normal.
 *
 * This is the only module that touches jStat. jStat supplies starting values for the quantiles;
 * the probabilities themselves come from the double-precision special functions in
 * `special-functions.ts`, and every quantile is refined by Newton steps on those, so each value
 * agrees with a 50-digit reference (mpmath) to about 1e-13 relative
 * (see tests/stats/distributions.test.ts and tests/fixtures/reference/distribution_check_values.json).
 */
import jstat from "jstat";
import { logBeta, logGamma, regularizedIncompleteBeta, regularizedIncompleteGamma } from "@/stats/special-functions";
import { normalUpperTail, tUpperTail } from "@/stats/tail-probabilities";

// The t and normal tails need no jStat, so they live apart and the Evidence screen can bundle them alone.
export { normalCdf, tCdf, tUpperTail } from "@/stats/tail-probabilities";

function assertProbability(p: number, name: string): void {
  if (!(p > 0 && p < 1)) throw new RangeError(`${name}: probability must be in (0, 1), got ${p}`);
}

function assertDegreesOfFreedom(df: number, name: string): void {
  if (!(df > 0) || !Number.isFinite(df)) throw new RangeError(`${name}: degrees of freedom must be > 0, got ${df}`);
}

/**
 * Newton refinement of a quantile, solving upperTail(x) = q (or lowerTail(x) = p) with the density.
 * Works on the smaller tail so the residual keeps its relative accuracy; falls back to bisection
 * steps when a Newton step leaves the bracket.
 */
function refineQuantile(
  start: number,
  target: number,
  tail: (x: number) => number,
  density: (x: number) => number,
  sign: 1 | -1,
  lowerBound: number,
): number {
  let x = Number.isFinite(start) && start > lowerBound ? start : lowerBound + 1;
  let low = lowerBound;
  let high = Number.POSITIVE_INFINITY;
  for (let iteration = 0; iteration < 100; iteration++) {
    const residual = tail(x) - target;
    // sign = +1: tail increases with x (lower tail); sign = -1: tail decreases (upper tail).
    if (residual * sign > 0) high = Math.min(high, x);
    else low = Math.max(low, x);
    const slope = sign * density(x);
    let next = slope !== 0 ? x - residual / slope : Number.NaN;
    if (!(next > low && next < high)) next = Number.isFinite(high) ? (low + high) / 2 : Math.max(2 * x, low + 1);
    if (Math.abs(next - x) <= 1e-15 * Math.abs(x) || next === x) return next;
    x = next;
  }
  return x;
}

/**
 * Student t density f(x; ν).
 * @example tDensity(0, 1) // 0.3183098861837907 (= 1/π)
 */
export function tDensity(x: number, df: number): number {
  return Math.exp(logGamma((df + 1) / 2) - logGamma(df / 2) - 0.5 * Math.log(df * Math.PI) - ((df + 1) / 2) * Math.log1p((x * x) / df));
}

/**
 * Two-sided p-value of a t statistic, 2·P(T >= |x|).
 *
 * Computed directly from the incomplete beta function, so p-values of 1e-20 keep full relative accuracy.
 * @example tTwoSidedP(2, 5) // 0.10193947882985836 (R: 2*pt(-2, 5))
 */
export function tTwoSidedP(x: number, df: number): number {
  assertDegreesOfFreedom(df, "tTwoSidedP");
  if (x === 0) return 1;
  const squared = x * x;
  return regularizedIncompleteBeta(df / (df + squared), squared / (df + squared), df / 2, 0.5).lower;
}

/**
 * Quantile of Student's t distribution: the x with P(T <= x) = p.
 *
 * jStat's `studentt.inv` gives the start; Newton steps on the smaller tail finish it.
 * Reference: R `qt(p, df)`.
 * @example tQuantile(0.975, 15) // 2.131449545559775 (R: qt(0.975, 15))
 */
export function tQuantile(p: number, df: number): number {
  assertProbability(p, "tQuantile");
  assertDegreesOfFreedom(df, "tQuantile");
  if (p === 0.5) return 0;
  if (p < 0.5) return -tQuantile(1 - p, df);
  const start = jstat.studentt.inv(p, df);
  return refineQuantile(
    start,
    1 - p,
    (x) => tUpperTail(x, df),
    (x) => tDensity(x, df),
    -1,
    0,
  );
}

/** F density f(x; d1, d2). @example fDensity(1, 2, 2) // 0.25 */
export function fDensity(x: number, df1: number, df2: number): number {
  if (x <= 0) return 0;
  const logDensity =
    (df1 / 2) * Math.log(df1 / df2) +
    (df1 / 2 - 1) * Math.log(x) -
    ((df1 + df2) / 2) * Math.log1p((df1 * x) / df2) -
    logBeta(df1 / 2, df2 / 2);
  return Math.exp(logDensity);
}

/**
 * Survival function of the F distribution, P(F >= x), as used for ANOVA p-values.
 *
 * P(F >= x) = I_{d2/(d2 + d1 x)}(d2/2, d1/2) (Abramowitz & Stegun 26.6.2). R `pf(x, df1, df2, lower.tail = FALSE)`.
 * @example fSurvival(11.8209917, 1, 15) // 0.003659638288975557
 */
export function fSurvival(x: number, df1: number, df2: number): number {
  assertDegreesOfFreedom(df1, "fSurvival");
  assertDegreesOfFreedom(df2, "fSurvival");
  if (x <= 0) return 1;
  if (x === Number.POSITIVE_INFINITY) return 0;
  const denominator = df2 + df1 * x;
  return regularizedIncompleteBeta(df2 / denominator, (df1 * x) / denominator, df2 / 2, df1 / 2).lower;
}

/**
 * Cumulative distribution function of the F distribution, P(F <= x). R `pf(x, df1, df2)`.
 * @example fCdf(2.5, 2, 6) // 0.8377160030052592
 */
export function fCdf(x: number, df1: number, df2: number): number {
  assertDegreesOfFreedom(df1, "fCdf");
  assertDegreesOfFreedom(df2, "fCdf");
  if (x <= 0) return 0;
  const denominator = df2 + df1 * x;
  return regularizedIncompleteBeta(df2 / denominator, (df1 * x) / denominator, df2 / 2, df1 / 2).upper;
}

/**
 * Quantile of the F distribution. R `qf(p, df1, df2)`.
 * @example fQuantile(0.95, 1, 15) // 4.543077123...
 */
export function fQuantile(p: number, df1: number, df2: number): number {
  assertProbability(p, "fQuantile");
  assertDegreesOfFreedom(df1, "fQuantile");
  assertDegreesOfFreedom(df2, "fQuantile");
  const start = jstat.centralF.inv(p, df1, df2);
  const density = (x: number) => fDensity(x, df1, df2);
  if (p > 0.5) return refineQuantile(start, 1 - p, (x) => fSurvival(x, df1, df2), density, -1, 0);
  return refineQuantile(start, p, (x) => fCdf(x, df1, df2), density, 1, 0);
}

/** Chi-square density. @example chiSquareDensity(2, 2) // 0.18393972058572117 */
export function chiSquareDensity(x: number, df: number): number {
  if (x <= 0) return 0;
  const half = df / 2;
  return Math.exp((half - 1) * Math.log(x) - x / 2 - half * Math.LN2 - logGamma(half));
}

/**
 * Survival function of the chi-square distribution, P(X >= x): the p-value of Cochran's Q and of QM.
 *
 * Q(ν/2, x/2) by continued fraction keeps tiny tails accurate. R `pchisq(x, df, lower.tail = FALSE)`.
 * @example chiSquareSurvival(238.915811, 8) // 3.8418090269345235e-47
 */
export function chiSquareSurvival(x: number, df: number): number {
  assertDegreesOfFreedom(df, "chiSquareSurvival");
  return regularizedIncompleteGamma(df / 2, x / 2).upper;
}

/** Chi-square cdf P(X <= x). R `pchisq(x, df)`. @example chiSquareCdf(2, 2) // 0.6321205588285577 */
export function chiSquareCdf(x: number, df: number): number {
  assertDegreesOfFreedom(df, "chiSquareCdf");
  return regularizedIncompleteGamma(df / 2, x / 2).lower;
}

/**
 * Quantile of the chi-square distribution. R `qchisq(p, df)`.
 * @example chiSquareQuantile(0.95, 1) // 3.8414588206941245
 */
export function chiSquareQuantile(p: number, df: number): number {
  assertProbability(p, "chiSquareQuantile");
  assertDegreesOfFreedom(df, "chiSquareQuantile");
  const start = jstat.chisquare.inv(p, df);
  const density = (x: number) => chiSquareDensity(x, df);
  if (p > 0.5) return refineQuantile(start, 1 - p, (x) => chiSquareSurvival(x, df), density, -1, 0);
  return refineQuantile(start, p, (x) => chiSquareCdf(x, df), density, 1, 0);
}

/** Standard normal density φ(x). @example normalDensity(0) // 0.3989422804014327 */
export function normalDensity(x: number): number {
  return Math.exp(-0.5 * x * x) / Math.sqrt(2 * Math.PI);
}

/**
 * Two-sided normal p-value 2·P(Z >= |x|), used by Wald (z) tests. R `2*pnorm(-abs(x))`.
 * @example normalTwoSidedP(1.96) // 0.04999579029644087
 */
export function normalTwoSidedP(x: number): number {
  return 2 * normalUpperTail(Math.abs(x));
}

/**
 * Standard normal quantile Φ⁻¹(p). R `qnorm(p)`.
 * @example normalQuantile(0.975) // 1.959963984540054
 */
export function normalQuantile(p: number): number {
  assertProbability(p, "normalQuantile");
  if (p === 0.5) return 0;
  if (p < 0.5) return -normalQuantile(1 - p);
  const start = jstat.normal.inv(p, 0, 1);
  return refineQuantile(start, 1 - p, normalUpperTail, normalDensity, -1, 0);
}
