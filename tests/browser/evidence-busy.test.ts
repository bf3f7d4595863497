import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { launchBrowser, newContext, phone, screenshot, startServer, type RunningServer } from "./harness";

// A server with a tiny quota for the web app (3 requests per browser in a 10 s window): the first screen spends it,
// so the next analysis is answered 429. The screen must say it is busy and when it tries again, then get the answer
// by itself after Retry-After; it never says "Something went wrong".
let server: RunningServer;
let browser: Browser;

beforeAll(async () => {
  server = await startServer({ config: { appRatePerMinute: 3, anonRatePerMinute: 3, rateWindowMs: 10_000 } });
  browser = await launchBrowser();
}, 180_000);
afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

describe("over the quota", () => {
  it("the Evidence screen says Busy with the seconds left, retries after Retry-After, and shows the answer", async () => {
    const context = await newContext(browser, phone);
    const page = await context.newPage();
    const statuses: number[] = [];
    page.on("response", (r) => {
      if (r.url().includes("/api/v1/analyses/meta")) statuses.push(r.status());
    });
    let sawSomethingWrong = false;
    await page.exposeFunction("reportWrong", () => (sawSomethingWrong = true));
    await page.addInitScript(() => {
      new MutationObserver(() => {
        if (document.body?.innerText.includes("Something went wrong")) (window as unknown as { reportWrong(): void }).reportWrong();
      }).observe(document, { subtree: true, childList: true, characterData: true });
    });
    await page.goto(`${server.url}/?nutrient=P`);
    await page.getByTestId("pooled-estimate").or(page.getByTestId("busy")).first().waitFor({ timeout: 60_000 });
    // A change of filter asks for a new analysis, over this browser's quota.
    await page.getByTestId("filters-toggle").click();
    await page.getByTestId("filter-crop-soybean").click();
    const busy = page.getByText(/^Busy — trying again in \d+ s$/);
    await busy.waitFor({ timeout: 30_000 });
    await screenshot(page, "evidence-phone-busy");
    const seconds = Number(/in (\d+) s/.exec(await busy.innerText())![1]);
    expect(seconds).toBeGreaterThan(0);
    expect(seconds).toBeLessThanOrEqual(10);
    // After Retry-After the request goes again by itself and the numbers come.
    await page.getByTestId("pooled-estimate").first().waitFor({ timeout: 60_000 });
    await page.getByTestId("busy").waitFor({ state: "detached", timeout: 30_000 });
    expect(page.url()).toContain("crop=soybean");
    expect(statuses).toContain(429);
    expect(statuses.at(-1)).toBe(200);
    expect(sawSomethingWrong).toBe(false);
    await context.close();
  });
});
