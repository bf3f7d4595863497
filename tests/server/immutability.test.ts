import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testApp, type TestApp } from "@/tests/support/test-app";
import { draftWithData, plotsCsv, upload, versionFingerprint, type Fixture } from "./curation-fixtures";

let t: TestApp;
let f: Fixture;
let before: string;
beforeAll(async () => {
  t = await testApp();
  f = await draftWithData(t.app, t.ctx);
  await f.curatorAgent.post(`/api/v1/curation/versions/${f.versionId}/submit`).send({ changelog: "First release." }).expect(200);
  await f.reviewerAgent.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({}).expect(200);
  before = await versionFingerprint(t.ctx, f.versionId);
});
afterAll(() => t.close());

/** The statement fails with the immutability trigger's own error (drizzle wraps it; the cause is PostgreSQL's). */
const refused = async (statement: ReturnType<typeof sql>) => {
  const error = await t.ctx.db.execute(statement).then(
    () => null,
    (e: unknown) => e as { cause?: { message?: string; hint?: string } },
  );
  expect(error, "the statement should have been refused").not.toBeNull();
  expect(error!.cause?.hint).toBe("plotbank:immutable");
  expect(error!.cause?.message).toMatch(/is published/);
};

describe("a published version cannot change", () => {
  it("the database refuses UPDATE, DELETE and INSERT on its rows", async () => {
    const v = f.versionId;
    await refused(sql`update plots set yield_kg_ha = 1 where version_id = ${v}`);
    await refused(sql`delete from plots where version_id = ${v}`);
    await refused(sql`update treatments set name = 'renamed' where version_id = ${v}`);
    await refused(sql`delete from site_years where version_id = ${v}`);
    await refused(sql`update responses set md_kg_ha = 0 where version_id = ${v}`);
    await refused(sql`delete from uploads where version_id = ${v}`);
    await refused(sql`insert into sites (version_id, code, location) values (${v}, 'TB-99', 'Wren County')`);
    expect(await versionFingerprint(t.ctx, v)).toBe(before);
  });

  it("the database refuses changes to the version row itself, except a withdrawal", async () => {
    const v = f.versionId;
    await refused(sql`update versions set changelog = 'rewritten' where id = ${v}`);
    await refused(sql`update versions set checksum = 'sha256:0' where id = ${v}`);
    await refused(sql`update versions set state = 'draft' where id = ${v}`);
    await refused(sql`update versions set table_schema = '{}'::jsonb where id = ${v}`);
    await refused(sql`delete from versions where id = ${v}`);
    expect(await versionFingerprint(t.ctx, v)).toBe(before);
  });

  it("the API answers 409 to every edit", async () => {
    const v = f.versionId;
    const up = await upload(f.curatorAgent, v, "plots", plotsCsv());
    expect(up.status).toBe(409);
    expect(up.body.detail).toMatch(/published/);
    await f.curatorAgent.patch(`/api/v1/curation/versions/${v}`).send({ changelog: "edited" }).expect(409);
    const detail = await f.curatorAgent.get(`/api/v1/curation/versions/${v}`).expect(200);
    await f.curatorAgent.put(`/api/v1/curation/versions/${v}/table-schema`).send(detail.body.tableSchema).expect(409);
    await f.curatorAgent.post(`/api/v1/curation/versions/${v}/submit`).send({ changelog: "again" }).expect(409);
    await f.reviewerAgent.post(`/api/v1/curation/versions/${v}/approve`).send({}).expect(409);
    await f.reviewerAgent.post(`/api/v1/curation/versions/${v}/return`).send({ comment: "take it back" }).expect(409);
    expect(await versionFingerprint(t.ctx, v)).toBe(before);
  });

  it("a new draft is a separate copy: editing it leaves the published version as it was", async () => {
    const next = await f.curatorAgent.post(`/api/v1/datasets/${f.slug}/versions`).send({}).expect(201);
    await upload(
      f.curatorAgent,
      next.body.id,
      "plots",
      plotsCsv({ override: { "TB-01-2021/101": "TB-01-2021,101,1,CHK,3300,13.1" } }),
    ).expect(201);
    expect(await versionFingerprint(t.ctx, f.versionId)).toBe(before);
  });
});
