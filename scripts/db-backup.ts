import path from "node:path";
import { backup, restore } from "@/server/maintenance/backup";

/**
 * npm run db:backup -- FILE            (PGlite at PLOTBANK_DATA_DIR, or DATABASE_URL with pg_dump)
 * npm run db:restore -- FILE DATA_DIR  (into a fresh folder; or DATABASE_URL with pg_restore)
 */
async function main() {
  const [command, file, target] = process.argv.slice(2);
  const url = process.env.DATABASE_URL || undefined;
  const dataDir = process.env.PLOTBANK_DATA_DIR ?? path.resolve("data/pglite");
  if (!file || (command !== "backup" && command !== "restore")) {
    console.error("usage: db-backup.ts backup FILE | restore FILE [DATA_DIR]");
    process.exit(2);
  }
  if (command === "backup") {
    const { bytes } = await backup({ dataDir, url, file });
    console.log(`backed up ${url ? "the PostgreSQL database" : dataDir} to ${file} (${bytes} bytes)`);
  } else {
    await restore({ dataDir: url ? undefined : (target ?? dataDir), url, file });
    console.log(`restored ${file} into ${url ? "the PostgreSQL database" : (target ?? dataDir)}`);
  }
}
main().catch((e) => {
  console.error(e instanceof Error ? e.message : e);
  process.exit(1);
});
