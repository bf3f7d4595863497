import ExcelJS from "exceljs";
import { sql } from "drizzle-orm";
import { PassThrough } from "node:stream";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { workbookUploadResult } from "@/schemas/curation";
import { testApp, type TestApp } from "@/tests/support/test-app";
import {
  emptyDraft,
  plotsCsv,
  sheetRows,
  siteYearsCsv,
  sitesCsv,
  soilTestsCsv,
  treatmentsCsv,
  uploadWorkbook,
  versionFingerprint,
  workbookOf,
  type WorkbookCell,
} from "./curation-fixtures";

/**
 * Workbook uploads: one sheet per resource, read by ExcelJS's streaming reader into the rows the CSV path checks, and
 * stored in one transaction. Every workbook here is written by ExcelJS, as a spreadsheet program saves one.
 */
let t: TestApp;
beforeAll(async () => {
  t = await testApp();
}, 120_000);
afterAll(() => t?.close());

const rows = async <T>(q: ReturnType<typeof sql>) => ((await t.ctx.db.execute(q)) as unknown as { rows: T[] }).rows;
const trialSheets = (): Record<string, WorkbookCell[][]> => ({
  // Sheet order and case differ from the resource order on purpose: the upload orders them itself.
  Plots: sheetRows(plotsCsv()),
  SITES: sheetRows(sitesCsv),
  site_years: sheetRows(siteYearsCsv),
  soil_tests: sheetRows(soilTestsCsv),
  treatments: sheetRows(treatmentsCsv),
  README: [["This sheet explains the columns and is skipped."]],
});

type Problem = { file: string; row?: number | null; column?: string | null; value?: string | null; message: string; severity?: string };

describe("a workbook with one sheet per resource", () => {
  it("stores every sheet, with dates and numbers typed as spreadsheet values read as the CSV would give them", async () => {
    const f = await emptyDraft(t.app, t.ctx);
    const sheets = trialSheets();
    // One planting date typed as a bare spreadsheet serial (its date format lost): 44338 is 2021-05-22.
    sheets.site_years![2]![8] = 44338;
    const res = await uploadWorkbook(f.curatorAgent, f.versionId, await workbookOf(sheets));
    expect(res.status, JSON.stringify(res.body).slice(0, 1500)).toBe(201);
    const body = workbookUploadResult.parse(res.body);
    expect(body.accepted).toBe(true);
    expect(body.sheets.map((s) => [s.sheet, s.resource, s.status])).toEqual([
      ["SITES", "sites", "stored"],
      ["site_years", "site_years", "stored"],
      ["soil_tests", "soil_tests", "stored"],
      ["treatments", "treatments", "stored"],
      ["Plots", "plots", "stored"],
    ]);
    expect(body.sheets.find((s) => s.resource === "plots")!.rows).toBe(32);
    const dates = await rows<{ code: string; d: string }>(
      sql`select code, to_char(planting_date, 'YYYY-MM-DD') as d from site_years where version_id = ${f.versionId} order by code`,
    );
    expect(dates).toEqual([
      { code: "TB-01-2021", d: "2021-05-12" },
      { code: "TB-02-2021", d: "2021-05-22" },
    ]);
    const [plot] = await rows<{ plot: string; block: number }>(
      sql`select plot, block from plots where version_id = ${f.versionId} order by plot limit 1`,
    );
    expect(plot).toEqual({ plot: "101", block: 1 });
    const [responses] = await rows<{ n: number | string }>(
      sql`select count(*) as n from responses where version_id = ${f.versionId} and measure = 'yield'`,
    );
    expect(Number(responses!.n)).toBe(6);
  });

  it("refuses sheets named after no resource with a 422 naming the sheets found and the names expected", async () => {
    const f = await emptyDraft(t.app, t.ctx);
    const before = await versionFingerprint(t.ctx, f.versionId);
    const res = await uploadWorkbook(
      f.curatorAgent,
      f.versionId,
      await workbookOf({ sites: sheetRows(sitesCsv), Plot: sheetRows(plotsCsv()) }),
    );
    expect(res.status).toBe(422);
    expect(res.body.sheetsFound).toEqual(["sites", "Plot"]);
    expect(res.body.sheetsExpected).toEqual(["sites", "site_years", "soil_tests", "treatments", "plots", "summaries"]);
    expect(res.body.detail).toMatch(/"sites", "Plot"/);
    expect(res.body.errors[0].message).toMatch(/sheet "Plot" is not a resource/);
    expect(await versionFingerprint(t.ctx, f.versionId)).toBe(before);
  });

  it("reads formula cells as their cached values and warns, naming the sheet and the cell", async () => {
    const f = await emptyDraft(t.app, t.ctx);
    const sheets = trialSheets();
    // plots row 3 (spreadsheet line 4): the yield is a formula with its last calculated result.
    sheets.Plots![3]![4] = { formula: "E2+E3", result: 3700 };
    const res = await uploadWorkbook(f.curatorAgent, f.versionId, await workbookOf(sheets));
    expect(res.status, JSON.stringify(res.body).slice(0, 1500)).toBe(201);
    const plots = res.body.sheets.find((s: { resource: string }) => s.resource === "plots");
    const warning = (plots.problems as Problem[]).find((p) => p.message.includes("formula"))!;
    expect(warning).toMatchObject({ severity: "warning", row: 3, column: "yield_kg_ha", value: "3700", file: "trials.xlsx, sheet Plots" });
    expect(warning.message).toMatch(/cell E4 of sheet Plots holds a formula/);
    const [stored] = await rows<{ y: number }>(sql`select yield_kg_ha as y from plots where version_id = ${f.versionId} and plot = '103'`);
    expect(stored!.y).toBe(3700);
  });

  it("stores nothing when one sheet has an error, and names its sheet, row and column", async () => {
    const f = await emptyDraft(t.app, t.ctx);
    const before = await versionFingerprint(t.ctx, f.versionId);
    const sheets = trialSheets();
    sheets.site_years![1]![5] = "four"; // blocks of TB-01-2021
    const res = await uploadWorkbook(f.curatorAgent, f.versionId, await workbookOf(sheets));
    expect(res.status).toBe(422);
    expect(res.headers["content-type"]).toMatch(/application\/problem\+json/);
    expect(res.body.errors).toEqual([
      expect.objectContaining({ file: "trials.xlsx, sheet site_years", row: 1, column: "blocks", value: "four" }),
    ]);
    expect(res.body.sheets.map((s: { sheet: string; status: string }) => [s.sheet, s.status])).toEqual([
      ["SITES", "not stored"],
      ["site_years", "rejected"],
    ]);
    expect(res.body.notChecked.map((s: { resource: string }) => s.resource)).toEqual(["soil_tests", "treatments", "plots"]);
    // The sites sheet was valid, but a workbook is stored whole or not at all.
    expect(await versionFingerprint(t.ctx, f.versionId)).toBe(before);
    const report = await f.curatorAgent.get(`/api/v1/curation/versions/${f.versionId}/reports/${res.body.sheets[1].reportId}`).expect(200);
    expect(report.body.accepted).toBe(false);
  });

  it.each([
    ["an empty file", Buffer.alloc(0), /empty/],
    ["a CSV renamed .xlsx", Buffer.from(sitesCsv), /not an \.xlsx workbook/],
    [
      "an encrypted workbook (an OLE container)",
      Buffer.concat([Buffer.from("d0cf11e0a1b11ae1", "hex"), Buffer.alloc(504)]),
      /password-protected/,
    ],
    [
      "a zip that holds no workbook",
      Buffer.concat([Buffer.from("504b0304", "hex"), Buffer.alloc(60)]),
      /cannot be read as an \.xlsx workbook|no sheets/,
    ],
  ])("answers %s with a 400 that says what to do, storing nothing", async (_name, bytes, message) => {
    const f = await emptyDraft(t.app, t.ctx);
    const before = await versionFingerprint(t.ctx, f.versionId);
    const res = await uploadWorkbook(f.curatorAgent, f.versionId, bytes);
    expect(res.status).toBe(400);
    expect(res.body.detail).toMatch(message);
    expect(await versionFingerprint(t.ctx, f.versionId)).toBe(before);
  });
});

/** A large workbook written row by row with ExcelJS's streaming writer, as the benchmark does. */
async function largeWorkbook(siteYears: number, blocks: number): Promise<Buffer> {
  const out = new PassThrough();
  const parts: Buffer[] = [];
  out.on("data", (c: Buffer) => parts.push(c));
  const workbook = new ExcelJS.stream.xlsx.WorkbookWriter({ stream: out, useSharedStrings: false, useStyles: false });
  const sites = workbook.addWorksheet("sites");
  sites.addRow(["site", "location"]).commit();
  const years = workbook.addWorksheet("site_years");
  years.addRow(["site_year", "site", "crop", "year", "blocks", "planting_date"]).commit();
  for (let i = 0; i < siteYears; i++) {
    sites.addRow([`TB-${i}`, "Wren County"]).commit();
    years.addRow([`TB-${i}-2024`, `TB-${i}`, "soybean", 2024, blocks, new Date(Date.UTC(2024, 4, 10 + (i % 20)))]).commit();
  }
  sites.commit();
  years.commit();
  const treatments = workbook.addWorksheet("treatments");
  treatments
    .addRow(["treatment", "name", "is_check", "application", "product", "grade", "product_rate", "rate_unit", "placement", "timing"])
    .commit();
  treatments.addRow(["CHK", "Untreated check", true, 1]).commit();
  treatments.addRow(["BAND", "2x2 band MAP", false, 1, "MAP", "11-52-0", 100, "lb/ac", "2x2-band", "at-planting"]).commit();
  treatments.commit();
  const plots = workbook.addWorksheet("plots");
  plots.addRow(["site_year", "plot", "block", "treatment", "yield_kg_ha"]).commit();
  let seed = 7;
  for (let i = 0; i < siteYears; i++)
    for (let b = 1; b <= blocks; b++)
      for (const [k, trt] of ["CHK", "BAND"].entries()) {
        seed = (seed * 48271) % 2147483647;
        plots.addRow([`TB-${i}-2024`, `${b}0${k + 1}`, b, trt, 3500 + (trt === "BAND" ? 200 : 0) + (seed % 300)]).commit();
      }
  plots.commit();
  await workbook.commit();
  return Buffer.concat(parts);
}

describe("a 50,000-row plots sheet", () => {
  it("is read, checked and stored with its site-years in one upload", async () => {
    const f = await emptyDraft(t.app, t.ctx);
    // 2,500 site-years × 10 blocks × 2 treatments = 50,000 plots.
    const workbook = await largeWorkbook(2500, 10);
    const res = await uploadWorkbook(f.curatorAgent, f.versionId, workbook);
    expect(res.status, JSON.stringify(res.body).slice(0, 1500)).toBe(201);
    expect(res.body.sheets.find((s: { resource: string }) => s.resource === "plots").rows).toBe(50_000);
    const [count] = await rows<{ n: number | string }>(sql`select count(*) as n from plots where version_id = ${f.versionId}`);
    expect(Number(count!.n)).toBe(50_000);
    const [responses] = await rows<{ n: number | string }>(
      sql`select count(*) as n from responses where version_id = ${f.versionId} and measure = 'yield'`,
    );
    expect(Number(responses!.n)).toBe(2500);
  }, 300_000);
});
