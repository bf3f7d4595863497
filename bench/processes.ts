import autocannon from "autocannon";
import { readMix } from "./read-mix";
import { scratchDatabase } from "./scratch-database";
import { startServerProcess, type ServerProcess } from "./server-process";

/**
 * Throughput of two Plotbank processes vs one on one PostgreSQL server (BENCH_DATABASE_URL, an admin connection; a
 * database is created and dropped), on bench/load.ts's read mix over the demo data, loopback, no proxy: the two-process
 * run sends half the clients to each. PROCESS_SECONDS (default 20) per run, 20 clients in all. Goal: ≥ 1.6× with no
 * errors. On a machine with 2 cores the client shares them with the servers and PostgreSQL.
 */
const seconds = Number(process.env.PROCESS_SECONDS ?? 20);
const connections = 20;
const paths = readMix;

const run = (url: string, conns: number) =>
  autocannon({ url, connections: conns, duration: seconds, requests: paths.map((p) => ({ method: "GET", path: p })) });

async function main() {
  const scratch = await scratchDatabase("plotbank_bench");
  const env = {
    DATABASE_URL: scratch.url,
    PLOTBANK_SERVE_WEB: "off",
    PLOTBANK_ANON_RATE_PER_MIN: "100000000",
    PLOTBANK_TOKEN_RATE_PER_MIN: "100000000",
  };
  const servers: ServerProcess[] = [];
  try {
    // The first process migrates and loads the demo; the second starts on the loaded database.
    servers.push(await startServerProcess({ port: 18610, env }));
    servers.push(await startServerProcess({ port: 18611, env: { ...env, PLOTBANK_MIGRATE: "off", PLOTBANK_DEMO: "off" } }));
    for (const p of paths) if (!(await fetch(servers[0]!.url + p)).ok) throw new Error(`${p} failed`);
    await run(servers[0]!.url, 4); // warm-up
    const one = await run(servers[0]!.url, connections);
    const both = await Promise.all(servers.map((s) => run(s.url, connections / 2)));
    const errors = (rs: autocannon.Result[]) => rs.reduce((n, r) => n + r.errors + r.timeouts + r.non2xx, 0);
    const rate = (rs: autocannon.Result[]) => rs.reduce((n, r) => n + r.requests.total, 0) / seconds;
    console.log(
      [
        `| processes | throughput | errors |`,
        `|---|---|---|`,
        `| 1 | ${rate([one]).toFixed(1)} req/s | ${errors([one])} |`,
        `| 2 | ${rate(both).toFixed(1)} req/s (${(rate(both) / rate([one])).toFixed(2)}×) | ${errors(both)} |`,
        `| load average at the end | ${(await import("node:os"))
          .loadavg()
          .map((l) => l.toFixed(1))
          .join(" / ")} | |`,
      ].join("\n"),
    );
  } finally {
    for (const s of servers) await s.stop();
    await scratch.drop();
  }
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
