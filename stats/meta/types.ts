/** Shared types of the meta-analysis engine. */

/** How the between-site-year variance τ² is estimated; "FE" fixes τ² = 0 (inverse-variance fixed effect). */
export type TauSquaredMethod = "FE" | "DL" | "REML" | "PM" | "ML" | "HE" | "SJ" | "HS" | "EB";

/** Confidence intervals and tests: Wald (normal) or Hartung–Knapp–Sidik–Jonkman (t with k − p df). */
export type ConfidenceIntervalMethod = "wald" | "hksj";

export interface IterationControl {
  /** Maximum Fisher-scoring / root-finding iterations (default 100). */
  maxIterations?: number;
  /** Convergence: |Δτ²| below tolerance·max(1, τ²) (default 1e-12). */
  tolerance?: number;
}

export interface TauSquaredEstimate {
  tau2: number;
  /** Standard error of τ̂² as metafor computes it for this estimator; null for FE. */
  seTau2: number | null;
  converged: boolean;
  iterations: number;
  message: string | null;
}

export interface CoefficientEstimate {
  name: string;
  estimate: number;
  se: number;
  statistic: number;
  pValue: number;
  ciLower: number;
  ciUpper: number;
}
