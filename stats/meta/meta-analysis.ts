/**
 * Random-effects (or fixed-effect) meta-analysis of per-site-year effects.
 */
import { chiSquareSurvival, normalQuantile, tQuantile } from "@/stats/distributions";
import { qProfileHeterogeneityInterval, type HeterogeneityInterval } from "@/stats/meta/heterogeneity-interval";
import { metaRegression } from "@/stats/meta/meta-regression";
import type { ConfidenceIntervalMethod, IterationControl, TauSquaredMethod } from "@/stats/meta/types";

export interface MetaAnalysisInput {
  /** Effect per site-year (e.g. yield response, bu/ac, or a log response ratio). */
  yi: readonly number[];
  /** Its sampling variance. */
  vi: readonly number[];
  /** Optional site-year labels, returned beside the weights. */
  labels?: readonly string[];
  /** τ² estimator (default "REML"); "FE" is the inverse-variance fixed-effect model. */
  method?: TauSquaredMethod;
  /** "hksj" (default): Hartung–Knapp–Sidik–Jonkman t(k − 1); "wald": normal. */
  ci?: ConfidenceIntervalMethod;
  /** Confidence level (default 0.95). */
  level?: number;
  control?: IterationControl;
  /** Compute Q-profile intervals for τ², I², H² (default true). */
  heterogeneityInterval?: boolean;
}

export interface PredictionInterval {
  lower: number;
  upper: number;
  /** "normal" or "t" and its df. */
  distribution: "normal" | "t";
  df: number | null;
}

export interface MetaAnalysisResult {
  method: TauSquaredMethod;
  ci: ConfidenceIntervalMethod;
  k: number;
  estimate: number;
  se: number;
  statistic: number;
  pValue: number;
  ciLower: number;
  ciUpper: number;
  /** "t" with df k − 1 under HKSJ, else "normal". */
  distribution: "normal" | "t";
  df: number | null;
  tau2: number;
  tau: number;
  seTau2: number | null;
  /** Cochran's Q about the fixed-effect mean, df k − 1 (the same for every method). */
  q: { statistic: number; df: number; pValue: number | null };
  /** I² (%) and H² from the chosen τ̂² (metafor's definition); for FE, 100(Q − df)/Q and Q/df. */
  i2Percent: number | null;
  h2: number | null;
  /** Higgins & Thompson's I² = max(0, 100(Q − df)/Q) and H² = Q/df, whatever the τ² method. */
  i2FromQPercent: number | null;
  h2FromQ: number | null;
  /** Typical within-site-year variance s² = (k − 1)Σw/((Σw)² − Σw²), w = 1/v. */
  typicalWithinVariance: number | null;
  /** HKSJ scale factor s² (not truncated); null under Wald. */
  knhaScale: number | null;
  predictionInterval: {
    /** μ̂ ± t(k − 2)·√(τ̂² + SE²), Higgins, Thompson & Spiegelhalter (2009); null for FE or k < 3. */
    tKMinus2: PredictionInterval | null;
    /** metafor's `predict()`: z, or t(k − 1) with the HKSJ SE under HKSJ; null for FE. */
    metafor: PredictionInterval | null;
  };
  /** 100·wᵢ/Σw with wᵢ = 1/(vᵢ + τ²). */
  weightsPercent: number[];
  labels: string[] | null;
  heterogeneityInterval: HeterogeneityInterval | null;
  /** k < 5: τ² and the prediction interval are imprecise. */
  imprecise: boolean;
  converged: boolean;
  iterations: number;
  notes: string[];
}

function validateInput(input: MetaAnalysisInput): void {
  const { yi, vi, labels } = input;
  if (yi.length === 0) throw new RangeError("metaAnalysis: no site-years (yi is empty)");
  if (vi.length !== yi.length) throw new RangeError(`metaAnalysis: yi has ${yi.length} values but vi has ${vi.length}`);
  if (labels && labels.length !== yi.length) throw new RangeError(`metaAnalysis: ${labels.length} labels for ${yi.length} site-years`);
}

/**
 * Meta-analysis of k effects yᵢ with sampling variances vᵢ.
 *
 * Defaults follow current random-effects guidance: τ² by REML, Hartung–Knapp–Sidik–Jonkman CI,
 * and a t(k − 2) prediction interval. Reference: Veroniki et al. (2016) Res Synth Methods 7:55–79;
 * IntHout, Ioannidis & Borm (2014) BMC Med Res Methodol 14:25; Higgins, Thompson & Spiegelhalter
 * (2009) J R Stat Soc A 172:137–159. Values reproduce metafor 3.8-1 `rma()` and `predict()`.
 *
 * @example
 * // Normand (1999), Stat Med 18:321–359; metafor: rma(yi, vi, method = "REML", test = "knha")
 * metaAnalysis({ yi, vi, method: "REML", ci: "hksj" }).ciUpper // 6.10669413560515
 */
export function metaAnalysis(input: MetaAnalysisInput): MetaAnalysisResult {
  validateInput(input);
  const method = input.method ?? "REML";
  const requestedCi = input.ci ?? "hksj";
  const level = input.level ?? 0.95;
  const { yi, vi } = input;
  const k = yi.length;
  const notes: string[] = [];
  const design = yi.map(() => [1]);
  const fit = metaRegression({ yi, vi, design, coefficientNames: ["intrcpt"], method, ci: requestedCi, level, control: input.control });
  notes.push(...fit.notes);
  const coefficient = fit.coefficients[0];
  if (!coefficient) throw new Error("metaAnalysis: the model produced no estimate");
  const qDf = k - 1;
  const qStatistic = fit.qe.statistic;

  if (k === 1) {
    notes.push("Only one site-year: no τ², no heterogeneity statistics, no HKSJ interval and no prediction interval.");
  } else if (k === 2) {
    notes.push("Two site-years: τ² is very imprecise, and the t(k − 2) prediction interval is not defined.");
  } else if (k < 5) {
    notes.push(`Only ${k} site-years: τ² and the prediction interval are imprecise.`);
  }
  const se = coefficient.se;
  let tKMinus2: PredictionInterval | null = null;
  let metaforPrediction: PredictionInterval | null = null;
  if (method !== "FE" && k >= 2) {
    const spread = Math.sqrt(fit.tau2 + se * se);
    const metaforCritical = fit.ci === "hksj" ? tQuantile(1 - (1 - level) / 2, qDf) : normalQuantile(1 - (1 - level) / 2);
    metaforPrediction = {
      lower: coefficient.estimate - metaforCritical * spread,
      upper: coefficient.estimate + metaforCritical * spread,
      distribution: fit.ci === "hksj" ? "t" : "normal",
      df: fit.ci === "hksj" ? qDf : null,
    };
    if (k >= 3) {
      const critical = tQuantile(1 - (1 - level) / 2, k - 2);
      tKMinus2 = {
        lower: coefficient.estimate - critical * spread,
        upper: coefficient.estimate + critical * spread,
        distribution: "t",
        df: k - 2,
      };
    }
  }
  const totalWeight = fit.weights.reduce((sum, w) => sum + w, 0);
  const typicalWithinVariance = fit.typicalWithinVariance;
  const heterogeneityInterval =
    input.heterogeneityInterval !== false && method !== "FE" && k >= 2 && typicalWithinVariance !== null
      ? qProfileHeterogeneityInterval(yi, vi, design, fit.tau2, typicalWithinVariance, level, input.control)
      : null;
  return {
    method,
    ci: fit.ci,
    k,
    estimate: coefficient.estimate,
    se,
    statistic: coefficient.statistic,
    pValue: coefficient.pValue,
    ciLower: coefficient.ciLower,
    ciUpper: coefficient.ciUpper,
    distribution: fit.ci === "hksj" ? "t" : "normal",
    df: fit.ci === "hksj" ? qDf : null,
    tau2: fit.tau2,
    tau: fit.tau,
    seTau2: fit.seTau2,
    q: { statistic: qStatistic, df: qDf, pValue: qDf > 0 ? chiSquareSurvival(qStatistic, qDf) : null },
    i2Percent: fit.i2Percent,
    h2: fit.h2,
    i2FromQPercent: qDf > 0 && qStatistic > 0 ? Math.max(0, (100 * (qStatistic - qDf)) / qStatistic) : null,
    h2FromQ: qDf > 0 ? qStatistic / qDf : null,
    typicalWithinVariance,
    knhaScale: fit.knhaScale,
    predictionInterval: { tKMinus2, metafor: metaforPrediction },
    weightsPercent: fit.weights.map((w) => (100 * w) / totalWeight),
    labels: input.labels ? [...input.labels] : null,
    heterogeneityInterval,
    imprecise: k < 5,
    converged: fit.converged,
    iterations: fit.iterations,
    notes,
  };
}
