import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { seedSafetyResult } from "@/schemas/seed-safety";
import { launchBrowser, newContext, phone, screenshot, startServer, watchPage, type RunningServer } from "./harness";

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

describe("the Evidence screen compares stand and early growth on the demo (390x844)", () => {
  it("switches to Stand, says whether seed-placed treatments reduced it, and keeps the choice in the link; then to Early growth", async () => {
    const context = await newContext(browser, phone);
    const page = await context.newPage();
    const problems = watchPage(page);
    await page.goto(`${server.url}/?crop=soybean&nutrient=P`);
    await page.getByTestId("pooled-estimate").first().waitFor({ timeout: 30_000 });
    await expect.poll(() => page.getByTestId("summary-title").innerText()).toBe("Mean yield response");
    // Yield: whether it pays is shown, and there is no seed-safety panel.
    expect(await page.getByTestId("seed-safety").count()).toBe(0);

    await page.getByTestId("measure-choice-stand").click();
    await page.waitForURL(/measure=stand/);
    await expect.poll(() => page.getByTestId("summary-title").innerText(), { timeout: 20_000 }).toBe("Mean stand response");
    await expect.poll(() => page.getByTestId("pooled-estimate").first().innerText(), { timeout: 20_000 }).toMatch(/plants\/ac/);
    // The profitability part is for yield only.
    expect(await page.getByTestId("price-input").count()).toBe(0);
    const statement = page.getByTestId("seed-safety-statement");
    await statement.waitFor({ timeout: 30_000 });
    const api = seedSafetyResult.parse(
      await (await fetch(`${server.url}/api/v1/analyses/seed-safety?crop=soybean&nutrient=P&measure=stand`)).json(),
    );
    // The demo's invented seed-placement injury: in-furrow treatments thin the stand; band and broadcast do not.
    expect(api.seedPlaced!.ciUpper).toBeLessThan(0);
    expect(api.notSeedPlaced!.ciUpper).toBeGreaterThan(0);
    expect(api.notSeedPlaced!.estimate).toBeGreaterThan(api.seedPlaced!.ciUpper);
    expect(await statement.innerText()).toBe(api.statement);
    expect(api.statement).toMatch(/^Seed-placed \(in-furrow\) treatments reduced the stand: −[\d,]+ plants\/ac/);
    expect(api.statement).toMatch(/found a loss in \d+ of \d+ seed-placed comparisons/);
    // The guideline check beside it, and the scatter of stand response against the rate with the seed.
    await page.getByTestId("caution-seed-placed-n-k2o").first().waitFor();
    const scatter = await page.getByTestId("seed-safety-scatter").getAttribute("aria-label");
    expect(scatter).toMatch(/N \+ K2O placed with the seed/);
    expect(await page.locator('[data-testid="seed-safety-scatter"] [data-shape="triangle"]').count()).toBe(
      api.points.filter((p) => p.seedPlaced).length,
    );
    await screenshot(page, "evidence-stand-phone");

    // The share link carries the choice.
    await page.getByTestId("share-link").click();
    expect(await page.getByTestId("share-url").first().innerText()).toMatch(/measure=stand/);

    await page.getByTestId("measure-choice-vigour").click();
    await page.waitForURL(/measure=vigour/);
    await expect.poll(() => page.getByTestId("summary-title").innerText(), { timeout: 20_000 }).toBe("Mean early growth response");
    await expect
      .poll(() => page.getByTestId("seed-safety-statement").innerText(), { timeout: 20_000 })
      .toMatch(/^Seed-placed \(in-furrow\) treatments reduced the early growth/);
    expect(await page.getByTestId("measure-unit").innerText()).toMatch(/score \(1 \(poor\) to 9 \(excellent\)\); higher is better/);
    await screenshot(page, "evidence-vigour-phone");
    expect(problems).toEqual([]);
    await context.close();
  }, 180_000);
});
