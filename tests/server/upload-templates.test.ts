import ExcelJS from "exceljs";
import { eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { resourceNames } from "@/constants/vocabulary";
import { versions } from "@/db/schema";
import { resourceCsv } from "@/server/services/curation/resource-csv";
import { testApp, type TestApp } from "@/tests/support/test-app";
import { binary } from "@/tests/support/zip";
import { draftWithData, emptyDraft, upload, uploadWorkbook, type Fixture } from "./curation-fixtures";

/**
 * Upload templates come from the version's data dictionary, so a field the curator added is in them; filled in, they
 * upload cleanly. Fields of the curator's own are added, renamed (their values follow) and removed through the API.
 */
let t: TestApp;
beforeAll(async () => {
  t = await testApp();
}, 120_000);
afterAll(() => t?.close());

const base = (id: string) => `/api/v1/curation/versions/${id}`;
async function plotsCsvOf(id: string): Promise<string> {
  const [v] = await t.ctx.db.select().from(versions).where(eq(versions.id, id));
  return (await resourceCsv(t.ctx.db, id, v!.tableSchema, "plots")).toString("utf8");
}
const seedLot = { resource: "plots", field: { name: "seed_lot", type: "string", description: "Seed lot planted in the plot." } };

describe("upload templates", () => {
  it("CSV templates hold the header and two example rows, and upload cleanly in resource order", async () => {
    const f = await emptyDraft(t.app, t.ctx);
    for (const resource of resourceNames) {
      const res = await f.curatorAgent.get(`${base(f.versionId)}/templates/${resource}.csv`).expect(200);
      expect(res.headers["content-type"]).toMatch(/text\/csv/);
      const lines = res.text.trim().split("\r\n");
      expect(lines).toHaveLength(3);
      const up = await upload(f.curatorAgent, f.versionId, resource, res.text, {}, `${resource}-template.csv`);
      expect(up.status, `${resource}: ${JSON.stringify(up.body).slice(0, 1200)}`).toBe(201);
      expect(up.body.errors).toBe(0);
    }
    const readme = await f.curatorAgent.get(`${base(f.versionId)}/templates/README.txt`).expect(200);
    expect(readme.text).toMatch(/yield_kg_ha: number; unit kg\/ha/);
  });

  it("the workbook template has a README sheet and one sheet per resource, carries a custom field, and uploads as it is", async () => {
    const f = await emptyDraft(t.app, t.ctx);
    const added = await f.curatorAgent.post(`${base(f.versionId)}/table-schema/fields`).send(seedLot);
    expect(added.status, JSON.stringify(added.body)).toBe(200);
    const csv = await f.curatorAgent.get(`${base(f.versionId)}/templates/plots.csv`).expect(200);
    expect(csv.text.split("\r\n")[0]).toMatch(/,seed_lot$/);

    const res = await f.curatorAgent
      .get(`${base(f.versionId)}/templates/workbook.xlsx`)
      .buffer(true)
      .parse(binary)
      .expect(200);
    const workbook = new ExcelJS.Workbook();
    await workbook.xlsx.load(res.body as ArrayBuffer);
    expect(workbook.worksheets.map((w) => w.name)).toEqual(["README", ...resourceNames]);
    const plots = workbook.getWorksheet("plots")!;
    expect((plots.getRow(1).values as unknown[]).slice(1)).toContain("seed_lot");
    expect(plots.rowCount).toBe(3);
    const readmeRows = workbook
      .getWorksheet("README")!
      .getSheetValues()
      .map((r) => (Array.isArray(r) ? r.slice(1) : []));
    expect(readmeRows).toContainEqual(expect.arrayContaining(["plots", "seed_lot", expect.stringMatching(/^no/), "string"]));
    expect(readmeRows).toContainEqual(expect.arrayContaining(["site_years", "crop", "yes", "string", "", "soybean, corn, wheat"]));
    // The planting date is a real date cell, formatted as one.
    const dateCell = workbook.getWorksheet("site_years")!.getRow(2).getCell(9);
    expect(dateCell.value).toBeInstanceOf(Date);

    const up = await uploadWorkbook(f.curatorAgent, f.versionId, res.body as Buffer, {}, "template.xlsx");
    expect(up.status, JSON.stringify(up.body).slice(0, 1500)).toBe(201);
    expect(up.body.sheets.map((s: { resource: string }) => s.resource)).toEqual(resourceNames);
  });
});

describe("fields of the curator's own", () => {
  let f: Fixture;
  beforeAll(async () => {
    f = await draftWithData(t.app, t.ctx);
  }, 120_000);

  it("an added field is saved, read from uploads and exported", async () => {
    const res = await f.curatorAgent
      .post(`${base(f.versionId)}/table-schema/fields`)
      .send(seedLot)
      .expect(200);
    expect(res.body.tableSchema.resources.plots.fields.map((x: { name: string }) => x.name)).toContain("seed_lot");
    const csv = "site_year,plot,block,treatment,yield_kg_ha,seed_lot\nTB-01-2021,101,1,CHK,3700,LOT-A7\nTB-01-2021,102,1,IF,3900,LOT-B2\n";
    await upload(f.curatorAgent, f.versionId, "plots", csv).expect(201);
    const out = await plotsCsvOf(f.versionId);
    expect(out.split("\r\n")[0]).toMatch(/,seed_lot$/);
    expect(out).toMatch(/TB-01-2021,101,1,CHK,3700,[^\r]*,LOT-A7\r\n/);
    // Another site-year's plots, uploaded before the field existed, have none.
    expect(out).toMatch(/TB-02-2021,101,1,CHK,[^\r]*,\r\n/);
  });

  it("a renamed field keeps its values under the new name", async () => {
    const res = await f.curatorAgent
      .patch(`${base(f.versionId)}/table-schema/fields/plots/seed_lot`)
      .send({ name: "seed_lot_code" })
      .expect(200);
    const names = res.body.tableSchema.resources.plots.fields.map((x: { name: string }) => x.name);
    expect(names).toContain("seed_lot_code");
    expect(names).not.toContain("seed_lot");
    const out = await plotsCsvOf(f.versionId);
    expect(out.split("\r\n")[0]).toMatch(/,seed_lot_code$/);
    expect(out).toMatch(/TB-01-2021,102,1,IF,3900,[^\r]*,LOT-B2\r\n/);
  });

  it("renaming through the whole dictionary works the same, and a stored field cannot be renamed", async () => {
    const current = (await f.curatorAgent.get(base(f.versionId)).expect(200)).body.tableSchema;
    const renamed = structuredClone(current);
    const field = renamed.resources.plots.fields.find((x: { name: string }) => x.name === "seed_lot_code");
    field.name = "lot";
    await f.curatorAgent
      .put(`${base(f.versionId)}/table-schema`)
      .send({ ...renamed, renames: [{ resource: "plots", from: "seed_lot_code", to: "lot" }] })
      .expect(200);
    expect(await plotsCsvOf(f.versionId)).toMatch(/TB-01-2021,101,1,CHK,3700,[^\r]*,LOT-A7\r\n/);

    const refused = await f.curatorAgent
      .patch(`${base(f.versionId)}/table-schema/fields/plots/yield_kg_ha`)
      .send({ name: "yield" })
      .expect(400);
    expect(JSON.stringify(refused.body.errors)).toMatch(/yield_kg_ha is a field Plotbank stores/);
  });

  it("a removed field leaves the dictionary, the exports and the stored values", async () => {
    await f.curatorAgent.delete(`${base(f.versionId)}/table-schema/fields/plots/lot`).expect(200);
    expect((await plotsCsvOf(f.versionId)).split("\r\n")[0]!.split(",")).not.toContain("lot");
    const left = (await t.ctx.db.execute(
      sql`select count(*) as n from custom_values where version_id = ${f.versionId} and "values" ? 'lot'`,
    )) as unknown as { rows: { n: number | string }[] };
    expect(Number(left.rows[0]!.n)).toBe(0);
    // A name that is not a plain identifier is refused, naming the field.
    const bad = await f.curatorAgent
      .post(`${base(f.versionId)}/table-schema/fields`)
      .send({ resource: "plots", field: { name: "Seed lot", type: "string" } })
      .expect(400);
    expect(JSON.stringify(bad.body.errors)).toMatch(/body\.field\.name/);
  });
});
