import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { metaAnalysisResult } from "@/schemas/analysis";
import { artifactsDir, launchBrowser, newContext, phone, screenshot, startServer, watchPage, type RunningServer } from "./harness";

/**
 * The cautions card on the Evidence screen shows the API's evaluated cautions: on the demo, in-furrow P starters on
 * soybean put their carrier N with the seed, so the seed-placement and salt rules come first and name the treatments.
 */
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

describe("the cautions card follows the question", () => {
  it("names the in-furrow treatments that trip a rule, ahead of the standing cautions (390x844)", async () => {
    const query = "crop=soybean&nutrient=P&placement=in-furrow";
    const api = metaAnalysisResult.parse(await (await fetch(`${server.url}/api/v1/analyses/meta?${query}`)).json());
    const tripped = api.cautions.filter((c) => c.matches);
    expect(tripped.map((c) => c.code)).toEqual(["seed-placed-n-k2o", "salt-sensitive-crop"]);
    expect(new Set(tripped[0]!.treatments.map((t) => t.treatment))).toEqual(new Set(["IF-APP", "IF-MAP"]));

    const context = await newContext(browser, phone);
    const page = await context.newPage();
    const problems = watchPage(page);
    await page.goto(`${server.url}/?${query}`);
    const card = page.getByTestId("cautions").first();
    await card.waitFor({ timeout: 30_000 });
    await page.getByTestId("caution-seed-placed-n-k2o").first().waitFor({ timeout: 30_000 });
    const text = await card.innerText();
    expect(text).toMatch(/N or N \+ K2O placed with the seed/);
    expect(text).toMatch(/IF-APP \(soybean-starter-p-placement\): [\d.]+ lb\/ac N \+ K2O with the seed/);
    expect(text).toMatch(/IF-MAP/);
    expect(text).toMatch(/Source: common practice, no source/);
    // The matching rules come before the standing cautions, and the band rule is only among those not tripped.
    expect(text.indexOf("placed with the seed")).toBeLessThan(text.indexOf("field can differ"));
    expect(await page.getByTestId("caution-band-n-k2o-rate").count()).toBe(0);
    expect(await page.getByTestId("cautions-untripped").first().innerText()).toMatch(/2x2 band/);
    // The screen says which nutrient rule chose these treatments: the tested nutrient, not any amount supplied.
    const rule = await page.getByTestId("nutrient-rule").first().innerText();
    expect(rule).toContain("nutrient=P");
    expect(rule).toContain(api.provenance.nutrientRule.text);
    await card.scrollIntoViewIfNeeded();
    await screenshot(page, "cautions-in-furrow-phone");
    await card.screenshot({ path: `${artifactsDir}/cautions-card-in-furrow-phone.png` });
    expect(problems).toEqual([]);
    await context.close();
  }, 120_000);
});
