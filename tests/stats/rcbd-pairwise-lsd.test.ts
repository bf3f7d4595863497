/**
 * Per-site-year ANOVA detail against R: the F table, LS-means with SEs and the LSD of every pair, on a published
 * RCBD with and without missing plots.
 *
 * Data: Yates, F. (1935) Complex experiments, J R Stat Soc Suppl 2:181–247; R datasets::npk as analysed in
 * Venables & Ripley (2002) MASS 4th ed. §6.7 (tests/fixtures/reference/anova_npk_data.csv). Each block holds every
 * N×P combination once, so treatment = N×P is an RCBD of 4 treatments in 6 blocks.
 * Reference values: tests/fixtures/reference/rcbd_npk_missing_plot.json, written by rcbd_npk_missing_plot.R beside it
 * (R 4.2.2, emmeans 1.8.4-1):
 *   fit <- lm(yield ~ block + trt, data = d); anova(fit)
 *   emm <- emmeans(fit, "trt"); vcov(emm); pairs(emm, adjust = "none")   # LSD = qt(0.975, df) * SE
 */
import { describe, expect, it } from "vitest";
import { pairwiseLeastSignificantDifferences } from "@/stats/pairwise-lsd";
import { rcbdAnova, type RcbdPlot } from "@/stats/rcbd-anova";
import { CLOSED_FORM, expectClose, loadCsvFixture, loadJsonFixture } from "@/tests/stats/fixtures";

interface TableRow {
  df: number;
  SS: number;
  MS: number;
  F?: number | null;
  p?: number | null;
}
interface ReferenceCase {
  dropped_plots: number[];
  plots: number;
  anova: { block: TableRow; trt: TableRow; Residuals: TableRow };
  MSE: number;
  df_error: number;
  grand_mean: number;
  CV_pct: number;
  t_crit_05: number;
  lsmeans: { trt: string; plots: number; mean: number; emmean: number; SE: number }[];
  lsmean_vcov: number[][];
  pairs: { a: string; b: string; difference: number; se: number; lsd_05: number }[];
}

const rows = loadCsvFixture("anova_npk_data.csv");
const reference = loadJsonFixture<{ cases: Record<string, ReferenceCase> }>("rcbd_npk_missing_plot.json");

function plotsWithout(dropped: readonly number[]): RcbdPlot[] {
  return rows
    .filter((row) => !dropped.includes(Number(row.plot)))
    .map((row) => ({ block: row.block!, treatment: `N${row.N}P${row.P}`, y: Number(row.yield) }));
}

describe.each(Object.entries(reference.cases))("npk, treatment = N×P, case %s (R lm + anova + emmeans)", (name, expected) => {
  const anova = rcbdAnova(plotsWithout(expected.dropped_plots));
  const pairs = pairwiseLeastSignificantDifferences(anova);

  it("anova(lm(yield ~ block + trt)): SS, df, MS, F and p of block, treatment and residual", () => {
    expect(anova.plots).toBe(expected.plots);
    expect(anova.balanced).toBe(expected.dropped_plots.length === 0);
    for (const [ours, theirs] of [
      [anova.block, expected.anova.block],
      [anova.treatment, expected.anova.trt],
    ] as const) {
      expect(ours.df, `${name} ${ours.term} df`).toBe(theirs.df);
      expectClose(ours.sumOfSquares, theirs.SS, CLOSED_FORM, `${name} ${ours.term} SS`);
      expectClose(ours.meanSquare, theirs.MS, CLOSED_FORM, `${name} ${ours.term} MS`);
      expectClose(ours.fStatistic, theirs.F, CLOSED_FORM, `${name} ${ours.term} F`);
      expectClose(ours.pValue, theirs.p, CLOSED_FORM, `${name} ${ours.term} p`);
    }
    expect(anova.error.df).toBe(expected.df_error);
    expectClose(anova.error.sumOfSquares, expected.anova.Residuals.SS, CLOSED_FORM, `${name} residual SS`);
    expectClose(anova.mse, expected.MSE, CLOSED_FORM, `${name} MSE`);
    expectClose(anova.grandMean, expected.grand_mean, CLOSED_FORM, `${name} grand mean`);
    expectClose(anova.cvPercent, expected.CV_pct, CLOSED_FORM, `${name} CV%`);
  });

  it("emmeans(fit, 'trt'): LS-means and their SEs; vcov() of the LS-means", () => {
    expect(anova.treatments).toEqual(expected.lsmeans.map((m) => m.trt));
    expected.lsmeans.forEach((m, i) => {
      const ours = anova.treatmentMeans[i]!;
      expect(ours.plots, `${name} ${m.trt} plots`).toBe(m.plots);
      expectClose(ours.mean, m.mean, CLOSED_FORM, `${name} ${m.trt} raw mean`);
      expectClose(ours.adjustedMean, m.emmean, CLOSED_FORM, `${name} ${m.trt} LS-mean`);
      expectClose(ours.standardError, m.SE, CLOSED_FORM, `${name} ${m.trt} SE`);
    });
    // R's off-diagonal zeros of the balanced case are round-off (~1e-16): compared on the scale of the variances.
    const scale = Math.max(...expected.lsmean_vcov.map((row, i) => row[i]!));
    expected.lsmean_vcov.forEach((row, i) =>
      row.forEach((value, j) => {
        const ours = anova.adjustedMeanCovariance![i]![j]!;
        expect(Math.abs(ours - value), `${name} vcov[${i}][${j}]: ${ours} vs ${value}`).toBeLessThanOrEqual(1e-9 * scale);
      }),
    );
  });

  it("every pair: difference, SE √(v_i + v_j − 2c_ij) and LSD(0.05) = qt(0.975, df)·SE", () => {
    expect(pairs).not.toBeNull();
    expect(pairs!.map((p) => `${p.a}|${p.b}`)).toEqual(expected.pairs.map((p) => `${p.a}|${p.b}`));
    expected.pairs.forEach((p, i) => {
      const ours = pairs![i]!;
      expectClose(ours.difference, p.difference, CLOSED_FORM, `${name} ${p.b} − ${p.a}`);
      expectClose(ours.standardError, p.se, CLOSED_FORM, `${name} ${p.b} − ${p.a} SE`);
      expectClose(ours.lsd, p.lsd_05, CLOSED_FORM, `${name} ${p.b} − ${p.a} LSD`);
      expect(ours.differs).toBe(Math.abs(p.difference) > p.lsd_05);
    });
  });
});

describe("pairwise LSDs: balanced and missing plots", () => {
  it("balanced: every pair's LSD is the single textbook LSD t·√(2·MSE/r)", () => {
    const anova = rcbdAnova(plotsWithout([]));
    const single = anova.meanSeparation!.lsd.alpha05;
    expectClose(single, reference.cases.balanced!.pairs[0]!.lsd_05, CLOSED_FORM, "single LSD against R");
    for (const p of pairwiseLeastSignificantDifferences(anova)!) expectClose(p.lsd, single, CLOSED_FORM, `${p.a}–${p.b}`);
  });

  it("one plot missing: pairs with the incomplete treatment have a larger LSD than the others", () => {
    const anova = rcbdAnova(plotsWithout([10]));
    expect(anova.meanSeparation).toBeNull();
    const pairs = pairwiseLeastSignificantDifferences(anova)!;
    const withN1P1 = pairs.filter((p) => p.a === "N1P1" || p.b === "N1P1");
    const others = pairs.filter((p) => p.a !== "N1P1" && p.b !== "N1P1");
    expect(withN1P1).toHaveLength(3);
    for (const p of withN1P1) for (const q of others) expect(p.lsd).toBeGreaterThan(q.lsd);
  });

  it("no error df: no pairwise LSDs; a bad alpha is refused by name", () => {
    const exact = rcbdAnova([
      { block: "1", treatment: "a", y: 1 },
      { block: "1", treatment: "b", y: 2 },
    ]);
    expect(pairwiseLeastSignificantDifferences(exact)).toBeNull();
    expect(() => pairwiseLeastSignificantDifferences(rcbdAnova(plotsWithout([])), 1.5)).toThrow(
      /pairwiseLeastSignificantDifferences: alpha/,
    );
  });
});
