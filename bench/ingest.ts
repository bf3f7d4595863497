/**
 * Ingest benchmark: 1,000,000 plot rows through the upload service (stream parse, Table Schema and domain
 * validation, COPY into the draft, responses recomputed for every site-year, raw file kept) against PGlite's own
 * COPY of the same rows into the plots table. Goal: the service at ≥ 0.7× COPY's rows/s, peak RSS < 1 GB.
 * COPY and the service run twice each, alternating, each in its own process (so peak RSS is the service's own); the
 * ratio compares the best run of each, since COPY's speed drifts between runs on this machine.
 * Run: node --import tsx bench/ingest.ts [rows]   (writes bench/out/ingest.json)
 */
import { spawnSync } from "node:child_process";
import { writeFileSync, mkdirSync } from "node:fs";
import path from "node:path";
import { Readable } from "node:stream";
import { eq } from "drizzle-orm";
import { migrateDatabase, openDatabase } from "@/db/client";
import { siteYears, treatments } from "@/db/schema";
import { mulberry32 } from "@/datasets/prng";
import type { UploadOptions } from "@/schemas/curation";
import { createApp } from "@/server/app";
import { loadConfig } from "@/server/config";
import { createDataset } from "@/server/services/curation/datasets";
import { datasetBySlug } from "@/server/services/curation/access";
import { createVersion } from "@/server/services/curation/versions";
import { textStream } from "@/server/services/ingest/csv-stream";
import { ingestUpload } from "@/server/services/ingest/ingest-upload";
import { createUser } from "@/server/services/users";

const ROWS = Number(process.argv[2] ?? 1_000_000);
const TREATMENTS = 5;
const BLOCKS = 20;
const PER_SITE_YEAR = TREATMENTS * BLOCKS;
const SITE_YEARS = Math.ceil(ROWS / PER_SITE_YEAR);
export const benchUploadOptions: UploadOptions = {
  mapping: {},
  units: { yield: "kg/ha", yieldMoisture: "standard", soilTest: "ppm", gradeBasis: "oxide" },
  mode: "merge",
};
const options = benchUploadOptions;

let peakRss = 0;
// Sampled only when this file is the program run (bench/ingest-xlsx.ts imports it).
const sampler = setInterval(() => {
  peakRss = Math.max(peakRss, process.memoryUsage().rss);
}, 25);
if (require.main !== module) clearInterval(sampler);

const syCode = (i: number) => `S${String(Math.floor(i / 100)).padStart(4, "0")}-${2000 + (i % 100)}`;

/** The bench's plot rows, one at a time: site-year, plot, block, treatment, yield (kg/ha), harvest moisture (%). */
export function* plotRows(rows: number): Generator<[string, number, number, string, number, number]> {
  const rng = mulberry32("bench-plots");
  for (let r = 0; r < rows; r++) {
    const sy = Math.floor(r / PER_SITE_YEAR);
    const within = r % PER_SITE_YEAR;
    const t = within % TREATMENTS;
    const y = Math.round(3800 + t * 60 + rng.normal(0, 250));
    yield [syCode(sy), within + 1, Math.floor(within / TREATMENTS) + 1, `T${t}`, y, Number((12 + rng.next() * 3).toFixed(1))];
  }
}

export const plotHeader = ["site_year", "plot", "block", "treatment", "yield_kg_ha", "harvest_moisture_pct"];

/** The plots file as 64 KiB-ish chunks, never one string. */
export function plotChunks(rows = ROWS): Buffer[] {
  const chunks: Buffer[] = [Buffer.from(plotHeader.join(",") + "\n")];
  let lines: string[] = [];
  for (const row of plotRows(rows)) {
    lines.push(row.map((v, i) => (i === 5 ? (v as number).toFixed(1) : String(v))).join(","));
    if (lines.length === 2000) {
      chunks.push(Buffer.from(lines.join("\n") + "\n"));
      lines = [];
    }
  }
  if (lines.length) chunks.push(Buffer.from(lines.join("\n") + "\n"));
  return chunks;
}

/** A fresh in-memory database with a draft holding the bench's sites, treatments and site-years (for `rows` plots). */
export async function prepare(rows = ROWS) {
  const siteYearCount = Math.ceil(rows / PER_SITE_YEAR);
  const database = await openDatabase();
  await migrateDatabase(database);
  const config = loadConfig({ NODE_ENV: "production", PLOTBANK_DEMO: "off" } as NodeJS.ProcessEnv, {
    uploadLimitBytes: 1024 * 1024 * 1024,
  });
  const { ctx } = createApp({ database, config, webDistDir: false });
  const user = await createUser(ctx.db, {
    email: "bench@plotbank.test",
    displayName: "Bench",
    password: "bench-password-2026",
    role: "curator",
    verified: true,
  });
  const u = { id: user.id, email: user.email, displayName: user.displayName, role: user.role } as Express.User;
  await createDataset(ctx.db, u, { slug: "bench", title: "Bench", crops: ["soybean"], region: "Bench", description: "Benchmark." });
  const version = await createVersion(ctx, u, await datasetBySlug(ctx.db, "bench"));
  const up = async (resource: "sites" | "site_years" | "treatments", text: string) => {
    const r = await ingestUpload(ctx, {
      versionId: version.id,
      resource,
      filename: `${resource}.csv`,
      source: textStream(text),
      options,
      userId: u.id,
    });
    if (!r.accepted) throw new Error(JSON.stringify(r.problems.slice(0, 3)));
  };
  const siteCount = Math.ceil(siteYearCount / 100);
  await up(
    "sites",
    "site,location\n" + Array.from({ length: siteCount }, (_, i) => `S${String(i).padStart(4, "0")},Bench County`).join("\n") + "\n",
  );
  await up(
    "treatments",
    "treatment,name,is_check,application,product,grade,product_rate,rate_unit,placement,timing\nT0,Check,true,1,,,,,,\n" +
      Array.from(
        { length: TREATMENTS - 1 },
        (_, i) => `T${i + 1},MAP ${i + 1},false,1,MAP,11-52-0,${50 * (i + 1)},lb/ac,2x2-band,at-planting`,
      ).join("\n") +
      "\n",
  );
  await up(
    "site_years",
    "site_year,site,crop,year,blocks\n" +
      Array.from(
        { length: siteYearCount },
        (_, i) => `${syCode(i)},S${String(Math.floor(i / 100)).padStart(4, "0")},soybean,${2000 + (i % 100)},${BLOCKS}`,
      ).join("\n") +
      "\n",
  );
  return { database, ctx, version, user: u };
}

interface PartResult {
  seconds: number;
  peakRssMb: number;
  responses?: number;
  warnings?: number;
}

/** One measured part, alone in its process: its RSS is its own, and its heap does not slow the other part. */
async function part(which: "copy" | "service"): Promise<PartResult> {
  const chunks = plotChunks();
  if (which === "copy") {
    // PGlite's own COPY of the same rows (ids already resolved), into a draft prepared the same way.
    const base = await prepare();
    const sy = new Map(
      (
        await base.ctx.db.select({ id: siteYears.id, code: siteYears.code }).from(siteYears).where(eq(siteYears.versionId, base.version.id))
      ).map((r) => [r.code, r.id]),
    );
    const tr = new Map(
      (
        await base.ctx.db
          .select({ id: treatments.id, code: treatments.code })
          .from(treatments)
          .where(eq(treatments.versionId, base.version.id))
      ).map((r) => [r.code, r.id]),
    );
    const copyParts: string[] = [];
    for (const chunk of chunks.slice(1)) {
      let out = "";
      for (const line of chunk.toString("utf8").split("\n")) {
        if (!line) continue;
        const [s, plot, block, t, y, m] = line.split(",");
        out += `${base.version.id},${sy.get(s!)},${tr.get(t!)},${plot},${block},${y},${m}\n`;
      }
      copyParts.push(out);
    }
    const copyBlob = new Blob(copyParts);
    copyParts.length = 0;
    if (global.gc) global.gc();
    peakRss = process.memoryUsage().rss;
    const started = performance.now();
    await base.database.pglite!.query(
      "COPY plots (version_id, site_year_id, treatment_id, plot, block, yield_kg_ha, harvest_moisture_pct) FROM '/dev/blob' WITH (FORMAT csv)",
      [],
      { blob: copyBlob },
    );
    const seconds = (performance.now() - started) / 1000;
    await base.database.close();
    return { seconds, peakRssMb: peakRss / 1024 / 1024 };
  }
  // The service: the same file as a stream.
  const svc = await prepare();
  if (global.gc) global.gc();
  peakRss = process.memoryUsage().rss;
  const started = performance.now();
  const result = await ingestUpload(svc.ctx, {
    versionId: svc.version.id,
    resource: "plots",
    filename: "plots.csv",
    source: Readable.from(chunks),
    options,
    userId: svc.user.id,
  });
  const seconds = (performance.now() - started) / 1000;
  if (!result.accepted) throw new Error(`refused: ${JSON.stringify(result.problems.slice(0, 3))}`);
  await svc.database.close();
  return { seconds, peakRssMb: peakRss / 1024 / 1024, responses: result.responses?.rows ?? 0, warnings: result.warnings };
}

function runPart(which: "copy" | "service"): PartResult {
  const run = spawnSync(process.execPath, ["--expose-gc", "--import", "tsx", __filename, String(ROWS)], {
    env: { ...process.env, BENCH_INGEST_PART: which },
    encoding: "utf8",
    maxBuffer: 16 * 1024 * 1024,
  });
  const line = run.stdout.split("\n").find((l) => l.startsWith("RESULT "));
  if (run.status !== 0 || !line) throw new Error(`the ${which} part failed (exit ${run.status}):\n${run.stderr.slice(-2000)}`);
  return JSON.parse(line.slice("RESULT ".length)) as PartResult;
}

async function main() {
  const which = process.env.BENCH_INGEST_PART;
  if (which === "copy" || which === "service") {
    const result = await part(which);
    clearInterval(sampler);
    console.log(`RESULT ${JSON.stringify(result)}`);
    return;
  }
  clearInterval(sampler);
  console.log(
    `${ROWS.toLocaleString("en")} plot rows in ${SITE_YEARS.toLocaleString("en")} site-years; COPY and service twice each, alternating, each in its own process…`,
  );
  const bytes = plotChunks().reduce((a, c) => a + c.length, 0);
  // COPY and the service alternate, twice each: COPY's speed drifts between runs on this machine, so each side is
  // taken at its best run (the least disturbed), and every run is shown.
  const copies: PartResult[] = [];
  const services: PartResult[] = [];
  for (let round = 0; round < 2; round++) {
    copies.push(runPart("copy"));
    services.push(runPart("service"));
  }
  const copySeconds = Math.min(...copies.map((c) => c.seconds));
  const service = services.reduce((best, s) => (s.seconds < best.seconds ? s : best));
  const copyRate = ROWS / copySeconds;
  const serviceRate = ROWS / service.seconds;
  const out = {
    rows: ROWS,
    siteYears: SITE_YEARS,
    fileBytes: bytes,
    copy: {
      seconds: copySeconds,
      runs: copies.map((c) => c.seconds),
      rowsPerSecond: copyRate,
      peakRssMb: Math.max(...copies.map((c) => c.peakRssMb)),
    },
    service: {
      seconds: service.seconds,
      runs: services.map((s) => s.seconds),
      rowsPerSecond: serviceRate,
      responses: service.responses ?? 0,
      warnings: service.warnings ?? 0,
    },
    ratio: serviceRate / copyRate,
    ratioOfMeans: copies.reduce((a, c) => a + c.seconds, 0) / services.reduce((a, s) => a + s.seconds, 0),
    peakRssMb: Math.max(...services.map((s) => s.peakRssMb)),
    goals: { ratio: 0.7, peakRssMb: 1024 },
    node: process.version,
    at: new Date().toISOString(),
  };
  const rate = (r: number) => Math.round(r).toLocaleString("en");
  const rows = [
    ...copies.map(
      (c, i) =>
        `| PGlite COPY (ids resolved, no checks), run ${i + 1} | ${c.seconds.toFixed(2)} | ${rate(ROWS / c.seconds)} | ${c.peakRssMb.toFixed(0)} |`,
    ),
    ...services.map(
      (s, i) =>
        `| ingest service (parse, validate, store, ${(s.responses ?? 0).toLocaleString("en")} responses, raw file), run ${i + 1} | ${s.seconds.toFixed(2)} | ${rate(ROWS / s.seconds)} | ${s.peakRssMb.toFixed(0)} |`,
    ),
  ];
  console.log(`
| what | seconds | rows/s | peak RSS MB |
|---|---:|---:|---:|
${rows.join("\n")}

ratio service/COPY, best run of each: **${out.ratio.toFixed(2)}** (of the means: ${out.ratioOfMeans.toFixed(2)}; goal ≥ 0.7) · service peak RSS **${out.peakRssMb.toFixed(0)} MB** (goal < 1024 MB) · file ${(bytes / 1024 / 1024).toFixed(1)} MB
`);
  const dir = path.resolve(__dirname, "out");
  mkdirSync(dir, { recursive: true });
  writeFileSync(path.join(dir, "ingest.json"), JSON.stringify(out, null, 2) + "\n");
}

if (require.main === module)
  main().catch((error) => {
    console.error(error);
    process.exit(1);
  });
