/**
 * RCBD site-year ANOVA, balanced and with a missing plot.
 *
 * The missing-plot case is checked against the classical exact results for one missing plot in an
 * RCBD (Yates 1933, Empire J Exp Agric 1:129–142; Steel, Torrie & Dickey 1997, §9.8):
 *   estimate x = (t·T + r·B − G)/((t − 1)(r − 1)); with x inserted, the error SS equals the
 *   least-squares error SS (error df one less); the LS mean of that treatment is its mean with x;
 *   var(mean_i − mean_j) = MSE·(2/r + t/(r(r − 1)(t − 1))) for the treatment with the missing plot.
 * R equivalent: anova(lm(y ~ block + treatment)); emmeans(fit, "treatment").
 * The plot values are invented numbers for the test.
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { fitLinearModel } from "@/stats/linear-model";
import { rcbdAnova, type RcbdPlot } from "@/stats/rcbd-anova";
import { treatmentVersusCheckContrasts } from "@/stats/effects";
import { tQuantile } from "@/stats/distributions";
import { CLOSED_FORM, expectClose } from "@/tests/stats/fixtures";

const treatments = ["check", "broadcast", "band", "in-furrow"];
const yields = [
  [52.1, 55.4, 50.8, 54.0],
  [56.3, 58.9, 55.2, 57.7],
  [57.0, 60.2, 56.4, 59.1],
  [54.8, 57.5, 53.9, 56.6],
]; // rows = treatments, columns = blocks 1..4

const balancedPlots: RcbdPlot[] = treatments.flatMap((treatment, t) =>
  (yields[t] as number[]).map((y, b) => ({ block: `${b + 1}`, treatment, y })),
);

describe("rcbdAnova — balanced RCBD (Steel, Torrie & Dickey 1997 ch. 9; R anova(lm(y ~ block + treatment)))", () => {
  const result = rcbdAnova(balancedPlots);

  it("partitions the total SS into block, treatment and error with df (t−1), (r−1), (t−1)(r−1)", () => {
    expect(result.balanced).toBe(true);
    expect(result.treatment.df).toBe(3);
    expect(result.block.df).toBe(3);
    expect(result.error.df).toBe(9);
    // Closed-form textbook sums of squares as an independent computation.
    const all = yields.flat();
    const grand = all.reduce((a, b) => a + b, 0) / all.length;
    const treatmentSs = 4 * yields.reduce((sum, row) => sum + (row.reduce((a, b) => a + b, 0) / 4 - grand) ** 2, 0);
    const blockSs = 4 * [0, 1, 2, 3].reduce((sum, b) => sum + (yields.reduce((a, row) => a + (row[b] as number), 0) / 4 - grand) ** 2, 0);
    const totalSs = all.reduce((sum, y) => sum + (y - grand) ** 2, 0);
    expectClose(result.treatment.sumOfSquares, treatmentSs, CLOSED_FORM, "treatment SS");
    expectClose(result.block.sumOfSquares, blockSs, CLOSED_FORM, "block SS");
    expectClose(result.error.sumOfSquares, totalSs - treatmentSs - blockSs, 1e-8, "error SS");
    expectClose(result.total.sumOfSquares, totalSs, CLOSED_FORM, "total SS");
  });

  it("gives LSD = qt(1 − α/2, 9)·sqrt(2·MSE/4), SED, SEM and CV%", () => {
    const mse = result.error.meanSquare as number;
    const separation = result.meanSeparation;
    expect(separation).not.toBeNull();
    expectClose(separation?.lsd.alpha05, tQuantile(0.975, 9) * Math.sqrt(mse / 2), CLOSED_FORM, "LSD 0.05");
    expectClose(separation?.lsd.alpha10, tQuantile(0.95, 9) * Math.sqrt(mse / 2), CLOSED_FORM, "LSD 0.10");
    expectClose(separation?.sed, Math.sqrt(mse / 2), CLOSED_FORM, "SED");
    expectClose(separation?.sem, Math.sqrt(mse / 4), CLOSED_FORM, "SEM");
    expectClose(result.cvPercent, (100 * Math.sqrt(mse)) / result.grandMean, CLOSED_FORM, "CV%");
  });

  it("treatment-vs-check contrasts have variance 2·MSE/r and covariance MSE/r", () => {
    const mse = result.error.meanSquare as number;
    const contrasts = treatmentVersusCheckContrasts(result, "check");
    expect(contrasts.treatments).toEqual(["band", "broadcast", "in-furrow"]);
    for (const effect of contrasts.effects) expectClose(effect.vi, mse / 2, CLOSED_FORM, "2·MSE/r");
    expectClose(contrasts.covariance[0]?.[1], mse / 4, CLOSED_FORM, "shared check covariance MSE/r");
    const band = (yields[2] as number[]).reduce((a, b) => a + b, 0) / 4;
    const check = (yields[0] as number[]).reduce((a, b) => a + b, 0) / 4;
    expectClose(contrasts.effects[0]?.yi, band - check, CLOSED_FORM, "band − check");
  });
});

describe("rcbdAnova — one missing plot (Yates 1933 missing-plot formula; R lm(y ~ block + treatment))", () => {
  const missingTreatment = 2; // "band"
  const missingBlock = 1; // block 2
  const plots = balancedPlots.filter((plot) => !(plot.treatment === "band" && plot.block === "2"));
  const result = rcbdAnova(plots);
  const t = 4;
  const r = 4;
  const treatmentTotal = (yields[missingTreatment] as number[]).reduce((a, b, index) => (index === missingBlock ? a : a + b), 0);
  const blockTotal = yields.reduce((a, row, index) => (index === missingTreatment ? a : a + (row[missingBlock] as number)), 0);
  const grandTotal = plots.reduce((a, plot) => a + plot.y, 0);
  const estimate = (t * treatmentTotal + r * blockTotal - grandTotal) / ((t - 1) * (r - 1));

  it("flags the design as unbalanced, says so, and keeps every plot", () => {
    expect(result.balanced).toBe(false);
    expect(result.plots).toBe(15);
    expect(result.notes.join(" ")).toMatch(/Unbalanced design/);
    expect(result.error.df).toBe(8);
    expect(result.meanSeparation).toBeNull();
  });

  it("error SS equals the error SS with the Yates estimate inserted", () => {
    const filled = rcbdAnova([...plots, { block: "2", treatment: "band", y: estimate }]);
    expectClose(result.error.sumOfSquares, filled.error.sumOfSquares, CLOSED_FORM, "error SS");
  });

  it("the least-squares mean of the treatment is its mean with the estimate inserted", () => {
    const band = result.treatmentMeans.find((mean) => mean.treatment === "band");
    expectClose(band?.adjustedMean, (treatmentTotal + estimate) / r, CLOSED_FORM, "adjusted mean");
    expect(band?.plots).toBe(3);
  });

  it("var(band − check) = MSE·(2/r + t/(r(r−1)(t−1))), the contrast's variance from the fit", () => {
    const mse = result.error.meanSquare as number;
    const contrasts = treatmentVersusCheckContrasts(result, "check");
    const index = contrasts.treatments.indexOf("band");
    expectClose(contrasts.effects[index]?.vi, mse * (2 / r + t / (r * (r - 1) * (t - 1))), CLOSED_FORM, "contrast variance");
    const other = contrasts.treatments.indexOf("broadcast");
    expectClose(contrasts.effects[other]?.vi, (2 * mse) / r, CLOSED_FORM, "complete treatment still 2·MSE/r");
  });

  it("names the plot and field of bad input", () => {
    expect(() => rcbdAnova([...plots, { block: "3", treatment: "band", y: Number.NaN }])).toThrow(/plot 16, field "y"/);
    expect(() => rcbdAnova([{ block: "", treatment: "a", y: 1 }])).toThrow(/plot 1, field "block"/);
  });
});

describe("rcbdAnova — the balanced closed form agrees with the least-squares fit (R anova(lm(y ~ block + treatment)))", () => {
  // Found by the property below: yields equal up to one ulp left residuals of ~1e-26 whose F ratio (0 in one fit,
  // 1.6 in the other) was round-off. An exact fit has no residual variation, so neither fit gives an F test.
  it("an exact fit up to round-off has MSE 0 and no F test in either fit", () => {
    const ys = [1000, 1000, 1000, 1000.0000000000001];
    const plots: RcbdPlot[] = ys.map((y, i) => ({ treatment: i < 2 ? "T0" : "T1", block: "1", y }));
    const ls = fitLinearModel({
      response: ys,
      factors: { block: { values: plots.map((p) => p.block) }, treatment: { values: plots.map((p) => p.treatment) } },
      terms: [["block"], ["treatment"]],
    });
    const result = rcbdAnova(plots);
    expect(result.balanced).toBe(true);
    expect(result.mse).toBe(0);
    expect(ls.residual.meanSquare).toBe(0);
    expect(result.treatment.fStatistic).toBeNull();
    expect(ls.rows.find((r) => r.term === "treatment")?.fStatistic).toBeNull();
  });

  // The least-squares fit is the reference: fitLinearModel is checked against R's aov on Yates' npk and NIST StRD.
  it("on random balanced layouts (t 2–6, b 1–6, 1–3 plots per cell): SS, df, MSE, F, p and mean covariance", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 2, max: 6 }),
        fc.integer({ min: 1, max: 6 }),
        fc.integer({ min: 1, max: 3 }),
        fc.array(fc.double({ min: 1000, max: 6000, noNaN: true }), { minLength: 108, maxLength: 108 }),
        (t, b, c, values) => {
          const plots: RcbdPlot[] = [];
          for (let ti = 0; ti < t; ti++)
            for (let bi = 0; bi < b; bi++)
              for (let ci = 0; ci < c; ci++) {
                plots.push({ treatment: `T${ti}`, block: `${bi + 1}`, y: values[plots.length]! });
              }
          const result = rcbdAnova(plots);
          expect(result.balanced).toBe(true);
          const ls = fitLinearModel({
            response: plots.map((p) => p.y),
            factors: { block: { values: plots.map((p) => p.block) }, treatment: { values: plots.map((p) => p.treatment) } },
            terms: [["block"], ["treatment"]],
          });
          const tol = 1e-9;
          const close = (a: number | null | undefined, e: number | null | undefined, what: string) => {
            if (e === null || e === undefined) return expect(a ?? null, what).toBeNull();
            expect(Math.abs((a ?? Number.NaN) - e), what).toBeLessThanOrEqual(tol * Math.max(1, Math.abs(e)));
          };
          expect(result.error.df).toBe(ls.residual.df);
          close(result.error.sumOfSquares, ls.residual.sumOfSquares, "error SS");
          close(result.mse, ls.residual.meanSquare, "MSE");
          for (const term of ["block", "treatment"] as const) {
            const reference = ls.rows.find((r) => r.term === term);
            expect(result[term].df).toBe(reference?.df ?? 0);
            close(result[term].sumOfSquares, reference?.sumOfSquares ?? 0, `${term} SS`);
            close(result[term].fStatistic, reference?.fStatistic ?? null, `${term} F`);
            close(result[term].pValue, reference?.pValue ?? null, `${term} p`);
          }
          // Balanced: the treatment means are independent, each with variance MSE/(b·c).
          const mse = ls.residual.meanSquare;
          if (mse === null) expect(result.adjustedMeanCovariance).toBeNull();
          else
            result.adjustedMeanCovariance!.forEach((row, i) =>
              row.forEach((v, j) => close(v, i === j ? mse / (b * c) : 0, `cov ${i},${j}`)),
            );
        },
      ),
      { numRuns: 300 },
    );
  });
});
