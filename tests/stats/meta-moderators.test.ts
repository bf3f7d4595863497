/**
 * Meta-regression on a continuous moderator, its fitted line and band, where the line and band cross a target, the
 * Q-profile interval of the residual τ², and separate-τ² subgroups, against metafor 3.8-1 (R 4.2.2):
 * tests/fixtures/reference/meta_moderators_metareg.R wrote meta_moderators_metareg.json.
 * - Curtis & Wang (1998) Oecologia 113:299–313 / Hedges, Gurevitch & Curtis (1999) Ecology 80:1150–1156
 *   (metadat dat.curtis1998), log response ratios by days of exposure (`time`) and elevated CO2 (`co2.elev`):
 *   rma(yi, vi, mods = ~ x, method = "REML", test = "knha"); predict(res, newmods = grid); confint(res).
 * - Colditz et al. (1994) JAMA 271:698–702; Berkey et al. (1995) Stat Med 14:395–411 (metadat dat.bcg), log risk
 *   ratios by absolute latitude: a slope clearly not zero, so the band's crossing is a bounded interval.
 * - Michael et al. (2013) Psychon Bull Rev 20:720–725 (metadat dat.michael2013): one REML + knha fit per level.
 */
import { describe, expect, it } from "vitest";
import { continuousModeratorRegression } from "@/stats/meta/continuous-moderator";
import { lineCrossing } from "@/stats/meta/line-crossing";
import { metaAnalysis } from "@/stats/meta/meta-analysis";
import { separateSubgroupFits } from "@/stats/meta/subgroups";
import { CLOSED_FORM, ITERATIVE, expectClose, loadJsonFixture } from "@/tests/stats/fixtures";

const fixture = loadJsonFixture("meta_moderators_metareg.json");
/** metafor's uniroot in the fixture script stops at 1e-13 absolute on x; the band roots are compared at 1e-7 relative. */
const ROOT = 1e-7;

const cases = [
  { label: "curtis1998 ~ time", data: fixture.curtis1998, x: fixture.curtis1998.time_days, expected: fixture.curtis1998.metareg_time },
  {
    label: "curtis1998 ~ co2.elev",
    data: fixture.curtis1998,
    x: fixture.curtis1998.co2_elev_ppm,
    expected: fixture.curtis1998.metareg_co2_elev,
  },
  { label: "bcg ~ ablat", data: fixture.bcg, x: fixture.bcg.ablat, expected: fixture.bcg.metareg_ablat },
];

describe("continuous moderator: rma(yi, vi, mods = ~ x, method = 'REML', test = 'knha'), metafor 3.8-1", () => {
  for (const { label, data, x, expected } of cases) {
    describe(label, () => {
      const result = continuousModeratorRegression({
        yi: data.yi,
        vi: data.vi,
        x,
        method: "REML",
        ci: "hksj",
        heterogeneityInterval: true,
      });

      it("slope and intercept with SE, t, p and CI; k and residual df", () => {
        expect(result.fit.k).toBe(expected.k);
        expect(result.fit.residualDf).toBe(expected.df_resid);
        for (const [index, name] of [
          [0, "intrcpt"],
          [1, "x"],
        ] as const) {
          const got = result.fit.coefficients[index]!;
          const want = expected.coefficients[name];
          expectClose(got.estimate, want.estimate, ITERATIVE, `${label} ${name} estimate`);
          expectClose(got.se, want.se, ITERATIVE, `${label} ${name} se`);
          expectClose(got.statistic, want.stat, ITERATIVE, `${label} ${name} t`);
          expectClose(got.pValue, want.pval, ITERATIVE, `${label} ${name} p`);
          expectClose(got.ciLower, want.ci_lb, ITERATIVE, `${label} ${name} ci_lb`);
          expectClose(got.ciUpper, want.ci_ub, ITERATIVE, `${label} ${name} ci_ub`);
        }
        expected.vcov.forEach((row: number[], i: number) =>
          row.forEach((value, j) => expectClose(result.fit.covariance[i]![j], value, ITERATIVE, `${label} vcov[${i}][${j}]`)),
        );
        expectClose(result.line.critical, expected.t_crit, CLOSED_FORM, `${label} t critical`);
      });

      it("R², residual τ², I², H², QE and its p, QM (F) and the knha scale", () => {
        expectClose(result.r2Percent, expected.R2_pct, ITERATIVE * 10, `${label} R2`);
        expectClose(result.tau2WithoutModerator, expected.tau2_intercept_only, ITERATIVE, `${label} tau2 without moderator`);
        expectClose(result.fit.tau2, expected.tau2, ITERATIVE, `${label} tau2`);
        expectClose(result.fit.tau, expected.tau, ITERATIVE, `${label} tau`);
        expectClose(result.fit.seTau2, expected.se_tau2, ITERATIVE, `${label} se tau2`);
        expectClose(result.fit.i2Percent, expected.I2_pct, ITERATIVE, `${label} I2`);
        expectClose(result.fit.h2, expected.H2, ITERATIVE, `${label} H2`);
        expectClose(result.fit.qe.statistic, expected.QE, CLOSED_FORM, `${label} QE`);
        expect(result.fit.qe.df).toBe(expected.QE_df);
        expectClose(result.fit.qe.pValue, expected.QE_pval, 1e-6, `${label} QE p`);
        expectClose(result.fit.qm?.statistic, expected.QM, ITERATIVE, `${label} QM`);
        expect(result.fit.qm?.df).toEqual(expected.QM_df);
        expectClose(result.fit.qm?.pValue, expected.QM_pval, ITERATIVE, `${label} QM p`);
        expectClose(result.fit.knhaScale, expected.knha_scale_factor_s2, ITERATIVE, `${label} knha s2`);
      });

      it("fitted line, its confidence band and prediction interval at the grid (predict(res, newmods = x))", () => {
        expect(result.range).toEqual({ min: expected.x_range[0], max: expected.x_range[1] });
        expect(result.grid).toHaveLength(expected.predict.x.length);
        result.grid.forEach((point, i) => {
          expectClose(point.x, expected.predict.x[i], 1e-12, `${label} grid x ${i}`);
          expectClose(point.fitted, expected.predict.pred[i], ITERATIVE, `${label} pred ${i}`);
          expectClose(point.se, expected.predict.se[i], ITERATIVE, `${label} se ${i}`);
          expectClose(point.ciLower, expected.predict.ci_lb[i], ITERATIVE, `${label} ci_lb ${i}`);
          expectClose(point.ciUpper, expected.predict.ci_ub[i], ITERATIVE, `${label} ci_ub ${i}`);
          expectClose(point.piLower, expected.predict.pi_lb[i], ITERATIVE, `${label} pi_lb ${i}`);
          expectClose(point.piUpper, expected.predict.pi_ub[i], ITERATIVE, `${label} pi_ub ${i}`);
        });
      });

      it("confint(res): Q-profile interval of the residual τ², τ, I², H²", () => {
        const interval = result.heterogeneityInterval!;
        expect(interval).not.toBeNull();
        const want = expected.heterogeneity_ci;
        for (const [key, got] of [
          ["tau2", interval.tau2],
          ["tau", interval.tau],
          ["I2_pct", interval.i2Percent],
          ["H2", interval.h2],
        ] as const) {
          expectClose(got.estimate, want[key][0], ITERATIVE, `${label} ${key} estimate`);
          expectClose(got.lower, want[key][1], 1e-6, `${label} ${key} lower`);
          expectClose(got.upper, want[key][2], 1e-6, `${label} ${key} upper`);
        }
      });

      it("crossings of each target: x̂ = (t − b₀)/b₁, and the interval where predict()'s band crosses t", () => {
        for (const crossing of expected.crossings) {
          const got = lineCrossing(result.line, crossing.target);
          expectClose(got.value, crossing.x_hat, ITERATIVE, `${label} x̂ at ${crossing.target}`);
          const roots = [crossing.band_lb_roots, crossing.band_ub_roots].flat();
          // A bounded interval has exactly one root of the lower and one of the upper band; anything else is a ray
          // or two, or the whole line: no interval.
          const bounded = [crossing.band_lb_roots].flat().length === 1 && [crossing.band_ub_roots].flat().length === 1;
          if (bounded) {
            expect(got.interval, `${label} interval at ${crossing.target}`).not.toBeNull();
            expectClose(got.interval!.lower, Math.min(...roots), ROOT, `${label} lower at ${crossing.target}`);
            expectClose(got.interval!.upper, Math.max(...roots), ROOT, `${label} upper at ${crossing.target}`);
          } else {
            expect(got.interval, `${label} no bounded interval at ${crossing.target} (band roots ${roots.join(", ")})`).toBeNull();
          }
        }
      });
    });
  }

  it("the fixture has both kinds of crossing: bounded (bcg) and unbounded (curtis1998)", () => {
    const bounded = fixture.bcg.metareg_ablat.crossings.filter(
      (c: any) => [c.band_lb_roots].flat().length === 1 && [c.band_ub_roots].flat().length === 1,
    );
    expect(bounded.length).toBe(2);
    expect(fixture.curtis1998.metareg_co2_elev.crossings[1].band_lb_roots).toHaveLength(2);
  });

  it("intercept-only confint() of curtis1998 matches metaAnalysis' Q-profile interval", () => {
    const fit = metaAnalysis({ yi: fixture.curtis1998.yi, vi: fixture.curtis1998.vi, method: "REML", ci: "hksj" });
    const want = fixture.curtis1998_intercept_only_heterogeneity_ci;
    expectClose(fit.heterogeneityInterval!.tau2.lower, want.tau2[1], 1e-6, "tau2 lower");
    expectClose(fit.heterogeneityInterval!.tau2.upper, want.tau2[2], 1e-6, "tau2 upper");
    expectClose(fit.heterogeneityInterval!.i2Percent.lower, want.I2_pct[1], 1e-6, "I2 lower");
    expectClose(fit.heterogeneityInterval!.i2Percent.upper, want.I2_pct[2], 1e-6, "I2 upper");
  });
});

describe("separate τ² per level: rma(yi, vi, subset = level, method = 'REML', test = 'knha'), michael2013", () => {
  const data = fixture.michael2013_separate_REML_knha;
  const result = separateSubgroupFits({ yi: data.yi, vi: data.vi, groups: data.groups, method: "REML", ci: "hksj" });
  for (const want of data.levels) {
    it(`${want.level}: estimate, SE, t(k − 1) CI and p, τ², I², Q`, () => {
      const got = result.perLevel[want.level]!;
      expect(got.k).toBe(want.k);
      expect(got.df).toBe(want.df);
      expectClose(got.estimate, want.estimate, ITERATIVE, "estimate");
      expectClose(got.se, want.se, ITERATIVE, "se");
      expectClose(got.statistic, want.stat, ITERATIVE, "t");
      expectClose(got.pValue, want.pval, ITERATIVE, "p");
      expectClose(got.ciLower, want.ci_lb, ITERATIVE, "ci_lb");
      expectClose(got.ciUpper, want.ci_ub, ITERATIVE, "ci_ub");
      expectClose(got.tau2, want.tau2, 1e-6, "tau2");
      expectClose(got.i2Percent, want.I2_pct, 1e-6, "I2");
      expectClose(got.q.statistic, want.Q, CLOSED_FORM, "Q");
      expectClose(got.q.pValue, want.Q_pval, CLOSED_FORM, "Q p");
    });
  }
  it("Q_between over the level estimates (metafor: rma(est, sei = se, method = 'FE')$QE)", () => {
    expectClose(result.qBetween.statistic, data.Q_between, ITERATIVE, "Q_between");
    expectClose(result.qBetween.statistic, data.Q_between_metafor, ITERATIVE, "Q_between (metafor)");
    expect(result.qBetween.df).toBe(data.Q_between_df);
    expectClose(result.qBetween.pValue, data.Q_between_pval, ITERATIVE, "Q_between p");
  });
});
