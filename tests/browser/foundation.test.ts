import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { datasetList } from "@/schemas/dataset";
import { desktop, launchBrowser, newContext, phone, screenshot, startServer, watchPage, type RunningServer } from "./harness";

let server: RunningServer;
let browser: Browser;
beforeAll(async () => {
  server = await startServer();
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

describe.each([
  ["phone", phone],
  ["desktop", desktop],
])("the dataset list at %s size", (name, viewport) => {
  it("shows what the API serves, in the shipped font, with no horizontal scroll", async () => {
    const api = datasetList.parse(await (await fetch(`${server.url}/api/v1/datasets`)).json());
    const context = await newContext(browser, viewport);
    const page = await context.newPage();
    const problems = watchPage(page);
    const external: string[] = [];
    page.on("request", (r) => {
      if (!r.url().startsWith(server.url) && !r.url().startsWith("data:") && !r.url().startsWith("blob:")) external.push(r.url());
    });
    await page.goto(`${server.url}/datasets`);
    await page.getByRole("heading", { name: "Datasets" }).first().waitFor();
    // This server loaded the demo, so an empty list means the demo or the list endpoint broke.
    expect(api.items.length).toBeGreaterThan(0);
    // The heading renders before the list arrives, so wait for each title rather than sampling once.
    for (const d of api.items) await page.getByText(d.title, { exact: true }).first().waitFor({ state: "visible" });
    // The web build must render Inter from assets/ without any network beyond this server.
    const fontOk = await page.evaluate(async () => {
      await document.fonts.ready;
      return [...document.fonts].some((f) => f.family.replace(/"/g, "") === "Inter_400Regular" && f.status === "loaded");
    });
    expect(fontOk).toBe(true);
    expect(external).toEqual([]);
    const scrollWidth = await page.evaluate(() => document.documentElement.scrollWidth);
    expect(scrollWidth).toBeLessThanOrEqual(viewport.width);
    await screenshot(page, `foundation-datasets-${name}`);
    expect(problems).toEqual([]);
    await context.close();
  });
});

describe("an empty catalogue", () => {
  it("shows the empty state at phone size", async () => {
    const empty = await startServer({ demo: false });
    try {
      const api = datasetList.parse(await (await fetch(`${empty.url}/api/v1/datasets`)).json());
      expect(api.items).toEqual([]);
      const context = await newContext(browser, phone);
      const page = await context.newPage();
      const problems = watchPage(page);
      await page.goto(`${empty.url}/datasets`);
      const state = page.getByRole("status").filter({ hasText: "No published datasets yet" });
      await state.waitFor({ state: "visible" });
      expect(await state.getByText("When a curator publishes a trial dataset, it appears here.").isVisible()).toBe(true);
      expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(phone.width);
      await screenshot(page, "foundation-datasets-empty-phone");
      expect(problems).toEqual([]);
      await context.close();
    } finally {
      await empty.stop();
    }
  });
});

describe("compression", () => {
  it("serves the web bundle and API pages gzipped to a client that accepts it, and plain to one that does not", async () => {
    const html = await (await fetch(server.url)).text();
    const bundle = html.match(/<script[^>]+src="([^"]+\.js)"/)![1]!;
    const gz = await fetch(`${server.url}${bundle}`, { headers: { "Accept-Encoding": "gzip" } });
    expect(gz.headers.get("content-encoding")).toBe("gzip");
    const plain = await fetch(`${server.url}${bundle}`, { headers: { "Accept-Encoding": "identity" } });
    expect(plain.headers.get("content-encoding")).toBeNull();
    // Same script either way (fetch undoes the gzip).
    expect(await gz.text()).toBe(await plain.text());
    const api = await fetch(`${server.url}/api/v1/responses?limit=200`, { headers: { "Accept-Encoding": "gzip" } });
    expect(api.headers.get("content-encoding")).toBe("gzip");
    expect(((await api.json()) as { items: unknown[] }).items.length).toBeGreaterThan(0);
  });
});

describe("favicon", () => {
  it("the page links our icon, served as an image and not as the page", async () => {
    const html = await (await fetch(server.url)).text();
    const iconLink = [...html.matchAll(/<link\b[^>]*>/g)].map((m) => m[0]).find((tag) => /\brel="[^"]*\bicon\b/.test(tag));
    const href = iconLink && /\bhref="([^"]+)"/.exec(iconLink)?.[1];
    expect(href).toBe("/favicon.ico");
    const res = await fetch(`${server.url}${href}`);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toMatch(/^image\//);
    // An ICO file: reserved 0, type 1, then how many images (16, 32 and 48 px).
    const bytes = new DataView(await res.arrayBuffer());
    expect([bytes.getUint16(0, true), bytes.getUint16(2, true), bytes.getUint16(4, true)]).toEqual([0, 1, 3]);
  });
});

describe("deep links", () => {
  it("a reload on a deep path serves the app, not a 404; a dataset page that names nothing is a 404 with the app", async () => {
    const res = await fetch(`${server.url}/datasets/soybean-starter-p-placement`);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toMatch(/text\/html/);
    const unknown = await fetch(`${server.url}/datasets/some-slug`);
    expect(unknown.status).toBe(404);
    expect(unknown.headers.get("content-type")).toMatch(/text\/html/);
  });
});
