import { existsSync, mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { migrateDatabase, openDatabase } from "@/db/client";
import { loadConfig } from "@/server/config";
import { createApp } from "@/server/app";
import { backup, restore } from "@/server/maintenance/backup";
import { createUser } from "@/server/services/users";
import { tableChecksums } from "@/tests/support/table-checksums";

const work = mkdtempSync(path.join(tmpdir(), "plotbank-backup-"));
afterAll(() => rmSync(work, { recursive: true, force: true }));

describe.skipIf(!!process.env.PLOTBANK_TEST_DATABASE_URL)("backup and restore of the embedded database", () => {
  it("round-trips the demo data into a fresh folder, table for table", async () => {
    const source = path.join(work, "source");
    const database = await openDatabase({ dataDir: source });
    await migrateDatabase(database);
    const config = loadConfig({ NODE_ENV: "test", PLOTBANK_DEMO: "off" } as NodeJS.ProcessEnv);
    const { ctx } = createApp({ database, config, webDistDir: false });
    const demoModule = path.resolve(__dirname, "../../datasets/index.ts");
    if (existsSync(demoModule)) {
      const demo = (await import(demoModule)) as { seedDemo?: (c: typeof ctx) => Promise<unknown> };
      await demo.seedDemo?.(ctx);
    }
    await createUser(ctx.db, {
      email: "backup-check@plotbank.test",
      displayName: "Backup check",
      password: "a-long-enough-pass",
      verified: true,
    });
    const before = await tableChecksums(ctx.db);
    await database.close();

    const file = path.join(work, "plotbank.tar.gz");
    const { bytes } = await backup({ dataDir: source, file });
    expect(bytes).toBeGreaterThan(1000);

    const target = path.join(work, "restored");
    await restore({ dataDir: target, file });
    const restored = await openDatabase({ dataDir: target });
    // Start-up migrations on a restored database are a no-op.
    await migrateDatabase(restored);
    const after = await tableChecksums(restored.db);
    await restored.close();
    expect(after).toEqual(before);
    expect(Number(after.users!.split(":")[0])).toBeGreaterThan(0);

    await expect(restore({ dataDir: target, file })).rejects.toThrow(/not empty/);
  });
});
