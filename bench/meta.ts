import { mkdirSync, writeFileSync } from "node:fs";
import type { AddressInfo } from "node:net";
import path from "node:path";
import { eq } from "drizzle-orm";
import { migrateDatabase, openDatabase } from "@/db/client";
import { datasets, responses, siteYears, sites, soilTests, treatments, users, versions } from "@/db/schema";
import type { TableSchemaDescriptor } from "@/schemas/table-schema";
import { createApp } from "@/server/app";
import { loadConfig } from "@/server/config";
import type { AppContext } from "@/server/context";
import { continuousModeratorRegression, metaAnalysis } from "@/stats";

/**
 * Meta-analysis speed: REML + HKSJ on k = 100, 1,000 and 10,000 effects, and the whole /api/v1/analyses/meta endpoint
 * (database read, per-site-year effects, fit, subgroups, decision numbers, JSON) on the demo data and on 20,000
 * site-years (BENCH_META_SITE_YEARS=2000 for a quicker run; BENCH_META_ENDPOINT_ONLY=1 skips the fit and demo rows). The
 * large JSON answers use the default forest bound; one row asks for forestLimit=all to show what the full forest costs.
 * Writes a Markdown table and bench/out/meta.json. Loopback only.
 */

/** Park–Miller minimal standard generator: reproducible effects without a dependency. */
function generator(seed: number) {
  let s = seed;
  return () => (s = (s * 48271) % 2147483647) / 2147483647;
}

function effects(k: number) {
  const u = generator(k + 7);
  const normal = () => Math.sqrt(-2 * Math.log(u() || 1e-12)) * Math.cos(2 * Math.PI * u());
  const vi = Array.from({ length: k }, () => 0.5 + 3 * u());
  const yi = vi.map((v) => 4 + 2.5 * normal() + Math.sqrt(v) * normal());
  return { yi, vi };
}

function timeIt(fn: () => void, minRuns = 3, minMs = 300): { medianMs: number; runs: number } {
  const times: number[] = [];
  const started = performance.now();
  while (times.length < minRuns || performance.now() - started < minMs) {
    const t0 = performance.now();
    fn();
    times.push(performance.now() - t0);
    if (times.length >= 50) break;
  }
  times.sort((a, b) => a - b);
  return { medianMs: times[Math.floor(times.length / 2)]!, runs: times.length };
}

async function timeRequest(url: string, runs = 5) {
  const times: number[] = [];
  let k = 0;
  let bytes = 0;
  for (let i = 0; i < runs + 1; i++) {
    const t0 = performance.now();
    const res = await fetch(url);
    const text = await res.text();
    if (!res.ok) throw new Error(`${url} answered ${res.status}: ${text.slice(0, 300)}`);
    if (i > 0) times.push(performance.now() - t0); // the first request warms caches and JIT
    k = JSON.parse(text).k;
    bytes = text.length;
  }
  times.sort((a, b) => a - b);
  return { medianMs: times[Math.floor(times.length / 2)]!, k, bytes };
}

async function serve() {
  const database = await openDatabase();
  await migrateDatabase(database);
  const config = loadConfig({ NODE_ENV: "production", PLOTBANK_DEMO: "off" } as NodeJS.ProcessEnv, { anonRatePerMinute: 1_000_000 });
  const { app, ctx } = createApp({ database, config, webDistDir: false });
  const server = await new Promise<import("node:http").Server>((resolve) => {
    const s = app.listen(0, "127.0.0.1", () => resolve(s));
  });
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  return {
    ctx,
    url,
    stop: async () => {
      await new Promise<void>((r) => server.close(() => r()));
      await database.close();
    },
  };
}

/** 20,000 site-years of one published version, inserted in bulk (one 2x2-band contrast each). */
async function bulkInsert(ctx: AppContext, count: number) {
  const db = ctx.db;
  const [owner] = await db
    .insert(users)
    .values({ email: "bench@plotbank.test", displayName: "Bench", passwordHash: "x", role: "curator" })
    .returning();
  const [dataset] = await db
    .insert(datasets)
    .values({
      slug: "bench-large",
      title: "Bench: many site-years",
      crops: ["soybean"],
      region: "Tallgrass Basin",
      description: "Synthetic",
      ownerId: owner!.id,
    })
    .returning();
  const [version] = await db
    .insert(versions)
    .values({ datasetId: dataset!.id, semver: "1.0.0", tableSchema: { resources: {} } as TableSchemaDescriptor, createdBy: owner!.id })
    .returning();
  const versionId = version!.id;
  const [site] = await db.insert(sites).values({ versionId, code: "TB-99", location: "Tallgrass County" }).returning();
  const [check, band] = await db
    .insert(treatments)
    .values([
      { versionId, code: "CK", name: "Check", isCheck: true },
      { versionId, code: "BAND", name: "2x2 band", nutrients: ["P"], placements: ["2x2-band"] },
    ])
    .returning();
  const u = generator(99);
  const classes = ["very_low", "low", "optimum", "high", "very_high"];
  for (let start = 0; start < count; start += 1000) {
    const n = Math.min(1000, count - start);
    const sy = await db
      .insert(siteYears)
      .values(
        Array.from({ length: n }, (_, i) => ({
          versionId,
          siteId: site!.id,
          code: `TB-99-${start + i}`,
          crop: "soybean",
          year: 2000 + ((start + i) % 25),
          blocks: 4,
        })),
      )
      .returning({ id: siteYears.id, code: siteYears.code, year: siteYears.year });
    // Bray-P1 soil-test P (ppm) spread within each class, so moderator=soilTestValue has a line to fit.
    const soilP = sy.map((_, i) => Math.round(10 * (4 + 6 * ((start + i) % 5) + 5 * u())) / 10);
    await db
      .insert(soilTests)
      .values(sy.map((s, i) => ({ versionId, siteYearId: s.id, analyte: "P", value: soilP[i]!, unit: "ppm", extractant: "Bray-P1" })));
    await db.insert(responses).values(
      sy.map((s, i) => {
        const cls = classes[(start + i) % 5]!;
        const md = 300 - 60 * classes.indexOf(cls) + 150 * (u() - 0.5);
        return {
          versionId,
          siteYearId: s.id,
          treatmentId: band!.id,
          checkTreatmentId: check!.id,
          siteCode: "TB-99",
          siteYearCode: s.code,
          treatmentCode: "BAND",
          crop: "soybean",
          year: s.year,
          nutrients: ["P"],
          placements: ["2x2-band"],
          nLbAc: 11,
          p2o5LbAc: 52,
          k2oLbAc: 0,
          sLbAc: 0,
          soilPClass: cls,
          soilPValue: soilP[i]!,
          checkMeanKgHa: 3500,
          treatedMeanKgHa: 3500 + md,
          mdKgHa: md,
          seKgHa: 60 + 60 * u(),
          dfError: 9,
          replicates: 4,
          balanced: true,
        };
      }),
    );
  }
  await db.update(versions).set({ state: "published", publishedAt: new Date() }).where(eq(versions.id, versionId));
}

async function main() {
  const rows: { case: string; k: number; medianMs: number; note: string }[] = [];
  const siteYearCount = Number(process.env.BENCH_META_SITE_YEARS ?? 20_000);
  const endpointOnly = process.env.BENCH_META_ENDPOINT_ONLY === "1";
  if (!endpointOnly) await fitAndDemo(rows);

  const large = await serve();
  const t0 = performance.now();
  await bulkInsert(large.ctx, siteYearCount);
  const insertMs = performance.now() - t0;
  const label = siteYearCount.toLocaleString("en-US");
  for (const query of [
    "?dataset=bench-large",
    "?dataset=bench-large&groupBy=soilTestClass&price=11&cost=24",
    "?dataset=bench-large&forestLimit=all",
    "?dataset=bench-large&nutrient=P&moderator=soilTestValue",
  ]) {
    const r = await timeRequest(`${large.url}/api/v1/analyses/meta${query}`, 7);
    const size = r.bytes > 1024 * 1024 ? `${(r.bytes / 1024 / 1024).toFixed(1)} MB` : `${(r.bytes / 1024).toFixed(0)} KB`;
    rows.push({
      case: `endpoint, ${label} site-years ${query}`,
      k: r.k,
      medianMs: r.medianMs,
      note: `PGlite in memory; ${size} JSON; bulk insert took ${(insertMs / 1000).toFixed(1)} s`,
    });
  }
  await large.stop();

  const table = [
    "| case | k | median ms | note |",
    "|---|---:|---:|---|",
    ...rows.map((r) => `| ${r.case} | ${r.k} | ${r.medianMs.toFixed(1)} | ${r.note} |`),
  ].join("\n");
  console.log(table);
  const out = path.resolve(__dirname, "out");
  mkdirSync(out, { recursive: true });
  writeFileSync(path.join(out, "meta.json"), JSON.stringify({ node: process.version, at: new Date().toISOString(), rows }, null, 2));
}

async function fitAndDemo(rows: { case: string; k: number; medianMs: number; note: string }[]) {
  // Warm the JIT so the first size is not charged for compilation.
  for (let i = 0; i < 20; i++) metaAnalysis({ ...effects(200), method: "REML", ci: "hksj" });
  for (const k of [100, 1_000, 10_000]) {
    const { yi, vi } = effects(k);
    const t = timeIt(() => metaAnalysis({ yi, vi, method: "REML", ci: "hksj", heterogeneityInterval: false }));
    rows.push({ case: `metaAnalysis REML + HKSJ`, k, medianMs: t.medianMs, note: `${t.runs} runs` });
    const q = timeIt(() => metaAnalysis({ yi, vi, method: "REML", ci: "hksj" }), 2, 200);
    rows.push({ case: `… with Q-profile τ²/I² intervals`, k, medianMs: q.medianMs, note: `${q.runs} runs` });
  }
  for (const k of [1_000, 20_000]) {
    const { yi, vi } = effects(k);
    const u = generator(k + 11);
    const x = yi.map(() => 4 + 30 * u());
    const t = timeIt(() => continuousModeratorRegression({ yi, vi, x, method: "REML", ci: "hksj" }), 3, 300);
    rows.push({ case: `meta-regression ~ x, REML + HKSJ, R² and 25-point band`, k, medianMs: t.medianMs, note: `${t.runs} runs` });
  }

  const demo = await serve();
  // The demo generator may not exist yet; a variable specifier keeps the type checker from requiring it.
  const demoModule = "@/datasets";
  const mod = (await import(demoModule).catch(() => ({}))) as { seedDemo?: (ctx: AppContext) => Promise<unknown> };
  let demoNote = "demo generator (datasets/seedDemo)";
  if (mod.seedDemo) await mod.seedDemo(demo.ctx);
  else {
    const { insertAnalysisFixture, tallgrassStarterResponses } = await import("@/tests/support/analysis-fixture");
    await insertAnalysisFixture(demo.ctx, { slug: "tb-p-starter", responses: tallgrassStarterResponses() });
    demoNote = "no demo generator yet: the 24-site-year Tallgrass fixture";
  }
  for (const query of ["", "?nutrient=P&groupBy=soilTestClass&price=11&cost=24", "?groupBy=placement&units=kg/ha"]) {
    const r = await timeRequest(`${demo.url}/api/v1/analyses/meta${query}`);
    rows.push({
      case: `endpoint, demo data ${query || "(no filters)"}`,
      k: r.k,
      medianMs: r.medianMs,
      note: `${demoNote}; ${(r.bytes / 1024).toFixed(0)} KB JSON`,
    });
  }
  await demo.stop();
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
