/**
 * Linear model with categorical factors, fitted by least squares, and its sequential (Type I) ANOVA.
 *
 * The design matrix is built as R's `model.matrix` builds it with treatment contrasts: an intercept,
 * one dummy column per non-reference level of each factor, and products of those dummies for
 * interactions. Terms enter in the order given; the SS of a term is the increase in regression SS
 * when its columns join the earlier ones (the squared QR "effects", as R's `aov()` reports them).
 * A column dependent on earlier ones (e.g. N:P:K confounded with blocks) is aliased and dropped,
 * and a term left without columns is listed in `aliasedTerms` — what `aov()` silently does.
 */
import { fSurvival } from "@/stats/distributions";
import { applyTransposedQ, householderQr, inverseCrossProduct, solveUpperTriangular } from "@/stats/householder-qr";

/** One categorical factor: its value for each observation, and optionally the level order (first = reference). */
export interface FactorColumn {
  values: readonly string[];
  levels?: readonly string[];
}

export interface LinearModelInput {
  /** Response, one value per observation. */
  response: readonly number[];
  /** Factors by name; each has one value per observation. */
  factors: Record<string, FactorColumn>;
  /** Model terms in sequential order; a term is a list of factor names (["N", "P"] is N:P). */
  terms: readonly (readonly string[])[];
}

export interface AnovaTableRow {
  term: string;
  df: number;
  sumOfSquares: number;
  meanSquare: number;
  fStatistic: number | null;
  pValue: number | null;
}

/** One ANOVA row (df > 0): MS = SS/df, F = MS/MSE and its upper-tail p; no F without a positive error mean square. */
export function anovaRow(term: string, df: number, sumOfSquares: number, residualMs: number | null, residualDf: number): AnovaTableRow {
  const meanSquare = sumOfSquares / df;
  const fStatistic = residualMs !== null && residualMs > 0 ? meanSquare / residualMs : null;
  return { term, df, sumOfSquares, meanSquare, fStatistic, pValue: fStatistic === null ? null : fSurvival(fStatistic, df, residualDf) };
}

/**
 * Exact fit: a residual sum of squares no larger than floating-point round-off of the response is zero. Data that the
 * model fits exactly (every plot the same value, say) leave residuals of a few ulps whose size depends on the order
 * of the arithmetic, and an F ratio built on them is noise; R's summary.lm warns of an "essentially perfect fit" in
 * the same case. The bound is n · (64 · ε · max|y|)², far below any real plot-to-plot variation.
 */
export function exactFitResidualSs(residualSs: number, response: ArrayLike<number>): number {
  let largest = 0;
  for (let i = 0; i < response.length; i++) largest = Math.max(largest, Math.abs(response[i]!));
  const roundOff = 64 * Number.EPSILON * largest;
  return residualSs <= response.length * roundOff * roundOff ? 0 : residualSs;
}

export interface LinearModelFit {
  n: number;
  rows: AnovaTableRow[];
  residual: { df: number; sumOfSquares: number; meanSquare: number | null };
  /** Terms whose columns were all aliased with earlier terms (not estimable). */
  aliasedTerms: string[];
  /** Names of estimable coefficients, R style: "(Intercept)", "blockb2", "N1:P1". */
  coefficientNames: string[];
  coefficients: number[];
  /** (X'X)⁻¹ of the estimable columns; multiply by the residual mean square for the covariance. */
  unscaledCovariance: number[][];
  fittedValues: number[];
  /** Levels of each factor in the order used (first = reference). */
  levels: Record<string, string[]>;
}

const naturalOrder = new Intl.Collator("en", { numeric: true }).compare;

/** Levels sorted as R sorts factor levels, but numerically aware ("2" before "10"). */
export function factorLevels(factor: FactorColumn): string[] {
  if (factor.levels) return [...factor.levels];
  return [...new Set(factor.values)].sort(naturalOrder);
}

function termLabel(term: readonly string[]): string {
  return term.join(":");
}

/**
 * Fits y ~ terms by least squares and returns the sequential ANOVA table.
 *
 * Reference: Chambers & Hastie (1992) Statistical Models in S, ch. 5; R `aov()` / `anova(lm())`.
 * @example
 * // npk, Yates (1935): aov(yield ~ block + N + P + K)
 * fitLinearModel({ response: yield, factors: { block, N, P, K }, terms: [["block"], ["N"], ["P"], ["K"]] })
 *   .rows[1].sumOfSquares // 189.28166666666…
 */
export function fitLinearModel(input: LinearModelInput): LinearModelFit {
  const n = input.response.length;
  if (n === 0) throw new RangeError("fitLinearModel: no observations");
  input.response.forEach((value, index) => {
    if (!Number.isFinite(value)) throw new RangeError(`fitLinearModel: response at row ${index + 1} is not a finite number`);
  });
  const levels: Record<string, string[]> = {};
  const dummies: Record<string, { name: string; column: Float64Array }[]> = {};
  for (const [name, factor] of Object.entries(input.factors)) {
    if (factor.values.length !== n) {
      throw new RangeError(`fitLinearModel: factor "${name}" has ${factor.values.length} values for ${n} observations`);
    }
    const order = factorLevels(factor);
    levels[name] = order;
    dummies[name] = order.slice(1).map((level) => ({
      name: `${name}${level}`,
      column: Float64Array.from(factor.values, (value) => (value === level ? 1 : 0)),
    }));
  }
  const columns: Float64Array[] = [new Float64Array(n).fill(1)];
  const columnNames = ["(Intercept)"];
  const columnTerm = [-1];
  input.terms.forEach((term, termIndex) => {
    let product: { name: string; column: Float64Array }[] = [{ name: "", column: new Float64Array(n).fill(1) }];
    for (const factorName of term) {
      const factorDummies = dummies[factorName];
      if (!factorDummies) throw new RangeError(`fitLinearModel: term uses unknown factor "${factorName}"`);
      const next: { name: string; column: Float64Array }[] = [];
      for (const left of product) {
        for (const right of factorDummies) {
          next.push({
            name: left.name ? `${left.name}:${right.name}` : right.name,
            column: left.column.map((value, i) => value * (right.column[i] ?? 0)),
          });
        }
      }
      product = next;
    }
    for (const entry of product) {
      columns.push(entry.column);
      columnNames.push(entry.name);
      columnTerm.push(termIndex);
    }
  });

  const qr = householderQr(columns);
  const effects = applyTransposedQ(qr, input.response);
  const rank = qr.keptColumns.length;
  const residualDf = n - rank;
  let residualSs = 0;
  for (let i = rank; i < n; i++) residualSs += (effects[i] ?? 0) ** 2;
  residualSs = exactFitResidualSs(residualSs, input.response);
  const residualMs = residualDf > 0 ? residualSs / residualDf : null;

  const termDf = new Array<number>(input.terms.length).fill(0);
  const termSs = new Array<number>(input.terms.length).fill(0);
  qr.keptColumns.forEach((columnIndex, position) => {
    const term = columnTerm[columnIndex] ?? -1;
    if (term < 0) return;
    termDf[term] = (termDf[term] ?? 0) + 1;
    termSs[term] = (termSs[term] ?? 0) + (effects[position] ?? 0) ** 2;
  });
  const rows: AnovaTableRow[] = [];
  const aliasedTerms: string[] = [];
  input.terms.forEach((term, index) => {
    const df = termDf[index] ?? 0;
    if (df === 0) {
      aliasedTerms.push(termLabel(term));
      return;
    }
    rows.push(anovaRow(termLabel(term), df, termSs[index] ?? 0, residualMs, residualDf));
  });

  const coefficients = solveUpperTriangular(qr.r, effects);
  const fittedValues = new Array<number>(n).fill(0);
  qr.keptColumns.forEach((columnIndex, position) => {
    const column = columns[columnIndex] as Float64Array;
    const coefficient = coefficients[position] ?? 0;
    for (let i = 0; i < n; i++) fittedValues[i] = (fittedValues[i] ?? 0) + coefficient * (column[i] ?? 0);
  });
  return {
    n,
    rows,
    residual: { df: residualDf, sumOfSquares: residualSs, meanSquare: residualMs },
    aliasedTerms,
    coefficientNames: qr.keptColumns.map((index) => columnNames[index] ?? ""),
    coefficients,
    unscaledCovariance: inverseCrossProduct(qr.r),
    fittedValues,
    levels,
  };
}
