/**
 * Yields come back as the curator gave them. A file in bu/ac is stored in kg/ha (the crop's bushel weight, NIST
 * Handbook 44 App. C) and read back in bu/ac through every read that converts: the public rows in JSON (encoded by
 * the database) and CSV (written in TypeScript), a draft's site-year ANOVA, and the responses. A file in kg/ha reads
 * back in kg/ha as it was given. The rule that makes this so: stats/precision.ts.
 */
import fc from "fast-check";
import Papa from "papaparse";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { metaAnalysisResult } from "@/schemas/analysis";
import { observationPage, responsePage } from "@/schemas/public";
import { siteYearAnova } from "@/schemas/site-year-anova";
import { versionRowsPage } from "@/schemas/review";
import { bushelsPerAcreToKilogramsPerHectare } from "@/stats/units";
import { testApp, type TestApp } from "@/tests/support/test-app";
import { draftWithData, upload, type Fixture } from "./curation-fixtures";

let t: TestApp;
let inBushels: Fixture;
let inKilograms: Fixture;
const soybeanKgHaPerBuAc = bushelsPerAcreToKilogramsPerHectare(1, 60);

const siteYears = ["TB-01-2021", "TB-02-2021"] as const;
const treatmentCodes = ["CHK", "IF", "BAND", "BC"] as const;

/**
 * Given yields of 2 site-years × 4 blocks × 4 treatments, as text. TB-01-2021's check is 63 in every block and its
 * band 63, 47.5, 58.25, 60; the other plots take 1–6 significant digits from a seeded generator.
 */
function givenYields(scale: number): Map<string, string> {
  const random = fc.sample(
    fc.tuple(fc.integer({ min: 1, max: 999_999 }), fc.integer({ min: 0, max: 4 })).map(([digits, decimals]) => {
      const x = Number(`${digits}e-${decimals}`);
      return x < 20 ? x + 20 : x > 120 ? (x % 100) + 20 : x;
    }),
    { numRuns: 32, seed: 20261203 },
  );
  const yields = new Map<string, string>();
  let i = 0;
  for (const sy of siteYears)
    for (let block = 1; block <= 4; block++)
      for (const trt of treatmentCodes) {
        let y = random[i++]!;
        if (sy === "TB-01-2021" && trt === "CHK") y = 63;
        if (sy === "TB-01-2021" && trt === "BAND") y = [63, 47.5, 58.25, 60][block - 1]!;
        yields.set(`${sy}/${block}0${treatmentCodes.indexOf(trt) + 1}`, String(Number((y * scale).toPrecision(15))));
      }
  return yields;
}
const bushels = givenYields(1);
const kilograms = givenYields(70);

function plotsFile(yields: Map<string, string>, header: string): string {
  const lines = [`site_year,plot,block,treatment,${header},harvest_moisture_pct`];
  for (const [key, y] of yields) {
    const [sy, plot] = key.split("/") as [string, string];
    lines.push(`${sy},${plot},${plot[0]},${treatmentCodes[Number(plot[2]) - 1]},${y},13.5`);
  }
  return lines.join("\n") + "\n";
}

async function publish(f: Fixture) {
  await f.curatorAgent.post(`/api/v1/curation/versions/${f.versionId}/submit`).send({ changelog: "First release." }).expect(200);
  await f.reviewerAgent.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({}).expect(200);
}

beforeAll(async () => {
  t = await testApp({ anonRatePerMinute: 1_000_000 });
  inBushels = await draftWithData(t.app, t.ctx, { plots: false });
  await upload(inBushels.curatorAgent, inBushels.versionId, "plots", plotsFile(bushels, "yield_bu_ac"), {
    mapping: JSON.stringify({ yield_bu_ac: "yield_kg_ha" }),
    units: JSON.stringify({ yield: "bu/ac" }),
  }).expect(201);
  inKilograms = await draftWithData(t.app, t.ctx, { plots: plotsFile(kilograms, "yield_kg_ha") });
}, 180_000);
afterAll(() => t.close());

const keyOf = (r: { siteYearCode: string; plot: string }) => `${r.siteYearCode}/${r.plot}`;

async function observationsJson(slug: string, units: string) {
  const res = await request(t.app).get(`/api/v1/datasets/${slug}/versions/1.0.0/observations?units=${units}&limit=100`).expect(200);
  return new Map(observationPage.parse(res.body).items.map((r) => [keyOf(r), r]));
}

async function observationsCsv(slug: string, units: string) {
  const res = await request(t.app).get(`/api/v1/datasets/${slug}/versions/1.0.0/observations?units=${units}&format=csv`).expect(200);
  const rows = Papa.parse<Record<string, string>>(res.text, { header: true, skipEmptyLines: true }).data;
  return new Map(rows.map((r) => [`${r.siteYearCode}/${r.plot}`, r]));
}

describe("a draft's rows and ANOVA", () => {
  it("stores the kg/ha of each bu/ac value unrounded, and the file's kg/ha as given", async () => {
    for (const [f, given, toKgHa] of [
      [inBushels, bushels, soybeanKgHaPerBuAc],
      [inKilograms, kilograms, 1],
    ] as const) {
      const res = await f.curatorAgent.get(`/api/v1/curation/versions/${f.versionId}/rows/plots?limit=500`).expect(200);
      const page = versionRowsPage.parse(res.body);
      const at = (name: string) => page.fields.indexOf(name);
      expect(page.rows).toHaveLength(32);
      for (const row of page.rows) {
        const key = `${row[at("site_year")]}/${row[at("plot")]}`;
        expect(Number(row[at("yield_kg_ha")]), key).toBe(Number(given.get(key)) * toKgHa);
        if (toKgHa === 1) expect(row[at("yield_kg_ha")], key).toBe(given.get(key));
      }
    }
  });

  it("the site-year ANOVA in bu/ac averages the values as given", async () => {
    const res = await inBushels.curatorAgent
      .get(`/api/v1/curation/versions/${inBushels.versionId}/site-years/TB-01-2021/anova?units=bu/ac`)
      .expect(200);
    const anova = siteYearAnova.parse(res.body);
    expect(anova.measure.unit).toBe("bu/ac");
    const mean = (code: string) => anova.means.find((m) => m.code === code)!.mean;
    expect(mean("CHK")).toBe(63);
    expect(mean("BAND")).toBe(57.1875); // (63 + 47.5 + 58.25 + 60) / 4
  });
});

describe("published rows read back as given", () => {
  beforeAll(async () => {
    await publish(inBushels);
    await publish(inKilograms);
  }, 120_000);

  it("bu/ac in, bu/ac out: JSON and CSV observations", async () => {
    const json = await observationsJson(inBushels.slug, "bu/ac");
    const csv = await observationsCsv(inBushels.slug, "bu/ac");
    expect(json.size).toBe(32);
    expect(csv.size).toBe(32);
    for (const [key, y] of bushels) {
      expect(json.get(key), key).toMatchObject({ yield: Number(y), yieldUnit: "bu/ac" });
      expect(csv.get(key)?.yield, key).toBe(y);
    }
    expect(json.get("TB-01-2021/101")!.yield).toBe(63);
    expect(csv.get("TB-01-2021/303")?.yield).toBe("58.25");
  });

  it("kg/ha in, kg/ha out: JSON and CSV observations", async () => {
    const json = await observationsJson(inKilograms.slug, "kg/ha");
    const csv = await observationsCsv(inKilograms.slug, "kg/ha");
    for (const [key, y] of kilograms) {
      expect(json.get(key), key).toMatchObject({ yield: Number(y), yieldUnit: "kg/ha" });
      expect(csv.get(key)?.yield, key).toBe(y);
    }
  });

  it("bu/ac uploads read in kg/ha carry no binary noise (15 significant digits)", async () => {
    const json = await observationsJson(inBushels.slug, "kg/ha");
    const csv = await observationsCsv(inBushels.slug, "kg/ha");
    for (const [key, y] of bushels) {
      const expected = Number((Number(y) * soybeanKgHaPerBuAc).toPrecision(15));
      expect(json.get(key)!.yield, key).toBe(expected);
      expect(Number(csv.get(key)?.yield), key).toBe(expected);
    }
    expect(json.get("TB-01-2021/101")!.yield).toBe(4236.81737041504); // 63 × 60 × 0.45359237 / 0.40468564224 = 4236.8173704150…
  });

  it("responses in bu/ac, JSON (encoded by the database) and CSV: the check's mean as given", async () => {
    const url = `/api/v1/datasets/${inBushels.slug}/versions/1.0.0/responses?units=bu/ac`;
    const json = responsePage.parse((await request(t.app).get(`${url}&limit=100`).expect(200)).body).items;
    const csv = Papa.parse<Record<string, string>>((await request(t.app).get(`${url}&format=csv`).expect(200)).text, {
      header: true,
      skipEmptyLines: true,
    }).data;
    const band = json.find((r) => r.siteYearCode === "TB-01-2021" && r.treatmentCode === "BAND")!;
    expect(band).toMatchObject({ unit: "bu/ac", checkMean: 63, treatedMean: 57.1875 });
    const bandCsv = csv.find((r) => r.siteYearCode === "TB-01-2021" && r.treatmentCode === "BAND")!;
    expect([bandCsv.checkMean, bandCsv.treatedMean]).toEqual(["63", "57.1875"]);
    for (const r of json) {
      const row = csv.find((c) => c.siteYearCode === r.siteYearCode && c.treatmentCode === r.treatmentCode)!;
      for (const field of ["checkMean", "treatedMean", "md", "se"] as const) expect(Number(row[field])).toBe(r[field]);
    }
  });

  it("the meta-analysis's forest rows give the check's mean in bu/ac as given", async () => {
    const res = await request(t.app).get(`/api/v1/analyses/meta?dataset=${inBushels.slug}&units=bu/ac&forestLimit=all`).expect(200);
    const rows = metaAnalysisResult.parse(res.body).rows.filter((r) => r.siteYearCode === "TB-01-2021");
    expect(rows.length).toBeGreaterThan(0);
    for (const r of rows) expect(r.checkMean).toBe(63);
  });
});
