import { sql } from "drizzle-orm";
import type { Database, Db } from "@/db/client";
import type { Cell } from "./field-values";

/** A drizzle transaction (or the db itself) as the ingest passes it around. */
export type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0] | Db;

interface RawQuery {
  query(sql: string, params?: unknown[], options?: { blob?: Blob }): Promise<unknown>;
}

/** The PGlite transaction under a drizzle transaction, for COPY FROM '/dev/blob'. */
function pgliteClient(tx: Tx): RawQuery | null {
  const client = (tx as unknown as { session?: { client?: RawQuery } }).session?.client;
  return client && typeof client.query === "function" ? client : null;
}

function csvCell(v: Cell): string {
  if (v === null) return "";
  if (typeof v === "string") return `"${v.replaceAll('"', '""')}"`;
  return String(v);
}

const COPY_BATCH = 100_000;

/**
 * Inserts rows into a table: PGlite's COPY FROM a blob in large batches (several times faster than INSERT there),
 * multi-row INSERTs on PostgreSQL. Column names are our own constants, never user input.
 */
export async function insertRows(database: Database, tx: Tx, table: string, columns: readonly string[], rows: readonly Cell[][]): Promise<void> {
  if (rows.length === 0) return;
  const client = database.kind === "pglite" ? pgliteClient(tx) : null;
  if (client) {
    for (let start = 0; start < rows.length; start += COPY_BATCH) {
      const parts: string[] = [];
      const end = Math.min(rows.length, start + COPY_BATCH);
      for (let i = start; i < end; i++) parts.push(rows[i]!.map(csvCell).join(",") + "\n");
      await client.query(`COPY ${table} (${columns.join(", ")}) FROM '/dev/blob' WITH (FORMAT csv)`, [], { blob: new Blob(parts) });
    }
    return;
  }
  const perBatch = Math.max(1, Math.floor(30_000 / columns.length));
  for (let start = 0; start < rows.length; start += perBatch) {
    const batch = rows.slice(start, start + perBatch);
    const values = sql.join(
      batch.map((row) => sql`(${sql.join(row.map((v) => sql`${v}`), sql`, `)})`),
      sql`, `,
    );
    await tx.execute(sql`INSERT INTO ${sql.raw(table)} (${sql.raw(columns.join(", "))}) VALUES ${values}`);
  }
}
