import { createServer } from "node:net";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { desktop, launchBrowser, phone, startServer, type RunningServer } from "./harness";

/**
 * Lighthouse (pinned in package.json; 12.2.3 is the last line that runs on Node 20) audits the main public pages
 * for search engines (SEO) and best practices, in the same Debian Chromium the other browser tests use, reached
 * over its DevTools port, offline. Both categories must score 1.0: every audit in them is a yes/no check of
 * something the server or the app controls (a title and description, status 200, a valid robots.txt that allows
 * crawling, descriptive link text, crawlable anchors, image alt text, no console errors, no deprecated APIs, a
 * doctype and charset, HTTPS or loopback, …), so anything below 1.0 is a page that got worse.
 */

type Lighthouse = typeof import("lighthouse").default;

const pages = [
  ["Evidence", "/?crop=soybean&nutrient=P&placement=2x2-band"],
  ["Datasets", "/datasets"],
  ["a dataset page", "/datasets/soybean-starter-p-placement"],
  ["a version's page (where its DOI lands)", "/datasets/soybean-starter-p-placement?version=1.0.0"],
  ["Developers", "/developers"],
  ["Sign in", "/sign-in"],
] as const;

const formFactors = [
  ["phone", { formFactor: "mobile", screenEmulation: { mobile: true, ...phone, deviceScaleFactor: 2, disabled: false } }],
  ["desktop", { formFactor: "desktop", screenEmulation: { mobile: false, ...desktop, deviceScaleFactor: 1, disabled: false } }],
] as const;

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.on("error", reject);
    s.listen(0, "127.0.0.1", () => {
      const { port } = s.address() as { port: number };
      s.close(() => resolve(port));
    });
  });
}

let server: RunningServer;
let browser: Browser;
let port: number;
let lighthouse: Lighthouse;
beforeAll(async () => {
  server = await startServer();
  port = await freePort();
  browser = await launchBrowser([`--remote-debugging-port=${port}`]);
  lighthouse = (await import("lighthouse")).default;
});
afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

// Every page at phone size; at desktop size the pages whose layout changes most (side filters, side navigation).
const runs = formFactors.flatMap(([size, settings]) =>
  pages
    .filter(([name]) => size === "phone" || ["Evidence", "a dataset page", "Developers"].includes(name))
    .map(([name, path]) => [`${name} at ${size} size`, path, settings] as const),
);

describe("Lighthouse", () => {
  it.each(runs)("%s scores 1.0 on SEO and best practices", async (_name, path, settings) => {
    const result = await lighthouse(`${server.url}${path}`, {
      port,
      output: "json",
      logLevel: "error",
      onlyCategories: ["seo", "best-practices"],
      formFactor: settings.formFactor,
      screenEmulation: settings.screenEmulation,
      // Only SEO and best practices run: no performance metrics, so no network or CPU throttling to simulate.
      throttlingMethod: "provided",
    });
    const lhr = result!.lhr;
    expect(lhr.runtimeError, "Lighthouse ran").toBeUndefined();
    const failing = Object.values(lhr.categories).flatMap((c) =>
      c.auditRefs
        .filter((ref) => ref.weight > 0 && (lhr.audits[ref.id]?.score ?? 1) < 1)
        .map(
          (ref) => `${c.id}: ${ref.id} (${lhr.audits[ref.id]!.title}) ${JSON.stringify(lhr.audits[ref.id]!.details ?? {}).slice(0, 300)}`,
        ),
    );
    expect(failing).toEqual([]);
    expect({ seo: lhr.categories.seo?.score, bestPractices: lhr.categories["best-practices"]?.score }).toEqual({
      seo: 1,
      bestPractices: 1,
    });
  });
});
