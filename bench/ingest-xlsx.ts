/**
 * Workbook ingest benchmark: the same plot rows uploaded as an .xlsx workbook (one plots sheet, written by ExcelJS)
 * and as CSV, each through its upload service (parse, Table Schema and domain validation, store, responses
 * recomputed, raw file kept) into a draft prepared the same way. Reports seconds, rows/s and peak RSS of each, and
 * the ratio xlsx ÷ CSV. Each run is its own process (so peak RSS is its own); CSV and xlsx alternate, twice each,
 * and each side is taken at its best run.
 * Run: node --import tsx bench/ingest-xlsx.ts [rows]   (default 200,000; writes bench/out/ingest-xlsx.json)
 */
import { spawnSync } from "node:child_process";
import { mkdirSync, writeFileSync } from "node:fs";
import path from "node:path";
import { PassThrough, Readable } from "node:stream";
import ExcelJS from "exceljs";
import { ingestUpload } from "@/server/services/ingest/ingest-upload";
import { ingestWorkbook } from "@/server/services/ingest/ingest-workbook";
import { benchUploadOptions, plotChunks, plotHeader, plotRows, prepare } from "./ingest";

const ROWS = Number(process.argv[2] ?? 200_000);

interface Run {
  seconds: number;
  peakRssMb: number;
  bytes: number;
  responses: number;
}

/** The plots sheet as an .xlsx file, streamed by ExcelJS's writer (numbers as numbers, as a spreadsheet holds them). */
async function workbookOf(rows: number): Promise<Buffer> {
  const parts: Buffer[] = [];
  const out = new PassThrough();
  out.on("data", (c: Buffer) => parts.push(c));
  const workbook = new ExcelJS.stream.xlsx.WorkbookWriter({ stream: out, useSharedStrings: false, useStyles: false });
  const sheet = workbook.addWorksheet("plots");
  sheet.addRow(plotHeader).commit();
  for (const row of plotRows(rows)) sheet.addRow(row).commit();
  sheet.commit();
  await workbook.commit();
  return Buffer.concat(parts);
}

async function part(which: "csv" | "xlsx"): Promise<Run> {
  const body = which === "csv" ? plotChunks(ROWS) : [await workbookOf(ROWS)];
  const bytes = body.reduce((a, c) => a + c.length, 0);
  const base = await prepare(ROWS);
  if (global.gc) global.gc();
  let peak = process.memoryUsage().rss;
  const sampler = setInterval(() => (peak = Math.max(peak, process.memoryUsage().rss)), 25);
  const started = performance.now();
  const input = { versionId: base.version.id, source: Readable.from(body), options: benchUploadOptions, userId: base.user.id };
  let accepted: boolean;
  let responses: number;
  if (which === "csv") {
    const r = await ingestUpload(base.ctx, { ...input, resource: "plots", filename: "plots.csv" });
    accepted = r.accepted;
    responses = r.responses?.rows ?? 0;
  } else {
    const r = await ingestWorkbook(base.ctx, { ...input, filename: "plots.xlsx" });
    accepted = r.accepted;
    responses = r.sheets.reduce((a, s) => a + (s.responses?.rows ?? 0), 0);
  }
  const seconds = (performance.now() - started) / 1000;
  clearInterval(sampler);
  if (!accepted) throw new Error(`the ${which} upload was refused`);
  await base.database.close();
  return { seconds, peakRssMb: peak / 1024 / 1024, bytes, responses };
}

function runPart(which: "csv" | "xlsx"): Run {
  const run = spawnSync(process.execPath, ["--expose-gc", "--import", "tsx", __filename, String(ROWS)], {
    env: { ...process.env, BENCH_XLSX_PART: which },
    encoding: "utf8",
    maxBuffer: 16 * 1024 * 1024,
  });
  const line = run.stdout.split("\n").find((l) => l.startsWith("RESULT "));
  if (run.status !== 0 || !line) throw new Error(`the ${which} part failed (exit ${run.status}):\n${run.stderr.slice(-2000)}`);
  return JSON.parse(line.slice("RESULT ".length)) as Run;
}

async function main() {
  const which = process.env.BENCH_XLSX_PART;
  if (which === "csv" || which === "xlsx") {
    console.log(`RESULT ${JSON.stringify(await part(which))}`);
    return;
  }
  console.log(`${ROWS.toLocaleString("en")} plot rows as CSV and as .xlsx, alternating, twice each, each in its own process…`);
  const runs: Record<"csv" | "xlsx", Run[]> = { csv: [], xlsx: [] };
  for (let round = 0; round < 2; round++) for (const w of ["csv", "xlsx"] as const) runs[w].push(runPart(w));
  const best = (w: "csv" | "xlsx") => runs[w].reduce((a, r) => (r.seconds < a.seconds ? r : a));
  const csv = best("csv");
  const xlsx = best("xlsx");
  const out = { rows: ROWS, csv, xlsx, runs, ratio: xlsx.seconds / csv.seconds, node: process.version, at: new Date().toISOString() };
  const line = (w: string, r: Run) =>
    `| ${w} | ${(r.bytes / 1024 / 1024).toFixed(1)} | ${r.seconds.toFixed(2)} | ${Math.round(ROWS / r.seconds).toLocaleString("en")} | ${r.peakRssMb.toFixed(0)} |`;
  console.log(`
| file | MB | seconds (best of 2) | rows/s | peak RSS MB |
|---|---:|---:|---:|---:|
${line("CSV", csv)}
${line(".xlsx", xlsx)}

xlsx ÷ CSV time: **${out.ratio.toFixed(2)}×** (runs: CSV ${runs.csv.map((r) => r.seconds.toFixed(2)).join(", ")} s; xlsx ${runs.xlsx.map((r) => r.seconds.toFixed(2)).join(", ")} s)
`);
  const dir = path.resolve(__dirname, "out");
  mkdirSync(dir, { recursive: true });
  writeFileSync(path.join(dir, "ingest-xlsx.json"), JSON.stringify(out, null, 2) + "\n");
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
