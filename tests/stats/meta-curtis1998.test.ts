/**
 * Hedges, L. V., Gurevitch, J., & Curtis, P. S. (1999). The meta-analysis of response ratios in
 * experimental ecology. Ecology 80(4):1150–1156; data of Curtis & Wang (1998) Oecologia 113:299–313
 * (metafor dat.curtis1998): 102 log response ratios (ROM), elevated vs ambient CO2.
 * Reference values: metafor 3.8-1 (R 4.2.2):
 *   dat <- escalc(measure = "ROM", m1i, sd1i, n1i, m2i, sd2i, n2i, data = dat.curtis1998)
 *   rma(yi, vi, data = dat, method = M, test = ...); 100 * (exp(coef) - 1)
 */
import { describe, expect, it } from "vitest";
import { metaAnalysis } from "@/stats/meta/meta-analysis";
import { subgroupAnalysis } from "@/stats/meta/subgroups";
import { CLOSED_FORM, expectClose, loadCsvFixture, loadJsonFixture, numericColumn } from "@/tests/stats/fixtures";
import {
  expectCommonTauSquaredMatches,
  expectHeterogeneityIntervalMatches,
  expectModelMatches,
  expectSeparateFitsMatch,
  parseModelKey,
  toleranceFor,
} from "@/tests/stats/meta-fixture-checks";

const rows = loadCsvFixture("meta_curtis1998_rom_data.csv");
const results = loadJsonFixture("meta_curtis1998_rom_results.json");
const yi = numericColumn(rows, "yi");
const vi = numericColumn(rows, "vi");

describe("Curtis & Wang 1998 / Hedges et al. 1999 (Ecology 80:1150–1156), ROM, metafor 3.8-1", () => {
  it("yi = log(m1i/m2i) and vi = sd1²/(n1 m1²) + sd2²/(n2 m2²) (escalc measure = 'ROM')", () => {
    expect(yi).toHaveLength(102);
    rows.forEach((row, index) => {
      const [m1, m2, s1, s2, n1, n2] = ["m1i", "m2i", "sd1i", "sd2i", "n1i", "n2i"].map((name) => Number(row[name])) as number[];
      expectClose(yi[index], Math.log((m1 as number) / (m2 as number)), CLOSED_FORM, `yi ${index + 1}`);
      expectClose(
        vi[index],
        (s1 as number) ** 2 / ((n1 as number) * (m1 as number) ** 2) + (s2 as number) ** 2 / ((n2 as number) * (m2 as number) ** 2),
        CLOSED_FORM,
        `vi ${index + 1}`,
      );
    });
  });

  for (const key of Object.keys(results.models).filter((name) => name !== "defaults_check")) {
    const { method, ci } = parseModelKey(key);
    it(`${key}: rma(yi, vi, method = "${method}"${ci === "hksj" ? ', test = "knha"' : ""}), percent change 100(exp(est) − 1)`, () => {
      const fit = metaAnalysis({ yi, vi, method, ci });
      const expected = results.models[key];
      expectModelMatches(fit, expected, key);
      if (expected.percent_change !== undefined) {
        const tolerance = toleranceFor(method);
        expectClose(100 * Math.expm1(fit.estimate), expected.percent_change, tolerance, `${key} percent change`);
        expectClose(100 * Math.expm1(fit.ciLower), expected.percent_change_ci[0], tolerance, `${key} percent change ci_lb`);
        expectClose(100 * Math.expm1(fit.ciUpper), expected.percent_change_ci[1], tolerance, `${key} percent change ci_ub`);
      }
    });
  }

  for (const key of ["DL", "REML", "PM"] as const) {
    it(`${key}: confint() Q-profile CI for tau2/tau/I2/H2`, () => {
      expectHeterogeneityIntervalMatches(metaAnalysis({ yi, vi, method: key, ci: "wald" }), results.models[key].heterogeneity_ci, key);
    });
  }

  describe("subgroups by fungrp (ANGIO, GYMNO, N2FIX with only 2 comparisons)", () => {
    const groups = rows.map((row) => row.fungrp as string);
    const fixture = results.subgroup_by_fungrp;
    it("levels, counts, and a note for the small level", () => {
      const result = subgroupAnalysis({ yi, vi, groups, method: "REML", ci: "wald" });
      expect(result.levels).toEqual(fixture.levels);
      expect(result.countPerLevel).toEqual(fixture.n_per_level);
      expect(result.notes.join(" ")).toMatch(/N2FIX/);
    });
    for (const key of ["common_tau2_DL", "common_tau2_DL_knha", "common_tau2_REML", "common_tau2_REML_knha"]) {
      const { method, ci } = parseModelKey(key.replace("common_tau2_", ""));
      it(`${key}: rma(yi, vi, mods = ~ fungrp, method = "${method}"${ci === "hksj" ? ', test = "knha"' : ""})`, () => {
        expectCommonTauSquaredMatches(subgroupAnalysis({ yi, vi, groups, method, ci }), fixture[key], key);
      });
    }
    for (const method of ["FE", "DL", "REML"] as const) {
      it(`separate_${method}: one rma(method = "${method}") per fungrp level + Q_between`, () => {
        expectSeparateFitsMatch(
          subgroupAnalysis({ yi, vi, groups, method, ci: "wald" }),
          fixture[`separate_${method}`],
          `separate_${method}`,
        );
      });
    }
  });

  describe("metadat help examples: rma(yi, vi, method = 'DL', subset = xtrt == X & level == 'LOW'); predict(res, transf = exp)", () => {
    for (const [key, xtrt] of [
      ["FERT_LOW", "FERT"],
      ["LIGHT_LOW", "LIGHT"],
    ] as const) {
      it(`${key}`, () => {
        const indices = rows.flatMap((row, index) => (row.xtrt === xtrt && row.level === "LOW" ? [index] : []));
        const expected = results.help_example_subsets[key];
        expect(indices).toHaveLength(expected.subset_k);
        const fit = metaAnalysis({
          yi: indices.map((i) => yi[i] as number),
          vi: indices.map((i) => vi[i] as number),
          method: "DL",
          ci: "wald",
        });
        expectModelMatches(fit, expected, key);
        expectClose(Math.exp(fit.estimate), expected.ratio_of_means, CLOSED_FORM, `${key} ratio`);
        expectClose(Math.exp(fit.ciLower), expected.ratio_ci[0], CLOSED_FORM, `${key} ratio ci_lb`);
        expectClose(Math.exp(fit.ciUpper), expected.ratio_ci[1], CLOSED_FORM, `${key} ratio ci_ub`);
        expectClose(Math.exp(fit.predictionInterval.metafor?.lower as number), expected.ratio_pi[0], CLOSED_FORM, `${key} ratio pi_lb`);
        expectClose(Math.exp(fit.predictionInterval.metafor?.upper as number), expected.ratio_pi[1], CLOSED_FORM, `${key} ratio pi_ub`);
      });
    }
  });
});
