/**
 * Householder QR decomposition with R-style detection of aliased columns.
 *
 * Columns are taken in order; a column whose remaining norm after the earlier reflections is below
 * `tolerance` × its original norm is linearly dependent on the columns before it and is set aside,
 * as LINPACK's dqrdc2 does for R's `lm()`/`aov()` (tol = 1e-7). Everything works on the data
 * matrix, never on X'X, so conditioning is that of X, not its square.
 * Reference: Golub & Van Loan (2013) Matrix Computations, 4th ed., §5.2; R `qr(x, tol = 1e-7)`.
 */

export interface HouseholderQr {
  /** Number of rows of X. */
  rows: number;
  /** Indices (into the original columns) that were kept, in order. */
  keptColumns: number[];
  /** Indices of columns found aliased (linearly dependent on earlier ones). */
  aliasedColumns: number[];
  /** Upper-triangular R (rank × rank), row-major: r[i][j]. */
  r: number[][];
  /** Householder vectors (each of length rows, zeros above its pivot row) and their scalars. */
  reflectors: { vector: Float64Array; beta: number }[];
}

/** Applies the stored reflections to y, giving the "effects" Q'y (R `qr.qty`). */
export function applyTransposedQ(qr: HouseholderQr, y: ArrayLike<number>): Float64Array {
  const effects = Float64Array.from(y as ArrayLike<number>);
  for (let step = 0; step < qr.reflectors.length; step++) {
    const reflector = qr.reflectors[step];
    if (!reflector) continue;
    const { vector, beta } = reflector;
    let dot = 0;
    for (let i = step; i < qr.rows; i++) dot += (vector[i] ?? 0) * (effects[i] ?? 0);
    const scale = beta * dot;
    for (let i = step; i < qr.rows; i++) effects[i] = (effects[i] ?? 0) - scale * (vector[i] ?? 0);
  }
  return effects;
}

/**
 * Householder QR of a column-major design (columns[j][i] = X[i, j]) with aliased-column detection.
 *
 * @example
 * householderQr([[1, 1, 1], [1, 2, 3], [2, 4, 6]]).aliasedColumns // [2] (third column = 2 × second)
 */
export function householderQr(columns: ArrayLike<number>[], tolerance = 1e-7): HouseholderQr {
  const rows = columns[0]?.length ?? 0;
  const working = columns.map((column) => Float64Array.from(column as ArrayLike<number>));
  const keptColumns: number[] = [];
  const aliasedColumns: number[] = [];
  const reflectors: { vector: Float64Array; beta: number }[] = [];
  const rColumns: number[][] = [];
  for (let j = 0; j < working.length; j++) {
    const column = working[j] as Float64Array;
    let originalNorm = 0;
    for (let i = 0; i < rows; i++) originalNorm += (columns[j]?.[i] ?? 0) ** 2;
    originalNorm = Math.sqrt(originalNorm);
    // Apply earlier reflections to this column.
    for (let step = 0; step < reflectors.length; step++) {
      const { vector, beta } = reflectors[step] as { vector: Float64Array; beta: number };
      let dot = 0;
      for (let i = step; i < rows; i++) dot += (vector[i] ?? 0) * (column[i] ?? 0);
      const scale = beta * dot;
      for (let i = step; i < rows; i++) column[i] = (column[i] ?? 0) - scale * (vector[i] ?? 0);
    }
    const pivotRow = reflectors.length;
    let remainingNorm = 0;
    for (let i = pivotRow; i < rows; i++) remainingNorm += (column[i] ?? 0) ** 2;
    remainingNorm = Math.sqrt(remainingNorm);
    if (pivotRow >= rows || originalNorm === 0 || remainingNorm <= tolerance * originalNorm) {
      aliasedColumns.push(j);
      continue;
    }
    const head = column[pivotRow] ?? 0;
    const alpha = head >= 0 ? -remainingNorm : remainingNorm;
    const vector = new Float64Array(rows);
    vector[pivotRow] = head - alpha;
    for (let i = pivotRow + 1; i < rows; i++) vector[i] = column[i] ?? 0;
    let vectorNormSquared = 0;
    for (let i = pivotRow; i < rows; i++) vectorNormSquared += (vector[i] ?? 0) ** 2;
    const beta = vectorNormSquared === 0 ? 0 : 2 / vectorNormSquared;
    reflectors.push({ vector, beta });
    const rColumn: number[] = [];
    for (let i = 0; i < pivotRow; i++) rColumn.push(column[i] ?? 0);
    rColumn.push(alpha);
    rColumns.push(rColumn);
    keptColumns.push(j);
  }
  const rank = keptColumns.length;
  const r: number[][] = Array.from({ length: rank }, () => new Array<number>(rank).fill(0));
  rColumns.forEach((rColumn, j) => {
    rColumn.forEach((value, i) => {
      const row = r[i];
      if (row) row[j] = value;
    });
  });
  return { rows, keptColumns, aliasedColumns, r, reflectors };
}

/** Solves R b = z for upper-triangular R (back substitution). */
export function solveUpperTriangular(r: number[][], z: ArrayLike<number>): number[] {
  const size = r.length;
  const solution = new Array<number>(size).fill(0);
  for (let i = size - 1; i >= 0; i--) {
    const row = r[i] as number[];
    let sum = z[i] ?? 0;
    for (let j = i + 1; j < size; j++) sum -= (row[j] ?? 0) * (solution[j] ?? 0);
    solution[i] = sum / (row[i] ?? 1);
  }
  return solution;
}

/** (X'X)⁻¹ = R⁻¹R⁻ᵀ for the kept columns (R `chol2inv(qr.R(qr))`). */
export function inverseCrossProduct(r: number[][]): number[][] {
  const size = r.length;
  // Invert R column by column, then form R⁻¹ R⁻ᵀ.
  const inverse: number[][] = Array.from({ length: size }, () => new Array<number>(size).fill(0));
  for (let column = 0; column < size; column++) {
    const unit = new Array<number>(size).fill(0);
    unit[column] = 1;
    const solved = solveUpperTriangular(r, unit);
    for (let i = 0; i < size; i++) (inverse[i] as number[])[column] = solved[i] ?? 0;
  }
  const result: number[][] = Array.from({ length: size }, () => new Array<number>(size).fill(0));
  for (let i = 0; i < size; i++) {
    for (let j = i; j < size; j++) {
      let sum = 0;
      for (let m = Math.max(i, j); m < size; m++) sum += (inverse[i]?.[m] ?? 0) * (inverse[j]?.[m] ?? 0);
      (result[i] as number[])[j] = sum;
      (result[j] as number[])[i] = sum;
    }
  }
  return result;
}
