import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createFakeDataCite, type FakeDataCite } from "@/server/doi/fake-datacite";
import { citableFixture } from "@/tests/support/citable-fixture";
import { launchBrowser, newContext, phone, screenshot, startServer, watchPage, type RunningServer } from "./harness";

const slug = "tb-cite-in-browser";
let fake: FakeDataCite;
let server: RunningServer;
let browser: Browser;
beforeAll(async () => {
  fake = createFakeDataCite({ user: "PLOTBANK.TEST", password: "fake-secret", prefixes: ["10.80555"] });
  const url = await fake.start();
  server = await startServer({ demo: false, config: { datacite: { url, user: "PLOTBANK.TEST", password: "fake-secret", prefix: "10.80555" } } });
  const f = await citableFixture(server.ctx, slug);
  await f.publish("1.0.0", { publishedAt: new Date(Date.UTC(2024, 4, 2)) });
  await f.publish("1.1.0", { publishedAt: new Date(Date.UTC(2025, 2, 14)) });
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.stop();
  await fake?.stop();
});

const apiCitation = async (format: string) =>
  (await (await fetch(`${server.url}/api/v1/datasets/${slug}/versions/1.1.0/citation?format=${format}`)).text()).trimEnd();

describe("citing a version on a phone", () => {
  it("copies the plain-text and the BibTeX citation to the clipboard", async () => {
    const context = await newContext(browser, phone);
    await context.grantPermissions(["clipboard-read", "clipboard-write"], { origin: server.url });
    const page = await context.newPage();
    const problems = watchPage(page);
    await page.goto(`${server.url}/datasets/${slug}`);
    const panel = page.getByTestId("citation-panel");
    await panel.getByText("Cite this version").waitFor();

    const text = await apiCitation("text");
    expect(text).toContain("https://doi.org/10.80555/plotbank.tb-cite-in-browser.v1.1.0");
    await panel.getByTestId("citation-text").getByText(text, { exact: true }).waitFor();
    await panel.getByRole("button", { name: "Copy Text citation" }).click();
    await panel.getByText("Copied").waitFor();
    expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(text);

    await panel.getByRole("radio", { name: "BibTeX" }).click();
    const bibtex = await apiCitation("bibtex");
    await panel.getByTestId("citation-text").getByText("@misc{", { exact: false }).waitFor();
    await panel.getByRole("button", { name: "Copy BibTeX citation" }).click();
    await expect.poll(() => page.evaluate(() => navigator.clipboard.readText())).toBe(bibtex);

    // The copy button is a full touch target, and the page does not scroll sideways.
    const box = await panel.getByRole("button", { name: "Copy BibTeX citation" }).boundingBox();
    expect(box!.height).toBeGreaterThanOrEqual(44);
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(phone.width);
    await panel.scrollIntoViewIfNeeded();
    await screenshot(page, "citation-panel-phone");
    expect(problems).toEqual([]);
    await context.close();
  });
});
