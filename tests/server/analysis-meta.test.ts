import Papa from "papaparse";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { defaultForestLimit, metaAnalysisResult } from "@/schemas/analysis";
import { trialFilters } from "@/schemas/filters";
import { loadContrasts, withLabels } from "@/server/services/analysis/load-contrasts";
import {
  breakEvenResponse,
  combineWithinSiteYear,
  commonTauSquaredSubgroups,
  empiricalShares,
  kilogramsPerHectarePerBushelPerAcre,
  metaAnalysis,
  probabilityNewResponseAbove,
  tTwoSidedP,
} from "@/stats";
import { loadJsonFixture } from "@/tests/stats/fixtures";
import { insertAnalysisFixture, type FixtureResponse } from "@/tests/support/analysis-fixture";
import { testApp, type TestApp } from "@/tests/support/test-app";

const soybean = kilogramsPerHectarePerBushelPerAcre(60);
const corn = kilogramsPerHectarePerBushelPerAcre(56);

let t: TestApp;
const get = async (query: string) => metaAnalysisResult.parse((await request(t.app).get(`/api/v1/analyses/meta${query}`).expect(200)).body);
const problem = async (query: string, status: number) => (await request(t.app).get(`/api/v1/analyses/meta${query}`).expect(status)).body;

// Normand (1999), Stat Med 18:321–359, dat.normand1999 (metafor 3.8-1): yi and vi as responses of nine site-years.
const normand = loadJsonFixture("meta_normand1999_md_results.json");
const normandYi: number[] = normand.yi;
const normandVi: number[] = normand.vi;

/** P-starter site-years of a second dataset: low and high P, two placements sharing a check at some site-years. */
const starter: FixtureResponse[] = [
  {
    siteYear: "TB-01-2020",
    year: 2020,
    treatment: "IF",
    placements: ["in-furrow"],
    md: 310,
    se: 95,
    soilPClass: "very_low",
    soilPValue: 4,
  },
  {
    siteYear: "TB-01-2020",
    year: 2020,
    treatment: "BAND",
    placements: ["2x2-band"],
    md: 260,
    se: 95,
    soilPClass: "very_low",
    soilPValue: 4,
  },
  { siteYear: "TB-02-2020", year: 2020, treatment: "BAND", placements: ["2x2-band"], md: 180, se: 80, soilPClass: "low", soilPValue: 9 },
  { siteYear: "TB-03-2021", year: 2021, treatment: "BAND", placements: ["2x2-band"], md: 240, se: 110, soilPClass: "low", soilPValue: 11 },
  { siteYear: "TB-03-2021", year: 2021, treatment: "IF", placements: ["in-furrow"], md: 150, se: 110, soilPClass: "low", soilPValue: 11 },
  { siteYear: "TB-04-2021", year: 2021, treatment: "BAND", placements: ["2x2-band"], md: 20, se: 90, soilPClass: "high", soilPValue: 28 },
  { siteYear: "TB-05-2022", year: 2022, treatment: "BAND", placements: ["2x2-band"], md: -35, se: 70, soilPClass: "high", soilPValue: 31 },
  {
    siteYear: "TB-06-2022",
    year: 2022,
    treatment: "BAND",
    placements: ["2x2-band"],
    md: 60,
    se: 85,
    soilPClass: "optimum",
    soilPValue: 18,
    df: 12,
  },
  { siteYear: "TB-07-2022", year: 2022, treatment: "IF", placements: ["in-furrow"], md: 95, se: 75, soilPClass: "optimum", soilPValue: 17 },
  {
    siteYear: "TB-08-2023",
    year: 2023,
    treatment: "BAND",
    placements: ["2x2-band"],
    md: 400,
    se: 120,
    soilPClass: "very_low",
    soilPValue: 3,
  },
  { siteYear: "TB-09-2023", year: 2023, treatment: "BAND", placements: ["2x2-band"], md: 10, se: 0, soilPClass: "high", soilPValue: 30 },
];

/** The site-year effects the endpoint should build for the starter dataset in bu/ac, computed by hand with stats. */
function starterEffects(select: (r: FixtureResponse) => boolean = () => true) {
  const bySiteYear = new Map<string, FixtureResponse[]>();
  for (const r of starter.filter(select)) if (r.se > 0) bySiteYear.set(r.siteYear, [...(bySiteYear.get(r.siteYear) ?? []), r]);
  return [...bySiteYear.entries()].map(([siteYear, rs]) => {
    const effects = rs.map((r) => ({ yi: r.md / soybean, vi: (r.se / soybean) ** 2 }));
    const shared = Math.min(...rs.map((r) => r.se ** 2 / 2)) / soybean ** 2;
    const combined = combineWithinSiteYear(
      effects,
      effects.map((a, i) => effects.map((_, j) => (i === j ? a.vi : shared))),
    );
    return { siteYear, ...combined, df: rs[0]!.df ?? 9, rows: rs };
  });
}

beforeAll(async () => {
  t = await testApp();
  await insertAnalysisFixture(t.ctx, {
    slug: "normand-check",
    responses: normandYi.map((yi, i) => ({
      siteYear: `NC-${String(i + 1).padStart(2, "0")}-2019`,
      year: 2019,
      treatment: "T1",
      crop: "corn",
      nutrients: ["N"],
      placements: ["side-dress"],
      md: yi,
      se: Math.sqrt(normandVi[i]!),
      soilPClass: null,
      soilPValue: null,
    })),
  });
  await insertAnalysisFixture(t.ctx, { slug: "p-starter", responses: starter });
  // An older version of p-starter must not be read unless asked for.
  await insertAnalysisFixture(t.ctx, {
    slug: "p-starter",
    semver: "0.9.0",
    responses: [{ siteYear: "TB-01-2019", year: 2019, treatment: "BAND", md: 999, se: 50 }],
  });
});
afterAll(() => t.close());

describe("GET /api/v1/analyses/meta against published check values", () => {
  it("REML + HKSJ on the Normand (1999) responses equals metafor's rma(yi, vi, method = 'REML', test = 'knha')", async () => {
    const body = await get("?dataset=normand-check&units=kg/ha");
    const ref = normand.models.REML_knha; // metafor 3.8-1, tests/fixtures/reference/meta_normand1999_md_results.json
    const close = (a: number, b: number) => expect(Math.abs(a - b)).toBeLessThanOrEqual(1e-7 * Math.max(1, Math.abs(b)));
    expect(body.k).toBe(9);
    close(body.pooled!.estimate, ref.estimate);
    close(body.pooled!.se, ref.se);
    close(body.pooled!.ciLower, ref.ci_lb);
    close(body.pooled!.ciUpper, ref.ci_ub);
    close(body.pooled!.pValue, ref.pval);
    close(body.heterogeneity!.tau2, ref.tau2);
    close(body.heterogeneity!.i2Percent!, ref.I2_pct);
    close(body.heterogeneity!.h2!, ref.H2);
    close(body.heterogeneity!.q, ref.Q);
    close(body.pooled!.predictionInterval!.lower, ref.pi_hts_tkm2_lb);
    close(body.pooled!.predictionInterval!.upper, ref.pi_hts_tkm2_ub);
    expect(body.pooled!.df).toBe(8);
    body.rows.forEach((row, i) => close(row.weightPercent, ref.weights_pct[i]));
  });

  it("DL + Wald on the same rows equals metafor's rma(yi, vi, method = 'DL')", async () => {
    const body = await get("?dataset=normand-check&units=kg/ha&method=DL&ci=wald");
    const ref = normand.models.DL; // metafor 3.8-1, Normand (1999)
    expect(body.pooled!.estimate).toBeCloseTo(ref.estimate, 9);
    expect(body.pooled!.ciLower).toBeCloseTo(ref.ci_lb, 9);
    expect(body.heterogeneity!.tau2).toBeCloseTo(ref.tau2, 7);
    expect(body.pooled!.distribution).toBe("normal");
  });
});

describe("the endpoint gives exactly what the stats functions give for the same rows", () => {
  it("pools one effect per site-year, combining treatments that share a check, in bu/ac by default", async () => {
    const body = await get("?dataset=p-starter");
    const expected = starterEffects();
    const fit = metaAnalysis({ yi: expected.map((e) => e.yi), vi: expected.map((e) => e.vi), method: "REML", ci: "hksj" });
    expect(body.k).toBe(expected.length);
    expect(body.units).toBe("bu/ac");
    expect(body.pooled!.estimate).toBeCloseTo(fit.estimate, 10);
    expect(body.pooled!.ciLower).toBeCloseTo(fit.ciLower, 10);
    expect(body.pooled!.ciUpper).toBeCloseTo(fit.ciUpper, 10);
    expect(body.pooled!.predictionInterval!.lower).toBeCloseTo(fit.predictionInterval.tKMinus2!.lower, 10);
    expect(body.heterogeneity!.tau).toBeCloseTo(fit.tau, 10);
    const combined = body.rows.find((r) => r.siteYearCode === "TB-01-2020")!;
    expect(combined.treatments.sort()).toEqual(["BAND", "IF"]);
    expect(combined.estimate).toBeCloseTo(expected.find((e) => e.siteYear === "TB-01-2020")!.yi, 10);
    expect(combined.se).toBeCloseTo(Math.sqrt(expected.find((e) => e.siteYear === "TB-01-2020")!.vi), 10);
    expect(body.provenance.combinedSiteYears).toBe(2);
    expect(body.provenance.combination).toMatch(/combined within the site-year/);
    // The older version's 999 kg/ha row is not read.
    expect(body.provenance.versions).toEqual([
      expect.objectContaining({ dataset: "p-starter", version: "1.0.0", licence: "CC-BY-4.0", siteYearsUsed: expected.length }),
    ]);
    expect(body.rows.map((r) => r.siteYearCode)).not.toContain("TB-01-2019");
  });

  it("leaves out a site-year it cannot weight and says why", async () => {
    const body = await get("?dataset=p-starter");
    expect(body.provenance.excluded).toEqual([
      expect.objectContaining({ siteYearCode: "TB-09-2023", treatments: ["BAND"], reason: expect.stringMatching(/SE/) }),
    ]);
    expect(body.provenance.contrastsRead).toBe(starter.length);
  });

  it("reports each site-year's own test, CI and soil test", async () => {
    const body = await get("?dataset=p-starter");
    const row = body.rows.find((r) => r.siteYearCode === "TB-06-2022")!;
    expect(row.df).toBe(12);
    expect(row.pValue).toBeCloseTo(tTwoSidedP(60 / 85, 12), 12);
    expect(row.significant).toBe(false);
    expect(body.rows.find((r) => r.siteYearCode === "TB-08-2023")!.significant).toBe(true);
    expect(row).toMatchObject({
      soilTestAnalyte: "P",
      soilTestClass: "optimum",
      soilTestValue: 18,
      dataset: "p-starter",
      version: "1.0.0",
      crop: "soybean",
    });
    expect(row.estimate).toBeCloseTo(60 / soybean, 12);
  });

  it.each([
    ["DL", "wald"],
    ["PM", "hksj"],
    ["FE", "wald"],
    ["REML", "wald"],
  ] as const)("method=%s ci=%s", async (method, ci) => {
    const body = await get(`?dataset=p-starter&method=${method}&ci=${ci}&units=kg/ha`);
    const expected = starterEffects().map((e) => ({ yi: e.yi * soybean, vi: e.vi * soybean ** 2 }));
    const fit = metaAnalysis({ yi: expected.map((e) => e.yi), vi: expected.map((e) => e.vi), method, ci });
    expect(body.pooled!.estimate).toBeCloseTo(fit.estimate, 8);
    expect(body.pooled!.ciUpper).toBeCloseTo(fit.ciUpper, 8);
    expect(body.heterogeneity!.tau2).toBeCloseTo(fit.tau2, 6);
    expect(body.provenance).toMatchObject({ method, ci, units: "kg/ha" });
    if (method === "FE") expect(body.pooled!.predictionInterval).toBeNull();
  });

  it("effect=lnrr pools log response ratios with the shared-check covariance of ratios", async () => {
    const body = await get("?dataset=p-starter&effect=lnrr");
    expect(body.units).toBe("ln(treated/check)");
    const rows = starter.filter((r) => r.se > 0);
    const bySiteYear = new Map<string, FixtureResponse[]>();
    for (const r of rows) bySiteYear.set(r.siteYear, [...(bySiteYear.get(r.siteYear) ?? []), r]);
    const effects = [...bySiteYear.values()].map((rs) => {
      const es = rs.map((r) => ({ yi: Math.log((3500 + r.md) / 3500), vi: (r.se ** 2 / 2) * (1 / (3500 + r.md) ** 2 + 1 / 3500 ** 2) }));
      const shared = Math.min(...rs.map((r) => r.se ** 2 / 2)) / 3500 ** 2;
      return combineWithinSiteYear(
        es,
        es.map((a, i) => es.map((_, j) => (i === j ? a.vi : shared))),
      );
    });
    const fit = metaAnalysis({ yi: effects.map((e) => e.yi), vi: effects.map((e) => e.vi) });
    expect(body.pooled!.estimate).toBeCloseTo(fit.estimate, 12);
    expect(body.pooled!.ciLower).toBeCloseTo(fit.ciLower, 12);
    expect(body.decision.breakEven).toBeNull();
  });
});

describe("subgroups", () => {
  it("groupBy=soilTestClass: per-class estimates and the between-group test from one model with a mean per class and a shared τ²", async () => {
    const body = await get("?dataset=p-starter&groupBy=soilTestClass");
    const expected = starterEffects();
    const groups = expected.map((e) => e.rows[0]!.soilPClass as string);
    const levels = ["very_low", "low", "optimum", "high"];
    const fit = commonTauSquaredSubgroups({
      yi: expected.map((e) => e.yi),
      vi: expected.map((e) => e.vi),
      groups,
      levels,
      method: "REML",
      ci: "hksj",
    });
    const s = body.subgroups!;
    expect(s.by).toBe("soilTestClass");
    expect(s.levels.map((l) => l.level)).toEqual(levels);
    expect(s.levels.map((l) => l.k)).toEqual([2, 2, 2, 2]);
    s.levels.forEach((l, i) => expect(l.estimate).toBeCloseTo(fit.perLevel.coefficients[i]!.estimate, 10));
    expect(s.qm!.statistic).toBeCloseTo(fit.differences.qm!.statistic, 10);
    expect(s.qm!.pValue).toBeCloseTo(fit.differences.qm!.pValue, 10);
    expect(s.qm).toMatchObject({ distribution: "F", df: 3, df2: 4 });
    // The same test under its own name, in words; the old field stays for existing scripts.
    expect(s.betweenGroupTest).toEqual({
      ...s.qm,
      text: expect.stringMatching(/^Between-group test: F = \d+\.\d on 3 and 4 df, p (< 0\.001|= \d\.\d+)$/),
    });
    expect(`${s.model} ${s.betweenGroupTest!.text}`).not.toMatch(/QM|moderator/);
    // The pooled estimate is unchanged by grouping.
    const plain = await get("?dataset=p-starter");
    expect(body.pooled!.estimate).toBeCloseTo(plain.pooled!.estimate, 12);
  });

  it("groupBy=placement gives each placement its own contrast per site-year (no double counting within a group)", async () => {
    const body = await get("?dataset=p-starter&groupBy=placement&units=kg/ha");
    const s = body.subgroups!;
    expect(s.levels.map((l) => l.level)).toEqual(["in-furrow", "2x2-band"]);
    const inFurrow = starter.filter((r) => r.placements?.[0] === "in-furrow");
    const band = starter.filter((r) => r.placements?.[0] === "2x2-band" && r.se > 0);
    expect(s.levels.map((l) => l.k)).toEqual([inFurrow.length, band.length]);
    const units = [...inFurrow, ...band];
    const fit = commonTauSquaredSubgroups({
      yi: units.map((r) => r.md),
      vi: units.map((r) => r.se ** 2),
      groups: units.map((r) => r.placements![0]!),
      levels: ["in-furrow", "2x2-band"],
    });
    expect(s.qm!.statistic).toBeCloseTo(fit.differences.qm!.statistic, 8);
    expect(s.levels[0]!.estimate).toBeCloseTo(fit.perLevel.coefficients[0]!.estimate, 8);
    // Site-year TB-01-2020 appears once in each placement group, never twice in one.
    const tb01 = body.rows.filter((r) => r.siteYearCode === "TB-01-2020");
    expect(tb01.map((r) => r.group).sort()).toEqual(["2x2-band", "in-furrow"]);
    expect(body.rows.length).toBe(units.length);
    // Weights add to 100 % within each group.
    for (const level of ["in-furrow", "2x2-band"]) {
      expect(body.rows.filter((r) => r.group === level).reduce((a, r) => a + r.weightPercent, 0)).toBeCloseTo(100, 9);
    }
  });

  it.each(["nutrient", "crop", "tillage", "plantingWindow", "dataset"])("groupBy=%s is accepted", async (by) => {
    const body = await get(`?groupBy=${by}`);
    expect(body.subgroups!.by).toBe(by);
    expect(body.subgroups!.levels.reduce((a, l) => a + l.k, 0)).toBe(body.rows.length);
  });

  it("groupBy=dataset compares the two datasets", async () => {
    const body = await get("?groupBy=dataset&units=kg/ha");
    expect(body.subgroups!.levels.map((l) => l.level).sort()).toEqual(["normand-check", "p-starter"]);
    expect(body.subgroups!.qm).not.toBeNull();
  });
});

describe("decision numbers", () => {
  it("break-even B = cost/price and the predictive probabilities equal the stats functions", async () => {
    const body = await get("?dataset=p-starter&price=12&cost=30");
    const expected = starterEffects();
    const fit = metaAnalysis({ yi: expected.map((e) => e.yi), vi: expected.map((e) => e.vi) });
    const b = breakEvenResponse(30, 12);
    const d = body.decision;
    expect(d.breakEven).toBeCloseTo(2.5, 12);
    expect(d.probabilityAboveBreakEven).toBeCloseTo(
      probabilityNewResponseAbove({ x: b, estimate: fit.estimate, se: fit.se, tau2: fit.tau2, k: fit.k }).probability!,
      12,
    );
    expect(d.probabilityAboveZero).toBeCloseTo(
      probabilityNewResponseAbove({ x: 0, estimate: fit.estimate, se: fit.se, tau2: fit.tau2, k: fit.k }).probability!,
      12,
    );
    const shares = empiricalShares(
      expected.map((e) => e.yi),
      b,
    );
    expect(d.shareAboveZero).toBe(shares.aboveZero);
    expect(d.shareAboveBreakEven).toBe(shares.aboveBreakEven);
    const significant = expected.filter((e) => tTwoSidedP(e.yi / Math.sqrt(e.vi), e.df) < 0.05).length;
    expect(d.significantCount).toBe(significant);
    expect(d.shareSignificant).toBeCloseTo(significant / expected.length, 12);
  });

  it("productCost + applicationCost is the same as cost", async () => {
    const a = await get("?dataset=p-starter&price=12&cost=30");
    const b = await get("?dataset=p-starter&price=12&productCost=22&applicationCost=8");
    expect(b.decision.costPerAcre).toBe(30);
    expect(b.decision.probabilityAboveBreakEven).toBe(a.decision.probabilityAboveBreakEven);
  });

  it("in kg/ha the break-even is converted with the crop's bushel weight", async () => {
    const body = await get("?dataset=p-starter&price=12&cost=30&units=kg/ha");
    expect(body.decision.breakEven).toBeCloseTo(2.5 * soybean, 9);
  });

  it("without prices it still gives P(response > 0) and says what is missing", async () => {
    const body = await get("?dataset=p-starter");
    expect(body.decision.breakEven).toBeNull();
    expect(body.decision.probabilityAboveZero).toBeGreaterThan(0.5);
    expect(body.decision.notes.join(" ")).toMatch(/price/);
  });
});

describe("filters, units and formats", () => {
  it("uses the shared filters and reports them normalised", async () => {
    const body = await get("?dataset=p-starter&soilTestClass=low,very_low&placement=2x2-band&yearFrom=2020&yearTo=2022&nutrient=P");
    expect(body.provenance.filters).toEqual({
      dataset: "p-starter",
      nutrient: "P",
      placement: "2x2-band",
      soilTestClass: "low,very_low",
      yearFrom: "2020",
      yearTo: "2022",
    });
    // TB-01-2020 (both placements match: BAND is 2x2) , TB-02-2020, TB-03-2021 (BAND only matches placement; IF is in-furrow).
    expect(body.rows.map((r) => r.siteYearCode).sort()).toEqual(["TB-01-2020", "TB-02-2020", "TB-03-2021"]);
    expect(body.rows.every((r) => r.treatments.length === 1)).toBe(true);
  });

  it("a named older version is read when asked for", async () => {
    const body = await get("?dataset=p-starter&version=0.9.0&units=kg/ha");
    expect(body.k).toBe(1);
    expect(body.rows[0]!.estimate).toBe(999);
    expect(body.provenance.versions[0]!.version).toBe("0.9.0");
  });

  it("converts each crop with its own bushel weight before pooling, and says so", async () => {
    const body = await get("");
    const nc = body.rows.find((r) => r.siteYearCode === "NC-01-2019")!;
    expect(nc.estimate).toBeCloseTo(normandYi[0]! / corn, 12);
    expect(body.rows.find((r) => r.siteYearCode === "TB-08-2023")!.estimate).toBeCloseTo(400 / soybean, 12);
    expect(body.notes.join(" ")).toMatch(/own crop's bushel weight/);
    expect(body.provenance.datasets).toBe(2);
  });

  it("format=csv returns the forest rows that reproduce the fit", async () => {
    const res = await request(t.app).get("/api/v1/analyses/meta?dataset=p-starter&format=csv").expect(200);
    expect(res.headers["content-type"]).toMatch(/^text\/csv/);
    const parsed = Papa.parse<Record<string, string>>(res.text.trim(), { header: true });
    const json = await get("?dataset=p-starter");
    expect(parsed.data.length).toBe(json.k);
    const fit = metaAnalysis({ yi: parsed.data.map((r) => Number(r.estimate)), vi: parsed.data.map((r) => Number(r.se) ** 2) });
    expect(fit.estimate).toBeCloseTo(json.pooled!.estimate, 10);
    expect(Object.keys(parsed.data[0]!)).toEqual(
      expect.arrayContaining(["site_year", "dataset", "version", "estimate", "se", "weight_pct", "soil_test_class"]),
    );
  });

  it("every result carries the cautions", async () => {
    const body = await get("?dataset=p-starter");
    const text = body.cautions.map((c) => `${c.text} (${c.source})`).join(" ");
    expect(text).toMatch(/summarise the trials/);
    expect(text).toMatch(/field can differ/);
    expect(text).toMatch(/injure a stand/);
    expect(text).toMatch(/Keep potassium out of the seed furrow for soybean.*\(common practice, no source\)/);
    expect(text).toMatch(/licensed advisers have the last word/);
    for (const c of body.cautions) expect(c.code).toMatch(/^[a-z0-9-]+$/);
  });
});

describe("small and empty results", () => {
  it("k = 0 is a 200 with a clear note, not an error", async () => {
    const body = await get("?dataset=p-starter&soilTestClass=very_high");
    expect(body.k).toBe(0);
    expect(body.rows).toEqual([]);
    expect(body.pooled).toBeNull();
    expect(body.heterogeneity).toBeNull();
    expect(body.notes[0]).toMatch(/No site-years match/);
    expect(body.cautions.length).toBeGreaterThan(0);
  });

  it("k = 1 gives that site-year's response and says what is missing", async () => {
    const body = await get("?dataset=p-starter&yearFrom=2023&price=10&cost=20");
    expect(body.k).toBe(1);
    expect(body.pooled!.estimate).toBeCloseTo(400 / soybean, 10);
    expect(body.pooled!.predictionInterval).toBeNull();
    expect(body.heterogeneity).toBeNull();
    expect(body.decision.probabilityAboveBreakEven).toBeNull();
    expect(body.notes.join(" ")).toMatch(/Only one site-year/);
  });

  it("k = 2 has no prediction interval and warns", async () => {
    const body = await get("?dataset=p-starter&yearFrom=2020&yearTo=2020");
    expect(body.k).toBe(2);
    expect(body.pooled!.predictionInterval).toBeNull();
    expect(body.heterogeneity!.df).toBe(1);
    expect(body.notes.join(" ")).toMatch(/two site-years/i);
  });
});

describe("bad input", () => {
  it.each([
    ["?colour=red", "colour"],
    ["?effect=smd", "query.effect"],
    ["?method=ML", "query.method"],
    ["?ci=z", "query.ci"],
    ["?groupBy=farm", "query.groupBy"],
    ["?units=t/ha", "query.units"],
    ["?price=-2", "query.price"],
    ["?cost=abc", "query.cost"],
    ["?format=xml", "query.format"],
    ["?nutrient=Zn", "query.nutrient.0"],
    ["?version=1.0.0", "query.version"],
    ["?yearFrom=2022&yearTo=2020", "query.yearTo"],
    ["?cost=10&productCost=5", "query.cost"],
    ["?forestLimit=-1", "query.forestLimit"],
    ["?forestLimit=some", "query.forestLimit"],
  ])("%s is a 400 naming %s", async (query, field) => {
    const body = await problem(query, 400);
    expect(body.title).toBe("Bad request");
    const named = body.errors.map((e: { field: string; message: string }) => `${e.field} ${e.message}`).join(" | ");
    expect(named).toContain(field === "colour" ? "colour" : field);
  });

  it("an unknown dataset is a 404", async () => {
    const body = await problem("?dataset=no-such-dataset", 404);
    expect(body.detail).toContain("no-such-dataset");
  });
});

describe("forestLimit bounds the forest rows, never the numbers", () => {
  const numbers = (b: Awaited<ReturnType<typeof get>>) => ({
    k: b.k,
    pooled: b.pooled,
    heterogeneity: b.heterogeneity,
    subgroups: b.subgroups,
    decision: b.decision,
    provenance: b.provenance,
  });

  it("keeps the most precise site-years in their usual order; the pooled estimate is the same with and without the bound", async () => {
    const all = await get("?dataset=p-starter&forestLimit=all&price=11&cost=18");
    const bounded = await get("?dataset=p-starter&forestLimit=3&price=11&cost=18");
    expect(all.forest).toEqual({ total: all.k, returned: all.k, limit: null, truncated: false, note: null });
    expect(bounded.rows).toHaveLength(3);
    expect(bounded.forest).toMatchObject({ total: all.k, returned: 3, limit: 3, truncated: true });
    expect(bounded.forest.note).toContain(`3 most precise of ${all.k} site-years`);
    expect(bounded.notes).toContain(bounded.forest.note);
    expect(numbers(bounded)).toEqual(numbers(all));
    // Most precise = smallest SE (largest weight), listed in the unbounded answer's order with identical rows.
    const expected = [...all.rows]
      .sort((a, b) => a.se - b.se)
      .slice(0, 3)
      .map((r) => r.id);
    expect(bounded.rows.map((r) => r.id)).toEqual(all.rows.map((r) => r.id).filter((id) => expected.includes(id)));
    for (const row of bounded.rows) expect(row).toEqual(all.rows.find((r) => r.id === row.id));
    // The same pooled estimate by hand from every site-year, not only the rows shown.
    const hand = metaAnalysis({ yi: starterEffects().map((e) => e.yi), vi: starterEffects().map((e) => e.vi), method: "REML", ci: "hksj" });
    expect(bounded.pooled!.estimate).toBeCloseTo(hand.estimate, 10);
  });

  it("forestLimit=0 returns no rows and the same numbers, also with subgroups", async () => {
    const all = await get("?dataset=p-starter&groupBy=placement&forestLimit=all");
    const none = await get("?dataset=p-starter&groupBy=placement&forestLimit=0");
    expect(none.rows).toEqual([]);
    expect(none.forest).toMatchObject({ total: all.rows.length, returned: 0, truncated: true });
    expect(none.forest.note).toMatch(/site-year × level rows/);
    expect(numbers(none)).toEqual(numbers(all));
  });

  it("format=csv gives every row unless forestLimit is given", async () => {
    const lines = async (q: string) =>
      (await request(t.app).get(`/api/v1/analyses/meta?dataset=p-starter&format=csv${q}`).expect(200)).text.trim().split("\r\n").length - 1;
    expect(await lines("")).toBe((await get("?dataset=p-starter")).k);
    expect(await lines("&forestLimit=2")).toBe(2);
  });

  describe("on more site-years than the default bound", () => {
    let many: TestApp;
    beforeAll(async () => {
      many = await testApp();
      await insertAnalysisFixture(many.ctx, {
        slug: "many-site-years",
        responses: Array.from({ length: defaultForestLimit + 25 }, (_, i) => ({
          siteYear: `MS-${String(i).padStart(3, "0")}-2021`,
          year: 2021,
          treatment: "BAND",
          md: 150 + ((i * 37) % 200),
          se: 60 + ((i * 53) % 90),
        })),
      });
    });
    afterAll(() => many.close());

    it(`returns ${defaultForestLimit} rows by default and says the forest is truncated`, async () => {
      const body = metaAnalysisResult.parse((await request(many.app).get("/api/v1/analyses/meta").expect(200)).body);
      const all = metaAnalysisResult.parse((await request(many.app).get("/api/v1/analyses/meta?forestLimit=all").expect(200)).body);
      expect(body.k).toBe(defaultForestLimit + 25);
      expect(body.rows).toHaveLength(defaultForestLimit);
      expect(body.forest).toMatchObject({
        total: defaultForestLimit + 25,
        returned: defaultForestLimit,
        limit: defaultForestLimit,
        truncated: true,
      });
      expect(all.rows).toHaveLength(defaultForestLimit + 25);
      expect(numbers(body)).toEqual(numbers(all));
    });

    it("reads the labels of a long forest with the filter instead of an id list, with the same result", async () => {
      const { rows, where } = await loadContrasts(many.ctx.db, trialFilters.parse({ dataset: "many-site-years" }));
      expect(rows).toHaveLength(defaultForestLimit + 25);
      const byIds = await withLabels(many.ctx.db, where, rows);
      const byFilter = await withLabels(many.ctx.db, where, rows, 10);
      expect(byIds.size).toBe(rows.length);
      expect([...byFilter.entries()]).toEqual([...byIds.entries()]);
      expect(byIds.get(rows[0]!.id)).toMatchObject({ siteYearCode: "MS-000-2021", treatmentCode: "BAND", year: 2021, seKgHa: 60 });
      // A subset asks only for its own rows.
      expect([...(await withLabels(many.ctx.db, where, rows.slice(3, 5))).keys()]).toEqual([rows[3]!.id, rows[4]!.id]);
    });
  });
});

describe("OpenAPI", () => {
  it("documents the endpoint with its named schemas", async () => {
    const res = await request(t.app).get("/api/v1/openapi.json").expect(200);
    const op = res.body.paths["/api/v1/analyses/meta"].get;
    expect(op.parameters.map((p: { name: string }) => p.name)).toEqual(
      expect.arrayContaining([
        "crop",
        "nutrient",
        "soilTestClass",
        "effect",
        "method",
        "ci",
        "groupBy",
        "price",
        "cost",
        "units",
        "format",
        "forestLimit",
      ]),
    );
    expect(res.body.components.schemas).toHaveProperty("MetaAnalysis");
    expect(res.body.components.schemas).toHaveProperty("ForestRow");
    expect(res.body.components.schemas).toHaveProperty("ForestExtent");
    expect(op.parameters.find((p: { name: string }) => p.name === "forestLimit").description).toMatch(/Default 200/);
  });
});
