import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { responsePage, siteYearPage } from "@/schemas/public";
import { uploadResult } from "@/schemas/curation";
import { testApp, type TestApp } from "@/tests/support/test-app";
import { draftWithData, upload, type Fixture } from "./curation-fixtures";

/**
 * A trial that reported its soil tests as low / medium / high under its own lab's scheme: the curator registers the
 * scheme in the version's data dictionary, uploads the classes under the trial's labels, and after publication the
 * cross-dataset filter soilTestClass= finds them on the ordinal scale, with the reported label and scheme beside it.
 */
let t: TestApp;
let f: Fixture;
let semver: string;
beforeAll(async () => {
  t = await testApp({ anonRatePerMinute: 1_000_000 });
  f = await draftWithData(t.app, t.ctx);
}, 60_000);
afterAll(() => t.close());

// Invented for this test: a three-class lab scheme whose "medium" stands for our optimum.
const wrenLab = {
  name: "wren-lab-lmh",
  title: "Wren County soil lab, three classes (invented)",
  analyte: "P",
  extractant: "Bray-P1",
  unit: "ppm",
  classes: [
    { label: "low", scale: "low" },
    { label: "medium", scale: "optimum" },
    { label: "high", scale: "high" },
  ],
  thresholds: [10, 20],
  source: "As printed in the trial's report (invented for this test).",
  sourceStatus: "invented for the demo",
};

async function putSchemes(schemes: unknown[]) {
  const current = await f.curatorAgent.get(`/api/v1/curation/versions/${f.versionId}`).expect(200);
  return f.curatorAgent
    .put(`/api/v1/curation/versions/${f.versionId}/table-schema`)
    .send({ ...current.body.tableSchema, soilTestSchemes: schemes });
}

describe("soil-test interpretation schemes", () => {
  it("refuses a scheme whose thresholds do not fit its classes, and one that takes a built-in name", async () => {
    const bad = await putSchemes([{ ...wrenLab, thresholds: [10] }]);
    expect(bad.status).toBe(400);
    expect(bad.body.errors).toContainEqual(
      expect.objectContaining({
        field: "body.soilTestSchemes.0.thresholds",
        message: expect.stringMatching(/3 classes need 2 thresholds/),
      }),
    );
    const clash = await putSchemes([{ ...wrenLab, name: "tallgrass-illustrative" }]);
    expect(clash.status).toBe(400);
    expect(clash.body.errors).toContainEqual(
      expect.objectContaining({ field: "body.soilTestSchemes.0.name", message: expect.stringMatching(/built-in/) }),
    );
  });

  it("uploads low/medium/high under the trial's own scheme; a label its thresholds contradict is a warning, not a refusal", async () => {
    const put = await putSchemes([wrenLab]);
    expect(put.status, JSON.stringify(put.body).slice(0, 1000)).toBe(200);
    // TB-02's 24 ppm is "high" by the lab's limits, but the trial reported "medium": kept, with a warning.
    const csv =
      "site_year,analyte,value,unit,extractant,class,interpretation\nTB-01-2021,P,7,ppm,Bray-P1,low,wren-lab-lmh\nTB-02-2021,P,24,ppm,Bray-P1,Medium,wren-lab-lmh\n";
    const res = await upload(f.curatorAgent, f.versionId, "soil_tests", csv);
    expect(res.status, JSON.stringify(res.body).slice(0, 1000)).toBe(201);
    const body = uploadResult.parse(res.body);
    expect(body.errors).toBe(0);
    expect(body.problems).toEqual([
      expect.objectContaining({
        severity: "warning",
        row: 2,
        column: "class",
        value: "Medium",
        message: expect.stringMatching(/contradicts scheme "wren-lab-lmh".*falls in "high"/),
      }),
    ]);
    await f.curatorAgent
      .post(`/api/v1/curation/versions/${f.versionId}/submit`)
      .send({ changelog: "Soil tests as the lab reported them." })
      .expect(200);
    semver = (await f.reviewerAgent.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({}).expect(200)).body.semver;
  });

  it("soilTestClass= filters on the mapped class; responses carry the reported label and the scheme beside it", async () => {
    const read = async (q: string) =>
      responsePage.parse((await request(t.app).get(`/api/v1/responses?dataset=${f.slug}&${q}&limit=1000`).expect(200)).body).items;
    const optimum = await read("soilTestClass=optimum");
    expect(new Set(optimum.map((r) => r.siteYearCode))).toEqual(new Set(["TB-02-2021"]));
    for (const r of optimum) {
      expect(r).toMatchObject({
        soilTestAnalyte: "P",
        soilTestClass: "optimum",
        soilPClass: "optimum",
        soilPReportedClass: "medium",
        soilPScheme: "wren-lab-lmh",
        soilPValue: 24,
      });
    }
    const low = await read("soilTestClass=low&nutrient=P");
    expect(new Set(low.map((r) => r.siteYearCode))).toEqual(new Set(["TB-01-2021"]));
    expect(low[0]).toMatchObject({ soilPReportedClass: "low", soilPScheme: "wren-lab-lmh" });
    expect(await read("soilTestClass=high")).toEqual([]);
    const meta = (await request(t.app).get(`/api/v1/analyses/meta?dataset=${f.slug}&soilTestClass=optimum`).expect(200)).body;
    expect(meta.k).toBe(1);
    expect(meta.rows[0]).toMatchObject({ soilTestClass: "optimum", soilTestReportedClass: "medium", soilTestScheme: "wren-lab-lmh" });
  });

  it("site-years list each test's reported class and scheme; the dictionary keeps the scheme", async () => {
    const sy = siteYearPage.parse((await request(t.app).get(`/api/v1/site-years?dataset=${f.slug}`).expect(200)).body).items;
    const tb02 = sy.find((s) => s.code === "TB-02-2021")!;
    expect(tb02.soilTests.find((s) => s.analyte === "P")).toMatchObject({
      class: "optimum",
      reportedClass: "medium",
      interpretation: "wren-lab-lmh",
    });
    const dictionary = await request(t.app).get(`/api/v1/datasets/${f.slug}/versions/${semver}/schema`).expect(200);
    expect(dictionary.body.soilTestSchemes).toEqual([wrenLab]);
  });
});

describe("built-in schemes", () => {
  it("are listed with their source, and the one known only from memory says so", async () => {
    const res = await request(t.app).get("/api/v1/soil-test-schemes").expect(200);
    const items = res.body.items as { name: string; analyte: string; source: string; sourceStatus: string }[];
    expect(items.length).toBeGreaterThan(0);
    for (const s of items) expect(s.source.length).toBeGreaterThan(10);
    expect(items.filter((s) => s.name === "isu-pm1688-2013").every((s) => s.sourceStatus === "from memory")).toBe(true);
    expect(items.filter((s) => s.name === "tallgrass-illustrative").every((s) => s.sourceStatus === "invented for the demo")).toBe(true);
  });
});
