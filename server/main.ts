import { spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import path from "node:path";
import { migrateDatabase, openDatabase } from "@/db/client";
import { createApp } from "./app";
import { mountDevProxy, proxyUpgrades } from "./dev-proxy";
import { loadConfig } from "./config";
import { startLocalDataCiteUnlessConfigured } from "./doi/local-datacite";
import { startDoiRetryLoop } from "./services/citation/doi-queue";
import { webDistDir } from "./web";
import { seedDemo } from "@/datasets";

async function main() {
  const config = loadConfig();
  const devProxy = process.env.PLOTBANK_WEB_PROXY;
  if (!devProxy && !existsSync(path.join(webDistDir, "index.html"))) {
    console.log("Building the web app (first start only, about a minute)…");
    const build = spawnSync("npm", ["run", "build:web"], { stdio: "inherit" });
    if (build.status !== 0) throw new Error("The web build failed; see the output above.");
  }
  const database = await openDatabase({ url: config.databaseUrl, dataDir: config.dataDir });
  await migrateDatabase(database);
  const dataCite = await startLocalDataCiteUnlessConfigured(config);
  const { app, ctx } = createApp({ database, config, webDistDir: devProxy ? false : undefined });
  const stopDoiRetries = startDoiRetryLoop(ctx);
  if (devProxy) mountDevProxy(app, devProxy);
  if (config.demo !== "off") {
    const demo = await seedDemo(ctx);
    if (demo.seeded) console.log(`Loaded the Tallgrass Basin demo: ${demo.datasets} datasets, ${demo.versions} versions (accounts *@plotbank.test, password tallgrass-demo-2026).`);
  }
  const server = app.listen(config.port, config.host, () => {
    const where = config.databaseUrl ? "PostgreSQL (DATABASE_URL)" : `PGlite at ${config.dataDir}`;
    console.log(`Plotbank ${config.version} is serving ${config.publicUrl} (API docs: ${config.publicUrl}/api/docs; database: ${where})`);
  });
  if (devProxy) proxyUpgrades(server, devProxy);
  const stop = async () => {
    server.close();
    stopDoiRetries();
    await dataCite.stop();
    await database.close();
    process.exit(0);
  };
  process.on("SIGINT", stop);
  process.on("SIGTERM", stop);
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
