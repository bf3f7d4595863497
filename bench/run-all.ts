import { spawnSync } from "node:child_process";
import { cpus, totalmem } from "node:os";
import { existsSync, readFileSync, writeFileSync } from "node:fs";
import path from "node:path";

/**
 * `npm run bench`: run the ingest, API, meta-analysis and web-bundle benchmarks (and, with BENCH_ALL=1, the load and crash
 * scripts), then write bench/RESULTS.md: each benchmark's own table (figures beside their baselines) and the
 * machine it ran on. Benchmarks are not tests: they only report.
 */
const benches = [
  { name: "ingest", file: "ingest.ts", title: "Ingest: 1,000,000 plot rows through the upload service vs PGlite COPY" },
  { name: "api", file: "api.ts", title: "API: filtered reads through HTTP vs the same SQL on PGlite" },
  { name: "meta", file: "meta.ts", title: "Meta-analysis: REML + HKSJ fits and the endpoint" },
  { name: "bundle", file: "bundle.ts", title: "Web export: first-screen JavaScript, gzip (needs dist/: npm run build:web)" },
  ...(process.env.BENCH_ALL
    ? [
        { name: "load", file: "load.ts", title: "Load: 50 clients for 60 s against the public reads and the meta-analysis" },
        { name: "crash", file: "crash.ts", title: "Crash safety: SIGKILL mid-import and mid-publish" },
      ]
    : []),
];
const only = process.argv.slice(2);

const sections: string[] = [];
for (const b of benches) {
  if (only.length && !only.includes(b.name)) continue;
  const file = path.join(__dirname, b.file);
  if (!existsSync(file)) continue;
  console.log(`\n=== ${b.name} ===`);
  const started = Date.now();
  const run = spawnSync(process.execPath, ["--expose-gc", "--import", "tsx", file], {
    cwd: path.resolve(__dirname, ".."),
    encoding: "utf8",
    maxBuffer: 64 * 1024 * 1024,
  });
  process.stdout.write(run.stdout);
  process.stderr.write(run.stderr);
  const tables = run.stdout
    .split("\n")
    .filter((l) => l.startsWith("|"))
    .join("\n");
  const status = run.status === 0 ? "" : `\n\n**The run failed (exit ${run.status}).**`;
  sections.push(
    `## ${b.title}\n\nRan ${new Date(started).toISOString()} in ${Math.round((Date.now() - started) / 1000)} s (\`node --import tsx bench/${b.file}\`).\n\n${tables || "(no table printed)"}${status}`,
  );
}

const resultsPath = path.join(__dirname, "RESULTS.md");
const previous = existsSync(resultsPath) ? readFileSync(resultsPath, "utf8") : "";
// Keep sections of benchmarks that were not run this time.
const kept = previous.split(/\n(?=## )/).filter((s) => s.startsWith("## ") && !sections.some((n) => n.split("\n")[0] === s.split("\n")[0]));
const cpu = cpus()[0]?.model ?? "unknown CPU";
const header = `# Benchmark results\n\nWritten by \`npm run bench\`. Machine: ${cpus().length} × ${cpu}, ${Math.round(totalmem() / 2 ** 30)} GiB, Node.js ${process.version}, ${process.platform}. PGlite (PostgreSQL 18 in WASM) on local disk or in memory, as each benchmark says.\n`;
writeFileSync(resultsPath, [header, ...kept, ...sections].join("\n\n").trimEnd() + "\n");
console.log(`\nwrote ${resultsPath}`);
