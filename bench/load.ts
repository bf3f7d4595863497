import autocannon from "autocannon";
import { mkdirSync, writeFileSync } from "node:fs";
import path from "node:path";
import { readMix } from "./read-mix";
import { startServerProcess } from "./server-process";

/**
 * Load: 50 concurrent clients for 60 s (LOAD_SECONDS to change) against the public read endpoints and the
 * meta-analysis on the demo data, loopback only. Reports throughput, latency percentiles and the server's RSS before
 * and after. Goals: no errors other than designed 429s; RSS growth under 10 %.
 */
const seconds = Number(process.env.LOAD_SECONDS ?? 60);
const connections = Number(process.env.LOAD_CONNECTIONS ?? 50);

const paths = readMix;

async function main() {
  // Quotas are raised for the throughput run; a short second run at the default quota shows the designed 429s.
  const server = await startServerProcess({
    port: 18500,
    env: { PLOTBANK_ANON_RATE_PER_MIN: "100000000", PLOTBANK_TOKEN_RATE_PER_MIN: "100000000" },
  });
  let table: string[];
  let record: Record<string, unknown>;
  let failed = false;
  try {
    for (const p of paths) {
      const res = await fetch(server.url + p);
      if (!res.ok) throw new Error(`${p} answered ${res.status}: ${await res.text()}`);
    }
    // Warm up, then measure RSS from a settled state.
    await run(server.url, 5, 10);
    const rssBefore = server.rssMb();
    const { result, latencies } = await run(server.url, seconds, connections);
    await new Promise((r) => setTimeout(r, 2000));
    const rssAfter = server.rssMb();
    const errors = result.errors + result.timeouts + result.non2xx;
    const growth = ((rssAfter - rssBefore) / rssBefore) * 100;
    const [p50, p95, p99] = [0.5, 0.95, 0.99].map((q) => percentile(latencies, q));
    failed = errors > 0 || growth >= 10;
    if (errors > 0) {
      // What the server said about them (stderr and stdout, last lines that mention an error).
      const said = server
        .output()
        .split("\n")
        .filter((l) => /error|fail|5\d\d/i.test(l))
        .slice(-10);
      console.error(`server output about errors:\n${said.join("\n") || "(nothing)"}`);
    }
    table = [
      `| measure | value |`,
      `|---|---|`,
      `| clients × duration | ${connections} × ${seconds} s, ${paths.length} read paths in turn |`,
      `| requests | ${result.requests.total} |`,
      `| throughput | ${Math.round(result.requests.average)} req/s |`,
      `| latency p50 / p95 / p99 | ${p50} / ${p95} / ${p99} ms |`,
      `| errors (non-2xx, timeouts, socket) | ${errors}${errors ? ` (${describeErrors(result)})` : ""} |`,
      `| server RSS before → after | ${rssBefore} → ${rssAfter} MB (${growth.toFixed(1)} %; goal < 10 %) |`,
    ];
    record = { seconds, connections, requests: result.requests, p50, p95, p99, errors, rssBefore, rssAfter };
  } finally {
    await server.stop();
  }

  // The same paths at the shipped anonymous quota: the only refusals should be the designed 429s.
  const limited = await startServerProcess({ port: 18501 });
  try {
    const { result } = await run(limited.url, 10, 10);
    const codes = (result as unknown as { statusCodeStats?: Record<string, { count: number }> }).statusCodeStats ?? {};
    const tooMany = codes["429"]?.count ?? 0;
    const other =
      result.errors +
      result.timeouts +
      Object.entries(codes)
        .filter(([c]) => c !== "429" && !c.startsWith("2"))
        .reduce((n, [, v]) => n + v.count, 0);
    if (other > 0) failed = true;
    table.push(
      `| at the default anonymous quota (10 clients × 10 s) | ${result.requests.total} requests: ${tooMany} designed 429s, ${other} other errors |`,
    );
    record = { ...record, quotaRun: { requests: result.requests.total, tooMany, other } };
  } finally {
    await limited.stop();
  }
  console.log(table.join("\n"));
  const out = path.resolve(__dirname, "out");
  mkdirSync(out, { recursive: true });
  writeFileSync(path.join(out, "load.json"), JSON.stringify(record, null, 2));
  if (failed) process.exitCode = 1;
}

/** Which errors: status codes other than 2xx with their counts, timeouts and socket errors. */
function describeErrors(result: autocannon.Result): string {
  const codes = (result as unknown as { statusCodeStats?: Record<string, { count: number }> }).statusCodeStats ?? {};
  const bad = Object.entries(codes)
    .filter(([c]) => !c.startsWith("2"))
    .map(([c, v]) => `${v.count} × ${c}`);
  return [...bad, result.timeouts ? `${result.timeouts} timeouts` : "", result.errors ? `${result.errors} socket errors` : ""]
    .filter(Boolean)
    .join(", ");
}

function percentile(values: number[], q: number): number {
  if (!values.length) return NaN;
  const sorted = [...values].sort((a, b) => a - b);
  return Math.round(sorted[Math.min(sorted.length - 1, Math.ceil(q * sorted.length) - 1)]! * 10) / 10;
}

/** One autocannon run; every response time is kept so p95 can be read exactly (autocannon's own table has p97.5). */
function run(url: string, duration: number, conns: number): Promise<{ result: autocannon.Result; latencies: number[] }> {
  const latencies: number[] = [];
  return new Promise((resolve, reject) => {
    const instance = autocannon(
      { url, connections: conns, duration, requests: paths.map((p) => ({ method: "GET", path: p })) },
      (err, result) => (err ? reject(err) : resolve({ result, latencies })),
    );
    instance.on("response", (_client, _status, _bytes, responseTime) => latencies.push(responseTime));
  });
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
