import { and, eq } from "drizzle-orm";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { follows, outbox } from "@/db/schema";
import { createUser } from "@/server/services/users";
import { citableFixture, type CitableFixture } from "@/tests/support/citable-fixture";
import { launchBrowser, newContext, phone, screenshot, startServer, watchPage, type RunningServer } from "./harness";

const slug = "tb-follow-on-phone";
const email = "ivo.marsh@tallgrass.test";
const password = "loess-ridge-furrow-88";
let server: RunningServer;
let browser: Browser;
let dataset: CitableFixture;
beforeAll(async () => {
  server = await startServer({ demo: false });
  dataset = await citableFixture(server.ctx, slug);
  await dataset.publish("1.0.0", { years: [2020, 2021] });
  await createUser(server.ctx.db, { email, displayName: "Ivo Marsh", password, verified: true });
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

describe("following a dataset on a phone", () => {
  it("a visitor signs in from the dataset page, comes back to it, follows it, and is mailed when a new version is published", async () => {
    const context = await newContext(browser, phone);
    const page = await context.newPage();
    const problems = watchPage(page);

    await page.goto(`${server.url}/datasets/${slug}`);
    await page.getByRole("link", { name: /^Sign in to follow/ }).click();
    await page.getByLabel("E-mail").fill(email);
    await page.getByLabel("Password", { exact: true }).fill(password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(`${server.url}/datasets/${slug}`);

    const follow = page
      .getByRole("button", { name: /^Follow / })
      .filter({ visible: true })
      .first();
    const box = await follow.boundingBox();
    expect(box!.height).toBeGreaterThanOrEqual(44);
    await follow.click();
    await page
      .getByRole("button", { name: /^Stop following / })
      .filter({ visible: true })
      .first()
      .waitFor();
    await page.getByText("You get an e-mail when a new version is published.").filter({ visible: true }).first().waitFor();
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(phone.width);
    await screenshot(page, "follow-dataset-phone");
    const rows = await server.ctx.db.select().from(follows).where(eq(follows.datasetId, dataset.datasetId));
    expect(rows).toHaveLength(1);

    await page.getByRole("link", { name: "Account" }).first().click();
    await page.getByText("Datasets you follow").waitFor();
    await page.getByRole("link", { name: /Latest version 1\.0\.0$/ }).waitFor();

    await dataset.publish("1.1.0", { years: [2020, 2022] });
    const notices = await server.ctx.db
      .select()
      .from(outbox)
      .where(and(eq(outbox.to, email), eq(outbox.kind, "new-version")));
    expect(notices).toHaveLength(1);
    expect(notices[0]!.text).toContain(`/datasets/${slug}`);

    // Unfollowing from the dataset page ends the notices.
    await page.goto(`${server.url}/datasets/${slug}`);
    await page
      .getByRole("button", { name: /^Stop following / })
      .filter({ visible: true })
      .first()
      .click();
    await page
      .getByRole("button", { name: /^Follow / })
      .filter({ visible: true })
      .first()
      .waitFor();
    expect(await server.ctx.db.select().from(follows).where(eq(follows.datasetId, dataset.datasetId))).toHaveLength(0);
    expect(problems).toEqual([]);
    await context.close();
  });
});
