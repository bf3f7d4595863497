import { spawnSync } from "node:child_process";
import { cpSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";

// The committed migrations in drizzle/ are what every database runs; db/schema is what the code believes. If a schema
// change was committed without `npm run db:generate`, the two disagree and only a real database finds out. This asks
// drizzle-kit (offline, about a second) what it would generate against a copy of drizzle/.
const root = path.resolve(__dirname, "../..");
const work = mkdtempSync(path.join(tmpdir(), "plotbank-drift-"));
afterAll(() => rmSync(work, { recursive: true, force: true }));

/** The files `drizzle-kit generate` would add to this migrations folder (a copy; the real one is never written). */
function wouldGenerate(migrations: string): { added: string[]; sql: string } {
  const before = new Set(readdirSync(migrations, { recursive: true }).map(String));
  const run = spawnSync(
    process.execPath,
    // drizzle-kit reads --out relative to the working folder, so the copy is named by a relative path.
    [
      path.join(root, "node_modules/drizzle-kit/bin.cjs"),
      "generate",
      "--dialect",
      "postgresql",
      "--schema",
      "./db/schema/index.ts",
      "--out",
      path.relative(root, migrations),
    ],
    { cwd: root, encoding: "utf8", timeout: 60_000 },
  );
  expect(run.status, `drizzle-kit generate failed:\n${run.stdout}\n${run.stderr}`).toBe(0);
  const added = readdirSync(migrations, { recursive: true })
    .map(String)
    .filter((f) => !before.has(f))
    .sort();
  const sql = added
    .filter((f) => f.endsWith(".sql"))
    .map((f) => readFileSync(path.join(migrations, f), "utf8"))
    .join("\n");
  return { added, sql };
}

describe("committed migrations", () => {
  it("match db/schema: drizzle-kit would generate nothing new", () => {
    const copy = path.join(work, "committed");
    cpSync(path.join(root, "drizzle"), copy, { recursive: true });
    const { added, sql } = wouldGenerate(copy);
    expect(
      added,
      `db/schema has changes without a migration; run \`npm run db:generate\` and commit drizzle/. It would write:\n${sql}`,
    ).toEqual([]);
  });

  it("the check sees missing migrations: with none at all it would write the whole schema", () => {
    const empty = path.join(work, "empty");
    mkdirSync(empty);
    const { added, sql } = wouldGenerate(empty);
    expect(added.filter((f) => f.endsWith(".sql"))).toHaveLength(1);
    expect(sql).toContain('CREATE TABLE "datasets"');
  });
});
