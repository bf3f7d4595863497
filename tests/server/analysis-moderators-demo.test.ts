/**
 * The demo question with moderator=soilTestValue, answered by the endpoint over HTTP on the seeded demo, against
 * metafor 3.8-1 on the same site-year effects: tests/fixtures/reference/demo_metareg_soil_p.R read the endpoint's CSV
 * (demo_metareg_soil_p.csv) and wrote demo_metareg_soil_p.json with
 * rma(estimate, vi, mods = ~ soil_test_value, method = "REML", test = "knha"), predict() and confint().
 */
import Papa from "papaparse";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { seedDemo } from "@/datasets";
import { metaAnalysisResult } from "@/schemas/analysis";
import { ITERATIVE, expectClose, loadCsvFixture, loadJsonFixture } from "@/tests/stats/fixtures";
import { testApp, type TestApp } from "@/tests/support/test-app";

const metafor = loadJsonFixture("demo_metareg_soil_p.json");
const question = "crop=soybean&nutrient=P&placement=2x2-band&moderator=soilTestValue";
let t: TestApp;

beforeAll(async () => {
  t = await testApp({ anonRatePerMinute: 1_000_000 });
  await seedDemo(t.ctx);
}, 180_000);
afterAll(async () => t?.close());

describe("demo: soybean · P · 2x2 band by Bray-P1 soil-test P, against metafor on the same effects", () => {
  it("the endpoint's site-year effects are the ones metafor was given", async () => {
    const text = (await request(t.app).get(`/api/v1/analyses/meta?${question}&format=csv`).expect(200)).text;
    const now = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true }).data;
    const then = loadCsvFixture("demo_metareg_soil_p.csv");
    expect(now.map((r) => [r.site_year, r.soil_test_value])).toEqual(then.map((r) => [r.site_year, r.soil_test_value]));
    now.forEach((r, i) => {
      expectClose(Number(r.estimate), Number(then[i]!.estimate), 1e-12, `estimate ${r.site_year}`);
      expectClose(Number(r.vi), Number(then[i]!.vi), 1e-12, `vi ${r.site_year}`);
    });
  });

  it("slope, intercept, R², residual τ² and I², QE, the line and its band, the critical level, the intervals", async () => {
    const body = (await request(t.app).get(`/api/v1/analyses/meta?${question}&price=11&cost=18&include=heterogeneityIntervals`).expect(200))
      .body;
    const result = metaAnalysisResult.parse(body);
    const m = result.moderatorRegression!;
    expect(m.label).toBe("Soil-test P (Bray-P1, ppm)");
    expect(m.k).toBe(metafor.k);
    expect(m.excluded.count).toBe(0);
    const fit = m.fit!;
    for (const [got, want, name] of [
      [fit.intercept, metafor.intercept, "intercept"],
      [fit.slope, metafor.slope, "slope"],
    ] as const) {
      expectClose(got.estimate, want.estimate, ITERATIVE, `${name} estimate`);
      expectClose(got.se, want.se, ITERATIVE, `${name} se`);
      expectClose(got.statistic, want.stat, ITERATIVE, `${name} t`);
      expectClose(got.pValue, want.pval, ITERATIVE, `${name} p`);
      expectClose(got.ciLower, want.ci_lb, ITERATIVE, `${name} ci_lb`);
      expectClose(got.ciUpper, want.ci_ub, ITERATIVE, `${name} ci_ub`);
    }
    expectClose(fit.r2Percent, metafor.R2_pct, 1e-6, "R2");
    expectClose(fit.tau2, metafor.tau2, ITERATIVE, "tau2");
    expectClose(fit.i2Percent, metafor.I2_pct, ITERATIVE, "I2");
    expectClose(fit.residualHeterogeneity.qe, metafor.QE, 1e-9, "QE");
    expect(fit.residualHeterogeneity.df).toBe(metafor.QE_df);
    expectClose(fit.residualHeterogeneity.pValue, metafor.QE_pval, 1e-9, "QE p");
    fit.line.forEach((p, i) => {
      expectClose(p.x, metafor.predict.x[i], 1e-12, `x ${i}`);
      expectClose(p.fitted, metafor.predict.pred[i], ITERATIVE, `pred ${i}`);
      expectClose(p.ciLower, metafor.predict.ci_lb[i], ITERATIVE, `ci_lb ${i}`);
      expectClose(p.ciUpper, metafor.predict.ci_ub[i], ITERATIVE, `ci_ub ${i}`);
      expectClose(p.piLower, metafor.predict.pi_lb[i], ITERATIVE, `pi_lb ${i}`);
      expectClose(p.piUpper, metafor.predict.pi_ub[i], ITERATIVE, `pi_ub ${i}`);
    });
    const h = fit.heterogeneityInterval!;
    expectClose(h.tau2.lower, metafor.residual_heterogeneity_ci.tau2[1], 1e-6, "residual tau2 lower");
    expectClose(h.tau2.upper, metafor.residual_heterogeneity_ci.tau2[2], 1e-6, "residual tau2 upper");
    expectClose(h.i2Percent.lower, metafor.residual_heterogeneity_ci.I2_pct[1], 1e-6, "residual I2 lower");
    expectClose(h.i2Percent.upper, metafor.residual_heterogeneity_ci.I2_pct[2], 1e-6, "residual I2 upper");
    const pooled = result.heterogeneity!.interval!;
    expectClose(pooled.tau2.lower, metafor.pooled.heterogeneity_ci.tau2[1], 1e-6, "pooled tau2 lower");
    expectClose(pooled.tau2.upper, metafor.pooled.heterogeneity_ci.tau2[2], 1e-6, "pooled tau2 upper");
    expectClose(pooled.i2Percent.upper, metafor.pooled.heterogeneity_ci.I2_pct[2], 1e-6, "pooled I2 upper");

    // Where metafor's band (found with uniroot) crosses zero and the break-even 18/11 bu/ac.
    for (const [got, want] of [
      [m.criticalLevel!.zero, metafor.crossings.zero],
      [m.criticalLevel!.breakEven!, metafor.crossings.break_even_18_over_11],
    ] as const) {
      expectClose(got.target, want.target, 1e-12, "target");
      expectClose(got.value, want.x_hat, ITERATIVE, `x̂ at ${want.target}`);
      expectClose(got.interval!.lower, want.band_lb_roots, 1e-7, `lower at ${want.target}`);
      expectClose(got.interval!.upper, want.band_ub_roots, 1e-7, `upper at ${want.target}`);
    }
    expect(m.criticalLevel!.zero.text).toBe(
      "The fitted response reaches zero at 24.8 ppm, 95 % interval 18.3 to 50.1 ppm (reaching beyond the tested 5–32 ppm).",
    );
    expect(m.criticalLevel!.caution.text).toMatch(/^This critical soil-test level is an estimate from these trials/);
  });

  it("the demo answer without a moderator is unchanged (soybean · P · 2x2 band · low → +3.5 bu/ac, 17 site-years)", async () => {
    const body = (
      await request(t.app).get("/api/v1/analyses/meta?crop=soybean&nutrient=P&placement=2x2-band&soilTestClass=low").expect(200)
    ).body;
    expect(body.k).toBe(17);
    expect(body.pooled.estimate.toFixed(1)).toBe("3.5");
    expect(body).not.toHaveProperty("moderatorRegression");
  });
});
