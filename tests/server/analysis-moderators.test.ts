/**
 * The meta endpoint's continuous moderators and heterogeneity detail over HTTP on PGlite: one scale or a 422 naming
 * what is mixed, site-years without a value left out and counted, the numbers equal to the statistics engine's on the
 * answer's own site-year effects (the engine is checked against metafor in tests/stats/meta-moderators.test.ts), and
 * a default answer without any of it.
 */
import Papa from "papaparse";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { metaAnalysisResult } from "@/schemas/analysis";
import { continuousModeratorRegression, lineCrossing, metaAnalysis, separateSubgroupFits } from "@/stats";
import { insertAnalysisFixture, type FixtureResponse } from "@/tests/support/analysis-fixture";
import { testApp, type TestApp } from "@/tests/support/test-app";

let t: TestApp;
const get = async (query: string) => metaAnalysisResult.parse((await request(t.app).get(`/api/v1/analyses/meta${query}`).expect(200)).body);
const problem = async (query: string, status: number) => (await request(t.app).get(`/api/v1/analyses/meta${query}`).expect(status)).body;
const csvRows = async (query: string) =>
  Papa.parse<Record<string, string>>((await request(t.app).get(`/api/v1/analyses/meta${query}&format=csv`).expect(200)).text, {
    header: true,
    skipEmptyLines: true,
  }).data;

/** Responses falling with soil-test P, planting dates in May, P2O5 rates from 20 to 60; TB-09 has no soil test. */
const bray: FixtureResponse[] = [
  { p: 4, md: 420, se: 90, date: "2021-04-28", rate: 20 },
  { p: 6, md: 350, se: 85, date: "2021-05-03", rate: 30 },
  { p: 9, md: 300, se: 100, date: "2021-05-10", rate: 40 },
  { p: 12, md: 180, se: 80, date: "2021-05-15", rate: 60 },
  { p: 15, md: 160, se: 95, date: null, rate: 40 },
  { p: 20, md: 40, se: 70, date: "2021-05-22", rate: 20 },
  { p: 26, md: 10, se: 90, date: "2021-05-30", rate: 60 },
  { p: 31, md: -60, se: 85, date: "2021-06-04", rate: 30 },
  { p: null, md: 200, se: 90, date: "2021-05-12", rate: 40 },
].map((r, i) => ({
  siteYear: `TB-${String(i + 1).padStart(2, "0")}-2021`,
  year: 2021,
  treatment: "BAND",
  md: r.md,
  se: r.se,
  soilPValue: r.p,
  soilPClass: r.p === null ? null : r.p < 10 ? "low" : r.p < 20 ? "optimum" : "high",
  plantingDate: r.date,
  p2o5LbAc: r.rate,
}));
const mehlich: FixtureResponse[] = [8, 14, 22, 35].map((p, i) => ({
  siteYear: `MH-${String(i + 1).padStart(2, "0")}-2022`,
  year: 2022,
  treatment: "BAND",
  md: 300 - 10 * p,
  se: 90,
  soilPValue: p,
  soilPClass: p < 20 ? "low" : "high",
}));
const corn: FixtureResponse[] = [1, 2, 3].map((i) => ({
  siteYear: `CN-0${i}-2022`,
  year: 2022,
  crop: "corn",
  treatment: "BAND",
  md: 100 * i,
  se: 90,
  checkMean: 9000 + 500 * i,
}));

beforeAll(async () => {
  t = await testApp({ anonRatePerMinute: 1_000_000 });
  await insertAnalysisFixture(t.ctx, { slug: "p-bray", responses: bray, soilPExtractant: "Bray-P1" });
  await insertAnalysisFixture(t.ctx, { slug: "p-mehlich", responses: mehlich, soilPExtractant: "Mehlich-3" });
  await insertAnalysisFixture(t.ctx, { slug: "corn-check", responses: corn });
});
afterAll(async () => t?.close());

describe("moderator=soilTestValue", () => {
  it("refuses soil tests of two extractants with 422, naming each with its count and datasets", async () => {
    const body = await problem("?nutrient=P&crop=soybean&moderator=soilTestValue", 422);
    expect(body.detail).toBe(
      "P soil tests use Bray-P1 (ppm) at 8 site-years and Mehlich-3 (ppm) at 4; filter to one extractant and unit " +
        "(by dataset: Bray-P1 (ppm): p-bray; Mehlich-3 (ppm): p-mehlich).",
    );
    expect(body.errors[0]).toMatchObject({ field: "query.moderator", value: "soilTestValue" });
  });

  it("on one dataset: the site-year without a soil test is left out and named; the fit is the engine's on the answer's effects", async () => {
    const query = "?dataset=p-bray&nutrient=P&moderator=soilTestValue";
    const result = await get(query);
    const m = result.moderatorRegression!;
    expect(m).toMatchObject({
      moderator: "soilTestValue",
      label: "Soil-test P (Bray-P1, ppm)",
      unit: "ppm",
      analyte: "P",
      extractant: "Bray-P1",
    });
    expect(result.k).toBe(9);
    expect(m.k).toBe(8);
    expect(m.excluded).toEqual({
      count: 1,
      siteYears: [{ siteYearCode: "TB-09-2021", dataset: "p-bray", version: "1.0.0", reason: "no P soil-test value" }],
    });
    expect(m.range).toEqual({ min: 4, max: 31 });

    const rows = (await csvRows(query)).filter((r) => r.soil_test_value !== "");
    const expected = continuousModeratorRegression({
      yi: rows.map((r) => Number(r.estimate)),
      vi: rows.map((r) => Number(r.vi)),
      x: rows.map((r) => Number(r.soil_test_value)),
      method: "REML",
      ci: "hksj",
    });
    const fit = m.fit!;
    expect(fit.slope.estimate).toBeCloseTo(expected.fit.coefficients[1]!.estimate, 12);
    expect(fit.slope.ciLower).toBeCloseTo(expected.fit.coefficients[1]!.ciLower, 12);
    expect(fit.slope.pValue).toBeCloseTo(expected.fit.coefficients[1]!.pValue, 12);
    expect(fit.slope.df).toBe(6);
    expect(fit.slope.estimate).toBeLessThan(0);
    expect(fit.r2Percent).toBeCloseTo(expected.r2Percent!, 10);
    expect(fit.tau2).toBeCloseTo(expected.fit.tau2, 12);
    expect(fit.residualHeterogeneity).toEqual({ qe: expected.fit.qe.statistic, df: 6, pValue: expected.fit.qe.pValue });
    expect(fit.line).toHaveLength(25);
    expect(fit.line[0]!.x).toBe(4);
    expect(fit.line.at(-1)!.x).toBe(31);
    for (const point of fit.line) expect(point.ciLower).toBeLessThan(point.fitted);
    expect(fit.heterogeneityInterval).toBeUndefined();

    const zero = lineCrossing(expected.line, 0);
    expect(m.criticalLevel!.zero.value).toBeCloseTo(zero.value!, 10);
    expect(m.criticalLevel!.zero.text).toMatch(/^The fitted response reaches zero at [\d.]+ ppm/);
    expect(m.criticalLevel!.breakEven).toBeNull();
    expect(m.criticalLevel!.caution.code).toBe("critical-level-estimate");
    expect(m.criticalLevel!.caution.text).toMatch(/estimate from these trials/);
    expect(m.plainWords).toMatch(/^The response falls by [\d.]+ bu\/ac per ppm of soil-test P \(95 % CI/);
  });

  it("with price and cost: the break-even crossing at cost ÷ price, with its interval or 'not estimable'", async () => {
    const result = await get("?dataset=p-bray&nutrient=P&moderator=soilTestValue&price=10&cost=20");
    const m = result.moderatorRegression!;
    const crossing = m.criticalLevel!.breakEven!;
    expect(crossing.target).toBe(2);
    const fit = m.fit!;
    const expected = lineCrossing(
      { intercept: fit.intercept.estimate, slope: fit.slope.estimate, covariance: fit.covariance, critical: fit.critical },
      2,
    );
    expect(crossing.value).toBeCloseTo(expected.value!, 12);
    expect(crossing.interval).toEqual(expected.interval);
    expect(crossing.text).toContain(expected.interval ? "95 % interval" : "not estimable");
  });

  it("a single dataset of another extractant has its own line", async () => {
    const result = await get("?dataset=p-mehlich&nutrient=P&moderator=soilTestValue");
    expect(result.moderatorRegression!.label).toBe("Soil-test P (Mehlich-3, ppm)");
    expect(result.moderatorRegression!.k).toBe(4);
  });
});

describe("the other moderators", () => {
  it("plantingDayOfYear: day 1 is 1 January; a site-year without a planting date is left out", async () => {
    const result = await get("?dataset=p-bray&moderator=plantingDayOfYear&forestLimit=0");
    const m = result.moderatorRegression!;
    expect(m.unit).toBe("day of year");
    expect(m.range).toEqual({ min: 118, max: 155 }); // 28 April and 4 June 2021
    expect(m.excluded.count).toBe(1);
    expect(m.excluded.siteYears[0]).toMatchObject({ siteYearCode: "TB-05-2021", reason: "no planting date" });
  });

  it("rate: the tested nutrient's rate in label units", async () => {
    const m = (await get("?dataset=p-bray&nutrient=P&moderator=rate")).moderatorRegression!;
    expect(m).toMatchObject({ label: "P2O5 rate (lb/ac)", unit: "lb/ac P2O5", nutrient: "P", k: 9, range: { min: 20, max: 60 } });
    expect(m.fit).not.toBeNull();
  });

  it("rate with one rate everywhere has no line (fit null, said why)", async () => {
    const m = (await get("?dataset=p-mehlich&nutrient=P&moderator=rate")).moderatorRegression!;
    expect(m.fit).toBeNull();
    expect(m.plainWords).toBe("Every site-year has the same rate: there is no line to fit.");
  });

  it("checkYield: refused across crops, fitted within one", async () => {
    const body = await problem("?moderator=checkYield", 422);
    expect(body.detail).toBe(
      "Check yields of several crops are not one yield scale: soybean at 13 site-years and corn at 3; filter to one crop with crop=.",
    );
    const m = (await get("?crop=corn&moderator=checkYield")).moderatorRegression!;
    expect(m.unit).toBe("bu/ac");
    expect(m.k).toBe(3);
  });

  it("an unknown moderator is a 400 naming the parameter", async () => {
    const body = await problem("?moderator=soilPh", 400);
    expect(body.errors[0].field).toBe("query.moderator");
  });
});

describe("heterogeneity detail only when asked", () => {
  it("a default answer has no moderator block, no intervals and no separate fits", async () => {
    const body = (await request(t.app).get("/api/v1/analyses/meta?nutrient=P&groupBy=soilTestClass").expect(200)).body;
    expect(body).not.toHaveProperty("moderatorRegression");
    expect(body.heterogeneity).not.toHaveProperty("interval");
    expect(body.subgroups).not.toHaveProperty("separate");
  });

  it("include=heterogeneityIntervals: the Q-profile interval of the pooled fit and of the moderator fit", async () => {
    const query = "?dataset=p-bray&nutrient=P&include=heterogeneityIntervals&moderator=soilTestValue";
    const result = await get(query);
    const rows = await csvRows(query);
    const fit = metaAnalysis({ yi: rows.map((r) => Number(r.estimate)), vi: rows.map((r) => Number(r.vi)), method: "REML", ci: "hksj" });
    expect(result.heterogeneity!.interval).toMatchObject({
      method: "Q-profile",
      tau2: fit.heterogeneityInterval!.tau2,
      i2Percent: fit.heterogeneityInterval!.i2Percent,
    });
    expect(result.moderatorRegression!.fit!.heterogeneityInterval!.tau2.estimate).toBe(result.moderatorRegression!.fit!.tau2);
  });

  it("subgroupTau2=separate: each level with its own τ², and Q_between, beside the common-τ² levels", async () => {
    const query = "?nutrient=P&groupBy=soilTestClass&subgroupTau2=separate&include=heterogeneityIntervals";
    const result = await get(query);
    const rows = await csvRows(query);
    const levels = result.subgroups!.levels.map((l) => l.level);
    const expected = separateSubgroupFits({
      yi: rows.map((r) => Number(r.estimate)),
      vi: rows.map((r) => Number(r.vi)),
      groups: rows.map((r) => r.group!),
      levels,
      method: "REML",
      ci: "hksj",
    });
    const separate = result.subgroups!.separate!;
    expect(separate.levels.map((l) => l.level)).toEqual(levels);
    for (const level of separate.levels) {
      expect(level.tau2).toBeCloseTo(expected.perLevel[level.level]!.tau2, 12);
      expect(level.estimate).toBeCloseTo(expected.perLevel[level.level]!.estimate, 12);
      expect(level.df).toBe(level.k > 1 ? level.k - 1 : null);
      if (level.k >= 2) expect(level.heterogeneityInterval).not.toBeNull();
    }
    expect(separate.betweenGroupTest!.statistic).toBeCloseTo(expected.qBetween.statistic, 12);
    expect(separate.betweenGroupTest!.text).toMatch(/^Between-group test \(separate τ²\): χ² = /);
    // The common-τ² view is unchanged beside it.
    expect(result.subgroups!.betweenGroupTest).not.toBeNull();
  });

  it("subgroupTau2=separate without groupBy is a 400", async () => {
    const body = await problem("?subgroupTau2=separate", 400);
    expect(body.errors[0]).toMatchObject({ field: "query.subgroupTau2", message: "separate subgroup fits need groupBy" });
  });
});
