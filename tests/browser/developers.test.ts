import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createUser } from "@/server/services/users";
import { desktop, launchBrowser, newContext, phone, screenshot, startServer, watchPage, type RunningServer } from "./harness";

const email = "ines.devlin@tallgrass.test";
const password = "prairie-script-2026";
let server: RunningServer;
let browser: Browser;
beforeAll(async () => {
  server = await startServer();
  await createUser(server.ctx.db, { email, displayName: "Ines Devlin", password, verified: true });
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

describe("the Developers screen", () => {
  it("makes a token that works against the API, shows it once, and revoking it stops it", async () => {
    const context = await newContext(browser, phone);
    const page = await context.newPage();
    const problems = watchPage(page);

    // Signed out: the examples are there, tokens need a sign-in.
    await page.goto(`${server.url}/developers?crop=soybean&placement=2x2-band&soilTestClass=low`);
    await page.getByText("Sign in to make API tokens").waitFor();
    const curl = page.getByText(/curl -H "Authorization: Bearer \$PLOTBANK_TOKEN"/).first();
    await curl.waitFor();
    // The example follows the page's filters, and the URL it shows answers with rows.
    const exampleUrl = (await curl.textContent())!.match(/"(http[^"]+)"/)![1]!;
    expect(new URL(exampleUrl).searchParams.get("placement")).toBe("2x2-band");
    const exampleRes = await fetch(exampleUrl.replace(new URL(exampleUrl).origin, server.url));
    expect(exampleRes.status).toBe(200);
    expect(((await exampleRes.json()) as { items: unknown[] }).items.length).toBeGreaterThan(0);

    await page.goto(`${server.url}/sign-in`);
    await page.getByLabel("E-mail").fill(email);
    await page.getByLabel("Password", { exact: true }).fill(password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.getByText("Signed in as Ines Devlin").waitFor();

    await page.goto(`${server.url}/developers`);
    await page.getByText("Make a token").waitFor();
    // A member may only make read tokens: no write choice is offered.
    expect(await page.getByRole("radio", { name: "Read and write (curation)" }).count()).toBe(0);

    // A bad expiry is named beside its field, and nothing is made.
    await page.getByLabel("Name").fill("nightly pull");
    await page.getByLabel("Expires after (days, 1–365)").fill("999");
    await page.getByRole("button", { name: "Make token" }).click();
    await page.getByText("at most 365 days").waitFor();
    expect(await page.getByText("Your new token", { exact: false }).count()).toBe(0);

    await page.getByLabel("Expires after (days, 1–365)").fill("30");
    await page.getByRole("button", { name: "Make token" }).click();
    await page.getByText("Your new token “nightly pull”").waitFor();
    const secret = (await page
      .getByText(/^pb_[A-Za-z0-9_-]{20,}$/)
      .first()
      .textContent())!.trim();
    await screenshot(page, "developers-new-token-phone");

    // The secret authenticates an API read; a made-up one does not.
    const withToken = await fetch(`${server.url}/api/v1/responses?crop=soybean&limit=5`, {
      headers: { Authorization: `Bearer ${secret}` },
    });
    expect(withToken.status).toBe(200);
    const wrong = await fetch(`${server.url}/api/v1/responses?limit=5`, { headers: { Authorization: `Bearer ${secret}x` } });
    expect(wrong.status).toBe(401);

    // Once dismissed, the secret is gone from the screen; the list keeps only its prefix.
    await page.getByRole("button", { name: "I have stored it" }).click();
    await page.getByText(`${secret.slice(0, 10)}…`).waitFor();
    expect(await page.getByText(secret, { exact: true }).count()).toBe(0);

    await page.getByRole("button", { name: "Revoke nightly pull" }).click();
    await expect
      .poll(async () => (await fetch(`${server.url}/api/v1/responses?limit=5`, { headers: { Authorization: `Bearer ${secret}` } })).status)
      .toBe(401);
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(phone.width);
    expect(problems.filter((p) => !/\b(400|401)\b/.test(p))).toEqual([]);
    await context.close();
  });

  it("reads well on a wide screen", async () => {
    const context = await newContext(browser, desktop);
    const page = await context.newPage();
    const problems = watchPage(page);
    // A visitor finds the screen from the navigation: open data need no account.
    await page.goto(`${server.url}/datasets`);
    await page.getByRole("link", { name: "Developers" }).first().click();
    await page.getByRole("link", { name: "OpenAPI document" }).waitFor();
    expect(new URL(page.url()).pathname).toBe("/developers");
    const href = await page.getByRole("link", { name: "OpenAPI document" }).getAttribute("href");
    const doc = (await (await fetch(`${server.url}${href}`)).json()) as { openapi: string };
    expect(doc.openapi).toMatch(/^3\.1/);
    // The reference is a server page, not an app route: following the link leaves the app for it.
    await page.getByRole("link", { name: "Interactive API reference" }).click();
    await page.waitForURL(`${server.url}/api/docs/`);
    await page.getByText("Plotbank open-data API").first().waitFor();
    await screenshot(page, "developers-api-reference");
    await page.goBack();
    await page.getByRole("link", { name: "OpenAPI document" }).waitFor();
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(desktop.width);
    await screenshot(page, "developers-desktop");
    expect(problems).toEqual([]);
    await context.close();
  });
});
