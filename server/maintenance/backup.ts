import { spawnSync } from "node:child_process";
import { existsSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import { openDatabase } from "@/db/client";

/**
 * Back up the embedded database as a gzipped tarball of its data directory (PGlite's own dump facility), or a
 * PostgreSQL server with pg_dump's custom format. The server must be stopped for a PGlite backup: PGlite is a
 * single-process database.
 */
export async function backup(options: { dataDir?: string; url?: string; file: string }): Promise<{ bytes: number }> {
  if (options.url) {
    const run = spawnSync("pg_dump", ["--format=custom", `--file=${options.file}`, options.url], { stdio: "inherit" });
    if (run.status !== 0) throw new Error("pg_dump failed");
    return { bytes: readFileSync(options.file).length };
  }
  if (!options.dataDir || !existsSync(options.dataDir)) throw new Error(`No database folder at ${options.dataDir}`);
  const database = await openDatabase({ dataDir: options.dataDir });
  try {
    const dump = await database.pglite!.dumpDataDir("gzip");
    const bytes = Buffer.from(await dump.arrayBuffer());
    writeFileSync(options.file, bytes);
    return { bytes: bytes.length };
  } finally {
    await database.close();
  }
}

/** Restore a backup into a fresh, empty data directory (or, with a URL, into an empty PostgreSQL database). */
export async function restore(options: { dataDir?: string; url?: string; file: string }): Promise<void> {
  if (options.url) {
    const run = spawnSync("pg_restore", ["--no-owner", `--dbname=${options.url}`, options.file], { stdio: "inherit" });
    if (run.status !== 0) throw new Error("pg_restore failed");
    return;
  }
  if (!options.dataDir) throw new Error("Name the folder to restore into");
  if (existsSync(options.dataDir) && readdirSync(options.dataDir).length > 0) {
    throw new Error(`${options.dataDir} is not empty; restore into a fresh folder so nothing is overwritten`);
  }
  const blob = new Blob([readFileSync(options.file)], { type: "application/x-gzip" });
  const database = await openDatabase({ dataDir: options.dataDir, loadDataDir: blob });
  await database.close();
}
