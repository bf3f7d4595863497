import { sql } from "drizzle-orm";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { metaAnalysisResult } from "@/schemas/analysis";
import { responsePage } from "@/schemas/public";
import { seedSafetyResult } from "@/schemas/seed-safety";
import { CLOSED_FORM, ITERATIVE, expectClose, loadJsonFixture, loadTextFixture } from "@/tests/stats/fixtures";
import { testApp, type TestApp } from "@/tests/support/test-app";
import { draftWithData, upload, type Fixture } from "./curation-fixtures";

/*
 * Measures beyond yield, end to end: a synthetic trial with stand counts and vigour scores (invented data, generated
 * by tests/fixtures/reference/measures_synthetic_stand.R) goes in through the real upload, is published, and its
 * per-measure responses, meta-analysis and seed-safety answer are compared with what R computed from the same plots.
 */

interface RFit {
  mse: number;
  df_error: number;
  p_treatment: number;
  lsd05: number;
  means: Record<string, number>;
  contrasts: { treatment: string; estimate: number; se: number }[];
}
interface RResults {
  per_site_year: { site_year: string; stand: RFit; vigour: RFit }[];
  pooled_stand_if: { k: number; estimate: number; se: number; ci_lower: number; ci_upper: number; tau2: number };
}
const reference = loadJsonFixture<RResults>("measures_synthetic_stand_results.json");
const plotsCsv = loadTextFixture("measures_synthetic_stand_plots.csv")
  .split("\n")
  .filter((line) => !line.startsWith("#"))
  .join("\n");

/** A curator-added measure: lodging score, 1 (upright) to 5 (flat), lower is better; values derived from the plot number. */
const lodging = { name: "lodging_score", title: "Lodging", unit: "score", better: "lower", rating: true, scale: "1 (upright) to 5 (flat)" };
const withLodging = (csv: string) =>
  csv
    .trim()
    .split("\n")
    .map((line, i) => (i === 0 ? `${line},lodging_score` : `${line},${1 + ((i * 7) % 5)}`))
    .join("\n") + "\n";

const siteYearsCsv =
  "site_year,site,crop,year,design,blocks,tillage,previous_crop,planting_date,row_spacing_in\n" +
  reference.per_site_year
    .map((s) => {
      const [, site, year] = /^(TB-0\d)-(\d{4})$/.exec(s.site_year)!;
      return `${s.site_year},${site},soybean,${year},RCBD,4,no-till,corn,${year}-05-12,30`;
    })
    .join("\n") +
  "\n";

let t: TestApp;
let f: Fixture;
beforeAll(async () => {
  t = await testApp();
  f = await draftWithData(t.app, t.ctx, { plots: false });
  const sy = await upload(f.curatorAgent, f.versionId, "site_years", siteYearsCsv);
  expect(sy.status, JSON.stringify(sy.body).slice(0, 1000)).toBe(201);
  // The curator adds a measure to the data dictionary: the measure and its number field in plots.
  const current = await f.curatorAgent.get(`/api/v1/curation/versions/${f.versionId}`).expect(200);
  const schema = current.body.tableSchema;
  schema.measures = [lodging];
  schema.resources.plots.fields.push({ name: "lodging_score", title: "Lodging", type: "number", unit: "score" });
  const put = await f.curatorAgent.put(`/api/v1/curation/versions/${f.versionId}/table-schema`).send(schema);
  expect(put.status, JSON.stringify(put.body).slice(0, 1000)).toBe(200);
  const plots = await upload(f.curatorAgent, f.versionId, "plots", withLodging(plotsCsv));
  expect(plots.status, JSON.stringify(plots.body).slice(0, 1500)).toBe(201);
  expect(plots.body.responses.rows, "yield responses are counted as before").toBe(8 * 3);
  await f.curatorAgent.post(`/api/v1/curation/versions/${f.versionId}/submit`).send({ changelog: "Stand and vigour." }).expect(200);
  await f.reviewerAgent.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({}).expect(200);
}, 240_000);
afterAll(() => t.close());

const responses = async (query: string) =>
  responsePage.parse((await request(t.app).get(`/api/v1/responses?dataset=${f.slug}&limit=1000&${query}`).expect(200)).body).items;

describe("responses per measure", () => {
  it.each([
    ["stand", "stand", "plants/ac"],
    ["vigour", "vigour", "score"],
  ] as const)("measure=%s: each site-year's contrast, SE, error df, F-test p and LSD are R's aov/lm values", async (measure, key, unit) => {
    const rows = await responses(`measure=${measure}`);
    expect(rows).toHaveLength(8 * 3);
    for (const r of reference.per_site_year) {
      const fit = r[key];
      for (const c of fit.contrasts) {
        const row = rows.find((x) => x.siteYearCode === r.site_year && x.treatmentCode === c.treatment)!;
        const at = `${r.site_year} ${c.treatment} ${measure}`;
        expect(row, at).toBeDefined();
        expect(row).toMatchObject({ measure, unit, df: fit.df_error, balanced: true });
        // Source: R 4.2.2 lm(y ~ block + treatment), treatment coefficient against CHK and its standard error.
        expectClose(row.md, c.estimate, CLOSED_FORM, `${at} md`);
        expectClose(row.se, c.se, CLOSED_FORM, `${at} se`);
        // Source: R 4.2.2 aov(y ~ block + treatment): the treatment F test's p and Fisher's LSD t(0.975, df)·√(2·MSE/r).
        expectClose(row.pValue, fit.p_treatment, CLOSED_FORM, `${at} p`);
        expectClose(row.lsd05, fit.lsd05, CLOSED_FORM, `${at} LSD`);
        expectClose(row.checkMean, fit.means.CHK, CLOSED_FORM, `${at} check mean`);
        expectClose(row.relativeToCheck, fit.means[c.treatment]! / fit.means.CHK!, CLOSED_FORM, `${at} relative`);
      }
    }
  });

  it("without measure= the answer is yield, as before, and units= converts yield only", async () => {
    const plain = await responses("");
    expect(plain).toHaveLength(8 * 3);
    expect(new Set(plain.map((r) => r.measure))).toEqual(new Set(["yield"]));
    expect(plain[0]).toMatchObject({ unit: "bu/ac", yieldUnit: "bu/ac" });
    const kg = await responses("units=kg/ha");
    expect(kg[0]!.unit).toBe("kg/ha");
    expect(kg[0]!.md / plain[0]!.md).toBeCloseTo(67.25, 1);
    const stand = await responses("measure=stand&units=kg/ha");
    expect(stand[0]!.unit).toBe("plants/ac");
    const standBu = await responses("measure=stand");
    expect(stand.map((r) => r.md)).toEqual(standBu.map((r) => r.md));
  });

  it("measure=test-weight with no values recorded is an empty answer; moisture is answered in %", async () => {
    expect(await responses("measure=test-weight")).toEqual([]);
    // The synthetic plots record one harvest moisture throughout: every difference is 0 %.
    const moisture = await responses("measure=moisture");
    expect(moisture).toHaveLength(8 * 3);
    expect(moisture.every((r) => r.unit === "%" && r.md === 0)).toBe(true);
  });

  it("a measure the curator added through the data dictionary has responses in its own unit, and reaches the meta-analysis", async () => {
    const rows = await responses("measure=lodging_score");
    expect(rows).toHaveLength(8 * 3);
    expect(rows[0]).toMatchObject({ measure: "lodging_score", unit: "score" });
    const meta = metaAnalysisResult.parse(
      (await request(t.app).get(`/api/v1/analyses/meta?dataset=${f.slug}&measure=lodging_score`).expect(200)).body,
    );
    expect(meta.measure).toEqual({
      name: "lodging_score",
      title: "Lodging",
      unit: "score",
      better: "lower",
      rating: true,
      scale: lodging.scale,
    });
    expect(meta.k).toBe(8);
    // The version's own answer and its Data Package carry the added column.
    const version = (await request(t.app).get(`/api/v1/datasets/${f.slug}/versions/latest/responses?measure=lodging_score`).expect(200))
      .body;
    expect(version.items).toHaveLength(8 * 3);
    const csv = await request(t.app).get(`/api/v1/datasets/${f.slug}/versions/latest/resources/plots.csv`).expect(200);
    expect(csv.text.split("\r\n")[0]).toMatch(/,lodging_score$/);
  });

  it.each(["/api/v1/responses?measure=sugar", "/api/v1/analyses/meta?measure=sugar", "/api/v1/responses?measure=Stand!"])(
    "an unknown measure is a 400 naming query.measure: %s",
    async (path) => {
      const res = await request(t.app).get(`${path}&dataset=${f.slug}`).expect(400);
      expect(res.body.errors).toContainEqual(expect.objectContaining({ field: "query.measure" }));
    },
  );

  it("a version's responses refuse an unknown measure too", async () => {
    const res = await request(t.app).get(`/api/v1/datasets/${f.slug}/versions/latest/responses?measure=sugar`).expect(400);
    expect(res.body.errors).toContainEqual(
      expect.objectContaining({ field: "query.measure", message: expect.stringMatching(/known measures: yield, stand/) }),
    );
  });

  it("the OpenAPI document lists the measures measure= allows", async () => {
    const doc = (await request(t.app).get("/api/v1/openapi.json").expect(200)).body;
    for (const path of ["/api/v1/responses", "/api/v1/analyses/meta", "/api/v1/datasets/{slug}/versions/{semver}/responses"]) {
      const param = doc.paths[path].get.parameters.find((p: { name: string }) => p.name === "measure");
      expect(JSON.stringify(param.schema), path).toContain('"enum":["yield","stand","vigour","test-weight","moisture"]');
      expect(param.schema.default, path).toBe("yield");
    }
  });
});

describe("meta-analysis and seed safety of the stand", () => {
  it("measure=stand, in-furrow: the pooled stand response is metafor's rma(REML, knha), in plants/ac, with no break-even", async () => {
    const meta = metaAnalysisResult.parse(
      (
        await request(t.app)
          .get(`/api/v1/analyses/meta?dataset=${f.slug}&measure=stand&placement=in-furrow&price=11&cost=18&units=kg/ha`)
          .expect(200)
      ).body,
    );
    const r = reference.pooled_stand_if;
    expect(meta).toMatchObject({ k: r.k, units: "plants/ac", measure: { name: "stand", unit: "plants/ac", better: "higher" } });
    // Source: metafor rma(yi, sei, method = "REML", test = "knha") on R's IF − CHK stand contrasts.
    expectClose(meta.pooled!.estimate, r.estimate, ITERATIVE, "pooled stand");
    expectClose(meta.pooled!.se, r.se, ITERATIVE, "pooled SE");
    expectClose(meta.pooled!.ciLower, r.ci_lower, ITERATIVE, "CI lower");
    expectClose(meta.pooled!.ciUpper, r.ci_upper, ITERATIVE, "CI upper");
    expectClose(meta.heterogeneity!.tau2, r.tau2, 1e-6, "tau2");
    expect(meta.decision.breakEven).toBeNull();
    expect(meta.decision.notes.join(" ")).toMatch(/yield only/);
  });

  it("the seed-safety answer pools the same loss, counts the site-year tests that found one, and sets the guideline check beside it", async () => {
    const body = seedSafetyResult.parse((await request(t.app).get(`/api/v1/analyses/seed-safety?dataset=${f.slug}`).expect(200)).body);
    const r = reference.pooled_stand_if;
    expectClose(body.seedPlaced!.estimate, r.estimate, ITERATIVE, "seed-placed stand");
    expect(body.seedPlaced!.k).toBe(8);
    // Source: R's aov per site-year: F-test p < 0.05 and IF below CHK by more than the LSD (Fisher's protected LSD).
    const expectedLosses = reference.per_site_year.filter(
      (s) => s.stand.p_treatment < 0.05 && s.stand.contrasts[0]!.estimate < -s.stand.lsd05,
    ).length;
    expect(body.seedPlaced!.lossesFound).toBe(expectedLosses);
    expect(body.seedPlaced!.tests).toBe(8);
    expect(body.notSeedPlaced!.tests).toBe(16);
    expect(body.statement).toMatch(/^Seed-placed \(in-furrow\) treatments reduced the stand: −8,716 plants\/ac/);
    expect(body.statement).toContain(`found a loss in ${expectedLosses} of 8 seed-placed comparisons`);
    // 5 gal/ac of 10-34-0 at 11.4 lb/gal is 5.7 lb/ac of N with the seed.
    expect(body.byRate).toEqual([expect.objectContaining({ seedPlacedNK2oLbAc: 5.7, tests: 8 })]);
    expect(body.points.filter((p) => !p.seedPlaced).every((p) => p.seedPlacedNK2oLbAc === 0)).toBe(true);
    // The guideline rules, from server/services/cautions.ts, tested on the seed-placed treatment.
    const tripped = body.cautions.filter((c) => c.matches).map((c) => c.code);
    expect(tripped).toEqual(expect.arrayContaining(["seed-placed-n-k2o", "salt-sensitive-crop"]));
    const vigour = seedSafetyResult.parse(
      (await request(t.app).get(`/api/v1/analyses/seed-safety?dataset=${f.slug}&measure=vigour`).expect(200)).body,
    );
    expect(vigour.measure).toMatchObject({ name: "vigour", rating: true });
    expect(vigour.seedPlaced!.estimate).toBeLessThan(0);
    await request(t.app).get(`/api/v1/analyses/seed-safety?dataset=${f.slug}&placement=in-furrow`).expect(400);
  });
});

let draftId = "";
describe("recompute per measure", () => {
  it("a new draft's plots without stand counts drop its stand responses and keep yield's", async () => {
    const v = await f.curatorAgent.post(`/api/v1/datasets/${f.slug}/versions`).send({});
    expect(v.status, JSON.stringify(v.body).slice(0, 1000)).toBe(201);
    draftId = v.body.id;
    const count = async (versionId: string) =>
      (
        (await t.ctx.db.execute(
          sql`select measure, count(*)::int as n from responses where version_id = ${versionId} group by measure order by measure`,
        )) as unknown as { rows: { measure: string; n: number }[] }
      ).rows;
    expect(await count(v.body.id)).toEqual([
      { measure: "lodging_score", n: 24 },
      { measure: "moisture", n: 24 },
      { measure: "stand", n: 24 },
      { measure: "vigour", n: 24 },
      { measure: "yield", n: 24 },
    ]);
    const noStand = plotsCsv
      .trim()
      .split("\n")
      .map((line) => line.split(",").slice(0, 6).join(","))
      .join("\n");
    const res = await upload(f.curatorAgent, v.body.id, "plots", noStand + "\n");
    expect(res.status, JSON.stringify(res.body).slice(0, 1000)).toBe(201);
    expect(await count(v.body.id)).toEqual([
      { measure: "moisture", n: 24 },
      { measure: "yield", n: 24 },
    ]);
  });

  it("stand counts per 10 ft of row, as the data dictionary states, become plants/ac with the site-year's row spacing", async () => {
    const current = await f.curatorAgent.get(`/api/v1/curation/versions/${draftId}`).expect(200);
    const schema = current.body.tableSchema;
    const stand = schema.resources.plots.fields.find((x: { name: string }) => x.name === "stand_count");
    stand.unit = "plants/m";
    const bad = await f.curatorAgent.put(`/api/v1/curation/versions/${draftId}/table-schema`).send(schema).expect(400);
    expect(bad.body.errors).toContainEqual(expect.objectContaining({ field: "body.resources.plots.fields.stand_count.unit" }));
    stand.unit = "plants/10 ft row";
    await f.curatorAgent.put(`/api/v1/curation/versions/${draftId}/table-schema`).send(schema).expect(200);
    // The same counts read as per 10 ft of 30-in row: 43,560 ft² ÷ (10 ft × 2.5 ft) = 1,742.4 times as many plants/ac.
    const res = await upload(f.curatorAgent, draftId, "plots", plotsCsv);
    expect(res.status, JSON.stringify(res.body).slice(0, 1000)).toBe(201);
    const rows = (
      (await t.ctx.db.execute(
        sql`select site_year_code, check_mean_kg_ha from responses where version_id = ${draftId} and measure = 'stand' and treatment_code = 'IF' order by site_year_code`,
      )) as unknown as { rows: { site_year_code: string; check_mean_kg_ha: number }[] }
    ).rows;
    expect(rows).toHaveLength(8);
    for (const row of rows) {
      const fit = reference.per_site_year.find((p) => p.site_year === row.site_year_code)!.stand;
      // Source: R's treatment means of the synthetic trial (aov), times 43,560 / (10 × 30 / 12).
      expectClose(row.check_mean_kg_ha, fit.means.CHK! * 1742.4, CLOSED_FORM, `${row.site_year_code} check stand`);
    }
  });
});
