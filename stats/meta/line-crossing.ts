/**
 * Where a fitted meta-regression line b₀ + b₁x crosses a target response t, with its interval.
 *
 * The point is x̂ = (t − b₀)/b₁. The interval is the set of x at which the line's confidence band contains t, the
 * Fieller (1954) interval: (b₀ − t + b₁x)² ≤ c²(v₀₀ + 2v₀₁x + v₁₁x²), with c the band's critical value. It is a
 * bounded interval exactly when the slope differs from zero at the band's level (b₁² > c²v₁₁); otherwise the band
 * contains t over a whole ray or the whole line, and the crossing has no interval ("not estimable").
 * Pure arithmetic (no jStat), so the browser computes the break-even crossing at the grower's own prices.
 */

export interface LineCoefficients {
  intercept: number;
  slope: number;
  /** Covariance of (intercept, slope): [[v₀₀, v₀₁], [v₀₁, v₁₁]] (HKSJ-scaled under HKSJ). */
  covariance: readonly (readonly number[])[];
  /** Critical value of the band: t(0.975, k − 2) under HKSJ, z(0.975) under Wald. */
  critical: number;
}

export interface LineCrossing {
  target: number;
  /** x̂ = (target − b₀)/b₁; null when the slope is 0. */
  value: number | null;
  /** The Fieller interval where the confidence band crosses the target; null when it is not a bounded interval. */
  interval: { lower: number; upper: number } | null;
}

/**
 * The crossing of `target` by the line, with the interval where its confidence band crosses it.
 * @example
 * // BCG trials by absolute latitude (metadat dat.bcg); metafor 3.8-1 rma(yi, vi, mods = ~ ablat, test = "knha"):
 * // x̂ = 8.641, and predict()'s ci.lb and ci.ub equal 0 at −31.19 and 20.14
 * lineCrossing(line, 0) // { target: 0, value: 8.641…, interval: { lower: -31.19…, upper: 20.14… } }
 */
export function lineCrossing(line: LineCoefficients, target: number): LineCrossing {
  const { intercept, slope, covariance, critical } = line;
  const v00 = covariance[0]?.[0] ?? Number.NaN;
  const v01 = covariance[0]?.[1] ?? Number.NaN;
  const v11 = covariance[1]?.[1] ?? Number.NaN;
  const value = slope !== 0 && Number.isFinite(slope) ? (target - intercept) / slope : null;
  const c2 = critical * critical;
  const d = intercept - target;
  const a = slope * slope - c2 * v11;
  const b = 2 * (slope * d - c2 * v01);
  const c = d * d - c2 * v00;
  if (!(a > 0)) return { target, value, interval: null };
  const discriminant = b * b - 4 * a * c;
  if (!(discriminant >= 0)) return { target, value, interval: null };
  const root = Math.sqrt(discriminant);
  // The numerically stable pair of roots.
  const q = -0.5 * (b + Math.sign(b || 1) * root);
  const r1 = q / a;
  const r2 = q !== 0 ? c / q : r1;
  return { target, value, interval: { lower: Math.min(r1, r2), upper: Math.max(r1, r2) } };
}

/** The fitted value and its confidence band at x: b₀ + b₁x ± c·√(v₀₀ + 2v₀₁x + v₁₁x²). */
export function linePoint(line: LineCoefficients, x: number): { x: number; fitted: number; se: number; ciLower: number; ciUpper: number } {
  const { intercept, slope, covariance, critical } = line;
  const fitted = intercept + slope * x;
  const variance = (covariance[0]?.[0] ?? 0) + 2 * x * (covariance[0]?.[1] ?? 0) + x * x * (covariance[1]?.[1] ?? 0);
  const se = Math.sqrt(Math.max(0, variance));
  return { x, fitted, se, ciLower: fitted - critical * se, ciUpper: fitted + critical * se };
}
