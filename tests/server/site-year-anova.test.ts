/**
 * The site-year ANOVA over HTTP: a published version (balanced, a lost plot, means only, other measures, units,
 * unknown code), the same site-year found across datasets, and a draft's for its editors and reviewers only.
 * The numbers themselves are checked against R in tests/stats/rcbd-pairwise-lsd.test.ts; here they are checked
 * against their own definitions and against the responses the upload stored.
 */
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { siteYearAnova, type SiteYearAnova } from "@/schemas/site-year-anova";
import { tQuantile } from "@/stats/distributions";
import { bushelsPerAcreToKilogramsPerHectare } from "@/stats/units";
import { signedInAgent } from "@/tests/support/sign-in";
import { makeUser, testApp, type TestApp } from "@/tests/support/test-app";
import { draftWithData, plotsCsv, upload, type Fixture } from "./curation-fixtures";

let t: TestApp;
let published: Fixture;
let draft: Fixture;
const soybeanKgHaPerBuAc = bushelsPerAcreToKilogramsPerHectare(1, 60);

beforeAll(async () => {
  t = await testApp();
  // TB-01-2021 loses plot 203 (block 2, BAND: the row is there with NA), TB-02-2021 is complete, TB-01-2022 has means only.
  published = await draftWithData(t.app, t.ctx, {
    plots: plotsCsv({ override: { "TB-01-2021/203": "TB-01-2021,203,2,BAND,NA,13.5" } }),
  });
  const { curatorAgent, reviewerAgent, versionId } = published;
  await upload(curatorAgent, versionId, "site_years", "site_year,site,crop,year,blocks\nTB-01-2022,TB-01,soybean,2022,4\n").expect(201);
  await upload(
    curatorAgent,
    versionId,
    "summaries",
    "site_year,treatment,mean_kg_ha,replicates,mse,df_error\nTB-01-2022,CHK,3500,4,20000,9\nTB-01-2022,BAND,3800,4,20000,9\n",
  ).expect(201);
  await curatorAgent.post(`/api/v1/curation/versions/${versionId}/submit`).send({ changelog: "First release." }).expect(200);
  await reviewerAgent.post(`/api/v1/curation/versions/${versionId}/approve`).send({}).expect(200);
  draft = await draftWithData(t.app, t.ctx, { plots: plotsCsv({ skip: ["TB-02-2021/402"] }) });
}, 180_000); // two datasets through upload, submit and approve: slow on a busy machine
afterAll(() => t.close());

const versionUrl = (code: string, query = "") => `/api/v1/datasets/${published.slug}/versions/1.0.0/site-years/${code}/anova${query}`;
const read = async (url: string, agent = request(t.app)): Promise<SiteYearAnova> => {
  const res = await agent.get(url);
  expect(res.status, JSON.stringify(res.body).slice(0, 600)).toBe(200);
  return siteYearAnova.parse(res.body);
};

describe("GET /datasets/{slug}/versions/{semver}/site-years/{code}/anova", () => {
  it("balanced: F table, MSE, CV, the single LSD t(0.975, df)·√(2·MSE/r), and every pair equal to it", async () => {
    const a = await read(versionUrl("TB-02-2021"));
    expect(a).toMatchObject({ source: "plots", computed: true, reason: null, balanced: true, plots: 16, missingPlots: [] });
    expect(a.measure).toEqual({ name: "yield", title: "Yield", unit: "bu/ac" });
    const table = a.table!;
    expect([table.block.df, table.treatment.df, table.residual.df, table.total.df]).toEqual([3, 3, 9, 15]);
    expect(table.block.sumOfSquares + table.treatment.sumOfSquares + table.residual.sumOfSquares).toBeCloseTo(table.total.sumOfSquares, 8);
    expect(table.treatment.fStatistic).toBeCloseTo(table.treatment.meanSquare / a.mse!, 10);
    expect(table.block.fStatistic).toBeCloseTo(table.block.meanSquare / a.mse!, 10);
    expect(a.cvPercent).toBeCloseTo((100 * Math.sqrt(a.mse!)) / a.grandMean!, 10);
    const single = tQuantile(0.975, 9) * Math.sqrt((2 * a.mse!) / 4);
    expect(a.lsd.single).toBeCloseTo(single, 10);
    expect(a.lsd.pairs).toHaveLength(6);
    for (const p of a.lsd.pairs) expect(p.lsd).toBeCloseTo(single, 10);
    expect(a.means.map((m) => m.code)).toEqual(["BAND", "BC", "CHK", "IF"]);
    expect(a.means.find((m) => m.code === "CHK")).toMatchObject({ name: "Untreated check", isCheck: true, observations: 4 });
    for (const m of a.means) {
      expect(m.lsMean).toBeCloseTo(m.mean, 10);
      expect(m.standardError).toBeCloseTo(Math.sqrt(a.mse! / 4), 10);
    }
  });

  it("a lost plot: unbalanced, the plot named, one LSD per pair (larger with the incomplete treatment), LS-means as the stored responses", async () => {
    const a = await read(versionUrl("TB-01-2021"));
    expect(a).toMatchObject({ computed: true, balanced: false, plots: 15, missingPlots: [{ block: 2, treatment: "BAND", plot: "203" }] });
    expect(a.table!.residual.df).toBe(8);
    expect(a.lsd.single).toBeNull();
    const t8 = tQuantile(0.975, 8);
    for (const p of a.lsd.pairs) expect(p.lsd).toBeCloseTo(t8 * p.standardError, 10);
    const withBand = a.lsd.pairs.filter((p) => p.a === "BAND" || p.b === "BAND");
    const others = a.lsd.pairs.filter((p) => p.a !== "BAND" && p.b !== "BAND");
    expect(withBand).toHaveLength(3);
    for (const p of withBand) for (const q of others) expect(p.lsd).toBeGreaterThan(q.lsd);
    const band = a.means.find((m) => m.code === "BAND")!;
    expect(band.observations).toBe(3);
    expect(band.lsMean).not.toBeCloseTo(band.mean, 6);
    // The same fit made the stored responses when the plots were uploaded: BAND − CHK and its SE agree.
    const responses = await request(t.app).get(`/api/v1/datasets/${published.slug}/versions/1.0.0/responses?limit=100`).expect(200);
    const stored = (responses.body.items as { siteYearCode: string; treatmentCode: string; md: number; se: number }[]).find(
      (r) => r.siteYearCode === "TB-01-2021" && r.treatmentCode === "BAND",
    )!;
    const pair = a.lsd.pairs.find((p) => p.a === "BAND" && p.b === "CHK")!;
    expect(-pair.difference).toBeCloseTo(stored.md, 8);
    expect(pair.standardError).toBeCloseTo(stored.se, 8);
    expect(a.notes.join(" ")).toMatch(/Unbalanced design/);
  });

  it("units: kg/ha scales means and LSDs by the bushel factor and sums of squares by its square; F, p and CV stay", async () => {
    const bu = await read(versionUrl("TB-01-2021"));
    const kg = await read(versionUrl("TB-01-2021", "?units=kg/ha"));
    expect(kg.measure.unit).toBe("kg/ha");
    expect(kg.grandMean! / bu.grandMean!).toBeCloseTo(soybeanKgHaPerBuAc, 8);
    expect(kg.lsd.pairs[0]!.lsd / bu.lsd.pairs[0]!.lsd).toBeCloseTo(soybeanKgHaPerBuAc, 8);
    expect(kg.table!.treatment.sumOfSquares / bu.table!.treatment.sumOfSquares).toBeCloseTo(soybeanKgHaPerBuAc ** 2, 6);
    expect(kg.mse! / bu.mse!).toBeCloseTo(soybeanKgHaPerBuAc ** 2, 6);
    expect(kg.table!.treatment.pValue).toBeCloseTo(bu.table!.treatment.pValue!, 12);
    expect(kg.cvPercent).toBeCloseTo(bu.cvPercent!, 10);
  });

  it("other measures: harvest moisture from its own column (the lost plot has one), stand count absent", async () => {
    const moisture = await read(versionUrl("TB-01-2021", "?measure=harvest_moisture&units=kg/ha"));
    expect(moisture.measure).toEqual({ name: "harvest_moisture", title: "Harvest moisture", unit: "%" });
    expect(moisture).toMatchObject({ computed: true, balanced: true, plots: 16, missingPlots: [] });
    expect(moisture.grandMean).toBeGreaterThan(13);
    expect(moisture.grandMean).toBeLessThan(14);
    const stand = await read(versionUrl("TB-01-2021", "?measure=stand_count"));
    expect(stand).toMatchObject({ computed: false, table: null, plots: 0, measure: { unit: "plants/ac" } });
    expect(stand.missingPlots).toHaveLength(16);
    expect(stand.reason).toMatch(/stand count/);
  });

  it("means only: the means, MSE and df as published (in the unit asked for) and the LSDs they imply; no table", async () => {
    const a = await read(versionUrl("TB-01-2022", "?units=kg/ha"));
    expect(a).toMatchObject({ source: "summary", computed: false, table: null, balanced: null, mse: 20000, dfError: 9 });
    expect(a.reason).toMatch(/cannot be computed/);
    expect(a.means.map((m) => [m.code, m.mean, m.observations, m.lsMean])).toEqual([
      ["BAND", 3800, 4, null],
      ["CHK", 3500, 4, null],
    ]);
    expect(a.lsd.single).toBeCloseTo(tQuantile(0.975, 9) * Math.sqrt((2 * 20000) / 4), 8);
    const bu = await read(versionUrl("TB-01-2022"));
    expect(bu.mse! * soybeanKgHaPerBuAc ** 2).toBeCloseTo(20000, 6);
    expect(bu.means[0]!.mean * soybeanKgHaPerBuAc).toBeCloseTo(3800, 8);
    const vigour = await read(versionUrl("TB-01-2022", "?measure=vigour"));
    expect(vigour).toMatchObject({ source: "summary", computed: false, means: [], mse: null });
  });

  it("an unknown site-year code, dataset or measure: 404 / 404 / 400 problems naming what", async () => {
    const res = await request(t.app).get(versionUrl("TB-09-1999")).expect(404);
    expect(res.type).toBe("application/problem+json");
    expect(res.body.detail).toMatch(/no site-year "TB-09-1999"/);
    await request(t.app).get(`/api/v1/datasets/no-such-dataset/versions/1.0.0/site-years/TB-01-2021/anova`).expect(404);
    const bad = await request(t.app).get(versionUrl("TB-01-2021", "?measure=height")).expect(400);
    expect(JSON.stringify(bad.body.errors)).toMatch(/query\.measure/);
  });

  it("a pinned version's answer is immutable and revalidates with its ETag", async () => {
    const res = await request(t.app).get(versionUrl("TB-02-2021")).expect(200);
    expect(res.headers["cache-control"]).toBe("public, max-age=31536000, immutable");
    await request(t.app).get(versionUrl("TB-02-2021")).set("If-None-Match", res.headers.etag!).expect(304);
  });
});

describe("GET /site-years/{code}/anova (across datasets)", () => {
  it("finds the site-year in the latest published version of its dataset; the answer names dataset and version", async () => {
    const a = await read(`/api/v1/site-years/TB-01-2021/anova?dataset=${published.slug}`);
    expect(a).toMatchObject({ dataset: published.slug, version: "1.0.0", versionState: "published", balanced: false });
    const pinned = await read(versionUrl("TB-01-2021"));
    expect(a.lsd).toEqual(pinned.lsd);
  });

  it("a code in no dataset is a 404; version without dataset is a 400 naming query.version", async () => {
    await request(t.app).get(`/api/v1/site-years/TB-77-2000/anova`).expect(404);
    const res = await request(t.app).get(`/api/v1/site-years/TB-01-2021/anova?version=1.0.0`).expect(400);
    expect(JSON.stringify(res.body.errors)).toMatch(/query\.version/);
  });
});

describe("GET /curation/versions/{id}/site-years/{code}/anova (drafts)", () => {
  const url = () => `/api/v1/curation/versions/${draft.versionId}/site-years/TB-02-2021/anova?units=kg/ha`;

  it("the draft's editor and a reviewer read it, never cached", async () => {
    const byEditor = await draft.curatorAgent.get(url()).expect(200);
    expect(byEditor.headers["cache-control"]).toBe("private, no-store");
    const a = siteYearAnova.parse(byEditor.body);
    expect(a).toMatchObject({ versionState: "draft", balanced: false, missingPlots: [{ block: 4, treatment: "IF", plot: null }] });
    expect(a.measure.unit).toBe("kg/ha");
    const byReviewer = siteYearAnova.parse((await draft.reviewerAgent.get(url()).expect(200)).body);
    expect(byReviewer.lsd).toEqual(a.lsd);
  });

  it("anyone else is told the draft does not exist (404), and an unknown code in a readable draft is a 404", async () => {
    await request(t.app).get(url()).expect(404);
    const member = await signedInAgent(t.app, (await makeUser(t.ctx, "member")).email);
    await member.get(url()).expect(404);
    const otherCurator = await signedInAgent(t.app, (await makeUser(t.ctx, "curator")).email);
    await otherCurator.get(url()).expect(404);
    await draft.curatorAgent.get(`/api/v1/curation/versions/${draft.versionId}/site-years/TB-09-1999/anova`).expect(404);
  });

  it("a published version's site-year reads here too, for anyone", async () => {
    const id = published.versionId;
    const a = siteYearAnova.parse(
      (await request(t.app).get(`/api/v1/curation/versions/${id}/site-years/TB-02-2021/anova`).expect(200)).body,
    );
    expect(a).toMatchObject({ versionState: "published", balanced: true });
  });
});
