/**
 * Estimators of the between-study (between-site-year) variance τ² in a (mixed-effects) meta-analysis.
 *
 * Formulas follow metafor 3.8 `rma.uni` (Viechtbauer 2010, J Stat Softw 36(3)); the standard errors
 * of τ̂² are metafor's. References per method: DL DerSimonian & Laird (1986) Control Clin Trials
 * 7:177–188; REML/ML Viechtbauer (2005) J Educ Behav Stat 30:261–293; PM Paule & Mandel (1982)
 * J Res NBS 87:377–385; HE Hedges (1983); SJ Sidik & Jonkman (2005) J Biopharm Stat 15:823–838;
 * HS Hunter & Schmidt (2004); EB Morris (1983) (same root as PM).
 */
import { weightedLeastSquares, type WeightedFit } from "@/stats/meta/weighted-least-squares";
import type { IterationControl, TauSquaredEstimate, TauSquaredMethod } from "@/stats/meta/types";

export const defaultIterationControl: Required<IterationControl> = { maxIterations: 100, tolerance: 1e-12 };

/** 1/(vᵢ + τ²). A plain loop: `Float64Array.from` with a map function is several times slower in V8. */
export function marginalWeights(vi: readonly number[], tau2: number): Float64Array {
  const weights = new Float64Array(vi.length);
  for (let i = 0; i < vi.length; i++) weights[i] = 1 / ((vi[i] as number) + tau2);
  return weights;
}

function sumOf(values: ArrayLike<number>): number {
  let sum = 0;
  for (let i = 0; i < values.length; i++) sum += values[i] ?? 0;
  return sum;
}

function sumOfSquares(values: ArrayLike<number>): number {
  let sum = 0;
  for (let i = 0; i < values.length; i++) sum += (values[i] ?? 0) ** 2;
  return sum;
}

function converged(tau2: number, seTau2: number, iterations: number): TauSquaredEstimate {
  return { tau2, seTau2, converged: true, iterations, message: null };
}

/**
 * Generalised Q, y'P(τ²)y, and the τ² solving y'P(τ²)y = target (Paule–Mandel, EB, Q-profile bounds).
 *
 * y'P(τ²)y decreases and is convex in τ², so Newton steps from τ² = 0 climb monotonically to the
 * root (derivative −y'PPy). Returns 0 when y'P(0)y is already below the target.
 */
export function solveGeneralisedQ(
  yi: readonly number[],
  vi: readonly number[],
  design: readonly (readonly number[])[],
  target: number,
  control: Required<IterationControl>,
): { tau2: number; converged: boolean; iterations: number } {
  let tau2 = 0;
  let fit = weightedLeastSquares(yi, design, marginalWeights(vi, tau2));
  if (fit.weightedResidualSumOfSquares <= target) return { tau2: 0, converged: true, iterations: 0 };
  for (let iteration = 1; iteration <= Math.max(control.maxIterations, 200); iteration++) {
    const step = (fit.weightedResidualSumOfSquares - target) / fit.squaredWeightedResidualSumOfSquares;
    tau2 += step;
    fit = weightedLeastSquares(yi, design, marginalWeights(vi, tau2));
    if (Math.abs(step) <= control.tolerance * Math.max(1, tau2) || Math.abs(step) <= 4 * Number.EPSILON * tau2) {
      return { tau2, converged: true, iterations: iteration };
    }
  }
  return { tau2, converged: false, iterations: Math.max(control.maxIterations, 200) };
}

/** Hedges (HE) method-of-moments estimate from the OLS residuals (also the ML/REML starting value). */
function hedgesEstimate(yi: readonly number[], vi: readonly number[], design: readonly (readonly number[])[]) {
  const k = yi.length;
  const p = design[0]?.length ?? 0;
  const ols = weightedLeastSquares(yi, design, new Float64Array(k).fill(1));
  const trPV = ols.traceP(vi);
  const tau2 = (ols.weightedResidualSumOfSquares - trPV) / (k - p);
  return { tau2, ols, trPV };
}

/**
 * Estimates τ² for a model with design matrix X (an intercept column alone for a plain meta-analysis).
 *
 * Iterative methods (REML, ML) use Fisher scoring from the HE estimate with step halving at 0, as
 * metafor does; PM and EB solve the generalised-Q equation by Newton steps. A run that reaches
 * `maxIterations` returns `converged: false` and a message instead of throwing.
 *
 * @example
 * // Normand (1999), metafor 3.8-1: rma(yi, vi, method = "REML")$tau2
 * estimateTauSquared(yi, vi, [[1], …], "REML").tau2 // 684.646151929666
 */
export function estimateTauSquared(
  yi: readonly number[],
  vi: readonly number[],
  design: readonly (readonly number[])[],
  method: TauSquaredMethod,
  controlInput: IterationControl = {},
): TauSquaredEstimate {
  const control = { ...defaultIterationControl, ...controlInput };
  const k = yi.length;
  const p = design[0]?.length ?? 0;
  const residualDf = k - p;
  if (method === "FE") return { tau2: 0, seTau2: null, converged: true, iterations: 0, message: null };
  if (residualDf <= 0) {
    return { tau2: 0, seTau2: null, converged: true, iterations: 0, message: "No residual degrees of freedom: τ² is set to 0." };
  }
  const fixedWeights = marginalWeights(vi, 0);

  switch (method) {
    case "DL": {
      const fit = weightedLeastSquares(yi, design, fixedWeights);
      const trP = fit.traceP();
      const tau2 = Math.max(0, (fit.weightedResidualSumOfSquares - residualDf) / trP);
      const se = Math.sqrt((2 * residualDf + 4 * tau2 * trP + 2 * tau2 * tau2 * fit.tracePP()) / (trP * trP));
      return converged(tau2, se, 0);
    }
    case "HS": {
      const fit = weightedLeastSquares(yi, design, fixedWeights);
      const sumW = sumOf(fixedWeights);
      const tau2 = Math.max(0, (fit.weightedResidualSumOfSquares - k) / sumW);
      const se = Math.sqrt((2 * residualDf + 4 * tau2 * fit.traceP() + 2 * tau2 * tau2 * fit.tracePP()) / (sumW * sumW));
      return converged(tau2, se, 0);
    }
    case "HE": {
      const { tau2: raw, ols, trPV } = hedgesEstimate(yi, vi, design);
      const tau2 = Math.max(0, raw);
      const se = Math.sqrt((2 * ols.tracePP(vi, vi) + 4 * tau2 * trPV + 2 * tau2 * tau2 * residualDf) / (residualDf * residualDf));
      return converged(tau2, se, 0);
    }
    case "SJ": {
      let mean = 0;
      for (const y of yi) mean += y;
      mean /= k;
      let initial = 0;
      for (const y of yi) initial += (y - mean) ** 2;
      initial /= k;
      const fit = weightedLeastSquares(yi, design, marginalWeights(vi, initial));
      const tau2 = (initial * fit.weightedResidualSumOfSquares) / residualDf;
      const se = Math.sqrt(
        ((initial * initial) / (residualDf * residualDf)) *
          (2 * fit.tracePP(vi, vi) + 4 * tau2 * fit.tracePP(undefined, vi) + 2 * tau2 * tau2 * fit.tracePP()),
      );
      return converged(tau2, se, 0);
    }
    case "PM":
    case "EB": {
      const root = solveGeneralisedQ(yi, vi, design, residualDf, control);
      const sumW = sumOf(marginalWeights(vi, root.tau2));
      const se = Math.sqrt((2 * k * k) / residualDf / (sumW * sumW));
      return {
        tau2: root.tau2,
        seTau2: se,
        converged: root.converged,
        iterations: root.iterations,
        message: root.converged ? null : `${method}: the τ² search did not converge in ${root.iterations} iterations.`,
      };
    }
    case "REML":
    case "ML": {
      let tau2 = Math.max(0, hedgesEstimate(yi, vi, design).tau2);
      let fit: WeightedFit = weightedLeastSquares(yi, design, marginalWeights(vi, tau2));
      for (let iteration = 1; iteration <= control.maxIterations; iteration++) {
        let step =
          method === "REML"
            ? (fit.squaredWeightedResidualSumOfSquares - fit.traceP()) / fit.tracePP()
            : (fit.squaredWeightedResidualSumOfSquares - sumOf(fit.weights)) / sumOfSquares(fit.weights);
        while (tau2 + step < 0) step /= 2;
        const previous = tau2;
        tau2 += step;
        fit = weightedLeastSquares(yi, design, marginalWeights(vi, tau2));
        if (Math.abs(tau2 - previous) <= control.tolerance * Math.max(1, tau2)) {
          const se = method === "REML" ? Math.sqrt(2 / fit.tracePP()) : Math.sqrt(2 / sumOfSquares(fit.weights));
          return converged(tau2, se, iteration);
        }
      }
      return {
        tau2,
        seTau2: null,
        converged: false,
        iterations: control.maxIterations,
        message:
          `${method}: Fisher scoring did not converge in ${control.maxIterations} iterations ` +
          `(last τ² = ${tau2}); try DL or PM, or a larger iteration limit.`,
      };
    }
    default: {
      const unknown: never = method;
      throw new RangeError(`estimateTauSquared: unknown method ${String(unknown)}`);
    }
  }
}
