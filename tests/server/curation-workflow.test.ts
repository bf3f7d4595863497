import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { versionDetail, versionDiff } from "@/schemas/curation";
import { makeUser, testApp, type TestApp } from "@/tests/support/test-app";
import { signedInAgent } from "@/tests/support/sign-in";
import { draftWithData, plotsCsv, upload, type Fixture } from "./curation-fixtures";

let t: TestApp;
let f: Fixture;
beforeAll(async () => {
  t = await testApp();
  f = await draftWithData(t.app, t.ctx);
});
afterAll(() => t.close());

describe("draft → review → published → next version", () => {
  it("computes responses per site-year from the plots", async () => {
    const res = await f.curatorAgent.get(`/api/v1/curation/versions/${f.versionId}`).expect(200);
    const v = versionDetail.parse(res.body);
    expect(v.state).toBe("draft");
    expect(v.counts).toMatchObject({ sites: 2, site_years: 2, soil_tests: 2, treatments: 4, plots: 32 });
    expect(v.responses).toBe(6);
    expect(v.uncomputedSiteYears).toEqual([]);
    const rows = await t.ctx.db.execute(
      sql`select site_year_code, treatment_code, md_kg_ha, balanced, soil_p_class, placements from responses where version_id = ${f.versionId} order by 1, 2`,
    );
    const r = (
      rows as unknown as {
        rows: {
          site_year_code: string;
          treatment_code: string;
          md_kg_ha: number;
          balanced: boolean;
          soil_p_class: string;
          placements: string[];
        }[];
      }
    ).rows;
    const band = r.find((x) => x.site_year_code === "TB-01-2021" && x.treatment_code === "BAND")!;
    // Balanced RCBD: the response is the plain difference of the treatment means.
    expect(band.balanced).toBe(true);
    expect(band.soil_p_class).toBe("low");
    expect(band.placements).toEqual(["2x2-band"]);
    expect(band.md_kg_ha).toBeGreaterThan(200);
    expect(Math.abs(r.find((x) => x.site_year_code === "TB-02-2021" && x.treatment_code === "BAND")!.md_kg_ha)).toBeLessThan(100);
  });

  it("needs a changelog to submit; the submitting reviewer cannot approve, another can", async () => {
    await f.curatorAgent.post(`/api/v1/curation/versions/${f.versionId}/submit`).send({}).expect(400);
    await f.curatorAgent
      .post(`/api/v1/curation/versions/${f.versionId}/submit`)
      .send({ changelog: "First release: 2021 season." })
      .expect(200);
    // A curator cannot approve at all.
    await f.curatorAgent.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({}).expect(403);
    // Uploads into a version in review are refused with 409.
    const late = await upload(f.curatorAgent, f.versionId, "plots", plotsCsv());
    expect(late.status).toBe(409);
    const queue = await f.reviewerAgent.get("/api/v1/curation/review-queue").expect(200);
    expect(queue.body.items.map((i: { versionId: string }) => i.versionId)).toContain(f.versionId);
    await f.reviewerAgent
      .post(`/api/v1/curation/versions/${f.versionId}/return`)
      .send({ comment: "Please add the soil series." })
      .expect(200);
    const back = await f.curatorAgent.get(`/api/v1/curation/versions/${f.versionId}`).expect(200);
    expect(back.body).toMatchObject({ state: "draft", reviewComment: "Please add the soil series." });
    await f.curatorAgent
      .post(`/api/v1/curation/versions/${f.versionId}/submit`)
      .send({ changelog: "First release: 2021 season." })
      .expect(200);
    const approved = await f.reviewerAgent.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({}).expect(200);
    const v = versionDetail.parse(approved.body);
    expect(v.state).toBe("published");
    expect(v.checksum).toMatch(/^sha256:[0-9a-f]{64}$/);
    expect(v.metadataSnapshot).toMatchObject({ slug: f.slug, licence: "CC-BY-4.0" });
    expect(v.publishedAt).not.toBeNull();
  });

  it("a reviewer who submitted a version cannot approve it (403)", async () => {
    const admin = await makeUser(t.ctx, "admin");
    const adminAgent = await signedInAgent(t.app, admin.email);
    const g = await draftWithData(t.app, t.ctx);
    await adminAgent.post(`/api/v1/curation/versions/${g.versionId}/submit`).send({ changelog: "Admin submits." }).expect(200);
    const res = await adminAgent.post(`/api/v1/curation/versions/${g.versionId}/approve`).send({}).expect(403);
    expect(res.body.detail).toMatch(/another reviewer/);
    const own = await draftWithData(t.app, t.ctx);
    // The reviewer account of `own` approves nothing it created either: make a draft as admin.
    const ds = await adminAgent
      .post("/api/v1/datasets")
      .send({ slug: `admin-own-${Date.now()}`, title: "Admin's own", crops: ["corn"], region: "Tallgrass Basin", description: "x" })
      .expect(201);
    const dv = await adminAgent.post(`/api/v1/datasets/${ds.body.slug}/versions`).send({}).expect(201);
    expect(dv.body.canReview).toBe(false);
    expect(own.versionId).toBeTruthy();
  });

  it("a new version copies the published rows; a correction diffs as PATCH, a new site-year as MINOR, a removal as MAJOR", async () => {
    const next = await f.curatorAgent.post(`/api/v1/datasets/${f.slug}/versions`).send({}).expect(201);
    const v2 = versionDetail.parse(next.body);
    expect(v2.semver).toBe("1.1.0");
    expect(v2.basedOnSemver).toBe("1.0.0");
    expect(v2.counts).toMatchObject({ site_years: 2, plots: 32, treatments: 4 });
    expect(v2.responses).toBe(6);
    // A second open version is refused.
    await f.curatorAgent.post(`/api/v1/datasets/${f.slug}/versions`).send({}).expect(409);

    const unchanged = versionDiff.parse(
      (await f.curatorAgent.get(`/api/v1/curation/diff?from=${v2.basedOnVersionId}&to=${v2.id}`).expect(200)).body,
    );
    expect(unchanged.suggestedBump).toBe("patch");
    expect(unchanged.reasons).toEqual(["no changes"]);

    const corrected = plotsCsv({ override: { "TB-01-2021/101": "TB-01-2021,101,1,CHK,3500,13.1" } });
    await upload(f.curatorAgent, v2.id, "plots", corrected).expect(201);
    let d = versionDiff.parse((await f.curatorAgent.get(`/api/v1/curation/diff?from=${v2.basedOnVersionId}&to=${v2.id}`).expect(200)).body);
    expect(d.rows.plots).toMatchObject({ added: 0, removed: 0, changed: 1 });
    expect(d.rows.plots.sample[0]).toMatchObject({ key: "TB-01-2021/101", change: "changed" });
    expect(d.siteYears.changed).toEqual([{ siteYear: "TB-01-2021", fields: ["plots"] }]);
    expect(d.suggestedBump).toBe("patch");

    await upload(f.curatorAgent, v2.id, "site_years", "site_year,site,crop,year,blocks\nTB-01-2022,TB-01,soybean,2022,4\n").expect(201);
    d = versionDiff.parse((await f.curatorAgent.get(`/api/v1/curation/diff?from=${v2.basedOnVersionId}&to=${v2.id}`).expect(200)).body);
    expect(d.siteYears.added).toEqual(["TB-01-2022"]);
    expect(d.suggestedBump).toBe("minor");
    expect(d.suggestedSemver).toBe("1.1.0");
    // The new site-year has no plots yet: reported, not dropped silently.
    const detail = versionDetail.parse((await f.curatorAgent.get(`/api/v1/curation/versions/${v2.id}`).expect(200)).body);
    expect(detail.uncomputedSiteYears).toEqual([{ siteYear: "TB-01-2022", reason: "no plots or summary means yet" }]);
    expect(detail.suggestedBump).toBe("minor");

    // Replacing the plots with a file that lacks one plot removes it.
    await upload(f.curatorAgent, v2.id, "plots", plotsCsv({ skip: ["TB-02-2021/101"] }), { mode: "replace" }).expect(201);
    d = versionDiff.parse((await f.curatorAgent.get(`/api/v1/curation/diff?from=${v2.basedOnVersionId}&to=${v2.id}`).expect(200)).body);
    expect(d.rows.plots.removed).toBe(1);
    expect(d.suggestedBump).toBe("major");
    expect(d.suggestedSemver).toBe("2.0.0");
    // The unbalanced site-year still has responses, flagged.
    const r = await t.ctx.db.execute(
      sql`select bool_and(balanced) as b, count(*) as n from responses where version_id = ${v2.id} and site_year_code = 'TB-02-2021' and measure = 'yield'`,
    );
    const row = (r as unknown as { rows: { b: boolean; n: number | string }[] }).rows[0]!;
    expect(row.b).toBe(false);
    expect(Number(row.n)).toBe(3);
  });

  it("semver must increase over the latest published version", async () => {
    const cur = (await f.curatorAgent.get(`/api/v1/curation/datasets/${f.slug}`).expect(200)).body.versions[0];
    const res = await f.curatorAgent.patch(`/api/v1/curation/versions/${cur.id}`).send({ semver: "1.0.0" }).expect(409);
    expect(res.body.errors[0].field).toBe("body.semver");
  });

  it("a non-owner curator gets 403 on edits and uploads; after being made editor they may", async () => {
    const other = await makeUser(t.ctx, "curator");
    const agent = await signedInAgent(t.app, other.email);
    const list = (await f.curatorAgent.get(`/api/v1/curation/datasets/${f.slug}`).expect(200)).body;
    const draft = list.versions.find((v: { state: string }) => v.state === "draft");
    await agent.patch(`/api/v1/datasets/${f.slug}`).send({ title: "Taken over" }).expect(403);
    expect((await upload(agent, draft.id, "sites", "site,location\nTB-09,Wren County\n")).status).toBe(403);
    await agent
      .put(`/api/v1/curation/versions/${draft.id}/table-schema`)
      .send(draft.tableSchema ?? {})
      .expect((r) => expect([400, 403]).toContain(r.status));
    const shared = await f.curatorAgent.post(`/api/v1/curation/datasets/${f.slug}/editors`).send({ email: other.email }).expect(200);
    expect(shared.body.editors).toEqual([{ id: other.id, displayName: other.displayName, email: other.email }]);
    expect(shared.body.canShare).toBe(true);
    await agent.patch(`/api/v1/datasets/${f.slug}`).send({ title: "Shared starter test" }).expect(200);
    const mine = await agent.get("/api/v1/curation/datasets").expect(200);
    expect(mine.body.items.map((d: { slug: string }) => d.slug)).toContain(f.slug);
    // An editor edits but does not choose editors; the owner can stop sharing, and then the edits are refused again.
    const asEditor = (await agent.get(`/api/v1/curation/datasets/${f.slug}`).expect(200)).body;
    expect(asEditor).toMatchObject({ canEdit: true, canShare: false });
    await agent.delete(`/api/v1/curation/datasets/${f.slug}/editors/${other.id}`).expect(403);
    const member0 = await makeUser(t.ctx, "member");
    // A member's address and an address without an account get the same answer: sharing tells nobody who has an account.
    const refused = await f.curatorAgent.post(`/api/v1/curation/datasets/${f.slug}/editors`).send({ email: member0.email }).expect(404);
    expect(refused.body.errors).toEqual([{ field: "body.email", message: "no curator has this address" }]);
    const unknown = await f.curatorAgent
      .post(`/api/v1/curation/datasets/${f.slug}/editors`)
      .send({ email: "nobody@tallgrass.test" })
      .expect(404);
    expect(unknown.body.errors).toEqual(refused.body.errors);
    const after = await f.curatorAgent.delete(`/api/v1/curation/datasets/${f.slug}/editors/${other.id}`).expect(200);
    expect(after.body.editors).toEqual([]);
    await f.curatorAgent.delete(`/api/v1/curation/datasets/${f.slug}/editors/${other.id}`).expect(404);
    await agent.patch(`/api/v1/datasets/${f.slug}`).send({ title: "Taken over" }).expect(403);
    await f.curatorAgent.post(`/api/v1/curation/datasets/${f.slug}/editors`).send({ email: other.email }).expect(200);
    // A member sees no drafts.
    const member = await makeUser(t.ctx, "member");
    const m = await signedInAgent(t.app, member.email);
    await m.get(`/api/v1/curation/versions/${draft.id}`).expect(404);
  });

  it("withdraws a published version with a reason and keeps a tombstone", async () => {
    const list = (await f.curatorAgent.get(`/api/v1/curation/datasets/${f.slug}`).expect(200)).body;
    const published = list.versions.find((v: { state: string }) => v.state === "published");
    await f.reviewerAgent.post(`/api/v1/curation/versions/${published.id}/withdraw`).send({}).expect(400);
    await f.reviewerAgent
      .post(`/api/v1/curation/versions/${published.id}/withdraw`)
      .send({ reason: "Plot yields of TB-01 were mis-keyed." })
      .expect(200);
    const tomb = await request(t).get(`/api/v1/curation/versions/${published.id}`).expect(200);
    expect(tomb.body).toMatchObject({ state: "withdrawn", withdrawnReason: "Plot yields of TB-01 were mis-keyed.", counts: null });
    const gone = await request(t).get(`/api/v1/datasets/${f.slug}/versions/1.0.0/datapackage.zip`).expect(410);
    expect(gone.body.detail).toMatch(/mis-keyed/);
    await f.reviewerAgent.post(`/api/v1/curation/versions/${published.id}/withdraw`).send({ reason: "again" }).expect(409);
  });
});

import supertest from "supertest";
const request = (x: TestApp) => supertest(x.app);
