import { getTableName, is, sql } from "drizzle-orm";
import { PgTable } from "drizzle-orm/pg-core";
import type { Db } from "@/db/client";
import * as schema from "@/db/schema";

/** Every application table, for whole-database comparisons: the tables db/schema declares. */
const applicationTables: readonly string[] = (Object.values(schema) as unknown[])
  .filter((value): value is PgTable => is(value, PgTable))
  .map((table) => getTableName(table));

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
