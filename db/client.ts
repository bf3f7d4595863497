import { mkdirSync, readFileSync } from "node:fs";
import { sql, type SQL } from "drizzle-orm";
import path from "node:path";
import { PGlite } from "@electric-sql/pglite";
import { drizzle as drizzlePglite } from "drizzle-orm/pglite";
import { migrate as migratePglite } from "drizzle-orm/pglite/migrator";
import { drizzle as drizzlePg } from "drizzle-orm/node-postgres";
import { migrate as migratePg } from "drizzle-orm/node-postgres/migrator";
import type { PgDatabase, PgQueryResultHKT } from "drizzle-orm/pg-core";
import pg from "pg";
import * as schema from "./schema";

export type Db = PgDatabase<PgQueryResultHKT, typeof schema>;

export interface Database {
  db: Db;
  kind: "pglite" | "postgres";
  /** Present for PGlite only: the embedded instance (dump/restore, raw COPY in benchmarks). */
  pglite?: PGlite;
  close(): Promise<void>;
}

export interface DatabaseOptions {
  /** A PostgreSQL connection string; when set, Plotbank talks to that server instead of PGlite. */
  url?: string;
  /** PGlite data directory; "memory://" (or undefined with memory: true) keeps everything in memory. */
  dataDir?: string;
  /** A PGlite data-dir tarball to start from (tests clone one migrated instance this way). */
  loadDataDir?: Blob | File;
}

const migrationsFolder = path.resolve(__dirname, "../drizzle");

export async function openDatabase(options: DatabaseOptions = {}): Promise<Database> {
  if (options.url) {
    const pool = new pg.Pool({ connectionString: options.url, max: 10 });
    // An idle pooled connection can be cut by the server (a restart, an administrator, a dropped database). pg then
    // emits "error" on the pool and drops that client; unhandled, the event would end the whole process.
    pool.on("error", (error: Error & { code?: string }) => {
      if (error.code !== "57P01") console.error(`PostgreSQL: an idle connection failed and was dropped: ${error.message}`);
    });
    const db = drizzlePg(pool, { schema }) as unknown as Db;
    return { db, kind: "postgres", close: () => pool.end() };
  }
  const dataDir = options.dataDir ?? "memory://";
  if (!dataDir.startsWith("memory://")) mkdirSync(dataDir, { recursive: true });
  const pglite = new PGlite(dataDir, options.loadDataDir ? { loadDataDir: options.loadDataDir } : {});
  await pglite.waitReady;
  const db = drizzlePglite(pglite, { schema }) as unknown as Db;
  return { db, kind: "pglite", pglite, close: () => pglite.close() };
}

export async function migrateDatabase(database: Database): Promise<void> {
  if (database.kind === "postgres") {
    await migratePg(database.db as never, { migrationsFolder });
  } else {
    await migratePglite(database.db as never, { migrationsFolder });
  }
}

/**
 * Every migration in drizzle/ has been applied: the newest one recorded in the database is at least as new as the
 * newest this code ships (drizzle records each migration's journal time as created_at).
 */
export async function migrationsApplied(database: Database): Promise<boolean> {
  const journal = JSON.parse(readFileSync(path.join(migrationsFolder, "meta/_journal.json"), "utf8")) as { entries: { when: number }[] };
  const newest = Math.max(...journal.entries.map((e) => e.when));
  try {
    const [row] = await queryRows<{ newest: string | number | null }>(
      database.db,
      sql`select max(created_at) as newest from drizzle.__drizzle_migrations`,
    );
    return Number(row?.newest ?? 0) >= newest;
  } catch {
    return false; // no migration table: nothing was ever applied
  }
}

/** The rows of a raw SQL query, from PGlite and node-postgres alike (both answer `{ rows }`). */
export async function queryRows<T>(db: Db, query: SQL): Promise<T[]> {
  const result = (await db.execute(query)) as unknown as { rows: T[] };
  return result.rows;
}

/** A timer that alone does not keep the process alive (tests, shutdown). */
export function unrefTimer<T>(timer: T): T {
  (timer as unknown as { unref?: () => void }).unref?.();
  return timer;
}
