import ExcelJS from "exceljs";
import type { Express } from "express";
import type request from "supertest";
import { expect } from "vitest";
import type { AppContext } from "@/server/context";
import { makeUser } from "@/tests/support/test-app";
import { signedInAgent } from "@/tests/support/sign-in";

export type Agent = ReturnType<typeof request.agent>;

export const sitesCsv =
  "site,location,soil_series,soil_texture\nTB-01,Wren County,Harlan,silt loam\nTB-02,Osage Bend County,Marrow,clay loam\n";
export const siteYearsCsv =
  "site_year,site,crop,year,design,blocks,tillage,previous_crop,planting_date,row_spacing_in\n" +
  "TB-01-2021,TB-01,soybean,2021,RCBD,4,no-till,corn,2021-05-12,30\n" +
  "TB-02-2021,TB-02,soybean,2021,RCBD,4,conventional,corn,2021-05-20,30\n";
export const soilTestsCsv =
  "site_year,analyte,value,unit,extractant,depth_in,class,interpretation\n" +
  "TB-01-2021,P,7,ppm,Bray-P1,6,low,tallgrass-illustrative\n" +
  "TB-02-2021,P,24,ppm,Bray-P1,6,very_high,tallgrass-illustrative\n";
export const treatmentsCsv =
  "treatment,name,is_check,application,product,grade,product_rate,rate_unit,placement,timing\n" +
  "CHK,Untreated check,true,1,,,,,,\n" +
  "IF,In-furrow 10-34-0,false,1,APP,10-34-0,5,gal/ac,in-furrow,at-planting\n" +
  "BAND,2x2 band MAP,false,1,MAP,11-52-0,100,lb/ac,2x2-band,at-planting\n" +
  "BC,Broadcast MAP,false,1,MAP,11-52-0,100,lb/ac,broadcast,pre-plant\n";

/** Plots of the two site-years: a response on the low-P site, none on the very-high one; deterministic noise. */
export function plotsCsv(options: { skip?: string[]; override?: Record<string, string> } = {}): string {
  const lines = ["site_year,plot,block,treatment,yield_kg_ha,harvest_moisture_pct"];
  const effect: Record<string, Record<string, number>> = {
    "TB-01-2021": { CHK: 0, IF: 180, BAND: 300, BC: 220 },
    "TB-02-2021": { CHK: 0, IF: 10, BAND: -15, BC: 5 },
  };
  const noise = [37, -52, 12, -8, 61, -33, 25, -19, -44, 7, 53, -28, 16, -61, 30, 4];
  for (const sy of ["TB-01-2021", "TB-02-2021"]) {
    let i = 0;
    for (let block = 1; block <= 4; block++) {
      for (const t of ["CHK", "IF", "BAND", "BC"]) {
        const plot = `${block}0${(i % 4) + 1}`;
        const key = `${sy}/${plot}`;
        i++;
        if (options.skip?.includes(key)) continue;
        const y = (sy === "TB-01-2021" ? 3600 : 4100) + effect[sy]![t]! + noise[i - 1]! * 3;
        lines.push(options.override?.[key] ?? `${sy},${plot},${block},${t},${y},13.${i % 10}`);
      }
    }
  }
  return lines.join("\n") + "\n";
}

export interface Fixture {
  curator: Awaited<ReturnType<typeof makeUser>>;
  curatorAgent: Agent;
  reviewer: Awaited<ReturnType<typeof makeUser>>;
  reviewerAgent: Agent;
  slug: string;
  versionId: string;
}

export function upload(
  agent: Agent,
  versionId: string,
  resource: string,
  csv: string | Buffer,
  fields: Record<string, string> = {},
  filename = `${resource}.csv`,
) {
  let req = agent.post(`/api/v1/curation/versions/${versionId}/uploads/${resource}`);
  for (const [k, v] of Object.entries(fields)) req = req.field(k, v);
  return req.attach("file", Buffer.isBuffer(csv) ? csv : Buffer.from(csv, "utf8"), filename);
}

let counter = 0;

/** A curator's dataset with a first, empty draft. */
export async function emptyDraft(app: Express, ctx: AppContext): Promise<Fixture> {
  const curator = await makeUser(ctx, "curator");
  const reviewer = await makeUser(ctx, "reviewer");
  const curatorAgent = await signedInAgent(app, curator.email);
  const reviewerAgent = await signedInAgent(app, reviewer.email);
  const slug = `starter-test-${++counter}-${Math.random().toString(36).slice(2, 6)}`;
  await curatorAgent
    .post("/api/v1/datasets")
    .send({ slug, title: "Starter placement test", crops: ["soybean"], region: "Tallgrass Basin", description: "Test dataset." })
    .expect(201);
  const v = await curatorAgent.post(`/api/v1/datasets/${slug}/versions`).send({}).expect(201);
  return { curator, curatorAgent, reviewer, reviewerAgent, slug, versionId: v.body.id as string };
}

/** A curator's dataset with a first draft holding the two-site-year starter trial above. */
export async function draftWithData(
  app: Express,
  ctx: AppContext,
  opts: { plots?: string | false; treatments?: string } = {},
): Promise<Fixture> {
  const fixture = await emptyDraft(app, ctx);
  const { curatorAgent, versionId } = fixture;
  for (const [resource, csv] of [
    ["sites", sitesCsv],
    ["site_years", siteYearsCsv],
    ["soil_tests", soilTestsCsv],
    ["treatments", opts.treatments ?? treatmentsCsv],
  ] as const) {
    const res = await upload(curatorAgent, versionId, resource, csv);
    expect(res.status, JSON.stringify(res.body).slice(0, 2000)).toBe(201);
  }
  if (opts.plots !== false) {
    const res = await upload(curatorAgent, versionId, "plots", opts.plots ?? plotsCsv());
    expect(res.status, JSON.stringify(res.body).slice(0, 2000)).toBe(201);
  }
  return fixture;
}

export type WorkbookCell = string | number | boolean | Date | null | { formula: string; result: string | number };

/** A workbook with the given sheets, written by ExcelJS as a spreadsheet program would save it. */
export async function workbookOf(sheets: Record<string, WorkbookCell[][]>): Promise<Buffer> {
  const workbook = new ExcelJS.Workbook();
  for (const [name, rows] of Object.entries(sheets)) {
    const sheet = workbook.addWorksheet(name);
    for (const row of rows) sheet.addRow(row);
  }
  return Buffer.from(await workbook.xlsx.writeBuffer());
}

/** CSV fixture text as sheet rows: numbers as numbers, ISO dates as date cells, true/false as booleans. */
export function sheetRows(csv: string): WorkbookCell[][] {
  return csv
    .trim()
    .split("\n")
    .map((line, i) =>
      line.split(",").map((cell) => {
        if (i === 0 || cell === "") return cell === "" ? null : cell;
        if (/^-?\d+(\.\d+)?$/.test(cell)) return Number(cell);
        if (/^\d{4}-\d{2}-\d{2}$/.test(cell)) return new Date(`${cell}T00:00:00Z`);
        if (cell === "true" || cell === "false") return cell === "true";
        return cell;
      }),
    );
}

export function uploadWorkbook(
  agent: Agent,
  versionId: string,
  workbook: Buffer,
  fields: Record<string, string> = {},
  filename = "trials.xlsx",
) {
  let req = agent.post(`/api/v1/curation/versions/${versionId}/workbook-uploads`);
  for (const [k, v] of Object.entries(fields)) req = req.field(k, v);
  return req.attach("file", workbook, filename);
}

export { versionFingerprint } from "@/tests/support/version-fingerprint";
