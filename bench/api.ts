import { mkdirSync, writeFileSync } from "node:fs";
import type { Server } from "node:http";
import type { AddressInfo } from "node:net";
import { loadavg } from "node:os";
import path from "node:path";
import { sql } from "drizzle-orm";
import { migrateDatabase, openDatabase, type Database } from "@/db/client";
import { createApp } from "@/server/app";
import { loadConfig } from "@/server/config";
import { observationResource } from "@/server/services/public/observations";
import { responseQuery, responseResource } from "@/server/services/public/responses";
import { resolveVersions } from "@/server/services/trial-filter";
import { trialFilters } from "@/schemas/filters";

/**
 * Public API speed on PGlite: the main filtered reads through HTTP against the same reads straight on the database
 * (the resource's own batch query, no HTTP), at full size (20,000 site-years, 1,000,000 plots) and at a tenth of it;
 * and the whole 1,000,000-plot CSV streamed, with the server's RSS sampled while it streams.
 * Writes a Markdown table to stdout and bench/out/api.json. Loopback only. Run: node --import tsx bench/api.ts
 */

const treatmentsPerSiteYear = 5;
const blocksPerSiteYear = 10;

/** Bulk seed with generate_series: one INSERT … SELECT per table, published at the end (the triggers allow drafts only). */
export async function seed(database: Database, siteYearCount: number) {
  const db = database.db;
  const q = (text: string) => db.execute(sql.raw(text));
  await q(`INSERT INTO users (email, display_name, role) VALUES ('bench@plotbank.test', 'Bench', 'curator')`);
  await q(`INSERT INTO datasets (slug, title, crops, region, description, owner_id)
           SELECT 'tb-bench', 'Tallgrass Basin bench', ARRAY['soybean'], 'Tallgrass Basin', 'Generated for the benchmark', id FROM users`);
  await q(`INSERT INTO versions (dataset_id, semver, table_schema, created_by)
           SELECT d.id, '1.0.0', '{"resources":{}}'::jsonb, d.owner_id FROM datasets d`);
  const v = `(SELECT id FROM versions LIMIT 1)`;
  const sitesN = Math.max(10, Math.round(siteYearCount / 40));
  await q(
    `INSERT INTO sites (version_id, code, location) SELECT ${v}, 'TB-' || g, 'Grid ' || (g % 97) FROM generate_series(1, ${sitesN}) g`,
  );
  await q(`INSERT INTO site_years (version_id, site_id, code, crop, year, blocks, tillage, planting_date, row_spacing_in)
           SELECT ${v}, s.id, 'SY-' || g, 'soybean', 2000 + (g % 25), ${blocksPerSiteYear},
                  (ARRAY['no-till','strip-till','reduced','conventional'])[1 + g % 4],
                  make_date(2000 + (g % 25), 5, 1 + (g % 28)), (ARRAY[15, 20, 30])[1 + g % 3]
           FROM generate_series(1, ${siteYearCount}) g JOIN sites s ON s.code = 'TB-' || (1 + g % ${sitesN})`);
  await q(`INSERT INTO soil_tests (version_id, site_year_id, analyte, value, unit, extractant, class)
           SELECT ${v}, sy.id, a.analyte, 5 + (sy.id % 40), 'ppm', 'Bray-P1',
                  (ARRAY['very_low','low','optimum','high','very_high'])[1 + (sy.id + a.k) % 5]
           FROM site_years sy CROSS JOIN (VALUES ('P', 0), ('K', 2)) a(analyte, k)`);
  await q(`INSERT INTO treatments (version_id, code, name, is_check, n_lb_ac, p2o5_lb_ac, k2o_lb_ac, nutrients, placements) VALUES
           (${v}, 'CHK', 'Check', true, 0, 0, 0, '{}', '{}'),
           (${v}, 'IF', 'In-furrow 10-34-0', false, 5.7, 19.4, 0, '{N,P}', '{in-furrow}'),
           (${v}, '2X2', '2x2 band MAP', false, 11, 52, 0, '{N,P}', '{2x2-band}'),
           (${v}, 'BC', 'Broadcast MAP', false, 16.5, 78, 0, '{N,P}', '{broadcast}'),
           (${v}, 'KBC', 'Broadcast potash', false, 0, 0, 60, '{K}', '{broadcast}')`);
  await q(`INSERT INTO plots (version_id, site_year_id, treatment_id, plot, block, yield_kg_ha, harvest_moisture_pct)
           SELECT ${v}, sy.id, t.id, b || '-' || t.code, b, 3600 + (sy.id % 500) + (t.id % 5) * 40 + ((sy.id * 31 + b * 17) % 300), 14.5
           FROM site_years sy CROSS JOIN treatments t CROSS JOIN generate_series(1, ${blocksPerSiteYear}) b`);
  await q(`INSERT INTO responses (version_id, site_year_id, treatment_id, check_treatment_id, site_code, site_year_code, treatment_code,
             crop, year, tillage, row_spacing_in, planting_date, nutrients, placements, n_lb_ac, p2o5_lb_ac, k2o_lb_ac, s_lb_ac,
             soil_p_class, soil_p_value, soil_k_class, soil_k_value, check_mean_kg_ha, treated_mean_kg_ha, md_kg_ha, se_kg_ha, df_error,
             p_value, lsd05_kg_ha, cv_pct, replicates, balanced)
           SELECT ${v}, sy.id, t.id, c.id, s.code, sy.code, t.code, sy.crop, sy.year, sy.tillage, sy.row_spacing_in, sy.planting_date,
                  t.nutrients, t.placements, t.n_lb_ac, t.p2o5_lb_ac, t.k2o_lb_ac, 0, sp.class, sp.value, sk.class, sk.value,
                  3700, 3700 + (sy.id % 300), sy.id % 300, 90, 36, 0.05, 180, 6, ${blocksPerSiteYear}, true
           FROM site_years sy JOIN sites s ON s.id = sy.site_id CROSS JOIN treatments t CROSS JOIN treatments c
           JOIN soil_tests sp ON sp.site_year_id = sy.id AND sp.analyte = 'P' JOIN soil_tests sk ON sk.site_year_id = sy.id AND sk.analyte = 'K'
           WHERE NOT t.is_check AND c.is_check`);
  await q(`UPDATE versions SET state = 'published', published_at = now()`);
  await q(`ANALYZE`);
}

function summarise(times: number[]) {
  const sorted = [...times].sort((a, b) => a - b);
  const at = (p: number) => sorted[Math.min(sorted.length - 1, Math.ceil(p * sorted.length) - 1)]!;
  return { medianMs: round(at(0.5)), p95Ms: round(at(0.95)), runs: sorted.length };
}
const round = (x: number) => Math.round(x * 10) / 10;

/** Two reads timed in alternation, so a busy moment of the machine falls on both alike. */
async function timePair(a: () => Promise<unknown>, b: () => Promise<unknown>, runs: number) {
  await a();
  await b();
  const ta: number[] = [];
  const tb: number[] = [];
  for (let i = 0; i < runs; i++) {
    for (const [fn, times] of i % 2
      ? ([
          [b, tb],
          [a, ta],
        ] as const)
      : ([
          [a, ta],
          [b, tb],
        ] as const)) {
      const t0 = performance.now();
      await fn();
      times.push(performance.now() - t0);
    }
  }
  return [summarise(ta), summarise(tb)] as const;
}

async function timeAsync(fn: () => Promise<unknown>, runs: number) {
  await fn(); // warm-up: JIT, plan cache, buffer cache
  const times: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    await fn();
    times.push(performance.now() - t0);
  }
  return summarise(times);
}

/** Uncompressed, as a script on the same machine or a client that does not ask for gzip gets it. */
async function fetchText(url: string): Promise<string> {
  const res = await fetch(url, { headers: { "Accept-Encoding": "identity" } });
  const text = await res.text();
  if (!res.ok) throw new Error(`${url} answered ${res.status}: ${text.slice(0, 300)}`);
  return text;
}

const responsesQuery = "nutrient=P&placement=2x2-band&soilTestClass=low,very_low&limit=1000";
const observationsQuery = "placement=in-furrow&tillage=no-till&format=csv";
/** The same filter as one JSON page: its size does not grow with the data, so it shows whether the indexes hold. */
const observationsPageQuery = "placement=in-furrow&tillage=no-till&limit=1000";

async function startServer(database: Database) {
  const config = loadConfig({ NODE_ENV: "production", PLOTBANK_DEMO: "off" } as NodeJS.ProcessEnv, {
    anonRatePerMinute: 1_000_000_000,
    tokenRatePerMinute: 1_000_000_000,
  });
  const { app, ctx } = createApp({ database, config, webDistDir: false });
  const server = await new Promise<Server>((resolve) => {
    const s = app.listen(0, "127.0.0.1", () => resolve(s));
  });
  // Keep idle sockets longer than the benchmark's pauses, so fetch never reuses one the server is just closing.
  server.keepAliveTimeout = 120_000;
  return { ctx, server, base: `http://127.0.0.1:${(server.address() as AddressInfo).port}` };
}

async function measure(siteYearCount: number, runs: number) {
  const t0 = performance.now();
  const database = await openDatabase();
  await migrateDatabase(database);
  await seed(database, siteYearCount);
  const seedMs = performance.now() - t0;
  const { ctx, server, base } = await startServer(database);

  const rq = trialFilters.parse(Object.fromEntries(new URLSearchParams(responsesQuery.replace(/&limit=\d+/, ""))));
  const oq = trialFilters.parse(Object.fromEntries(new URLSearchParams(observationsQuery.replace(/&format=csv/, ""))));
  const versions = await resolveVersions(ctx.db, {});
  // The baseline of the JSON page: the same SELECT, run bare on PGlite (rows parsed into objects, nothing else).
  const rawSelect = responseQuery(ctx.db, { versions, filters: rq, units: "bu/ac" }, 0, 1001).toSQL();
  const [responsesHttp, responsesRawSelect] = await timePair(
    () => fetchText(`${base}/api/v1/responses?${responsesQuery}`),
    () => database.pglite!.query(rawSelect.sql, rawSelect.params),
    runs,
  );
  const responsesDirect = await timeAsync(
    () => responseResource.readBatch(ctx.db, { versions, filters: rq, units: "bu/ac" }, 0, 1001),
    runs,
  );
  const observationsPageHttp = await timeAsync(() => fetchText(`${base}/api/v1/observations?${observationsPageQuery}`), runs);
  const observationsPageDirect = await timeAsync(
    () => observationResource.readBatch(ctx.db, { versions, filters: oq, units: "bu/ac" }, 0, 1001),
    runs,
  );
  let csvRows = 0;
  const observationsHttp = await timeAsync(
    async () => {
      csvRows = (await fetchText(`${base}/api/v1/observations?${observationsQuery}`)).split("\r\n").length - 2;
    },
    Math.max(3, Math.round(runs / 4)),
  );
  const observationsDirect = await timeAsync(
    async () => {
      // The same batches the CSV stream reads, without HTTP or CSV writing.
      let after = 0;
      for (;;) {
        const rows = await observationResource.readBatch(ctx.db, { versions, filters: oq, units: "bu/ac" }, after, 2000);
        if (rows.length < 2000) break;
        after = rows[rows.length - 1]!.id;
      }
    },
    Math.max(3, Math.round(runs / 4)),
  );
  return {
    siteYearCount,
    plots: siteYearCount * treatmentsPerSiteYear * blocksPerSiteYear,
    seedMs: round(seedMs),
    responsesHttp,
    responsesDirect,
    responsesRawSelect,
    observationsPageHttp,
    observationsPageDirect,
    observationsHttp,
    observationsDirect,
    csvRows,
    database,
    server,
    base,
  };
}

/** Stream every plot as CSV; sample the process RSS while the bytes flow, reading the body without keeping it. */
async function streamAll(base: string) {
  const before = process.memoryUsage().rss;
  let peak = before;
  const timer = setInterval(() => (peak = Math.max(peak, process.memoryUsage().rss)), 50);
  const t0 = performance.now();
  const res = await fetch(`${base}/api/v1/observations?format=csv`);
  let bytes = 0;
  let lines = 0;
  for await (const chunk of res.body as unknown as AsyncIterable<Uint8Array>) {
    bytes += chunk.length;
    for (const b of chunk) if (b === 0x0a) lines++;
  }
  clearInterval(timer);
  return {
    rows: lines - 1,
    mb: round(bytes / 1e6),
    seconds: round((performance.now() - t0) / 1000),
    rssBeforeMb: round(before / 1e6),
    rssPeakMb: round(peak / 1e6),
  };
}

async function main() {
  const small = await measure(2_000, 40);
  await new Promise((r) => small.server.close(r));
  await small.database.close();
  const full = await measure(20_000, 40);
  const stream = await streamAll(full.base);
  await new Promise((r) => full.server.close(r));
  await full.database.close();

  const row = (name: string, s: { medianMs: number; p95Ms: number }, d: { medianMs: number; p95Ms: number }, tenth: { p95Ms: number }) =>
    `| ${name} | ${s.medianMs} | ${s.p95Ms} | ${d.medianMs} | ${d.p95Ms} | ${tenth.p95Ms} |`;
  const lines = [
    `Seeded ${full.siteYearCount.toLocaleString()} site-years / ${full.plots.toLocaleString()} plots in ${round(full.seedMs / 1000)} s (tenth: ${small.plots.toLocaleString()} plots).`,
    "",
    "| read | HTTP median ms | HTTP p95 ms | direct median ms | direct p95 ms | HTTP p95 ms at 1/10 size |",
    "|---|---|---|---|---|---|",
    row(`responses ?${responsesQuery} (1000-row JSON page)`, full.responsesHttp, full.responsesDirect, small.responsesHttp),
    `| the same SELECT run bare on PGlite | | | ${full.responsesRawSelect.medianMs} | ${full.responsesRawSelect.p95Ms} | |`,
    row(
      `observations ?${observationsPageQuery} (1000-row JSON page)`,
      full.observationsPageHttp,
      full.observationsPageDirect,
      small.observationsPageHttp,
    ),
    row(
      `observations ?${observationsQuery} (${full.csvRows.toLocaleString()} CSV rows)`,
      full.observationsHttp,
      full.observationsDirect,
      small.observationsHttp,
    ),
    "",
    `Responses page against the bare SELECT, timed in alternation: ${(full.responsesHttp.medianMs / full.responsesRawSelect.medianMs).toFixed(2)}× (median), ${(full.responsesHttp.p95Ms / full.responsesRawSelect.p95Ms).toFixed(2)}× (p95). Load average at the end: ${loadavg()
      .map((x) => x.toFixed(1))
      .join(" / ")}.`,
    "",
    `The filtered CSV grows with the data (${small.csvRows.toLocaleString()} rows at 1/10 size, ${full.csvRows.toLocaleString()} at full size), so its 1/10 column compares unequal outputs; the JSON pages hold the output fixed.`,
    "",
    `Whole CSV stream: ${stream.rows.toLocaleString()} rows, ${stream.mb} MB in ${stream.seconds} s; RSS ${stream.rssBeforeMb} MB before, ${stream.rssPeakMb} MB peak (server and client in one process, PGlite included).`,
  ];
  console.log(lines.join("\n"));
  const out = path.resolve(__dirname, "out");
  mkdirSync(out, { recursive: true });
  const strip = ({ database: _d, server: _s, base: _b, ...rest }: typeof full) => rest;
  writeFileSync(
    path.join(out, "api.json"),
    JSON.stringify({ full: strip(full), tenth: strip(small), stream, at: new Date().toISOString() }, null, 2),
  );
}

if (require.main === module)
  main().catch((error) => {
    console.error(error);
    process.exit(1);
  });
