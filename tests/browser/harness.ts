import { existsSync, mkdirSync, readFileSync } from "node:fs";
import type { AddressInfo } from "node:net";
import path from "node:path";
import { chromium, type Browser, type BrowserContext, type Page } from "playwright-core";
import { migrateDatabase, openDatabase, type Database } from "@/db/client";
import { createApp } from "@/server/app";
import { loadConfig, type AppConfig } from "@/server/config";
import type { AppContext } from "@/server/context";
import { drainDoiQueue } from "@/server/services/citation/doi-queue";
import { webDistDir } from "@/server/web";

export const artifactsDir = path.resolve(__dirname, "../artifacts");

export interface RunningServer {
  url: string;
  ctx: AppContext;
  database: Database;
  stop(): Promise<void>;
}

/**
 * The real product on a loopback port: the exported web app, the API and a fresh in-memory database with the demo
 * data loaded through the same path `npm start` uses.
 */
export async function startServer(options: { demo?: boolean; config?: Partial<AppConfig> } = {}): Promise<RunningServer> {
  if (!existsSync(path.join(webDistDir, "index.html"))) throw new Error("dist/ is missing: run `npm run build:web` first");
  const database = await openDatabase();
  await migrateDatabase(database);
  const config = loadConfig({ NODE_ENV: "test", PLOTBANK_DEMO: "off" } as NodeJS.ProcessEnv, {
    // Browser tests click quickly through many requests; the anonymous quota is tested on its own in the API tests.
    anonRatePerMinute: 10_000,
    tokenRatePerMinute: 10_000,
    ...options.config,
  });
  const { app, ctx } = createApp({ database, config });
  const server = await new Promise<import("node:http").Server>((resolve) => {
    const s = app.listen(0, "127.0.0.1", () => resolve(s));
  });
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  ctx.config.publicUrl = url;
  if (options.demo !== false && existsSync(path.resolve(__dirname, "../../datasets/index.ts"))) {
    const demo = (await import("@/datasets")) as { seedDemo?: (ctx: AppContext) => Promise<unknown> };
    if (demo.seedDemo) await demo.seedDemo(ctx);
  }
  return {
    url,
    ctx,
    database,
    async stop() {
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await drainDoiQueue(ctx);
      await database.close();
    },
  };
}

/** Debian's Chromium, headless, with the flags that keep it off the network (it has none here). */
export async function launchBrowser(extraArgs: string[] = []): Promise<Browser> {
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    headless: true,
    args: [
      "--no-sandbox",
      "--disable-gpu",
      "--disable-quic",
      "--no-first-run",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
      "--disable-dev-shm-usage",
      ...extraArgs,
    ],
  });
}

export const phone = { width: 390, height: 844 } as const;
export const desktop = { width: 1280, height: 800 } as const;

export async function newContext(browser: Browser, viewport: { width: number; height: number }): Promise<BrowserContext> {
  return browser.newContext({ viewport, deviceScaleFactor: 1, isMobile: viewport.width < 600, hasTouch: viewport.width < 600 });
}

/** Save a screenshot as a test artefact (tests/artifacts/NAME.png). */
export async function screenshot(page: Page, name: string) {
  mkdirSync(artifactsDir, { recursive: true });
  await page.screenshot({ path: path.join(artifactsDir, `${name}.png`), fullPage: true });
}

/** Fails the test on any uncaught page error or failed request to our own server. */
export function watchPage(page: Page): string[] {
  const problems: string[] = [];
  page.on("pageerror", (e) => problems.push(`page error: ${e.message}`));
  // Chromium logs every 4xx and 5xx answer as a console error; a visitor's "who am I" is a 200, so none is expected.
  page.on("console", (m) => {
    if (m.type() === "error") problems.push(`console error: ${m.text()}`);
  });
  return problems;
}

const axeSource = readFileSync(require.resolve("axe-core/axe.min.js"), "utf8");
export const axeVersion = (JSON.parse(readFileSync(require.resolve("axe-core/package.json"), "utf8")) as { version: string }).version;

interface Violation {
  id: string;
  impact: string | null;
  nodes: { target: string[]; html: string }[];
}

/** axe-core's violations of its default rules on the rendered page (WCAG 2.0–2.2 A/AA and best practices). */
export async function axeViolations(page: Page): Promise<Violation[]> {
  // Evaluated over the DevTools protocol, not added as a <script>: the page's Content-Security-Policy stays as served.
  await page.evaluate(axeSource);
  return page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (c: Document, o: object) => Promise<{ violations: Violation[] }> } }).axe;
    const result = await axe.run(document, { resultTypes: ["violations"] });
    return result.violations.map((v) => ({
      id: v.id,
      impact: v.impact,
      nodes: v.nodes.map((n) => ({ target: n.target, html: n.html.slice(0, 160) })),
    }));
  });
}
