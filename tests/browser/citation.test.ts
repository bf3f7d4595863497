import { eq } from "drizzle-orm";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { users, versions } from "@/db/schema";
import type { FakeDataCite } from "@/server/doi/fake-datacite";
import { citableFixture, type CitableFixture } from "@/tests/support/citable-fixture";
import { startFakeDoiService } from "@/tests/support/fake-doi-service";
import { testPassword } from "@/tests/support/test-app";
import { desktop, launchBrowser, newContext, phone, screenshot, startServer, watchPage, type RunningServer } from "./harness";

const slug = "tb-cite-in-browser";
let fake: FakeDataCite;
let server: RunningServer;
let browser: Browser;
let withdrawn: CitableFixture;
beforeAll(async () => {
  const service = await startFakeDoiService();
  fake = service.fake;
  server = await startServer({ demo: false, config: { datacite: service.datacite() } });
  const f = await citableFixture(server.ctx, slug);
  await f.publish("1.0.0", { publishedAt: new Date(Date.UTC(2024, 4, 2)), years: [2020, 2021] });
  await f.publish("1.1.0", { publishedAt: new Date(Date.UTC(2025, 2, 14)), years: [2020, 2023] });
  withdrawn = await citableFixture(server.ctx, "tb-cite-withdrawn");
  const first = await withdrawn.publish("1.0.0", { publishedAt: new Date(Date.UTC(2024, 4, 2)) });
  await withdrawn.publish("1.1.0", { publishedAt: new Date(Date.UTC(2025, 2, 14)) });
  await server.ctx.db
    .update(versions)
    .set({ state: "withdrawn", withdrawnReason: "Yields at TB-01 were entered in bu/ac", withdrawnAt: new Date(Date.UTC(2025, 3, 1)) })
    .where(eq(versions.id, first));
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
    await panel.getByTestId("citation-text").getByText("@dataset{", { exact: false }).waitFor();
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

describe("a version's DOI landing page", () => {
  it("opens the version the DOI names, with its citation; choosing another version rewrites the link", async () => {
    const doi = "10.80555/plotbank.tb-cite-in-browser.v1.0.0";
    const landing = fake.records.get(doi)!.url!;
    expect(landing).toBe(`${server.url}/datasets/${slug}?version=1.0.0`);
    const context = await newContext(browser, phone);
    const page = await context.newPage();
    const problems = watchPage(page);
    await page.goto(landing);
    const picker = page.getByTestId("version-picker");
    await picker.getByRole("radio", { name: "v1.0.0" }).waitFor();
    expect(await picker.getByRole("radio", { name: "v1.0.0" }).getAttribute("aria-checked")).toBe("true");
    await page.getByRole("heading", { name: "Download v1.0.0" }).waitFor();
    const panel = page.getByTestId("citation-panel");
    await panel.getByText("Version 1.0.0.", { exact: false }).waitFor();
    await panel.getByTestId("citation-text").getByText(`https://doi.org/${doi}`, { exact: false }).waitFor();
    const citation = (await (await fetch(`${server.url}/api/v1/datasets/${slug}/versions/1.0.0/citation`)).text()).trimEnd();
    await panel.getByTestId("citation-text").getByText(citation, { exact: true }).waitFor();
    expect(await page.getByTestId("download-datapackage").getAttribute("href")).toContain("/versions/1.0.0/datapackage.zip");
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(phone.width);
    await panel.scrollIntoViewIfNeeded();
    await screenshot(page, "doi-landing-older-version-phone");

    await picker.getByRole("radio", { name: "v1.1.0" }).click();
    await page.waitForURL(/[?&]version=1\.1\.0/);
    await page.getByRole("heading", { name: "Download v1.1.0" }).waitFor();
    await panel.getByTestId("citation-text").getByText("plotbank.tb-cite-in-browser.v1.1.0", { exact: false }).waitFor();
    expect(problems).toEqual([]);
    await context.close();
  });

  it("a withdrawn version's DOI lands on its tombstone, not a missing page", async () => {
    const landing = fake.records.get("10.80555/plotbank.tb-cite-withdrawn.v1.0.0")!.url!;
    const context = await newContext(browser, phone);
    const page = await context.newPage();
    const problems = watchPage(page);
    await page.goto(landing);
    const tombstone = page.getByTestId("tombstone");
    await tombstone.getByRole("heading", { name: "v1.0.0 was withdrawn" }).waitFor();
    await tombstone.getByText("Yields at TB-01 were entered in bu/ac", { exact: false }).waitFor();
    await tombstone.getByText("10.80555/plotbank.tb-cite-withdrawn.v1.0.0", { exact: false }).waitFor();
    expect(await page.getByTestId("downloads").count()).toBe(0);
    await screenshot(page, "doi-landing-withdrawn-phone");
    await tombstone.getByRole("button", { name: "Open v1.1.0" }).click();
    await page.waitForURL(/[?&]version=1\.1\.0/);
    await page.getByRole("heading", { name: "Download v1.1.0" }).waitFor();
    expect(problems).toEqual([]);
    await context.close();
  });
});

describe("DOI registration on the version desk", () => {
  it("shows the dataset's editor a refused registration with the reason, and sends it again", async () => {
    const f = await citableFixture(server.ctx, "tb-cite-desk");
    const id = await f.publish("1.0.0");
    const doi = "10.80555/plotbank.tb-cite-desk.v1.0.0";
    // As a service that refused the metadata would have left it.
    fake.records.delete(doi);
    await server.ctx.db
      .update(versions)
      .set({
        doi: null,
        doiStatus: "failed",
        doiLastError: "The DOI service answered 422 to POST /dois: types.resourceTypeGeneral: not accepted.",
      })
      .where(eq(versions.id, id));
    const [owner] = await server.ctx.db.select().from(users).where(eq(users.id, f.ownerId));

    for (const [viewport, name] of [
      [phone, "phone"],
      [desktop, "desktop"],
    ] as const) {
      const context = await newContext(browser, viewport);
      const page = await context.newPage();
      const problems = watchPage(page);
      await page.goto(`${server.url}/sign-in?next=/curate/versions/${id}`);
      await page.getByLabel("E-mail", { exact: true }).fill(owner!.email);
      await page.getByLabel("Password", { exact: true }).fill(testPassword);
      await page.getByRole("button", { name: "Sign in" }).click();
      const card = page.getByTestId("doi-status");
      if (name === "phone") {
        await card.getByText("Refused by the DOI service").waitFor();
        await card.getByTestId("doi-last-error").getByText("types.resourceTypeGeneral: not accepted", { exact: false }).waitFor();
        await card.scrollIntoViewIfNeeded();
        await screenshot(page, "doi-status-refused-phone");
        await card.getByRole("button", { name: "Send to the DOI service again" }).click();
      }
      await card.getByText("Registered", { exact: true }).waitFor({ timeout: 20_000 });
      await card.getByText(`https://doi.org/${doi}`, { exact: false }).waitFor();
      expect(await card.getByRole("button", { name: "Send to the DOI service again" }).count()).toBe(0);
      expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(viewport.width);
      await card.scrollIntoViewIfNeeded();
      await screenshot(page, `doi-status-registered-${name}`);
      expect(problems).toEqual([]);
      await context.close();
    }
    expect(fake.records.get(doi)?.state).toBe("findable");
  });
});
