import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { SiteYearAnova } from "@/schemas/site-year-anova";
import {
  axeViolations,
  desktop,
  launchBrowser,
  newContext,
  phone,
  screenshot,
  startServer,
  watchPage,
  type RunningServer,
} from "./harness";

const slug = "soybean-starter-p-placement";
let server: RunningServer;
let browser: Browser;
let semver: string;
beforeAll(async () => {
  server = await startServer();
  semver = ((await (await fetch(`${server.url}/api/v1/datasets/${slug}`)).json()) as { latestVersion: string }).latestVersion;
  browser = await launchBrowser();
}, 180_000);
afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

const anova = async (code: string, query = "") =>
  (await (
    await fetch(`${server.url}/api/v1/datasets/${slug}/versions/${semver}/site-years/${code}/anova${query}`)
  ).json()) as SiteYearAnova;

/** The demo site-years with and without a lost plot, as the API reports them. */
async function demoSiteYears() {
  const list = (await (await fetch(`${server.url}/api/v1/datasets/${slug}/versions/${semver}/site-years?limit=1000`)).json()) as {
    items: { code: string }[];
  };
  const answers = await Promise.all(list.items.map((s) => anova(s.code)));
  const unbalanced = answers.find((a) => a.computed && a.balanced === false);
  const balanced = answers.find((a) => a.computed && a.balanced === true);
  if (!unbalanced || !balanced) throw new Error("the demo dataset needs a balanced and an unbalanced site-year");
  return { unbalanced, balanced };
}

describe("a site-year's ANOVA on the demo dataset page", () => {
  it("desktop: choose a site-year with a lost plot; the table, the LSD of each pair and the LS-means match the API; units switch", async () => {
    const { unbalanced } = await demoSiteYears();
    const code = unbalanced.siteYear.code;
    const context = await newContext(browser, desktop);
    const page = await context.newPage();
    const problems = watchPage(page);
    await page.goto(`${server.url}/datasets/${slug}`);
    const card = page.getByTestId("site-year-analysis");
    await card.getByRole("radio", { name: `Site-year: ${code}` }).click();
    await page.waitForURL(new RegExp(`siteYear=${code}`));

    const view = card.getByTestId("site-year-anova");
    await view.getByText(`${code} · soybean`).waitFor();
    await view
      .getByTestId("anova-balance")
      .getByText(/^Unbalanced: \d+ plots? missing/)
      .waitFor();
    const table = view.getByTestId("anova-table");
    const treatmentRow = table.getByRole("row").filter({ hasText: "Treatment" });
    expect(await treatmentRow.getByRole("cell").allInnerTexts()).toEqual([
      String(unbalanced.table!.treatment.df),
      expect.any(String),
      expect.any(String),
      unbalanced.table!.treatment.fStatistic!.toFixed(2),
      expect.any(String),
    ]);
    await expect(view.getByTestId("anova-lsd").innerText()).resolves.toContain("per pair");
    // Missing plots: the pairs table is open and has a row per pair, with the API's LSDs.
    const pairs = view.getByTestId("anova-pairs");
    expect(await pairs.getByRole("row").count()).toBe(unbalanced.lsd.pairs.length + 1);
    const lsds = new Set(unbalanced.lsd.pairs.map((p) => p.lsd.toFixed(2)));
    expect(lsds.size).toBeGreaterThan(1);
    for (const text of await pairs.getByRole("row").locator('[role="cell"]:nth-child(3)').allInnerTexts()) expect(lsds).toContain(text);
    const check = unbalanced.means.find((m) => m.isCheck)!;
    await view
      .getByTestId("anova-means")
      .getByRole("row")
      .filter({ hasText: `(${check.code}) · check` })
      .getByText(check.lsMean!.toFixed(1), { exact: true })
      .waitFor();

    await card.getByRole("radio", { name: "Yield unit: kg/ha" }).click();
    await view.getByText(/Yield \(kg\/ha\)/).waitFor();
    const kg = await anova(code, "?units=kg/ha");
    const kgCheck = kg.means.find((m) => m.isCheck)!;
    await view.getByTestId("anova-means").getByText(Math.round(kgCheck.lsMean!).toLocaleString("en-US"), { exact: true }).waitFor();
    await card.getByRole("radio", { name: "Measure: Harvest moisture" }).click();
    await view.getByText(/Harvest moisture \(%\)/).waitFor();
    expect(await axeViolations(page), "axe-core on the open analysis").toEqual([]);
    await screenshot(page, "site-year-anova-desktop");
    expect(problems).toEqual([]);
    await context.close();
  });

  it("phone: a link opens a balanced site-year's ANOVA with its single LSD, and nothing is wider than the screen", async () => {
    const { balanced } = await demoSiteYears();
    const code = balanced.siteYear.code;
    const context = await newContext(browser, phone);
    const page = await context.newPage();
    const problems = watchPage(page);
    await page.goto(`${server.url}/datasets/${slug}?siteYear=${code}`);
    const view = page.getByTestId("site-year-anova");
    await view
      .getByTestId("anova-balance")
      .getByText(/^Balanced: every treatment in every block/)
      .waitFor();
    await expect(view.getByTestId("anova-lsd").innerText()).resolves.toContain(`${balanced.lsd.single!.toFixed(2)} bu/ac`);
    // Balanced: the pairs are behind a closed heading, since one LSD serves them all.
    expect(await view.getByTestId("anova-pairs").count()).toBe(0);
    await view.getByTestId("anova-pairs-toggle").click();
    expect(await view.getByTestId("anova-pairs").getByRole("row").count()).toBe(balanced.lsd.pairs.length + 1);
    for (const id of ["anova-table", "anova-means", "anova-pairs"]) {
      const box = (await view.getByTestId(id).boundingBox())!;
      expect(box.x, id).toBeGreaterThanOrEqual(0);
      expect(box.x + box.width, id).toBeLessThanOrEqual(phone.width);
    }
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(phone.width);
    // In kg/ha the sums of squares run to millions; every cell of the table still fits on one line.
    await page.getByRole("radio", { name: "Yield unit: kg/ha" }).click();
    await view.getByText(/Yield \(kg\/ha\)/).waitFor();
    const total = view.getByTestId("anova-table").getByRole("row").filter({ hasText: "Total" }).getByRole("cell").nth(1);
    await expect(total.innerText()).resolves.toMatch(/^\d+(\.\d+)?[KM]$/);
    const heights = await view
      .getByTestId("anova-table")
      .locator('[role="cell"], [role="rowheader"], [role="columnheader"]')
      .evaluateAll((cells) => cells.map((c) => (c.firstElementChild as HTMLElement | null)?.getBoundingClientRect().height ?? 0));
    for (const h of heights) expect(h).toBeLessThanOrEqual(24);
    expect(await axeViolations(page), "axe-core on the open analysis").toEqual([]);
    await screenshot(page, "site-year-anova-phone");
    expect(problems).toEqual([]);
    await context.close();
  });
});
