import { sql } from "drizzle-orm";
import type { Db } from "@/db/client";

/** Every application table, for whole-database comparisons. */
export const applicationTables = [
  "users", "sessions", "email_tokens", "api_tokens", "outbox", "role_changes", "saved_queries",
  "datasets", "dataset_editors", "follows", "versions", "uploads", "validation_reports",
  "sites", "site_years", "soil_tests", "treatments", "applications", "plots", "summary_means", "responses",
] as const;

/** An order-independent checksum of each table's rows (md5 over the rows' text, sorted). */
export async function tableChecksums(db: Db, tables: readonly string[] = applicationTables): Promise<Record<string, string>> {
  const out: Record<string, string> = {};
  for (const table of tables) {
    const result = await db.execute(
      sql.raw(`SELECT count(*)::int AS n, coalesce(md5(string_agg(t::text, '|' ORDER BY t::text)), '') AS h FROM ${table} t`),
    );
    const row = (result as unknown as { rows: { n: number | string; h: string }[] }).rows[0]!;
    out[table] = `${Number(row.n)}:${row.h}`;
  }
  return out;
}
