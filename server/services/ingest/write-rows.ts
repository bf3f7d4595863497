import { sql } from "drizzle-orm";
import type { PgTable } from "drizzle-orm/pg-core";
import type { Database, Db } from "@/db/client";
import { columnNames, tableName, type ColumnKey } from "@/db/columns";
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

/** Lines per text chunk: a Blob of a few hundred large strings reads far faster than one of a million small ones. */
const LINES_PER_CHUNK = 2000;
const COPY_BATCH = 100_000;

/**
 * Rows of one table on their way in. When they will go in by COPY (PGlite) each row is turned into its CSV line as it
 * arrives and lines are joined into chunks, so a million-row file holds a few hundred strings rather than a million
 * arrays of boxed values; PostgreSQL's multi-row INSERT takes the arrays.
 */
export class RowBuffer {
  private readonly chunks: string[] = [];
  private lines: string[] = [];
  private readonly arrays: Cell[][] = [];
  private rows = 0;

  constructor(readonly asCsv: boolean) {}

  push(row: Cell[]): void {
    this.rows++;
    if (!this.asCsv) {
      this.arrays.push(row);
      return;
    }
    let line = csvCell(row[0] ?? null);
    for (let i = 1; i < row.length; i++) line += "," + csvCell(row[i] ?? null);
    this.lines.push(line);
    if (this.lines.length === LINES_PER_CHUNK) this.seal();
  }

  get length(): number {
    return this.rows;
  }

  /** The CSV text in chunks of LINES_PER_CHUNK lines. */
  csvChunks(): string[] {
    this.seal();
    return this.chunks;
  }

  /** The rows as arrays (only when not kept as CSV). */
  rowArrays(): readonly Cell[][] {
    if (this.asCsv) throw new Error("RowBuffer: rows were kept as CSV text");
    return this.arrays;
  }

  private seal(): void {
    if (this.lines.length === 0) return;
    this.chunks.push(this.lines.join("\n") + "\n");
    this.lines = [];
  }
}

/**
 * Inserts rows into a table: PGlite's COPY FROM a blob in large batches (several times faster than INSERT there),
 * multi-row INSERTs on PostgreSQL. `keys` names the row's columns in order by their db/schema property names; the SQL
 * names come from the Drizzle table, never from user input.
 */
export async function insertRows<T extends PgTable>(
  database: Database,
  tx: Tx,
  into: T,
  keys: readonly ColumnKey<T>[],
  input: readonly Cell[][] | RowBuffer,
): Promise<void> {
  if (input.length === 0) return;
  const table = tableName(into);
  const columns = columnNames(into, keys);
  const client = database.kind === "pglite" ? pgliteClient(tx) : null;
  if (client) {
    let buffer = input instanceof RowBuffer ? input : null;
    if (!buffer?.asCsv) {
      buffer = new RowBuffer(true);
      for (const row of input instanceof RowBuffer ? input.rowArrays() : input) buffer.push(row);
    }
    const chunks = buffer.csvChunks();
    const perCopy = COPY_BATCH / LINES_PER_CHUNK;
    for (let start = 0; start < chunks.length; start += perCopy) {
      const blob = new Blob(chunks.slice(start, start + perCopy));
      await client.query(`COPY ${table} (${columns.join(", ")}) FROM '/dev/blob' WITH (FORMAT csv)`, [], { blob });
    }
    return;
  }
  const rows = input instanceof RowBuffer ? input.rowArrays() : input;
  const perBatch = Math.max(1, Math.floor(30_000 / columns.length));
  for (let start = 0; start < rows.length; start += perBatch) {
    const batch = rows.slice(start, start + perBatch);
    const values = sql.join(
      batch.map(
        (row) =>
          sql`(${sql.join(
            row.map((v) => sql`${v}`),
            sql`, `,
          )})`,
      ),
      sql`, `,
    );
    await tx.execute(sql`INSERT INTO ${sql.raw(table)} (${sql.raw(columns.join(", "))}) VALUES ${values}`);
  }
}
