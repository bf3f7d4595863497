import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { cellEditResult, versionDetail } from "@/schemas/curation";
import { testApp, type TestApp } from "@/tests/support/test-app";
import { draftWithData, versionFingerprint, type Fixture } from "./curation-fixtures";

let t: TestApp;
let f: Fixture;
beforeAll(async () => {
  t = await testApp();
  f = await draftWithData(t.app, t.ctx);
}, 300_000);
afterAll(() => t.close());

const rows = async <T>(q: ReturnType<typeof sql>) => ((await t.ctx.db.execute(q)) as unknown as { rows: T[] }).rows;
const yieldOf = async (plot: string) =>
  (
    await rows<{ yield_kg_ha: number | null }>(
      sql`select p.yield_kg_ha from plots p join site_years sy on sy.id = p.site_year_id
          where p.version_id = ${f.versionId} and sy.code = 'TB-01-2021' and p.plot = ${plot}`,
    )
  )[0]!.yield_kg_ha;
const edit = (body: object) => f.curatorAgent.post(`/api/v1/curation/versions/${f.versionId}/cells`).send(body);

describe("one cell edited by hand, with a reason", () => {
  it("goes through the upload's checks, recomputes the responses and is recorded in the changelog", async () => {
    const before = await yieldOf("203");
    const [response] = await rows<{ treated_mean_kg_ha: number }>(
      sql`select r.treated_mean_kg_ha from responses r join treatments tr on tr.id = r.treatment_id
          where r.version_id = ${f.versionId} and r.site_year_code = 'TB-01-2021' and tr.code = 'BAND' and r.measure = 'yield'`,
    );
    const res = await edit({
      resource: "plots",
      key: { site_year: "TB-01-2021", plot: "203" },
      field: "yield_kg_ha",
      value: String(before! + 400),
      reason: "Weigh-wagon slip re-read: the plot was entered 400 kg/ha low.",
    });
    expect(res.status, JSON.stringify(res.body).slice(0, 1500)).toBe(200);
    const body = cellEditResult.parse(res.body);
    expect(body.from).toBe(String(before));
    expect(body.to).toBe(String(before! + 400));
    expect(await yieldOf("203")).toBe(before! + 400);
    // 203 is BAND in block 2: the BAND mean moves by a quarter of the change.
    const [after] = await rows<{ treated_mean_kg_ha: number }>(
      sql`select r.treated_mean_kg_ha from responses r join treatments tr on tr.id = r.treatment_id
          where r.version_id = ${f.versionId} and r.site_year_code = 'TB-01-2021' and tr.code = 'BAND' and r.measure = 'yield'`,
    );
    expect(after!.treated_mean_kg_ha).toBeCloseTo(response!.treated_mean_kg_ha + 100, 6);
    const n = await rows<{ n: number | string }>(sql`select count(*) as n from plots where version_id = ${f.versionId}`);
    expect(Number(n[0]!.n)).toBe(32);
    const detail = versionDetail.parse((await f.curatorAgent.get(`/api/v1/curation/versions/${f.versionId}`).expect(200)).body);
    expect(detail.changelog).toContain(
      `Edited plots site_year TB-01-2021, plot 203: yield_kg_ha ${before} → ${before! + 400}. Reason: Weigh-wagon slip re-read: the plot was entered 400 kg/ha low.`,
    );
    // The editor is among the version's authors, so they cannot approve it (four eyes).
    const authors = await rows<{ user_id: string }>(sql`select user_id from version_edits where version_id = ${f.versionId}`);
    expect(authors.map((a) => a.user_id)).toContain(f.curator.id);
  });

  it("a value the checks refuse comes back as a problem of body.value, and nothing changes", async () => {
    const before = await versionFingerprint(t.ctx, f.versionId);
    const res = await edit({
      resource: "plots",
      key: { site_year: "TB-01-2021", plot: "203" },
      field: "yield_kg_ha",
      value: "n/a",
      reason: "Trying a wrong value.",
    }).expect(422);
    expect(res.body.errors).toContainEqual({
      field: "body.value",
      message:
        'Plot 203 of TB-01-2021: yield (yield_kg_ha) "n/a" is not a number of kg/ha; write digits only (e.g. 3650.5), or leave the cell empty for a missing plot',
    });
    expect(await versionFingerprint(t.ctx, f.versionId)).toBe(before);
  });

  it("an edit that makes the merged version invalid is refused at the cell", async () => {
    const before = await versionFingerprint(t.ctx, f.versionId);
    // Plot 203 (BAND, block 2) moved to the check: block 2 would hold the check twice.
    const res = await edit({
      resource: "plots",
      key: { site_year: "TB-01-2021", plot: "203" },
      field: "treatment",
      value: "CHK",
      reason: "Testing the block rule.",
    }).expect(422);
    expect(res.body.errors[0].field).toBe("body.block");
    expect(res.body.errors[0].message).toMatch(/CHK is already in block 2/);
    expect(await versionFingerprint(t.ctx, f.versionId)).toBe(before);
  });

  it("a reason is required, a key field is not edited in place, and an unknown row is a 404", async () => {
    let res = await edit({ resource: "sites", key: { site: "TB-01" }, field: "location", value: "Wren", reason: "" }).expect(400);
    expect(res.body.errors).toContainEqual({
      field: "body.reason",
      message: "needs at least 3 characters, found 0; write a few more words",
    });
    res = await edit({ resource: "sites", key: { site: "TB-01" }, field: "site", value: "TB-09", reason: "Renaming." }).expect(422);
    expect(res.body.errors[0].field).toBe("body.field");
    res = await edit({ resource: "sites", key: { site: "TB-99" }, field: "location", value: "Wren", reason: "No such site." }).expect(404);
    expect(res.body.detail).toBe("No sites row of this draft has site TB-99.");
  });
});
