import { spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import http from "node:http";
import path from "node:path";
import { migrateDatabase, openDatabase } from "@/db/client";
import { createApp } from "./app";
import { mountDevProxy, proxyUpgrades } from "./dev-proxy";
import { loadConfig, refuseUndeliverableMail } from "./config";
import { closeServer, listen, localUrl } from "./listen";
import { startLocalDataCiteUnlessConfigured } from "./doi/local-datacite";
import { startDoiCatchUp } from "./services/citation/doi-queue";
import { webDistDir } from "./web";
import { seedDemo } from "@/datasets";

async function main() {
  const config = loadConfig();
  refuseUndeliverableMail(config);
  const devProxy = process.env.PLOTBANK_WEB_PROXY;
  // An API-only process (behind a proxy that serves the web export elsewhere, or the multi-process tests) builds nothing.
  const serveWeb = process.env.PLOTBANK_SERVE_WEB !== "off";
  if (serveWeb && !devProxy && !existsSync(path.join(webDistDir, "index.html"))) {
    console.log("Building the web app (first start only, about a minute)…");
    const build = spawnSync("npm", ["run", "build:web"], { stdio: "inherit" });
    if (build.status !== 0) throw new Error("The web build failed; see the output above.");
  }
  const database = await openDatabase({ url: config.databaseUrl, dataDir: config.dataDir });
  // With several processes on one server, one migration runner (`npm run db:migrate`) goes first and the processes
  // start with PLOTBANK_MIGRATE=off; readiness says 503 until the database has every migration this code expects.
  if (process.env.PLOTBANK_MIGRATE !== "off") await migrateDatabase(database);
  const dataCite = await startLocalDataCiteUnlessConfigured(config);
  const { app, ctx } = createApp({ database, config, webDistDir: devProxy || !serveWeb ? false : undefined });
  await ctx.jobs.start();
  const stopDoiCatchUp = startDoiCatchUp(ctx);
  if (devProxy) mountDevProxy(app, devProxy);

  // The port is bound before the demo loads: with PORT=0 only the bound socket knows the address, and the demo's
  // links and DOIs are written with it. Until the process is ready every request gets a 503, not a half-filled catalogue.
  let ready = false;
  const server = http.createServer((req, res) => (ready ? app(req, res) : answerStarting(res)));
  const address = await listen(server, config.port, config.host);
  const url = localUrl(address);
  if (config.port === 0 && !process.env.PLOTBANK_PUBLIC_URL) config.publicUrl = url;
  if (devProxy) proxyUpgrades(server, devProxy);

  let stopping = false;
  // A stop during the first start's demo load lets the load finish rather than closing the database under it.
  let seeding: Promise<unknown> = Promise.resolve();
  const stop = async (signal: NodeJS.Signals) => {
    if (stopping) {
      console.error(`${signal} again: stopping at once.`);
      process.exit(1);
    }
    stopping = true;
    console.log(`${signal}: taking no new requests or jobs, finishing those in flight, then closing the database…`);
    let code = 0;
    try {
      stopDoiCatchUp();
      // Readiness answers 503 from here (the queue no longer runs), so a proxy stops sending; the running job ends.
      await Promise.all([ctx.jobs.stop(), closeServer(server, 10_000)]);
      await seeding.catch(() => undefined);
      await dataCite.stop();
      await database.close();
    } catch (error) {
      console.error(error);
      code = 1;
    }
    process.exit(code);
  };
  process.on("SIGINT", stop);
  process.on("SIGTERM", stop);

  if (config.demo !== "off") {
    const loading = seedDemo(ctx);
    seeding = loading;
    const demo = await loading;
    if (demo.seeded)
      console.log(
        `Loaded the Tallgrass Basin demo: ${demo.datasets} datasets, ${demo.versions} versions (accounts *@plotbank.test, password tallgrass-demo-2026).`,
      );
  }
  if (stopping) return;
  ready = true;
  const where = config.databaseUrl ? "PostgreSQL (DATABASE_URL)" : `PGlite at ${config.dataDir}`;
  const publicNote = config.publicUrl === url ? "" : `; public address ${config.publicUrl}`;
  console.log(`Plotbank ${config.version} is serving ${url} (API docs: ${url}/api/docs/; database: ${where}${publicNote})`);
}

function answerStarting(res: http.ServerResponse) {
  res.writeHead(503, { "Content-Type": "application/problem+json", "Retry-After": "5", "Cache-Control": "no-store" });
  res.end(
    JSON.stringify({
      type: "about:blank",
      title: "Service unavailable",
      status: 503,
      detail: "Plotbank is starting; try again in a few seconds.",
    }),
  );
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
