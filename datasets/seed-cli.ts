import { migrateDatabase, openDatabase } from "@/db/client";
import { createApp } from "@/server/app";
import { loadConfig } from "@/server/config";
import { seedDemo } from "./seed-demo";

/** `npm run seed`: load the Tallgrass Basin demo into the configured database (only when it has no datasets). */
async function main() {
  const config = loadConfig();
  const database = await openDatabase({ url: config.databaseUrl, dataDir: config.dataDir });
  await migrateDatabase(database);
  const { ctx } = createApp({ database, config, webDistDir: false });
  const started = Date.now();
  const result = await seedDemo(ctx);
  console.log(
    result.seeded
      ? `Seeded ${result.datasets} datasets, ${result.versions} versions in ${((Date.now() - started) / 1000).toFixed(1)} s.`
      : "The database already has datasets; nothing seeded.",
  );
  await database.close();
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
