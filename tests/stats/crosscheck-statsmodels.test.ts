/**
 * Independent re-computation with statsmodels 0.13.5 (crosscheck_statsmodels.json):
 * DL = statsmodels combine_effects(method_re = "chi2"), PM = method_re = "iterated", FE, knha se,
 * and the npk ANOVA (statsmodels anova_lm(ols("yield ~ C(block) + N + P + K"))).
 * Each check carries its own tolerance: 1e-8, or 1e-6 for statsmodels' PM (it stops at atol 1e-6).
 */
import { describe, expect, it } from "vitest";
import { fitLinearModel } from "@/stats/linear-model";
import { metaAnalysis } from "@/stats/meta/meta-analysis";
import { expectClose, loadCsvFixture, loadJsonFixture, numericColumn } from "@/tests/stats/fixtures";

interface Check {
  check: string;
  fixture: number;
  statsmodels: number;
  tol: number;
}
const checks = loadJsonFixture<{ checks: Check[] }>("crosscheck_statsmodels.json").checks;

const data = Object.fromEntries(
  ["meta_normand1999_md", "meta_michael2013_md", "meta_curtis1998_rom"].map((name) => {
    const rows = loadCsvFixture(`${name}_data.csv`);
    return [name, { yi: numericColumn(rows, "yi"), vi: numericColumn(rows, "vi") }];
  }),
);
const npkRows = loadCsvFixture("anova_npk_data.csv");
const npk = (terms: string[][]) =>
  fitLinearModel({
    response: numericColumn(npkRows, "yield"),
    factors: Object.fromEntries(["block", "N", "P", "K"].map((name) => [name, { values: npkRows.map((row) => row[name] as string) }])),
    terms,
  });

function compute(check: string): number {
  const words = check.split(" ");
  const [dataset = "", model = "", quantity = ""] = words;
  if (dataset === "npk") {
    const fit = npk(model === "model_block_N" ? [["block"], ["N"]] : [["block"], ["N"], ["P"], ["K"]]);
    const term = words[2] ?? "";
    const statistic = words[3] ?? "";
    if (term === "Residuals") return fit.residual.sumOfSquares;
    const row = fit.rows.find((entry) => entry.term === term);
    if (!row) throw new Error(`no ${term}`);
    return statistic === "SS" ? row.sumOfSquares : statistic === "F" ? (row.fStatistic as number) : (row.pValue as number);
  }
  const input = data[dataset];
  if (!input) throw new Error(`unknown dataset in "${check}"`);
  if (model === "Q") return metaAnalysis({ ...input, method: "FE", ci: "wald" }).q.statistic;
  if (check.includes("estimating-equation residual")) {
    // PM estimating equation: the τ² solving Σ (y − μ)²/(v + τ²) = k − 1.
    return metaAnalysis({ ...input, method: "PM", ci: "wald" }).tau2;
  }
  const [method, knha] = model.split("_");
  const fit = metaAnalysis({ ...input, method: method as "DL" | "PM" | "FE", ci: knha ? "hksj" : "wald" });
  if (model === "FE" && quantity === "I2") return fit.i2Percent as number;
  if (quantity === "estimate") return fit.estimate;
  if (quantity === "se") return fit.se;
  if (quantity === "tau2") return fit.tau2;
  throw new Error(`unhandled check "${check}"`);
}

describe("cross-check with statsmodels 0.13.5 (combine_effects, anova_lm)", () => {
  it("has all 59 checks", () => expect(checks).toHaveLength(59));
  for (const check of checks) {
    it(`${check.check}: statsmodels ${check.statsmodels} (tol ${check.tol})`, () => {
      const value = compute(check.check);
      // Agree with the metafor fixture to 1e-9 …
      expectClose(value, check.fixture, 1e-9, `${check.check} vs metafor fixture`);
      if (check.check.includes("estimating-equation residual")) {
        // … and, for these rows, statsmodels' number is the PM equation's residual at τ²: ours is ~0 too.
        const input = data[check.check.split(" ")[0] ?? ""] as { yi: number[]; vi: number[] };
        const fit = metaAnalysis({ ...input, method: "PM", ci: "wald" });
        const residual =
          input.yi.reduce((sum, y, i) => sum + (y - fit.estimate) ** 2 / ((input.vi[i] as number) + fit.tau2), 0) - (input.yi.length - 1);
        expect(Math.abs(residual)).toBeLessThanOrEqual(check.tol * input.yi.length);
        expect(Math.abs(check.statsmodels)).toBeLessThanOrEqual(check.tol * input.yi.length);
      } else {
        expectClose(value, check.statsmodels, Math.max(check.tol, 1e-9), `${check.check} vs statsmodels`);
      }
    });
  }
});
