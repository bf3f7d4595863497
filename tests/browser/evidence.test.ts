import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { formatInterval, formatPercent, formatResponse } from "@/components/evidence/format";
import { metaAnalysisResult, type MetaAnalysisResponse } from "@/schemas/analysis";
import { insertAnalysisFixture, tallgrassStarterResponses } from "@/tests/support/analysis-fixture";
import { desktop, launchBrowser, newContext, phone, screenshot, startServer, watchPage, type RunningServer } from "./harness";

let server: RunningServer;
let browser: Browser;

beforeAll(async () => {
  server = await startServer();
  // The demo data when the demo generator has filled responses; otherwise a deterministic Tallgrass set.
  const probe = metaAnalysisResult.parse(await (await fetch(`${server.url}/api/v1/analyses/meta?nutrient=P`)).json());
  if (probe.k < 6) await insertAnalysisFixture(server.ctx, { slug: "tb-p-starter-screens", responses: tallgrassStarterResponses() });
  browser = await launchBrowser();
}, 120_000);
afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

const text = (page: Page, id: string) => page.getByTestId(id).first().innerText();

async function settled(page: Page) {
  await page.getByTestId("pooled-estimate").first().waitFor({ timeout: 20_000 });
  await page.waitForFunction(() => !document.querySelector('[data-testid="updating"]'), undefined, { timeout: 20_000 });
}

async function apiFor(page: Page, extra = ""): Promise<MetaAnalysisResponse> {
  await page.getByTestId("api-toggle").click();
  const url = await text(page, "api-url");
  expect(url.startsWith(`${server.url}/api/v1/analyses/meta?`)).toBe(true);
  expect(url).not.toMatch(/price|Cost/);
  await page.getByTestId("api-toggle").click();
  return metaAnalysisResult.parse(await (await fetch(url + extra)).json());
}

/** What the summary must say for an API result, formatted as the screen formats it. */
function expectedSummary(api: MetaAnalysisResponse) {
  const p = api.pooled!;
  return {
    estimate: `${formatResponse(p.estimate, api.units)} ${api.units}`,
    ci: `95 % CI ${formatInterval(p.ciLower, p.ciUpper, api.units)} ${api.units}`,
    k: `${api.k} site-year`,
    profit: formatPercent(api.decision.probabilityAboveBreakEven),
  };
}

async function agronomistPath(page: Page, wide: boolean) {
  await page.goto(`${server.url}/`);
  await settled(page);
  if (!wide) await page.getByTestId("filters-toggle").click();
  await page.getByTestId("filter-nutrient-P").click();
  await page.waitForURL(/nutrient=P/);
  await page.getByTestId("filter-placement-2x2-band").click();
  await page.waitForURL(/placement=2x2-band/);
  await page.getByTestId("filter-soil-low").click();
  await page.waitForURL(/soilTestClass=low/);
  await settled(page);
  await page.getByTestId("product-cost-input").fill("18");
  await page.getByTestId("application-cost-input").fill("6");
  await page.getByTestId("price-input").fill("11.5");
  // Each field settles on its own; wait until all three are in the break-even.
  await page.getByTestId("break-even").filter({ hasText: "$24.00/ac ÷ $11.50/bu" }).waitFor();
}

describe.each([
  ["phone", phone],
  ["desktop", desktop],
] as const)("the agronomist's path at %s size", (name, viewport) => {
  it("filters, reads the summary, prices it, opens the forest plot, shares, and the link reproduces the numbers", async () => {
    const context = await newContext(browser, viewport);
    const page = await context.newPage();
    const problems = watchPage(page);
    const wide = viewport.width >= 900;
    await agronomistPath(page, wide);

    if (wide) {
      // Two columns: the filter panel sits beside the results.
      const filters = (await page.getByTestId("filter-panel").boundingBox())!;
      const summary = (await page.getByTestId("summary-card").boundingBox())!;
      expect(filters.x + filters.width).toBeLessThanOrEqual(summary.x);
      expect(Math.abs(filters.y - summary.y)).toBeLessThan(400);
    }

    // The screen's API link has no prices; the same query with them gives the chance the device computed.
    const api = await apiFor(page, "&productCost=18&applicationCost=6&price=11.5");
    expect(api.provenance.filters).toMatchObject({ nutrient: "P", placement: "2x2-band", soilTestClass: "low" });
    expect(api.k).toBeGreaterThan(0);
    const want = expectedSummary(api);
    const shown = {
      estimate: await text(page, "pooled-estimate"),
      ci: await text(page, "pooled-ci"),
      k: await text(page, "k-site-years"),
      profit: await text(page, "probability-profit"),
    };
    expect(shown.estimate).toContain(want.estimate);
    expect(shown.ci).toContain(want.ci);
    expect(shown.k).toContain(want.k);
    expect(shown.profit).toBe(want.profit);
    expect(api.decision.costPerAcre).toBe(24);
    expect(api.decision.breakEven).toBeCloseTo(24 / 11.5, 9);
    expect(await text(page, "cautions")).toMatch(/injure a stand/);
    expect(await text(page, "subgroup-test")).toMatch(
      /Between-group test: (F|χ²) = [\d.]+ on \d+( and \d+)? df, p [<=] [\d.]+|Only one group/,
    );

    await page.getByTestId("open-forest-plot").click();
    const plot = page.getByTestId("forest-plot");
    await plot.waitFor();
    expect(await plot.getAttribute("aria-label")).toMatch(new RegExp(`Forest plot of ${api.rows.length} site-year`));
    expect(await plot.locator("svg rect").count()).toBeGreaterThanOrEqual(api.rows.length);

    // Prices go into the link only when the user ticks the box.
    await page.getByTestId("share-link").click();
    expect(await text(page, "share-url")).not.toMatch(/price|Cost/);
    await page.getByTestId("share-with-prices").click();
    await page.getByTestId("share-link").click();
    const link = await text(page, "share-url");
    expect(link).toContain("nutrient=P");
    expect(link).toContain("price=11.5");

    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(viewport.width);
    await screenshot(page, `evidence-${name}-summary`);
    await page.getByTestId("forest-plot").screenshot({ path: `tests/artifacts/evidence-${name}-forest.png` });

    // A fresh browser (no stored prices) opening the shared link sees the same numbers.
    const fresh = await newContext(browser, viewport);
    const other = await fresh.newPage();
    const otherProblems = watchPage(other);
    await other.goto(link);
    await settled(other);
    expect(await text(other, "pooled-estimate")).toBe(shown.estimate);
    expect(await text(other, "pooled-ci")).toBe(shown.ci);
    expect(await text(other, "k-site-years")).toBe(shown.k);
    expect(await text(other, "probability-profit")).toBe(shown.profit);
    expect(await other.getByTestId("price-input").inputValue()).toBe("11.5");
    await screenshot(other, `evidence-${name}-shared-link`);
    await fresh.close();

    // The prices stay on this device: a new visit fills them in, and they stay out of the address.
    const again = await context.newPage();
    await again.goto(`${server.url}/`);
    await settled(again);
    await expect.poll(() => again.getByTestId("product-cost-input").inputValue(), { timeout: 20_000 }).toBe("18");
    expect(again.url()).not.toMatch(/price|Cost/);

    expect(problems).toEqual([]);
    expect(otherProblems).toEqual([]);
    await context.close();
  });
});

describe("states of the Evidence screen", () => {
  it("empty: no site-years match, with a way to widen", async () => {
    const context = await newContext(browser, phone);
    const page = await context.newPage();
    await page.goto(`${server.url}/?nutrient=P&soilTestClass=very_high&yearFrom=2100`);
    await page.getByText("No site-years match; widen these filters").waitFor({ timeout: 20_000 });
    expect(await text(page, "cautions")).toMatch(/field can differ/);
    await screenshot(page, "evidence-phone-empty");
    await context.close();
  });

  it("error: an unknown dataset says what went wrong", async () => {
    const context = await newContext(browser, phone);
    const page = await context.newPage();
    await page.goto(`${server.url}/?dataset=no-such-dataset`);
    const alert = page.getByRole("alert");
    await alert.waitFor({ timeout: 20_000 });
    expect(await alert.innerText()).toMatch(/Something went wrong[\s\S]*no-such-dataset/);
    await context.close();
  });

  it("offline: a change while the network is down says so, and recovers", async () => {
    const context = await newContext(browser, phone);
    const page = await context.newPage();
    await page.goto(`${server.url}/`);
    await settled(page);
    await context.setOffline(true);
    await page.getByTestId("filters-toggle").click();
    await page.getByTestId("filter-crop-soybean").click();
    await page.getByText("You are offline").waitFor({ timeout: 20_000 });
    await screenshot(page, "evidence-phone-offline");
    await context.setOffline(false);
    // Back online, the paused request resumes by itself and the numbers return.
    await settled(page);
    expect(await page.getByText("You are offline").count()).toBe(0);
    expect(page.url()).toContain("crop=soybean");
    await context.close();
  });

  it("keyboard and touch: every control is labelled, focusable in order, and at least 44 px", async () => {
    const context = await newContext(browser, desktop);
    const page = await context.newPage();
    await page.goto(`${server.url}/`);
    await settled(page);
    const controls = await page.evaluate(() =>
      [...document.querySelectorAll('[role="button"], [role="checkbox"], [role="radio"], input, [role="columnheader"]')].map((el) => {
        const r = el.getBoundingClientRect();
        // Labelled: an aria-label, or (a button named by its own words) its text.
        return {
          label: el.getAttribute("aria-label") ?? el.textContent?.trim() ?? "",
          h: r.height,
          w: r.width,
          visible: r.width > 0 && r.height > 0,
          tab: (el as HTMLElement).tabIndex,
        };
      }),
    );
    const visible = controls.filter((c) => c.visible);
    expect(visible.length).toBeGreaterThan(20);
    for (const c of visible) {
      expect(c.label, JSON.stringify(c)).not.toBe("");
      expect(c.h, c.label).toBeGreaterThanOrEqual(44);
      expect(c.tab, c.label).toBeGreaterThanOrEqual(0);
    }
    // Tab walks through the filters from the first chip onwards, in reading order.
    const seen: string[] = [];
    await page.getByTestId("filter-crop-soybean").focus();
    for (let i = 0; i < 6; i++) {
      seen.push(await page.evaluate(() => document.activeElement?.getAttribute("aria-label") ?? ""));
      await page.keyboard.press("Tab");
    }
    expect(seen.slice(0, 4)).toEqual(["Crop: Soybean", "Crop: Corn", "Crop: Wheat", "Nutrient: N"]);
    await page.keyboard.press("Enter");
    await page.waitForURL(/nutrient=/);
    await context.close();
  });

  it("the site-year table sorts by response", async () => {
    const context = await newContext(browser, desktop);
    const page = await context.newPage();
    await page.goto(`${server.url}/?nutrient=P`);
    await settled(page);
    await page.getByTestId("open-table").click();
    await page.getByTestId("sort-estimate").click();
    const header = page.getByTestId("sort-estimate");
    expect(await header.getAttribute("aria-sort")).toBe("ascending");
    const api = await apiFor(page);
    const lowest = [...api.rows].sort((a, b) => a.estimate - b.estimate)[0]!;
    const firstRow = page.locator('[data-testid^="site-year-row-"]').first();
    expect(await firstRow.getAttribute("data-testid")).toBe(`site-year-row-${lowest.siteYearCode}`);
    await context.close();
  });

  it("the dataset page shows metadata, dictionary, versions and downloads, and 'Analyse this dataset' opens the Evidence screen on it", async () => {
    const list = (await (await fetch(`${server.url}/api/v1/datasets`)).json()) as { items: { slug: string; title: string }[] };
    const dataset = list.items[0]!;
    const context = await newContext(browser, phone);
    const page = await context.newPage();
    const problems = watchPage(page);
    await page.goto(`${server.url}/datasets/${dataset.slug}`);
    await page.getByTestId("dataset-metadata").waitFor({ timeout: 20_000 });
    expect(await page.getByRole("heading", { name: dataset.title }).count()).toBeGreaterThan(0);
    expect(await text(page, "dataset-licence")).toMatch(/Licence/);
    await page.getByTestId("data-dictionary").waitFor();
    expect(await page.getByTestId("versions").innerText()).toMatch(/v\d+\.\d+\.\d+/);
    expect(await page.getByTestId("download-datapackage").getAttribute("href")).toMatch(
      new RegExp(`/api/v1/datasets/${dataset.slug}/versions/.+/datapackage.zip$`),
    );
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(phone.width);
    await screenshot(page, "dataset-page-phone");
    await page.getByTestId("analyse-dataset").click();
    await page.waitForURL(new RegExp(`/\\?dataset=${dataset.slug}$`));
    await settled(page);
    const api = await apiFor(page);
    expect(api.provenance.versions.map((v) => v.dataset)).toEqual([dataset.slug]);
    expect(await text(page, "k-site-years")).toContain(`${api.k} site-year`);
    expect(problems).toEqual([]);
    await context.close();
  });
});
