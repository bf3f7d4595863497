/**
 * Michael, R. B., Newman, E. J., Vuorre, M., Cumming, G., & Garry, M. (2013). On the (non)persuasive
 * power of a brain image. Psychonomic Bulletin & Review 20(4):720–725 — 12 experiments (MD).
 * Reference values: metafor 3.8-1 (R 4.2.2), threshold = 1e-12, tol = 1e-12:
 *   rma(yi, vi, data = dat.michael2013, method = M, test = "z" | "knha")
 *   rma(yi, vi, mods = ~ included_critique, ...); rma(yi, vi, mods = ~ 0 + included_critique, ...)
 *   by(dat, dat$included_critique, function(d) rma(yi, vi, data = d, method = M))
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
} from "@/tests/stats/meta-fixture-checks";

const rows = loadCsvFixture("meta_michael2013_md_data.csv");
const results = loadJsonFixture("meta_michael2013_md_results.json");
const yi = numericColumn(rows, "yi");
const vi = numericColumn(rows, "vi");

describe("Michael et al. 2013 (Psychon Bull Rev 20:720–725), metafor 3.8-1 rma()", () => {
  for (const key of Object.keys(results.models).filter((name) => name !== "defaults_check")) {
    const { method, ci } = parseModelKey(key);
    it(`${key}: rma(yi, vi, method = "${method}"${ci === "hksj" ? ', test = "knha"' : ""}) + predict()`, () => {
      expectModelMatches(metaAnalysis({ yi, vi, method, ci }), results.models[key], key);
    });
  }

  for (const key of ["DL", "REML", "PM"] as const) {
    it(`${key}: confint() Q-profile CI for tau2/tau/I2/H2`, () => {
      expectHeterogeneityIntervalMatches(metaAnalysis({ yi, vi, method: key, ci: "wald" }), results.models[key].heterogeneity_ci, key);
    });
  }

  it("published result: RE estimate 0.07 [-0.00, 0.14] (metadat help page restating Michael et al. 2013)", () => {
    const fit = metaAnalysis({ yi, vi, method: "REML", ci: "wald" });
    const published = results.published_check.fixture_REML_rounded_2dp;
    expect(Number(fit.estimate.toFixed(2))).toBe(published.estimate);
    // The published lower bound is printed "-0.00": compare the rounded values without the sign of zero.
    expect(Number(fit.ciLower.toFixed(2)) + 0).toBe(published.ci_lb + 0);
    expect(fit.ciLower).toBeLessThan(0);
    expect(Number(fit.ciUpper.toFixed(2))).toBe(published.ci_ub);
  });

  it("defaults_check: metafor default control agrees with the tight fit to 1e-3 relative", () => {
    const fit = metaAnalysis({ yi, vi, method: "REML" });
    expectClose(fit.estimate, results.models.defaults_check.REML.estimate_default_control, 1e-3, "REML estimate");
  });

  for (const factor of ["included_critique", "medium"] as const) {
    const groups = rows.map((row) => row[factor] as string);
    const fixture = results[`subgroup_by_${factor}`];
    describe(`subgroups by ${factor}`, () => {
      it("levels and counts", () => {
        const result = subgroupAnalysis({ yi, vi, groups, method: "DL", ci: "wald" });
        expect(result.levels).toEqual(fixture.levels);
        expect(result.countPerLevel).toEqual(fixture.n_per_level);
      });
      for (const key of ["common_tau2_DL", "common_tau2_DL_knha", "common_tau2_REML", "common_tau2_REML_knha"]) {
        const { method, ci } = parseModelKey(key.replace("common_tau2_", ""));
        it(`${key}: rma(yi, vi, mods = ~ ${factor}, method = "${method}"${ci === "hksj" ? ', test = "knha"' : ""})`, () => {
          expectCommonTauSquaredMatches(subgroupAnalysis({ yi, vi, groups, method, ci }), fixture[key], key);
        });
      }
      for (const method of ["FE", "DL", "REML"] as const) {
        it(`separate_${method}: one rma(method = "${method}") per level + Q_between`, () => {
          const result = subgroupAnalysis({ yi, vi, groups, method, ci: "wald" });
          expectSeparateFitsMatch(result, fixture[`separate_${method}`], `separate_${method}`);
          if (method === "FE") {
            // Fixed effect: Q_total = Q_between + sum Q_within exactly.
            const within = Object.values(result.separate.perLevel).reduce((sum, fit) => sum + fit.q.statistic, 0);
            expectClose(within, fixture.separate_FE.Q_within_sum, CLOSED_FORM, "sum Q_within");
            expectClose(result.separate.qBetween.statistic, fixture.separate_FE.Q_total - within, 1e-9, "Q partition");
          }
        });
      }
    });
  }
});
