import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { metaAnalysisResult } from "@/schemas/analysis";
import { desktop, launchBrowser, newContext, phone, screenshot, startServer, watchPage, type RunningServer } from "./harness";

let server: RunningServer;
let browser: Browser;

beforeAll(async () => {
  server = await startServer();
  browser = await launchBrowser();
}, 180_000);
afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

const question = "crop=soybean&nutrient=P&placement=2x2-band";

describe.each([
  ["phone", phone],
  ["desktop", desktop],
] as const)("the response along the soil test at %s size, on the demo", (name, viewport) => {
  it("draws the fitted line with its band and states the critical level with its caution; the break-even level follows the prices", async () => {
    const context = await newContext(browser, viewport);
    const page = await context.newPage();
    const problems = watchPage(page);
    await page.goto(`${server.url}/?${question}`);
    await page.getByTestId("pooled-estimate").first().waitFor({ timeout: 30_000 });
    await page.getByTestId("open-scatter").click();
    await page.getByTestId("critical-level").waitFor({ timeout: 30_000 });

    const api = metaAnalysisResult.parse(
      await (
        await fetch(`${server.url}/api/v1/analyses/meta?${question}&groupBy=soilTestClass&moderator=soilTestValue&forestLimit=0`)
      ).json(),
    );
    const m = api.moderatorRegression!;
    expect(m.fit).not.toBeNull();
    // The band and the line are drawn, and the level in the text is the API's.
    expect(await page.getByTestId("soil-line").count()).toBe(1);
    const critical = await page.getByTestId("critical-level").innerText();
    expect(critical).toContain(m.criticalLevel!.zero.text);
    expect(critical).toContain("Critical soil-test level");
    expect(await page.getByTestId("critical-level-caution").innerText()).toBe(m.criticalLevel!.caution.text);
    expect(await page.getByTestId("soil-line-text").innerText()).toContain(m.plainWords);
    // The scatter's accessible name carries the line in words.
    expect(await page.getByTestId("soil-scatter").getAttribute("aria-label")).toContain(m.criticalLevel!.zero.text);

    // Prices typed on the device give the level where the line falls to the break-even, computed here.
    await page.getByTestId("product-cost-input").fill("12");
    await page.getByTestId("application-cost-input").fill("6");
    await page.getByTestId("price-input").fill("11");
    const atBreakEven = page.getByTestId("critical-level-break-even");
    await atBreakEven.waitFor();
    const priced = metaAnalysisResult.parse(
      await (await fetch(`${server.url}/api/v1/analyses/meta?${question}&moderator=soilTestValue&forestLimit=0&price=11&cost=18`)).json(),
    );
    expect(await atBreakEven.innerText()).toBe(priced.moderatorRegression!.criticalLevel!.breakEven!.text);

    // Phone first: nothing wider than the screen.
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    expect(overflow).toBeLessThanOrEqual(0);
    await page.getByTestId("critical-level").scrollIntoViewIfNeeded();
    await screenshot(page, `evidence-soil-line-${name}`);
    expect(problems).toEqual([]);
    await context.close();
  }, 180_000);
});

it("soil tests on two scales: the panel says what is mixed instead of a line", async () => {
  const context = await newContext(browser, phone);
  const page = await context.newPage();
  // With no filters, the soil test that counts is P for some site-years and K for others.
  await page.goto(`${server.url}/`);
  await page.getByTestId("pooled-estimate").first().waitFor({ timeout: 30_000 });
  await page.getByTestId("open-scatter").click();
  const refused = page.getByTestId("soil-line-refused");
  await refused.waitFor({ timeout: 30_000 });
  expect(await refused.innerText()).toMatch(/^No line: The soil test that counts is P by Bray-P1 \(ppm\) at \d+ site-years and K by/);
  expect(await page.getByTestId("soil-line").count()).toBe(0);
  await context.close();
}, 180_000);
