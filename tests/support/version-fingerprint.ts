import { createHash } from "node:crypto";
import { sql } from "drizzle-orm";
import type { AppContext } from "@/server/context";

const versionTables = [
  "sites",
  "site_years",
  "soil_tests",
  "treatments",
  "applications",
  "plots",
  "summary_means",
  "responses",
  "uploads",
  "custom_values",
];

/** A fingerprint of everything a version holds: its own row and every row of its tables, ids included. */
export async function versionFingerprint(ctx: AppContext, versionId: string): Promise<string> {
  const hash = createHash("sha256");
  const v = await ctx.db.execute(sql`select row_to_json(v)::text as j from versions v where id = ${versionId}`);
  hash.update((v as unknown as { rows: { j: string }[] }).rows[0]!.j);
  for (const table of versionTables) {
    const r = await ctx.db.execute(
      sql.raw(
        `select coalesce(string_agg(row_to_json(t)::text, E'\\n' order by t.id), '') as j from ${table} t where version_id = '${versionId}'`,
      ),
    );
    hash.update(`${table}:${(r as unknown as { rows: { j: string }[] }).rows[0]!.j}`);
  }
  return hash.digest("hex");
}
