import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { cautionCodes, metaAnalysisResult } from "@/schemas/analysis";
import { uploadResult } from "@/schemas/curation";
import { cautionRules } from "@/server/services/cautions";
import { testApp, type TestApp } from "@/tests/support/test-app";
import { draftWithData, treatmentsCsv, upload, type Fixture } from "./curation-fixtures";

/**
 * Cautions follow the question: the rules are tested against the treatments a filter includes, the ones tripped
 * come first and name the treatments, and the curator's upload report warns about the same treatment.
 */
let t: TestApp;
let f: Fixture;
let report: ReturnType<typeof uploadResult.parse>;
beforeAll(async () => {
  t = await testApp({ anonRatePerMinute: 1_000_000 });
  f = await draftWithData(t.app, t.ctx);
  // The 2x2 band becomes UAN 28 (20 gal/ac ≈ 59.8 lb N) plus 100 lb/ac potash (60 lb K2O): about 120 lb/ac N + K2O at 30-in rows.
  const overBand = treatmentsCsv.replace(
    "BAND,2x2 band MAP,false,1,MAP,11-52-0,100,lb/ac,2x2-band,at-planting",
    "BAND,2x2 band UAN + potash,false,1,UAN 28,28-0-0,20,gal/ac,2x2-band,at-planting\nBAND,2x2 band UAN + potash,false,2,Potash,0-0-60,100,lb/ac,2x2-band,at-planting",
  );
  const res = await upload(f.curatorAgent, f.versionId, "treatments", overBand);
  expect(res.status, JSON.stringify(res.body).slice(0, 1500)).toBe(201);
  report = uploadResult.parse(res.body);
  await f.curatorAgent
    .post(`/api/v1/curation/versions/${f.versionId}/submit`)
    .send({ changelog: "Band treatment as applied." })
    .expect(200);
  await f.reviewerAgent.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({}).expect(200);
}, 60_000);
afterAll(() => t.close());

const meta = async (q: string) =>
  metaAnalysisResult.parse((await request(t.app).get(`/api/v1/analyses/meta?dataset=${f.slug}&${q}`).expect(200)).body);

describe("cautions that follow the question", () => {
  it("the upload report warns about the treatment over the band guideline, naming it", () => {
    expect(report.problems).toContainEqual(
      expect.objectContaining({
        severity: "warning",
        column: "treatment",
        value: "BAND",
        message: expect.stringMatching(
          /treatment "BAND" trips caution band-n-k2o-rate on soybean: 119\.8 lb\/ac N \+ K2O in the 2x2 band, above about 90 lb\/ac at 30-in rows/,
        ),
      }),
    );
    // The in-furrow 10-34-0 puts its carrier N with soybean seed.
    expect(report.problems).toContainEqual(
      expect.objectContaining({ severity: "warning", value: "IF", message: expect.stringMatching(/seed-placed-n-k2o/) }),
    );
    expect(report.problems.filter((p) => p.value === "BC")).toEqual([]);
  });

  it("a 2x2-band question puts the band caution first and names the treatment; every rule keeps its code and source", async () => {
    const body = await meta("placement=2x2-band");
    expect(body.k).toBe(2);
    expect(body.cautions[0]).toMatchObject({
      code: "band-n-k2o-rate",
      matches: true,
      standing: false,
      source: "common practice, no source",
    });
    expect(body.cautions[0]!.treatments).toEqual([
      { dataset: f.slug, treatment: "BAND", detail: expect.stringMatching(/119\.8 lb\/ac N \+ K2O/) },
    ]);
    expect(body.cautions.map((c) => c.code).sort()).toEqual(cautionRules.map((r) => r.code).sort());
    expect(cautionRules.map((r) => r.code).sort()).toEqual([...cautionCodes].sort());
    // Nothing in the furrow here: the seed-placement rules are listed but not tripped, after the standing cautions.
    const furrow = body.cautions.find((c) => c.code === "seed-placed-n-k2o")!;
    expect(furrow).toMatchObject({ matches: false, treatments: [] });
    expect(body.cautions.findIndex((c) => c.code === "trials-not-your-field")).toBeLessThan(body.cautions.indexOf(furrow));
  });

  it("an in-furrow question on soybean trips the seed and salt rules instead, and not the band rule", async () => {
    const body = await meta("placement=in-furrow");
    const matching = body.cautions.filter((c) => c.matches).map((c) => c.code);
    expect(matching).toEqual(["seed-placed-n-k2o", "salt-sensitive-crop"]);
    expect(body.cautions.slice(0, 2).map((c) => c.code)).toEqual(matching);
    expect(body.cautions.find((c) => c.code === "seed-placed-n-k2o")!.treatments).toEqual([
      { dataset: f.slug, treatment: "IF", detail: expect.stringMatching(/lb\/ac N \+ K2O with the seed/) },
    ]);
    expect(body.cautions.find((c) => c.code === "band-n-k2o-rate")).toMatchObject({ matches: false });
  });

  it("a broadcast question trips nothing, and the standing cautions come first", async () => {
    const body = await meta("placement=broadcast");
    expect(body.cautions.filter((c) => c.matches)).toEqual([]);
    expect(body.cautions.slice(0, 3).map((c) => c.code)).toEqual(["trials-not-your-field", "seed-placement-injury", "local-advice"]);
  });
});
