/**
 * Mixed-effects meta-regression: y_i = x_i'β + u_i + e_i, u_i ~ N(0, τ²), e_i ~ N(0, v_i).
 *
 * Weighted least squares with weights 1/(v_i + τ̂²) and a residual τ² from any estimator in
 * `tau-squared.ts`. A categorical moderator (soil-test class, placement) is a design matrix of
 * dummies; a continuous soil-test value is one more column. Reference: Viechtbauer (2010) J Stat
 * Softw 36(3) (metafor `rma(yi, vi, mods = ...)`); Knapp & Hartung (2003) Stat Med 22:2693–2710.
 */
import { chiSquareSurvival, fSurvival, normalQuantile, normalTwoSidedP, tQuantile, tTwoSidedP } from "@/stats/distributions";
import { estimateTauSquared, marginalWeights } from "@/stats/meta/tau-squared";
import type {
  CoefficientEstimate,
  ConfidenceIntervalMethod,
  IterationControl,
  TauSquaredEstimate,
  TauSquaredMethod,
} from "@/stats/meta/types";
import { invertSymmetricPositiveDefinite, weightedLeastSquares } from "@/stats/meta/weighted-least-squares";

export interface MetaRegressionInput {
  yi: readonly number[];
  vi: readonly number[];
  /** k rows × p columns. */
  design: readonly (readonly number[])[];
  coefficientNames: readonly string[];
  method?: TauSquaredMethod;
  ci?: ConfidenceIntervalMethod;
  /** Coefficients tested jointly by QM (indices); default: all but an "intrcpt" column. */
  testedCoefficients?: readonly number[];
  level?: number;
  control?: IterationControl;
  /**
   * A τ² already estimated for a model with the same column space (metafor's `tau2 =` argument): `~ 0 + group` has
   * the same residual τ² as `~ group`, so it is not estimated twice.
   */
  tau2Estimate?: TauSquaredEstimate;
}

export interface MetaRegressionResult {
  method: TauSquaredMethod;
  ci: ConfidenceIntervalMethod;
  k: number;
  p: number;
  /** k − p: the t df of HKSJ tests and the QE df. */
  residualDf: number;
  coefficients: CoefficientEstimate[];
  /** Covariance of the coefficients (HKSJ: scaled by s²). */
  covariance: number[][];
  tau2: number;
  tau: number;
  seTau2: number | null;
  /** Residual heterogeneity test QE = Σ (y − Xb_FE)²/v with df k − p. */
  qe: { statistic: number; df: number; pValue: number | null };
  /** Omnibus test of the tested coefficients: χ²(m) under Wald, F(m, k − p) under HKSJ. */
  qm: { statistic: number; df: number | [number, number]; pValue: number; distribution: "chi-square" | "F" } | null;
  /** Residual I² (%) and H² from τ̂² and the typical within-study variance (k − p)/tr(P). */
  i2Percent: number | null;
  h2: number | null;
  typicalWithinVariance: number | null;
  /** HKSJ scale factor s² = Σ w (y − Xb)²/(k − p), not truncated at 1; null under Wald. */
  knhaScale: number | null;
  /** RE weights 1/(v + τ²). */
  weights: number[];
  converged: boolean;
  iterations: number;
  notes: string[];
}

/**
 * Fits a meta-regression with a design matrix.
 *
 * @example
 * // Michael et al. (2013) by critique; metafor 3.8-1: rma(yi, vi, mods = ~ included_critique, method = "REML")
 * metaRegression({ yi, vi, design: [[1, 0], [1, 1], …], coefficientNames: ["intrcpt", "gNo_critique"], method: "REML" }).qm?.statistic
 * // 0.844164876045444
 */
export function metaRegression(input: MetaRegressionInput): MetaRegressionResult {
  const method = input.method ?? "REML";
  const ci = input.ci ?? "hksj";
  const level = input.level ?? 0.95;
  const { yi, vi, design } = input;
  const k = yi.length;
  const p = design[0]?.length ?? 0;
  if (vi.length !== k || design.length !== k) {
    throw new RangeError(`metaRegression: yi (${k}), vi (${vi.length}) and design (${design.length}) rows differ`);
  }
  if (input.coefficientNames.length !== p) {
    throw new RangeError(`metaRegression: ${input.coefficientNames.length} coefficient names for ${p} design columns`);
  }
  yi.forEach((y, index) => {
    if (!Number.isFinite(y)) throw new RangeError(`metaRegression: yi at row ${index + 1} is not finite`);
  });
  vi.forEach((v, index) => {
    if (!(v > 0) || !Number.isFinite(v)) throw new RangeError(`metaRegression: vi at row ${index + 1} must be > 0 (got ${v})`);
  });
  if (k < p) throw new RangeError(`metaRegression: ${k} site-years cannot estimate ${p} coefficients`);
  const notes: string[] = [];
  const residualDf = k - p;

  const estimate = input.tau2Estimate ?? estimateTauSquared(yi, vi, design, method, input.control);
  if (estimate.message) notes.push(estimate.message);
  const tau2 = estimate.tau2;
  const fixedFit = weightedLeastSquares(yi, design, marginalWeights(vi, 0));
  const qeStatistic = fixedFit.weightedResidualSumOfSquares;
  const fit = weightedLeastSquares(yi, design, marginalWeights(vi, tau2));

  let covariance = fit.inverseInformation.map((row) => [...row]);
  let knhaScale: number | null = null;
  let effectiveCi = ci;
  if (ci === "hksj") {
    if (residualDf <= 0) {
      notes.push("HKSJ needs k > p; with no residual df there is no t-based interval, so the Wald interval is shown.");
      effectiveCi = "wald";
    } else {
      knhaScale = fit.weightedResidualSumOfSquares / residualDf;
      const scale = knhaScale;
      covariance = covariance.map((row) => row.map((value) => value * scale));
    }
  }
  const critical = effectiveCi === "hksj" ? tQuantile(1 - (1 - level) / 2, residualDf) : normalQuantile(1 - (1 - level) / 2);
  const coefficients: CoefficientEstimate[] = fit.coefficients.map((value, index) => {
    const se = Math.sqrt(covariance[index]?.[index] ?? Number.NaN);
    const statistic = value / se;
    return {
      name: input.coefficientNames[index] ?? `b${index}`,
      estimate: value,
      se,
      statistic,
      pValue: effectiveCi === "hksj" ? tTwoSidedP(statistic, residualDf) : normalTwoSidedP(statistic),
      ciLower: value - critical * se,
      ciUpper: value + critical * se,
    };
  });

  const tested = input.testedCoefficients ?? input.coefficientNames.flatMap((name, index) => (name === "intrcpt" ? [] : [index]));
  let qm: MetaRegressionResult["qm"] = null;
  if (tested.length > 0) {
    const subCovariance = tested.map((i) => tested.map((j) => covariance[i]?.[j] ?? 0));
    const inverse = invertSymmetricPositiveDefinite(subCovariance);
    const b = tested.map((i) => fit.coefficients[i] ?? 0);
    let wald = 0;
    for (let i = 0; i < b.length; i++) for (let j = 0; j < b.length; j++) wald += (b[i] ?? 0) * (inverse[i]?.[j] ?? 0) * (b[j] ?? 0);
    const m = tested.length;
    qm =
      effectiveCi === "hksj"
        ? { statistic: wald / m, df: [m, residualDf], pValue: fSurvival(wald / m, m, residualDf), distribution: "F" }
        : { statistic: wald, df: m, pValue: chiSquareSurvival(wald, m), distribution: "chi-square" };
  }

  let i2Percent: number | null = null;
  let h2: number | null = null;
  let typicalWithinVariance: number | null = null;
  if (residualDf > 0) {
    typicalWithinVariance = residualDf / fixedFit.traceP();
    if (method === "FE") {
      i2Percent = qeStatistic > 0 ? Math.max(0, (100 * (qeStatistic - residualDf)) / qeStatistic) : 0;
      h2 = qeStatistic / residualDf;
    } else {
      i2Percent = (100 * tau2) / (typicalWithinVariance + tau2);
      h2 = tau2 / typicalWithinVariance + 1;
    }
  }
  return {
    method,
    ci: effectiveCi,
    k,
    p,
    residualDf,
    coefficients,
    covariance,
    tau2,
    tau: Math.sqrt(tau2),
    seTau2: estimate.seTau2,
    qe: { statistic: qeStatistic, df: residualDf, pValue: residualDf > 0 ? chiSquareSurvival(qeStatistic, residualDf) : null },
    qm,
    i2Percent,
    h2,
    typicalWithinVariance,
    knhaScale,
    weights: Array.from(fit.weights),
    converged: estimate.converged,
    iterations: estimate.iterations,
    notes,
  };
}
