import type { Browser, Page, Request } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { formatPercent } from "@/components/evidence/format";
import { metaAnalysisResult, type MetaAnalysisResponse } from "@/schemas/analysis";
import { desktop, launchBrowser, newContext, phone, screenshot, startServer, watchPage, type RunningServer } from "./harness";

/**
 * "Compare by" views a reader can tell apart, decision numbers per group, prices that never leave the device, and
 * the site-year list at phone and desktop width, on the demo data through the real server and Chromium.
 */

let server: RunningServer;
let browser: Browser;
beforeAll(async () => {
  server = await startServer();
  browser = await launchBrowser();
}, 120_000);
afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

const byPlacement = "/?crop=soybean&nutrient=P&placement=in-furrow,2x2-band&groupBy=placement";
const apiByPlacement = "/api/v1/analyses/meta?crop=soybean&groupBy=placement&nutrient=P&placement=2x2-band,in-furrow";

async function api(query: string): Promise<MetaAnalysisResponse> {
  return metaAnalysisResult.parse(await (await fetch(`${server.url}${query}`)).json());
}

async function settled(page: Page) {
  await page.getByTestId("pooled-estimate").first().waitFor({ timeout: 20_000 });
  await page.waitForFunction(() => !document.querySelector('[data-testid="updating"]'), undefined, { timeout: 20_000 });
}

/** WCAG 2.1 contrast ratio of two sRGB colours (relative luminance as the recommendation defines it). */
function contrast(a: string, b: string): number {
  const lum = (c: string) => {
    const [r, g, bl] = (c.match(/\d+/g) ?? []).slice(0, 3).map((v) => {
      const s = Number(v) / 255;
      return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
    });
    return 0.2126 * r! + 0.7152 * g! + 0.0722 * bl!;
  };
  const [hi, lo] = [lum(a), lum(b)].sort((x, y) => y - x);
  return (hi! + 0.05) / (lo! + 0.05);
}

/** Every URL and body the page sent to our server after `since`. */
function recordRequests(page: Page): Request[] {
  const sent: Request[] = [];
  page.on("request", (r) => {
    if (r.url().startsWith(server.url)) sent.push(r);
  });
  return sent;
}

describe("compare by placement at 390x844", () => {
  it("each group has its own colour and shape, the forest plot is grouped with subtotals and k, and each group has its chances", async () => {
    const want = await api(apiByPlacement);
    const levels = want.subgroups!.levels;
    expect(levels.map((l) => l.level)).toEqual(["in-furrow", "2x2-band"]);

    const context = await newContext(browser, phone);
    const page = await context.newPage();
    const problems = watchPage(page);
    await page.goto(`${server.url}${byPlacement}`);
    await settled(page);

    // Colour and shape per group, both distinct, each marker at least 3:1 against its card (WCAG 2.1 SC 1.4.11).
    const markers = await page.evaluate(
      (names) => {
        const card = document.querySelector('[data-testid="subgroup-view"]')!;
        return names.map((level) => {
          const shape = document.querySelector(`[data-testid="group-marker-${level}"] [data-shape]`)!;
          return {
            level,
            shape: shape.getAttribute("data-shape"),
            fill: getComputedStyle(shape).fill,
            card: getComputedStyle(card).backgroundColor,
          };
        });
      },
      levels.map((l) => l.level),
    );
    expect(new Set(markers.map((m) => m.shape)).size).toBe(levels.length);
    expect(new Set(markers.map((m) => m.fill)).size).toBe(levels.length);
    for (const m of markers) expect(contrast(m.fill, m.card), JSON.stringify(m)).toBeGreaterThanOrEqual(3);

    // Each group's chance of any gain, as the API gives it.
    for (const l of levels) {
      const line = await page.getByTestId(`subgroup-chance-${l.level}`).innerText();
      expect(line).toContain(
        `Any gain on a new site-year: ${formatPercent(l.probabilityAboveZero)} (observed ${formatPercent(l.shareAboveZero)})`,
      );
    }

    // The grouped forest plot: a header per group with its k, its rows under it, a subtotal diamond with its k.
    await page.getByTestId("open-forest-plot").click();
    const plot = page.getByTestId("forest-plot");
    await plot.waitFor();
    const forest = await page.evaluate(() => {
      const svg = document.querySelector('[data-testid="forest-plot"] svg')!;
      const texts = [...svg.querySelectorAll("text")].map((t) => t.textContent ?? "");
      const headers = [...svg.querySelectorAll("[data-group-header]")].map((t) => ({
        level: t.getAttribute("data-group-header"),
        text: t.textContent,
      }));
      const subtotals = [...svg.querySelectorAll("[data-subtotal]")].map((p) => ({
        level: p.getAttribute("data-subtotal"),
        k: Number(p.getAttribute("data-k")),
        fill: getComputedStyle(p).fill,
      }));
      return { texts, headers, subtotals };
    });
    expect(forest.headers).toEqual([
      { level: "in-furrow", text: `In-furrow (seed-placed) · k = ${levels[0]!.k}` },
      { level: "2x2-band", text: `2x2 band · k = ${levels[1]!.k}` },
    ]);
    expect(forest.subtotals.map((s) => [s.level, s.k])).toEqual(levels.map((l) => [l.level, l.k]));
    expect(new Set(forest.subtotals.map((s) => s.fill)).size).toBe(2);
    expect(forest.texts.filter((t) => t.startsWith("Subtotal, k = "))).toEqual(levels.map((l) => `Subtotal, k = ${l.k}`));
    // Between the two headers, each site-year appears once: no more rows repeated under one label.
    const first = forest.texts.indexOf(forest.headers[0]!.text!);
    const second = forest.texts.indexOf(forest.headers[1]!.text!);
    const inFurrowRows = forest.texts.slice(first + 1, second).filter((t) => /^TB-/.test(t));
    expect(inFurrowRows.length).toBe(want.rows.filter((r) => r.group === "in-furrow").length);
    expect(new Set(inFurrowRows).size).toBe(inFurrowRows.length);
    expect(await plot.getAttribute("aria-label")).toMatch(/Grouped: In-furrow \(seed-placed\), k = \d+, subtotal/);

    // Prices typed: each group's chance of beating the break-even equals the API's answer at those prices.
    await page.getByTestId("product-cost-input").fill("14");
    await page.getByTestId("application-cost-input").fill("4");
    await page.getByTestId("price-input").fill("10.5");
    await page.getByTestId("break-even").filter({ hasText: "$18.00/ac ÷ $10.50/bu" }).waitFor();
    const priced = await api(`${apiByPlacement}&price=10.5&productCost=14&applicationCost=4`);
    for (const l of priced.subgroups!.levels) {
      await expect
        .poll(() => page.getByTestId(`subgroup-chance-${l.level}`).innerText())
        .toContain(
          `Beats the break-even on a new site-year: ${formatPercent(l.probabilityAboveBreakEven)} (observed ${formatPercent(l.shareAboveBreakEven)} of these site-years)`,
        );
    }
    expect(await page.getByTestId("probability-profit").innerText()).toBe(formatPercent(priced.decision.probabilityAboveBreakEven));

    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(phone.width);
    await screenshot(page, "evidence-phone-by-placement");
    await plot.screenshot({ path: "tests/artifacts/evidence-phone-forest-by-placement.png" });
    await page.getByTestId("break-even-panel").screenshot({ path: "tests/artifacts/evidence-phone-break-even.png" });
    expect(problems).toEqual([]);
    await context.close();
  });
});

describe("prices stay on the device", () => {
  it("typed prices reach no request; the share link carries them only when chosen", async () => {
    const context = await newContext(browser, phone);
    const page = await context.newPage();
    const problems = watchPage(page);
    await page.goto(`${server.url}/?crop=soybean&nutrient=P&placement=2x2-band`);
    await settled(page);
    const sent = recordRequests(page);
    await page.getByTestId("product-cost-input").fill("18.25");
    await page.getByTestId("application-cost-input").fill("6.75");
    await page.getByTestId("price-input").fill("11.35");
    await page.getByTestId("break-even").filter({ hasText: "$25.00/ac ÷ $11.35/bu" }).waitFor();
    // Change a filter too, so a request is certainly made while prices are set.
    await page.getByTestId("filters-toggle").click();
    // Filter changes are debounced: wait for the analysis request itself, not only the address.
    const asked = page.waitForRequest((r) => r.url().includes("/api/v1/analyses/meta") && r.url().includes("soilTestClass=low"));
    await page.getByTestId("filter-soil-low").click();
    await page.waitForURL(/soilTestClass=low/);
    await asked;
    await settled(page);
    await page.getByTestId("break-even").waitFor();
    await page.waitForLoadState("networkidle");

    const leaks = /price|cost|18\.25|6\.75|11\.35/i;
    expect(sent.length).toBeGreaterThan(0);
    for (const r of sent) {
      expect(r.url(), r.url()).not.toMatch(leaks);
      expect(r.postData() ?? "", r.url()).not.toMatch(leaks);
    }
    expect(page.url()).not.toMatch(leaks);
    const want = await api(
      `/api/v1/analyses/meta?crop=soybean&nutrient=P&placement=2x2-band&soilTestClass=low&groupBy=soilTestClass&price=11.35&productCost=18.25&applicationCost=6.75`,
    );
    expect(await page.getByTestId("probability-profit").innerText()).toBe(formatPercent(want.decision.probabilityAboveBreakEven));
    expect(await page.getByTestId("share-above-break-even").innerText()).toContain(
      `${formatPercent(want.decision.shareAboveBreakEven)} of site-years beat it`,
    );
    expect(await page.getByTestId("chance-bars").getAttribute("aria-label")).toBe(
      `On one scale from 0 to 100 %: Chance a new site-year beats the break-even: ${formatPercent(want.decision.probabilityAboveBreakEven)}; Share of these site-years that beat it (observed): ${formatPercent(want.decision.shareAboveBreakEven)}`,
    );
    expect(await page.getByTestId("chance-explained").innerText()).toMatch(/predictive distribution of a new site-year.*plot noise/);

    // Share: no prices unless the box is ticked.
    await page.getByTestId("share-link").click();
    const plain = await page.getByTestId("share-url").first().innerText();
    expect(plain).toContain("soilTestClass=low");
    expect(plain).not.toMatch(leaks);
    expect(await page.getByTestId("share-with-prices").getAttribute("aria-checked")).toBe("false");
    await page.getByTestId("share-with-prices").click();
    await page.getByTestId("share-link").click();
    const withPrices = await page.getByTestId("share-url").first().innerText();
    const params = new URL(withPrices).searchParams;
    expect([params.get("price"), params.get("productCost"), params.get("applicationCost")]).toEqual(["11.35", "18.25", "6.75"]);
    expect(sent.filter((r) => leaks.test(r.url()))).toEqual([]);

    // A fresh browser opening the priced link gets the same chance; the address bar then drops the prices, and its
    // own API requests carry none.
    const fresh = await newContext(browser, phone);
    const other = await fresh.newPage();
    const otherSent = recordRequests(other);
    await other.goto(withPrices);
    await settled(other);
    await other.getByTestId("break-even").waitFor();
    expect(await other.getByTestId("probability-profit").innerText()).toBe(formatPercent(want.decision.probabilityAboveBreakEven));
    await other.waitForFunction(() => !/price/.test(window.location.search), undefined, { timeout: 10_000 });
    expect(
      otherSent
        .filter((r) => r.url().includes("/api/"))
        .map((r) => r.url())
        .filter((u) => leaks.test(u)),
    ).toEqual([]);
    await fresh.close();

    // The device remembers them: a new visit fills them in without putting them in the address.
    const again = await context.newPage();
    await again.goto(`${server.url}/?crop=soybean&nutrient=P&placement=2x2-band`);
    await settled(again);
    await expect.poll(() => again.getByTestId("price-input").inputValue()).toBe("11.35");
    expect(again.url()).not.toMatch(leaks);
    expect(problems).toEqual([]);
    await context.close();
  });
});

describe.each([
  ["phone", phone],
  ["desktop", desktop],
] as const)("the site-year list at %s size", (name, viewport) => {
  it("fits without clipping, names treatments in words and shows the headline mean's weights", async () => {
    const want = await api(apiByPlacement);
    const context = await newContext(browser, viewport);
    const page = await context.newPage();
    await page.goto(`${server.url}${byPlacement}`);
    await settled(page);
    if (viewport.width < 900) await page.getByTestId("filters-toggle").waitFor();
    await page.getByTestId("open-table").click();
    const table = page.getByTestId("site-year-table");
    await table.waitFor({ timeout: 20_000 });
    const fit = await page.evaluate(() => {
      const t = document.querySelector('[data-testid="site-year-table"]') as HTMLElement;
      const box = t.getBoundingClientRect();
      let overflow = 0;
      for (const el of t.querySelectorAll("*")) {
        const e = el as HTMLElement;
        if (e.scrollWidth > e.clientWidth + 1 && getComputedStyle(e).overflowX !== "visible") overflow++;
        const r = e.getBoundingClientRect();
        if (r.width > 0 && (r.right > box.right + 1 || r.left < box.left - 1)) overflow++;
      }
      return { overflow, scrollWidth: t.scrollWidth, clientWidth: t.clientWidth, page: document.documentElement.scrollWidth };
    });
    expect(fit.overflow).toBe(0);
    expect(fit.scrollWidth).toBeLessThanOrEqual(fit.clientWidth);
    expect(fit.page).toBeLessThanOrEqual(viewport.width);

    const row = want.rows.find((r) => r.group === "2x2-band")!;
    const shown = await page.getByTestId(`site-year-row-${row.siteYearCode}`).filter({ hasText: "2x2 band" }).first().innerText();
    expect(shown).toContain("MAP 11-52-0");
    expect(shown).toMatch(/lb P2O5/);
    expect(shown).not.toMatch(/BAND-MAP|very_low/);
    expect(shown).toContain(`${row.pooledWeightPercent!.toFixed(1)} %`);
    expect(shown).toContain(`${row.weightPercent.toFixed(1)} %`);
    expect(await page.getByText(/Weight: each site-year's share of the mean above/).count()).toBe(1);
    await screenshot(page, `evidence-${name}-site-years`);
    await table.screenshot({ path: `tests/artifacts/evidence-${name}-site-year-list.png` });
    await context.close();
  });
});
