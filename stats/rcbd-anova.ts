/**
 * Analysis of variance of one site-year laid out as a randomized complete block design (RCBD).
 */
import { anovaRow, exactFitResidualSs, fitLinearModel, type AnovaTableRow } from "@/stats/linear-model";
import { designBalance } from "@/stats/design-balance";
import { coefficientOfVariationPercent, meanSeparation, type MeanSeparation } from "@/stats/mean-separation";

/** One plot of a site-year: its block (replicate), treatment and measured response (e.g. yield). */
export interface RcbdPlot {
  block: string;
  treatment: string;
  y: number;
}

export interface RcbdTreatmentMean {
  treatment: string;
  /** Plots observed for this treatment. */
  plots: number;
  /** Arithmetic mean of its plots. */
  mean: number;
  /** Least-squares (block-adjusted) mean; equals `mean` when the design is balanced. */
  adjustedMean: number;
  /** Standard error of the adjusted mean, √(var · MSE). */
  standardError: number | null;
}

export interface RcbdAnovaResult {
  /** Every treatment observed the same number of times in every block (complete, orthogonal). */
  balanced: boolean;
  notes: string[];
  plots: number;
  blocks: string[];
  treatments: string[];
  grandMean: number;
  /** Sequential ANOVA rows: block, then treatment adjusted for block. */
  block: AnovaTableRow;
  treatment: AnovaTableRow;
  error: { df: number; sumOfSquares: number; meanSquare: number | null };
  total: { df: number; sumOfSquares: number };
  /** Error mean square and 100·√MSE/grand mean (also given when unbalanced); null without error df. */
  mse: number | null;
  cvPercent: number | null;
  /** SEM, SED, LSD(0.05, 0.10) and CV%; null when there are no error df or r differs between treatments. */
  meanSeparation: MeanSeparation | null;
  /** Replicates per treatment when balanced, else null. */
  replicates: number | null;
  treatmentMeans: RcbdTreatmentMean[];
  /**
   * (X'X)⁻¹-based covariance of the adjusted treatment means, already multiplied by the MSE
   * (rows and columns in `treatments` order). Contrast variances come from it: var(a − b) = V_aa + V_bb − 2V_ab.
   */
  adjustedMeanCovariance: number[][] | null;
}

function validatePlots(plots: readonly RcbdPlot[]): void {
  if (plots.length === 0) throw new RangeError("rcbdAnova: no plots");
  plots.forEach((plot, index) => {
    const row = index + 1;
    if (typeof plot.block !== "string" || plot.block === "") throw new RangeError(`rcbdAnova: plot ${row}, field "block" is empty`);
    if (typeof plot.treatment !== "string" || plot.treatment === "") {
      throw new RangeError(`rcbdAnova: plot ${row}, field "treatment" is empty`);
    }
    if (typeof plot.y !== "number" || !Number.isFinite(plot.y)) {
      throw new RangeError(`rcbdAnova: plot ${row}, field "y" is not a finite number (${String(plot.y)})`);
    }
  });
}

/**
 * RCBD analysis of variance of one site-year from its plots.
 *
 * Fits y ~ block + treatment by least squares (Householder QR, as R's `lm`/`aov`). With every
 * treatment once (or equally often) in every block this is the textbook RCBD ANOVA: error df
 * (t − 1)(r − 1), LSD = t(1 − α/2, df_e)·√(2·MSE/r), CV% = 100·√MSE/mean. With missing plots the
 * same fit gives the treatment SS adjusted for blocks (Type I with block first = Type II for
 * treatment), block-adjusted treatment means, and their covariance; the result says so in
 * `balanced: false` and `notes`, and no plot or site-year is dropped silently.
 *
 * Reference: Steel, Torrie & Dickey (1997) Principles and Procedures of Statistics, 3rd ed., ch. 9;
 * R `anova(lm(y ~ block + treatment))`; the npk data of Yates (1935) with `aov(yield ~ block + N)`.
 * @example
 * rcbdAnova([{ block: "1", treatment: "check", y: 50 }, { block: "1", treatment: "P", y: 55 }, …]).meanSeparation?.lsd.alpha05
 */
export function rcbdAnova(plots: readonly RcbdPlot[]): RcbdAnovaResult {
  validatePlots(plots);
  const notes: string[] = [];
  const blockValues = plots.map((plot) => plot.block);
  const treatmentValues = plots.map((plot) => plot.treatment);
  const design = designBalance(plots);
  const { blocks, treatments, balanced } = design;
  if (treatments.length < 2) throw new RangeError("rcbdAnova: at least two treatments are needed");
  if (blocks.length < 2) notes.push("Only one block: the block term has no degrees of freedom.");
  const firstCount = design.perCell ?? 0;
  if (!balanced) {
    const missing = design.emptyCells.length;
    notes.push(
      `Unbalanced design (${missing} treatment-block cell(s) without a plot, or unequal plots per cell): ` +
        "fitted as the least-squares model y ~ block + treatment; the treatment SS is adjusted for blocks " +
        "(sequential, block first) and treatment means are block-adjusted least-squares means.",
    );
  }

  const n = plots.length;
  let sum = 0;
  for (const plot of plots) sum += plot.y;
  let grandMean = sum / n;
  let correction = 0;
  for (const plot of plots) correction += plot.y - grandMean;
  grandMean += correction / n;
  let totalSs = 0;
  for (const plot of plots) totalSs += (plot.y - grandMean) ** 2;

  const fitted = balanced
    ? balancedFit(plots, blocks, treatments, firstCount, grandMean)
    : leastSquaresFit(plots, blockValues, treatmentValues, blocks, treatments, notes);
  const { blockRow, treatmentRow, residual, covariance, adjusted } = fitted;
  const mse = residual.meanSquare;
  if (mse === null) notes.push("No error degrees of freedom: no F test, LSD or standard errors.");

  const treatmentMeans = treatments.map((treatment, index): RcbdTreatmentMean => {
    const values = plots.filter((plot) => plot.treatment === treatment).map((plot) => plot.y);
    const mean = values.reduce((acc, value) => acc + value, 0) / values.length;
    const variance = covariance?.[index]?.[index];
    return {
      treatment,
      plots: values.length,
      mean,
      adjustedMean: balanced ? mean : (adjusted[index] ?? Number.NaN),
      standardError: variance === undefined ? null : Math.sqrt(variance),
    };
  });
  const replicates = balanced ? firstCount * blocks.length : null;
  return {
    balanced,
    notes,
    plots: n,
    blocks,
    treatments,
    grandMean,
    block: blockRow,
    treatment: treatmentRow,
    error: residual,
    total: { df: n - 1, sumOfSquares: totalSs },
    mse,
    cvPercent: mse === null ? null : coefficientOfVariationPercent(mse, grandMean),
    meanSeparation: mse !== null && replicates !== null ? meanSeparation({ mse, dfError: residual.df, replicates, grandMean }) : null,
    replicates,
    treatmentMeans,
    adjustedMeanCovariance: covariance,
  };
}

interface ModelFit {
  blockRow: AnovaTableRow;
  treatmentRow: AnovaTableRow;
  residual: { df: number; sumOfSquares: number; meanSquare: number | null };
  /** Covariance of the adjusted treatment means (× MSE), or null without error df or when not estimable. */
  covariance: number[][] | null;
  /** Adjusted treatment means, in `treatments` order. */
  adjusted: number[];
}

const emptyRow = (term: string): AnovaTableRow => ({ term, df: 0, sumOfSquares: 0, meanSquare: 0, fStatistic: null, pValue: null });

/** A term with no degrees of freedom (one block, or aliased) has an empty row. */
const termRow = (term: string, df: number, sumOfSquares: number, residualMs: number | null, residualDf: number): AnovaTableRow =>
  df === 0 ? emptyRow(term) : anovaRow(term, df, sumOfSquares, residualMs, residualDf);

/**
 * The textbook RCBD sums of squares for a balanced layout (the same number c of plots in every treatment × block
 * cell): SS_block = t·c·Σ(ȳ_b − ȳ)², SS_treatment = b·c·Σ(ȳ_t − ȳ)², and the error SS from the residuals
 * y − ȳ_b − ȳ_t + ȳ of the additive fit. The least-squares fit gives the same numbers (the design is orthogonal), and
 * the treatment means are independent with variance MSE/(b·c). Used for every balanced site-year: a plots file of
 * 10,000 site-years spends a few milliseconds here instead of seconds in QR factorisations.
 */
function balancedFit(plots: readonly RcbdPlot[], blocks: string[], treatments: string[], perCell: number, grandMean: number): ModelFit {
  const blockIndex = new Map(blocks.map((b, i) => [b, i]));
  const treatmentIndex = new Map(treatments.map((t, i) => [t, i]));
  const b = blocks.length;
  const t = treatments.length;
  const blockSum = new Float64Array(b);
  const treatmentSum = new Float64Array(t);
  const bi = new Int32Array(plots.length);
  const ti = new Int32Array(plots.length);
  plots.forEach((plot, i) => {
    bi[i] = blockIndex.get(plot.block)!;
    ti[i] = treatmentIndex.get(plot.treatment)!;
    blockSum[bi[i]!]! += plot.y;
    treatmentSum[ti[i]!]! += plot.y;
  });
  const blockMean = Array.from(blockSum, (sum) => sum / (t * perCell));
  const treatmentMean = Array.from(treatmentSum, (sum) => sum / (b * perCell));
  let blockSs = 0;
  for (const m of blockMean) blockSs += (m - grandMean) ** 2;
  blockSs *= t * perCell;
  let treatmentSs = 0;
  for (const m of treatmentMean) treatmentSs += (m - grandMean) ** 2;
  treatmentSs *= b * perCell;
  let errorSs = 0;
  plots.forEach((plot, i) => {
    errorSs += (plot.y - blockMean[bi[i]!]! - treatmentMean[ti[i]!]! + grandMean) ** 2;
  });
  errorSs = exactFitResidualSs(
    errorSs,
    plots.map((plot) => plot.y),
  );
  const errorDf = plots.length - 1 - (b - 1) - (t - 1);
  const mse = errorDf > 0 ? errorSs / errorDf : null;
  const variance = mse === null ? null : mse / (b * perCell);
  return {
    blockRow: termRow("block", b - 1, blockSs, mse, errorDf),
    treatmentRow: termRow("treatment", t - 1, treatmentSs, mse, errorDf),
    residual: { df: errorDf, sumOfSquares: errorSs, meanSquare: mse },
    covariance: variance === null ? null : treatments.map((_, i) => treatments.map((__, j) => (i === j ? variance : 0))),
    adjusted: treatmentMean,
  };
}

/** y ~ block + treatment by least squares (Householder QR), for layouts with missing or extra plots. */
function leastSquaresFit(
  plots: readonly RcbdPlot[],
  blockValues: string[],
  treatmentValues: string[],
  blocks: string[],
  treatments: string[],
  notes: string[],
): ModelFit {
  const fit = fitLinearModel({
    response: plots.map((plot) => plot.y),
    factors: { block: { values: blockValues, levels: blocks }, treatment: { values: treatmentValues, levels: treatments } },
    terms: [["block"], ["treatment"]],
  });
  const blockRow = fit.rows.find((row) => row.term === "block") ?? emptyRow("block");
  const treatmentRow = fit.rows.find((row) => row.term === "treatment") ?? emptyRow("treatment");
  if (fit.aliasedTerms.includes("treatment")) notes.push("Treatment effects are not estimable from these plots (aliased with blocks).");
  const mse = fit.residual.meanSquare;

  // Adjusted means: L·b with L = intercept + treatment dummy + average of the block dummies.
  const coefficientIndex = new Map(fit.coefficientNames.map((name, index) => [name, index]));
  const contrastRows = treatments.map((treatment, treatmentIndex) => {
    const row = new Array<number>(fit.coefficientNames.length).fill(0);
    const intercept = coefficientIndex.get("(Intercept)");
    if (intercept !== undefined) row[intercept] = 1;
    blocks.slice(1).forEach((block) => {
      const index = coefficientIndex.get(`block${block}`);
      if (index !== undefined) row[index] = 1 / blocks.length;
    });
    if (treatmentIndex > 0) {
      const index = coefficientIndex.get(`treatment${treatment}`);
      if (index === undefined) return null;
      row[index] = 1;
    }
    return row;
  });
  const adjusted = contrastRows.map((row) =>
    row ? row.reduce((acc, value, index) => acc + value * (fit.coefficients[index] ?? 0), 0) : Number.NaN,
  );
  let covariance: number[][] | null = null;
  if (mse !== null && contrastRows.every((row) => row !== null)) {
    const rowsL = contrastRows as number[][];
    covariance = rowsL.map((left) =>
      rowsL.map((right) => {
        let total = 0;
        for (let i = 0; i < left.length; i++) {
          const li = left[i] ?? 0;
          if (li === 0) continue;
          for (let j = 0; j < right.length; j++) total += li * (fit.unscaledCovariance[i]?.[j] ?? 0) * (right[j] ?? 0);
        }
        return total * mse;
      }),
    );
  }

  return { blockRow, treatmentRow, residual: fit.residual, covariance, adjusted };
}
