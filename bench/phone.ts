import { execFileSync } from "node:child_process";
import { mkdirSync, mkdtempSync, rmSync, symlinkSync, writeFileSync } from "node:fs";
import type { Server } from "node:http";
import type { AddressInfo } from "node:net";
import { loadavg, tmpdir } from "node:os";
import path from "node:path";
import compression from "compression";
import express from "express";
import type { Browser } from "playwright-core";
import { launchBrowser } from "../tests/browser/harness";
import { startServerProcess } from "./server-process";

/**
 * A phone on a weak rural link: Chromium throttled to 1.6 Mbit/s down, 150 ms latency (CDP
 * Network.emulateNetworkConditions), cache empty, opens Plotbank's Evidence screen with filters in the address and
 * waits for the pooled estimate; next to it, a bare Expo Router web export built by this script into a temp dir from
 * the same node_modules (one screen with one line of text, not a product), served gzipped by Express, and timed to
 * its text. The two alternate, three runs each, in one run of this script. Reports the times, the ratio of the
 * medians, and Plotbank's bytes by kind before the estimate. Build Plotbank first (`npm run build:web`).
 * Loopback only. Run: node --import tsx bench/phone.ts
 */

const root = path.resolve(__dirname, "..");
const filters = "/?crop=soybean&nutrient=P&placement=2x2-band&soilTestClass=low";
const throttle = { offline: false, latency: 150, downloadThroughput: (1.6e6 / 8) * 0.9, uploadThroughput: (750e3 / 8) * 0.9 };
const runs = 3;
const goals = { ratio: 1.3, bytesKb: 700 };

/** A bare Expo Router app: a root layout and one screen with one line, exported for the web like Plotbank. */
function buildBareApp(): string {
  const dir = mkdtempSync(path.join(tmpdir(), "plotbank-bare-"));
  symlinkSync(path.join(root, "node_modules"), path.join(dir, "node_modules"), "dir");
  writeFileSync(
    path.join(dir, "package.json"),
    JSON.stringify({ name: "bare", version: "1.0.0", main: "expo-router/entry", private: true }),
  );
  writeFileSync(
    path.join(dir, "app.json"),
    JSON.stringify({
      expo: { name: "bare", slug: "bare", scheme: "bare", web: { bundler: "metro", output: "single" }, plugins: ["expo-router"] },
    }),
  );
  writeFileSync(path.join(dir, "tsconfig.json"), JSON.stringify({ extends: "expo/tsconfig.base" }));
  mkdirSync(path.join(dir, "app"));
  writeFileSync(
    path.join(dir, "app/_layout.tsx"),
    `import { Stack } from "expo-router";\nexport default function Layout() { return <Stack screenOptions={{ headerShown: false }} />; }\n`,
  );
  writeFileSync(
    path.join(dir, "app/index.tsx"),
    `import { Text, View } from "react-native";\nexport default function Home() { return <View><Text>Bare first screen</Text></View>; }\n`,
  );
  execFileSync(path.join(root, "node_modules/.bin/expo"), ["export", "--platform", "web", "--output-dir", "dist"], {
    cwd: dir,
    stdio: "inherit",
    env: { ...process.env, EXPO_OFFLINE: "1", EXPO_NO_TELEMETRY: "1", EXPO_UNSTABLE_HEADLESS: "1", CI: "1" },
  });
  return dir;
}

async function serveBare(dist: string): Promise<{ url: string; server: Server }> {
  const app = express();
  app.use(compression({ threshold: 1024 }));
  app.use(express.static(dist));
  const server = await new Promise<Server>((resolve) => {
    const s = app.listen(0, "127.0.0.1", () => resolve(s));
  });
  return { url: `http://127.0.0.1:${(server.address() as AddressInfo).port}`, server };
}

interface Visit {
  ms: number;
  bytes: Record<string, number>;
}

/** One throttled visit with an empty cache: ms from navigation to the selector, and bytes received by kind until then. */
async function visit(browser: Browser, url: string, done: string): Promise<Visit> {
  const context = await browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });
  const page = await context.newPage();
  const cdp = await context.newCDPSession(page);
  await cdp.send("Network.enable");
  await cdp.send("Network.setCacheDisabled", { cacheDisabled: true });
  await cdp.send("Network.emulateNetworkConditions", throttle);
  const kinds = new Map<string, string>();
  const bytes: Record<string, number> = {};
  let counting = true;
  cdp.on("Network.responseReceived", (e: { requestId: string; type: string; response: { url: string } }) => {
    const type = e.response.url.includes("/api/") ? "API" : e.type;
    kinds.set(e.requestId, type);
  });
  // Bytes on the wire (headers included, compressed as sent) of each response finished before the estimate.
  cdp.on("Network.loadingFinished", (e: { requestId: string; encodedDataLength: number }) => {
    if (!counting) return;
    const kind = kinds.get(e.requestId) ?? "Other";
    bytes[kind] = (bytes[kind] ?? 0) + e.encodedDataLength;
  });
  const start = Date.now();
  await page.goto(url, { waitUntil: "commit" });
  await page.locator(done).first().waitFor({ timeout: 120_000 });
  const ms = Date.now() - start;
  counting = false;
  await context.close();
  return { ms, bytes };
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
const kb = (n: number) => `${(n / 1024).toFixed(0)} KB`;

async function main() {
  const load = loadavg().map((l) => l.toFixed(1));
  console.log(`load average at start: ${load.join(" ")}`);
  const bareDir = buildBareApp();
  const bare = await serveBare(path.join(bareDir, "dist"));
  const plotbank = await startServerProcess({ port: 40000 + Math.floor(Math.random() * 20000) });
  const browser = await launchBrowser();
  const results = { plotbank: [] as Visit[], bare: [] as Visit[] };
  try {
    // Warm both servers once (the first analysis reads from a cold database), unthrottled and uncounted.
    await (await fetch(`${plotbank.url}/api/v1/analyses/meta?crop=soybean&groupBy=soilTestClass&nutrient=P`)).arrayBuffer();
    for (let i = 0; i < runs; i++) {
      results.plotbank.push(await visit(browser, `${plotbank.url}${filters}`, '[data-testid="pooled-estimate"]'));
      results.bare.push(await visit(browser, `${bare.url}/`, "text=Bare first screen"));
      console.log(`run ${i + 1}: Plotbank ${results.plotbank.at(-1)!.ms} ms, bare ${results.bare.at(-1)!.ms} ms`);
    }
  } finally {
    await browser.close();
    await plotbank.stop();
    await new Promise<void>((resolve) => bare.server.close(() => resolve()));
    rmSync(bareDir, { recursive: true, force: true });
  }
  const p = median(results.plotbank.map((v) => v.ms));
  const b = median(results.bare.map((v) => v.ms));
  const last = results.plotbank.at(-1)!.bytes;
  const total = Object.values(last).reduce((a, n) => a + n, 0);
  const ratio = p / b;
  console.log(
    [
      "",
      "| | runs (ms) | median |",
      "|---|---|---|",
      `| Plotbank \`${filters}\`, to the pooled estimate | ${results.plotbank.map((v) => v.ms).join(", ")} | **${(p / 1000).toFixed(2)} s** |`,
      `| bare Expo Router export, to its first screen | ${results.bare.map((v) => v.ms).join(", ")} | ${(b / 1000).toFixed(2)} s |`,
      `| ratio | | **${ratio.toFixed(2)}×** (goal ≤ ${goals.ratio}×: ${ratio <= goals.ratio ? "met" : "missed"}) |`,
      "",
      `Plotbank's bytes before the estimate (last run, on the wire): ${Object.entries(last)
        .map(([k, n]) => `${k} ${kb(n)}`)
        .join(", ")}; total **${kb(total)}** (goal ≤ ${goals.bytesKb} KB: ${total / 1024 <= goals.bytesKb ? "met" : "missed"}).`,
      `Load average at start ${load.join(" ")}, at the end ${loadavg()
        .map((l) => l.toFixed(1))
        .join(" ")} (2 cores).`,
    ].join("\n"),
  );
  const out = path.resolve(__dirname, "out");
  mkdirSync(out, { recursive: true });
  writeFileSync(
    path.join(out, "phone.json"),
    JSON.stringify({ at: new Date().toISOString(), throttle, load, results, ratio, total }, null, 2),
  );
}

void main().catch((err: unknown) => {
  console.error(err);
  process.exit(1);
});
