/**
 * Weighted least squares for meta-analytic models, with the traces of the projection P that the
 * τ² estimators need — all in O(k·p²), never forming the k×k matrix P.
 *
 * P = W − W X (X'WX)⁻¹ X'W for diagonal weights W. Writing M = (X'WX)⁻¹ and, for a diagonal G,
 * S(G) = X' W G W X (p×p):
 *   tr(P D)        = Σ wᵢ dᵢ − tr(M S(D))
 *   tr(P D₁ P D₂)  = Σ wᵢ² d₁ᵢ d₂ᵢ − 2 tr(M S(W D₁ D₂)) + tr(M S(D₁) M S(D₂))
 * so REML for k = 10,000 site-years costs a few passes over the data per iteration.
 * Reference: Viechtbauer (2005) J Educ Behav Stat 30:261–293 (the P matrix in τ² estimation).
 */

export type Matrix = number[][];

/** Inverse of a small symmetric positive-definite matrix by Cholesky factorisation. */
export function invertSymmetricPositiveDefinite(matrix: Matrix): Matrix {
  const size = matrix.length;
  const lower: Matrix = Array.from({ length: size }, () => new Array<number>(size).fill(0));
  for (let i = 0; i < size; i++) {
    for (let j = 0; j <= i; j++) {
      let sum = matrix[i]?.[j] ?? 0;
      for (let m = 0; m < j; m++) sum -= (lower[i]?.[m] ?? 0) * (lower[j]?.[m] ?? 0);
      if (i === j) {
        if (!(sum > 0)) throw new RangeError("The moderator design matrix is not of full rank (X'WX is singular).");
        (lower[i] as number[])[i] = Math.sqrt(sum);
      } else {
        (lower[i] as number[])[j] = sum / (lower[j]?.[j] ?? 1);
      }
    }
  }
  // Invert L, then M = L⁻ᵀ L⁻¹.
  const inverseLower: Matrix = Array.from({ length: size }, () => new Array<number>(size).fill(0));
  for (let column = 0; column < size; column++) {
    for (let i = column; i < size; i++) {
      let sum = i === column ? 1 : 0;
      for (let m = column; m < i; m++) sum -= (lower[i]?.[m] ?? 0) * (inverseLower[m]?.[column] ?? 0);
      (inverseLower[i] as number[])[column] = sum / (lower[i]?.[i] ?? 1);
    }
  }
  const inverse: Matrix = Array.from({ length: size }, () => new Array<number>(size).fill(0));
  for (let i = 0; i < size; i++) {
    for (let j = 0; j <= i; j++) {
      let sum = 0;
      for (let m = i; m < size; m++) sum += (inverseLower[m]?.[i] ?? 0) * (inverseLower[m]?.[j] ?? 0);
      (inverse[i] as number[])[j] = sum;
      (inverse[j] as number[])[i] = sum;
    }
  }
  return inverse;
}

/** tr(A B) for square matrices of equal size. */
function traceOfProduct(a: Matrix, b: Matrix): number {
  let sum = 0;
  for (let i = 0; i < a.length; i++) for (let j = 0; j < a.length; j++) sum += (a[i]?.[j] ?? 0) * (b[j]?.[i] ?? 0);
  return sum;
}

export interface WeightedFit {
  /** Weights wᵢ used. */
  weights: Float64Array;
  coefficients: number[];
  /** M = (X'WX)⁻¹. */
  inverseInformation: Matrix;
  /** yᵢ − xᵢ'b. */
  residuals: Float64Array;
  /** y'Py = Σ wᵢ (yᵢ − xᵢ'b)². */
  weightedResidualSumOfSquares: number;
  /** y'PPy = Σ wᵢ² (yᵢ − xᵢ'b)². */
  squaredWeightedResidualSumOfSquares: number;
  /** tr(P D). */
  traceP(diagonal?: ArrayLike<number>): number;
  /** tr(P D₁ P D₂). */
  tracePP(first?: ArrayLike<number>, second?: ArrayLike<number>): number;
}

/**
 * Weighted least-squares fit of y on X with diagonal weights, plus the P-matrix traces.
 *
 * @example weightedLeastSquares([1, 3], [[1], [1]], [1, 1]).coefficients // [2]
 */
export function weightedLeastSquares(
  y: ArrayLike<number>,
  design: readonly (readonly number[])[],
  weights: ArrayLike<number>,
): WeightedFit {
  const k = y.length;
  const p = design[0]?.length ?? 0;
  const w = Float64Array.from(weights);
  // The design row-major in one typed array: the passes below are the hot loops of every τ² iteration.
  const x = new Float64Array(k * p);
  for (let i = 0; i < k; i++) {
    const row = design[i] as readonly number[];
    for (let a = 0; a < p; a++) x[i * p + a] = row[a] ?? 0;
  }
  const information: Matrix = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  const score = new Array<number>(p).fill(0);
  for (let i = 0; i < k; i++) {
    const wi = w[i] as number;
    const yi = y[i] ?? 0;
    for (let a = 0; a < p; a++) {
      const xa = (x[i * p + a] as number) * wi;
      score[a] = (score[a] as number) + xa * yi;
      const target = information[a] as number[];
      for (let b = 0; b <= a; b++) target[b] = (target[b] as number) + xa * (x[i * p + b] as number);
    }
  }
  for (let a = 0; a < p; a++) for (let b = a + 1; b < p; b++) (information[a] as number[])[b] = information[b]?.[a] ?? 0;
  const inverseInformation = invertSymmetricPositiveDefinite(information);
  const coefficients = inverseInformation.map((row) => row.reduce((acc, value, index) => acc + value * (score[index] ?? 0), 0));
  const residuals = new Float64Array(k);
  let rss = 0;
  let rss2 = 0;
  for (let i = 0; i < k; i++) {
    let fitted = 0;
    for (let a = 0; a < p; a++) fitted += (x[i * p + a] as number) * (coefficients[a] as number);
    const residual = (y[i] ?? 0) - fitted;
    residuals[i] = residual;
    const wi = w[i] as number;
    rss += wi * residual * residual;
    rss2 += wi * wi * residual * residual;
  }
  /** S(G) = X' W G W X for the diagonal gᵢ (all ones when omitted). */
  const sandwich = (g: Float64Array | null): Matrix => {
    const result: Matrix = Array.from({ length: p }, () => new Array<number>(p).fill(0));
    for (let i = 0; i < k; i++) {
      const factor = (w[i] as number) ** 2 * (g ? (g[i] as number) : 1);
      for (let a = 0; a < p; a++) {
        const xa = (x[i * p + a] as number) * factor;
        const target = result[a] as number[];
        for (let b = 0; b <= a; b++) target[b] = (target[b] as number) + xa * (x[i * p + b] as number);
      }
    }
    for (let a = 0; a < p; a++) for (let b = a + 1; b < p; b++) (result[a] as number[])[b] = result[b]?.[a] ?? 0;
    return result;
  };
  const diagonalOf = (diagonal: ArrayLike<number> | undefined): Float64Array | null => {
    if (!diagonal) return null;
    const values = new Float64Array(k);
    for (let i = 0; i < k; i++) values[i] = diagonal[i] ?? 0;
    return values;
  };
  return {
    weights: w,
    coefficients,
    inverseInformation,
    residuals,
    weightedResidualSumOfSquares: rss,
    squaredWeightedResidualSumOfSquares: rss2,
    traceP(diagonal) {
      const d = diagonalOf(diagonal);
      let sum = 0;
      for (let i = 0; i < k; i++) sum += (w[i] as number) * (d ? (d[i] as number) : 1);
      return sum - traceOfProduct(inverseInformation, sandwich(d));
    },
    tracePP(first, second) {
      const d1 = diagonalOf(first);
      const d2 = second === first ? d1 : diagonalOf(second);
      const product = new Float64Array(k);
      let sum = 0;
      for (let i = 0; i < k; i++) {
        const wi = w[i] as number;
        const v1 = d1 ? (d1[i] as number) : 1;
        const v2 = d2 ? (d2[i] as number) : 1;
        sum += wi ** 2 * v1 * v2;
        product[i] = wi * v1 * v2;
      }
      const cross = traceOfProduct(inverseInformation, sandwich(product));
      const firstSandwich = sandwich(d1);
      const secondSandwich = second === first ? firstSandwich : sandwich(d2);
      const mFirst = multiply(inverseInformation, firstSandwich);
      const mSecond = multiply(inverseInformation, secondSandwich);
      return sum - 2 * cross + traceOfProduct(mFirst, mSecond);
    },
  };
}

function multiply(a: Matrix, b: Matrix): Matrix {
  const size = a.length;
  const result: Matrix = Array.from({ length: size }, () => new Array<number>(size).fill(0));
  for (let i = 0; i < size; i++) {
    for (let m = 0; m < size; m++) {
      const aim = a[i]?.[m] ?? 0;
      if (aim === 0) continue;
      for (let j = 0; j < size; j++) (result[i] as number[])[j] = (result[i]?.[j] ?? 0) + aim * (b[m]?.[j] ?? 0);
    }
  }
  return result;
}
