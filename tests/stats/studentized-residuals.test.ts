import { describe, expect, it } from "vitest";
import { studentizedResiduals } from "@/stats";
import { loadCsvFixture, loadJsonFixture, numericColumn } from "./fixtures";

/**
 * Source: Yates (1935), the pea trial as R's datasets::npk; reference values from R 4.2.2
 * `rstandard(lm(yield ~ block + N, data = npk))`, `rstudent(...)` and `hatvalues(...)`, balanced and with plot 5 removed
 * (tests/fixtures/reference/studentized_npk.R).
 */
const rows = loadCsvFixture("anova_npk_data.csv");
const reference = loadJsonFixture<{
  balanced: { plots: number[]; rstandard: number[]; rstudent: number[]; bonferroni: number[]; hat: number[] };
  unbalanced: { plots: number[]; rstandard: number[]; rstudent: number[]; bonferroni: number[]; hat: number[] };
}>("studentized_npk_results.json");

function fitOf(plots: number[]) {
  const kept = plots.map((p) => rows[p - 1]!);
  return studentizedResiduals({
    response: numericColumn(kept, "yield"),
    factors: { block: { values: kept.map((r) => r.block!) }, N: { values: kept.map((r) => r.N!) } },
    terms: [["block"], ["N"]],
  });
}

describe("studentizedResiduals", () => {
  for (const design of ["balanced", "unbalanced"] as const) {
    it(`matches R's rstandard, rstudent, hatvalues and the Bonferroni outlier p on npk, ${design}`, () => {
      const ref = reference[design];
      const fit = fitOf(ref.plots);
      expect(fit.studentized).toHaveLength(ref.rstandard.length);
      ref.rstandard.forEach((r, i) => expect(fit.studentized[i]).toBeCloseTo(r, 9));
      ref.rstudent.forEach((r, i) => expect(fit.external[i]).toBeCloseTo(r, 9));
      ref.bonferroni.forEach((p, i) => expect(fit.bonferroniP[i]).toBeCloseTo(p, 9));
      ref.hat.forEach((h, i) => expect(fit.leverage[i]).toBeCloseTo(h, 9));
    });
  }

  it("refuses interaction terms", () => {
    expect(() => studentizedResiduals({ response: [1, 2], factors: { a: { values: ["x", "y"] } }, terms: [["a", "a"]] })).toThrow(
      /main-effect/,
    );
  });
});
