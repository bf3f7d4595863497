import { runMigrations } from "graphile-worker";
import { migrateDatabase, openDatabase } from "@/db/client";
import { loadConfig } from "@/server/config";

/**
 * The one migration runner for several processes on one PostgreSQL server: Plotbank's schema, then the job queue's.
 * Run it before starting (or upgrading) the processes, which then start with PLOTBANK_MIGRATE=off.
 */
async function main() {
  const config = loadConfig();
  const database = await openDatabase({ url: config.databaseUrl, dataDir: config.dataDir });
  try {
    await migrateDatabase(database);
    if (config.databaseUrl) await runMigrations({ connectionString: config.databaseUrl });
    console.log(`Migrated ${config.databaseUrl ? "the PostgreSQL database (and its job queue)" : `PGlite at ${config.dataDir}`}.`);
  } finally {
    await database.close();
  }
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
