import { sql } from "drizzle-orm";
import { migrateDatabase, openDatabase, queryRows } from "@/db/client";
import { seedDemo } from "@/datasets";
import { createApp } from "@/server/app";
import { loadConfig } from "@/server/config";
import { scratchDatabase } from "./scratch-database";

/**
 * What one PostgreSQL server holds per 1,000 site-years: loads the demo into a fresh database on the server named by
 * BENCH_DATABASE_URL (an admin connection), then reports rows and megabytes over the empty, migrated database.
 */
async function main() {
  const scratch = await scratchDatabase("plotbank_size");
  const database = await openDatabase({ url: scratch.url });
  try {
    await migrateDatabase(database);
    const size = async () =>
      Number((await queryRows<{ b: string }>(database.db, sql`select pg_database_size(current_database()) as b`))[0]!.b);
    const empty = await size();
    const { ctx } = createApp({
      database,
      config: loadConfig({ NODE_ENV: "test", PLOTBANK_DEMO: "auto" } as NodeJS.ProcessEnv),
      webDistDir: false,
    });
    await seedDemo(ctx);
    await ctx.jobs.drain();
    await ctx.jobs.stop();
    await database.db.execute(sql`vacuum analyze`);
    const full = await size();
    const [sy] = await queryRows<{ n: string }>(database.db, sql`select count(*) as n from site_years`);
    const [rows] = await queryRows<{ n: string }>(database.db, sql`select sum(n_live_tup) as n from pg_stat_user_tables`);
    const siteYears = Number(sy!.n);
    const per = 1000 / siteYears;
    console.log(
      [
        `| measure | value |`,
        `|---|---|`,
        `| demo site-years | ${siteYears} |`,
        `| rows, all tables | ${rows!.n} (${Math.round(Number(rows!.n) * per)} per 1,000 site-years) |`,
        `| database size over the empty migrated one | ${((full - empty) / 1048576).toFixed(1)} MB (${(((full - empty) / 1048576) * per).toFixed(1)} MB per 1,000 site-years) |`,
      ].join("\n"),
    );
  } finally {
    await database.close();
    await scratch.drop();
  }
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
