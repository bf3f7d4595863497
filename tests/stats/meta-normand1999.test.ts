/**
 * Normand, S.-L. T. (1999). Meta-analysis: formulating, evaluating, combining, and reporting.
 * Statistics in Medicine 18(3):321–359 — 9 stroke-care trials, length of stay (MD).
 * Reference values: metafor 3.8-1 (R 4.2.2), threshold = 1e-12, tol = 1e-12:
 *   dat <- escalc(measure = "MD", m1i, sd1i, n1i, m2i, sd2i, n2i, data = dat.normand1999)
 *   rma(yi, vi, data = dat, method = M, test = "z" | "knha"); predict(fit); confint(fit)
 */
import { describe, expect, it } from "vitest";
import { metaAnalysis } from "@/stats/meta/meta-analysis";
import { CLOSED_FORM, expectClose, loadCsvFixture, loadJsonFixture, numericColumn } from "@/tests/stats/fixtures";
import { expectHeterogeneityIntervalMatches, expectModelMatches, parseModelKey } from "@/tests/stats/meta-fixture-checks";

const rows = loadCsvFixture("meta_normand1999_md_data.csv");
const results = loadJsonFixture("meta_normand1999_md_results.json");
const yi = numericColumn(rows, "yi");
const vi = numericColumn(rows, "vi");
const modelKeys = Object.keys(results.models).filter((key) => key !== "defaults_check");

describe("Normand 1999 (Stat Med 18:321–359), metafor 3.8-1 rma()", () => {
  it("reads the CSV yi/vi as escalc(measure = 'MD') gives them (yi = m1i − m2i, vi = sd1²/n1 + sd2²/n2)", () => {
    expect(yi).toEqual(results.yi);
    rows.forEach((row, index) => {
      const expected = Number(row.sd1i) ** 2 / Number(row.n1i) + Number(row.sd2i) ** 2 / Number(row.n2i);
      expectClose(vi[index], expected, CLOSED_FORM, `vi ${index + 1}`);
    });
  });

  for (const key of modelKeys) {
    const { method, ci } = parseModelKey(key);
    it(`${key}: rma(yi, vi, method = "${method}"${ci === "hksj" ? ', test = "knha"' : ""}) + predict()`, () => {
      const result = metaAnalysis({ yi, vi, method, ci, labels: rows.map((row) => row.source as string) });
      expectModelMatches(result, results.models[key], key);
      expect(result.converged).toBe(true);
      expect(result.labels?.[0]).toBe("Edinburgh");
    });
  }

  for (const key of ["REML", "PM"]) {
    it(`${key}: confint(rma(yi, vi, method = "${key}")) Q-profile CI of tau2, tau, I2, H2 (Viechtbauer 2007)`, () => {
      const result = metaAnalysis({ yi, vi, method: key as "REML" | "PM", ci: "wald" });
      expectHeterogeneityIntervalMatches(result, results.models[key].heterogeneity_ci, key);
    });
  }

  it("DL: confint() — the Q-profile bounds do not depend on the estimator; metafor caps the upper search at 10·tau2_DL", () => {
    const result = metaAnalysis({ yi, vi, method: "DL", ci: "wald" });
    const expected = results.models.DL.heterogeneity_ci;
    expectHeterogeneityIntervalMatches(
      result,
      {
        ...expected,
        tau2: { ...expected.tau2, ci_ub: results.models.REML.heterogeneity_ci.tau2.ci_ub },
        H2: results.models.REML.heterogeneity_ci.H2,
        tau: results.models.REML.heterogeneity_ci.tau,
      },
      "DL",
    );
    // metafor's reported DL upper bound equals its search limit 10·tau2_DL (it warns in that case).
    expectClose(expected.tau2.ci_ub, 10 * results.models.DL.tau2, 1e-12, "metafor DL upper bound = 10·tau2");
    expect(result.heterogeneityInterval?.tau2.upper ?? 0).toBeGreaterThan(expected.tau2.ci_ub);
  });

  it("metafor default control (threshold 1e-5) lands within 1e-8 of the tight REML/PM values used here", () => {
    const reml = metaAnalysis({ yi, vi, method: "REML" });
    expectClose(reml.tau2, results.models.defaults_check.REML.tau2_default_control, 1e-8, "REML default control tau2");
    const pm = metaAnalysis({ yi, vi, method: "PM" });
    expectClose(pm.estimate, results.models.defaults_check.PM.estimate_default_control, 1e-8, "PM default control estimate");
  });
});
