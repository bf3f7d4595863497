/**
 * Sequential ANOVA, LSD, CV and means against R 4.2.2 `aov()` on the npk data:
 * Yates, F. (1935) Complex experiments, J R Stat Soc Suppl 2:181–247; R datasets::npk as analysed in
 * Venables & Ripley (2002) Modern Applied Statistics with S, 4th ed., §6.7.
 * Fixture: tests/fixtures/reference/anova_npk_results.json.
 */
import { describe, expect, it } from "vitest";
import { fitLinearModel, type LinearModelFit } from "@/stats/linear-model";
import { meanSeparation } from "@/stats/mean-separation";
import { rcbdAnova } from "@/stats/rcbd-anova";
import { CLOSED_FORM, expectClose, loadCsvFixture, loadJsonFixture, numericColumn } from "@/tests/stats/fixtures";

const rows = loadCsvFixture("anova_npk_data.csv");
const results = loadJsonFixture("anova_npk_results.json");
const response = numericColumn(rows, "yield");
const factor = (name: string) => ({ values: rows.map((row) => row[name] as string) });
const factors = { block: factor("block"), N: factor("N"), P: factor("P"), K: factor("K") };

interface TableEntry {
  df: number;
  SS: number;
  MS: number;
  F: number | null;
  p: number | null;
}

function expectTable(fit: LinearModelFit, table: Record<string, TableEntry>, label: string): void {
  const terms = Object.keys(table).filter((term) => term !== "Residuals");
  expect(fit.rows.map((row) => row.term)).toEqual(terms);
  for (const row of fit.rows) {
    const expected = table[row.term] as TableEntry;
    expect(row.df, `${label} ${row.term} df`).toBe(expected.df);
    expectClose(row.sumOfSquares, expected.SS, CLOSED_FORM, `${label} ${row.term} SS`);
    expectClose(row.meanSquare, expected.MS, CLOSED_FORM, `${label} ${row.term} MS`);
    expectClose(row.fStatistic, expected.F, CLOSED_FORM, `${label} ${row.term} F`);
    expectClose(row.pValue, expected.p, CLOSED_FORM, `${label} ${row.term} p`);
  }
  const residual = table.Residuals as TableEntry;
  expect(fit.residual.df).toBe(residual.df);
  expectClose(fit.residual.sumOfSquares, residual.SS, CLOSED_FORM, `${label} residual SS`);
  expectClose(fit.residual.meanSquare, residual.MS, CLOSED_FORM, `${label} residual MS`);
}

function expectLsd(lsd: any, actual: ReturnType<typeof meanSeparation>, label: string): void {
  expectClose(actual.mse, lsd.MSE, CLOSED_FORM, `${label} MSE`);
  expect(actual.dfError).toBe(lsd.df_error);
  expect(actual.replicates).toBe(lsd.r_per_mean);
  expectClose(actual.sem, lsd.SEM, CLOSED_FORM, `${label} SEM`);
  expectClose(actual.sed, lsd.SED, CLOSED_FORM, `${label} SED`);
  expectClose(actual.tCritical.alpha05, lsd.t_crit["alpha_0.05"], CLOSED_FORM, `${label} qt(0.975, df)`);
  expectClose(actual.tCritical.alpha10, lsd.t_crit["alpha_0.1"], CLOSED_FORM, `${label} qt(0.95, df)`);
  expectClose(actual.lsd.alpha05, lsd.LSD["alpha_0.05"], CLOSED_FORM, `${label} LSD 0.05`);
  expectClose(actual.lsd.alpha10, lsd.LSD["alpha_0.1"], CLOSED_FORM, `${label} LSD 0.10`);
  expectClose(actual.cvPercent, lsd.CV_pct, CLOSED_FORM, `${label} CV%`);
  expectClose(actual.rootMse, lsd.root_MSE, CLOSED_FORM, `${label} root MSE`);
  expectClose(actual.grandMean, lsd.grand_mean, CLOSED_FORM, `${label} grand mean`);
}

describe("npk (Yates 1935; R 4.2.2 aov) — sequential ANOVA by least squares", () => {
  it("aov(yield ~ block + N + P + K): table, and LSD/CV for the main-effect means (r = 12)", () => {
    const fit = fitLinearModel({ response, factors, terms: [["block"], ["N"], ["P"], ["K"]] });
    expectTable(fit, results.model_block_N_P_K.table, "block+N+P+K");
    // R: qt(1 - a/2, 15) * sqrt(2 * 16.0123333 / 12); 100 * sqrt(MSE) / mean(npk$yield)
    const lsd = meanSeparation({ mse: fit.residual.meanSquare as number, dfError: fit.residual.df, replicates: 12, grandMean: 54.875 });
    expectLsd(results.model_block_N_P_K.lsd_for_main_effect_means, lsd, "block+N+P+K");
  });

  it("aov(yield ~ block + N*P*K): N:P:K is confounded with blocks, found aliased and dropped (npk.aov of ?npk)", () => {
    const fit = fitLinearModel({
      response,
      factors,
      terms: [["block"], ["N"], ["P"], ["K"], ["N", "P"], ["N", "K"], ["P", "K"], ["N", "P", "K"]],
    });
    expect(fit.aliasedTerms).toEqual(["N:P:K"]);
    expectTable(fit, results.model_block_NxPxK.table, "block+N*P*K");
  });

  it("aov(yield ~ block + N): the same numbers through rcbdAnova (block, treatment = N; 2 plots per cell)", () => {
    const fit = fitLinearModel({ response, factors, terms: [["block"], ["N"]] });
    expectTable(fit, results.model_block_N.table, "block+N");
    const plots = rows.map((row, index) => ({ block: row.block as string, treatment: row.N as string, y: response[index] as number }));
    const anova = rcbdAnova(plots);
    expect(anova.balanced).toBe(true);
    expect(anova.replicates).toBe(12);
    const table = results.model_block_N.table;
    expectClose(anova.block.sumOfSquares, table.block.SS, CLOSED_FORM, "rcbd block SS");
    expectClose(anova.block.fStatistic, table.block.F, CLOSED_FORM, "rcbd block F");
    expectClose(anova.treatment.sumOfSquares, table.N.SS, CLOSED_FORM, "rcbd treatment SS");
    expectClose(anova.treatment.fStatistic, table.N.F, CLOSED_FORM, "rcbd treatment F");
    expectClose(anova.treatment.pValue, table.N.p, CLOSED_FORM, "rcbd treatment p");
    expectClose(anova.error.meanSquare, table.Residuals.MS, CLOSED_FORM, "rcbd MSE");
    expect(anova.error.df).toBe(17);
    expectLsd(results.model_block_N.lsd, anova.meanSeparation as ReturnType<typeof meanSeparation>, "rcbd block+N");
    // R: tapply(npk$yield, npk$N, mean)
    expectClose(anova.treatmentMeans[0]?.mean, results.means.N["0"], CLOSED_FORM, "mean N0");
    expectClose(anova.treatmentMeans[1]?.mean, results.means.N["1"], CLOSED_FORM, "mean N1");
    expectClose(anova.treatmentMeans[1]?.adjustedMean, results.means.N["1"], CLOSED_FORM, "balanced: adjusted = raw mean");
    expectClose(anova.treatmentMeans[0]?.standardError, results.model_block_N.lsd.SEM, CLOSED_FORM, "SEM of a treatment mean");
  });

  it("level and cell means: tapply(yield, N/P/K/block, mean) and the 8 N×P×K cells (model.tables(npk.aov, 'means'))", () => {
    for (const name of ["N", "P", "K", "block"] as const) {
      const values = rows.map((row) => row[name] as string);
      for (const [level, expected] of Object.entries<number>(results.means[name])) {
        const selected = response.filter((_, index) => values[index] === level);
        expectClose(selected.reduce((a, b) => a + b, 0) / selected.length, expected, CLOSED_FORM, `${name}=${level} mean`);
      }
    }
    // The full factorial fit reproduces cell means as block-averaged fitted values.
    for (const cell of results.means.NPK_cells as { N: string; P: string; K: string; mean: number; n: number }[]) {
      const selected = response.filter((_, index) => rows[index]?.N === cell.N && rows[index]?.P === cell.P && rows[index]?.K === cell.K);
      expect(selected).toHaveLength(cell.n);
      expectClose(selected.reduce((a, b) => a + b, 0) / selected.length, cell.mean, CLOSED_FORM, `cell N${cell.N}P${cell.P}K${cell.K}`);
    }
  });
});
