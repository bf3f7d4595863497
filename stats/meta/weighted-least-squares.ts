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
export function weightedLeastSquares(y: ArrayLike<number>, design: readonly (readonly number[])[], weights: ArrayLike<number>): WeightedFit {
  const k = y.length;
  const p = design[0]?.length ?? 0;
  const w = Float64Array.from(weights);
  const information: Matrix = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  const score = new Array<number>(p).fill(0);
  for (let i = 0; i < k; i++) {
    const row = design[i] as readonly number[];
    const wi = w[i] ?? 0;
    for (let a = 0; a < p; a++) {
      const xa = (row[a] ?? 0) * wi;
      score[a] = (score[a] ?? 0) + xa * (y[i] ?? 0);
      for (let b = 0; b <= a; b++) (information[a] as number[])[b] = (information[a]?.[b] ?? 0) + xa * (row[b] ?? 0);
    }
  }
  for (let a = 0; a < p; a++) for (let b = a + 1; b < p; b++) (information[a] as number[])[b] = information[b]?.[a] ?? 0;
  const inverseInformation = invertSymmetricPositiveDefinite(information);
  const coefficients = inverseInformation.map((row) => row.reduce((acc, value, index) => acc + value * (score[index] ?? 0), 0));
  const residuals = new Float64Array(k);
  let rss = 0;
  let rss2 = 0;
  for (let i = 0; i < k; i++) {
    const row = design[i] as readonly number[];
    let fitted = 0;
    for (let a = 0; a < p; a++) fitted += (row[a] ?? 0) * (coefficients[a] ?? 0);
    const residual = (y[i] ?? 0) - fitted;
    residuals[i] = residual;
    const wi = w[i] ?? 0;
    rss += wi * residual * residual;
    rss2 += wi * wi * residual * residual;
  }
  /** S(G) = X' W G W X. */
  const sandwich = (g: (i: number) => number): Matrix => {
    const result: Matrix = Array.from({ length: p }, () => new Array<number>(p).fill(0));
    for (let i = 0; i < k; i++) {
      const row = design[i] as readonly number[];
      const factor = (w[i] ?? 0) ** 2 * g(i);
      for (let a = 0; a < p; a++) {
        const xa = (row[a] ?? 0) * factor;
        for (let b = 0; b <= a; b++) (result[a] as number[])[b] = (result[a]?.[b] ?? 0) + xa * (row[b] ?? 0);
      }
    }
    for (let a = 0; a < p; a++) for (let b = a + 1; b < p; b++) (result[a] as number[])[b] = result[b]?.[a] ?? 0;
    return result;
  };
  const value = (diagonal: ArrayLike<number> | undefined, i: number) => (diagonal ? (diagonal[i] ?? 0) : 1);
  return {
    weights: w,
    coefficients,
    inverseInformation,
    residuals,
    weightedResidualSumOfSquares: rss,
    squaredWeightedResidualSumOfSquares: rss2,
    traceP(diagonal) {
      let sum = 0;
      for (let i = 0; i < k; i++) sum += (w[i] ?? 0) * value(diagonal, i);
      return sum - traceOfProduct(inverseInformation, sandwich((i) => value(diagonal, i)));
    },
    tracePP(first, second) {
      let sum = 0;
      for (let i = 0; i < k; i++) sum += (w[i] ?? 0) ** 2 * value(first, i) * value(second, i);
      const cross = traceOfProduct(inverseInformation, sandwich((i) => (w[i] ?? 0) * value(first, i) * value(second, i)));
      const firstSandwich = sandwich((i) => value(first, i));
      const secondSandwich = second === first ? firstSandwich : sandwich((i) => value(second, i));
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
