import { execFileSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";

// Links are type-checked against the routes in app/ (expo-router typed routes). The declarations are committed so a
// clean clone type-checks without starting Expo; this fails when a route was added, renamed or removed without
// `node --import tsx scripts/write-typed-routes.ts`.
const root = path.resolve(__dirname, "../..");

describe("typed routes", () => {
  it("are switched on in app.json", () => {
    const app = JSON.parse(readFileSync(path.join(root, "app.json"), "utf8")) as { expo: { experiments?: { typedRoutes?: boolean } } };
    expect(app.expo.experiments?.typedRoutes).toBe(true);
  });

  it("types/generated/router.d.ts is what the generator writes for app/ today", () => {
    const out = mkdtempSync(path.join(tmpdir(), "plotbank-routes-"));
    try {
      execFileSync(process.execPath, ["--import", "tsx", "scripts/write-typed-routes.ts", out], { cwd: root, stdio: "pipe" });
      const fresh = readFileSync(path.join(out, "router.d.ts"), "utf8");
      expect(fresh).toContain("/curate/versions/${Router.SingleRoutePart<T>}");
      expect(readFileSync(path.join(root, "types/generated/router.d.ts"), "utf8")).toBe(fresh);
    } finally {
      rmSync(out, { recursive: true, force: true });
    }
  }, 60_000);
});
