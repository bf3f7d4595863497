import { createHash } from "node:crypto";
import supertest from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { checkDataPackage } from "@/tests/support/data-package-check";
import { testApp, type TestApp } from "@/tests/support/test-app";
import { binary, unzip } from "@/tests/support/zip";
import { draftWithData, type Fixture } from "./curation-fixtures";

let t: TestApp;
let f: Fixture;
let checksum: string;
beforeAll(async () => {
  t = await testApp();
  f = await draftWithData(t.app, t.ctx);
  await f.curatorAgent.post(`/api/v1/curation/versions/${f.versionId}/submit`).send({ changelog: "First release." }).expect(200);
  const v = await f.reviewerAgent.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({}).expect(200);
  checksum = v.body.checksum;
});
afterAll(() => t.close());

describe("exports of a published version", () => {
  it("a Frictionless Data Package zip: datapackage.json with hashes and sizes, and one CSV per resource", async () => {
    const res = await supertest(t.app)
      .get(`/api/v1/datasets/${f.slug}/versions/1.0.0/datapackage.zip`)
      .buffer(true)
      .parse(binary)
      .expect(200);
    expect(res.headers["content-type"]).toBe("application/zip");
    const files = unzip(res.body as Buffer);
    expect([...files.keys()].sort()).toEqual([
      "data/plots.csv",
      "data/site_years.csv",
      "data/sites.csv",
      "data/soil_tests.csv",
      "data/summaries.csv",
      "data/treatments.csv",
      "datapackage.json",
    ]);
    const dp = JSON.parse(files.get("datapackage.json")!.toString("utf8"));
    expect(dp).toMatchObject({ profile: "tabular-data-package", name: f.slug, version: "1.0.0", licenses: [{ name: "CC-BY-4.0" }] });
    expect(dp.resources).toHaveLength(6);
    for (const r of dp.resources) {
      const csv = files.get(r.path)!;
      expect(r.hash).toBe(`sha256:${createHash("sha256").update(csv).digest("hex")}`);
      expect(r.bytes).toBe(csv.length);
      expect(r.schema.fields.map((x: { name: string }) => x.name)).toEqual(csv.toString("utf8").split("\r\n")[0]!.split(","));
    }
    const plots = files.get("data/plots.csv")!.toString("utf8").trim().split("\r\n");
    expect(plots).toHaveLength(33);
    expect(plots[0]).toBe("site_year,plot,block,treatment,yield_kg_ha,harvest_moisture_pct,stand_count,vigour,test_weight");
    const treatments = files.get("data/treatments.csv")!.toString("utf8");
    expect(treatments).toContain("CHK,Untreated check,true,,1,,,,,,,,0,0,0,0");
    // The version checksum is SHA-256 over "<resource>\n" + CSV, in the fixed resource order.
    const h = createHash("sha256");
    for (const name of ["sites", "site_years", "soil_tests", "treatments", "plots", "summaries"])
      h.update(`${name}\n`).update(files.get(`data/${name}.csv`)!);
    expect(checksum).toBe(`sha256:${h.digest("hex")}`);
    expect(dp.plotbank.checksum).toBe(checksum);
  });

  it("the zip is a valid Data Package: v2 and v1 profiles, hashes, sizes, every table and every foreign key", async () => {
    const res = await supertest(t.app)
      .get(`/api/v1/datasets/${f.slug}/versions/1.0.0/datapackage.zip`)
      .buffer(true)
      .parse(binary)
      .expect(200);
    const files = unzip(res.body as Buffer);
    const dp = JSON.parse(files.get("datapackage.json")!.toString("utf8"));
    expect(await checkDataPackage(dp, async (p) => files.get(p) ?? Buffer.alloc(0))).toEqual([]);
    expect(dp.$schema).toBe("https://datapackage.org/profiles/2.0/datapackage.json");
    // Every foreign key names a resource of the package, by the name the package gives it.
    const names = dp.resources.map((r: { name: string }) => r.name);
    const referenced = dp.resources.flatMap((r: { schema: { foreignKeys?: { reference: { resource: string } }[] } }) =>
      (r.schema.foreignKeys ?? []).map((k) => k.reference.resource),
    );
    expect(referenced).toContain("site_years");
    for (const name of referenced) expect(names).toContain(name);
  });

  it("the standalone datapackage.json works from its URL: every path answers 200 with the declared bytes and hash", async () => {
    const url = `/api/v1/datasets/${f.slug}/versions/latest/datapackage.json`;
    const dp = (await supertest(t.app).get(url).expect(200)).body;
    const fetched: string[] = [];
    const problems = await checkDataPackage(dp, async (p) => {
      // Resolve the path against the descriptor's own address, as a reader that downloaded it from there would.
      const target = new URL(p, `http://plotbank.test${url}`);
      expect(target.origin).toBe("http://plotbank.test");
      fetched.push(target.pathname);
      const r = await supertest(t.app).get(target.pathname).buffer(true).parse(binary);
      expect(r.status, target.pathname).toBe(200);
      return r.body as Buffer;
    });
    expect(problems).toEqual([]);
    expect(fetched).toContain(`/api/v1/datasets/${f.slug}/versions/1.0.0/resources/site_years.csv`);
    expect(fetched).toHaveLength(6);
  });

  it("the /schema answer is keyed by the package's resource names", async () => {
    const schema = (await supertest(t.app).get(`/api/v1/datasets/${f.slug}/versions/1.0.0/schema`).expect(200)).body;
    const dp = (await supertest(t.app).get(`/api/v1/datasets/${f.slug}/versions/1.0.0/datapackage.json`).expect(200)).body;
    expect(Object.keys(schema.resources).sort()).toEqual(dp.resources.map((r: { name: string }) => r.name).sort());
  });

  it("a resource CSV with Digest, a strong ETag, 304 and a describedby link", async () => {
    const res = await supertest(t.app).get(`/api/v1/datasets/${f.slug}/versions/1.0.0/resources/plots.csv`).expect(200);
    const sha = createHash("sha256").update(res.text).digest();
    expect(res.headers.digest).toBe(`sha-256=${sha.toString("base64")}`);
    expect(res.headers.etag).toBe(`"${sha.toString("hex")}"`);
    expect(res.headers.link).toContain(`/api/v1/datasets/${f.slug}/versions/1.0.0/datapackage.json>; rel="describedby"`);
    await supertest(t.app)
      .get(`/api/v1/datasets/${f.slug}/versions/1.0.0/resources/plots.csv`)
      .set("If-None-Match", res.headers.etag!)
      .expect(304);
    const latest = await supertest(t.app).get(`/api/v1/datasets/${f.slug}/versions/latest/resources/plots.csv`).expect(200);
    expect(latest.text).toBe(res.text);
    await supertest(t.app).get(`/api/v1/datasets/${f.slug}/versions/1.0.0/resources/nothing.csv`).expect(404);
  });

  it("drafts are not downloadable", async () => {
    await f.curatorAgent.post(`/api/v1/datasets/${f.slug}/versions`).send({}).expect(201);
    await supertest(t.app).get(`/api/v1/datasets/${f.slug}/versions/1.1.0/datapackage.zip`).expect(404);
  });

  it("every curation route is in the OpenAPI document", async () => {
    const doc = await supertest(t.app).get("/api/v1/openapi.json").expect(200);
    expect(Object.keys(doc.body.paths)).toEqual(
      expect.arrayContaining([
        "/api/v1/curation/versions/{id}/uploads/{resource}",
        "/api/v1/curation/diff",
        "/api/v1/datasets/{slug}/versions/{semver}/datapackage.zip",
        "/api/v1/curation/review-queue",
      ]),
    );
    expect(doc.body.components.schemas.VersionDetail).toBeDefined();
    expect(doc.body.components.schemas.ValidationProblem).toBeDefined();
  });
});
