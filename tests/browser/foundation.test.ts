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
    if (api.items.length) {
      // The heading renders before the list arrives, so wait for each title rather than sampling once.
      for (const d of api.items) await page.getByText(d.title, { exact: true }).first().waitFor({ state: "visible" });
    } else {
      await page.getByText("No published datasets yet").waitFor();
    }
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

describe("deep links", () => {
  it("a reload on a deep path serves the app, not a 404", async () => {
    const res = await fetch(`${server.url}/datasets/some-slug`);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toMatch(/text\/html/);
  });
});
