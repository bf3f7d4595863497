import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { demoPassword } from "@/datasets";
import { createUser } from "@/server/services/users";
import { desktop, launchBrowser, newContext, phone, screenshot, startServer, watchPage, type RunningServer } from "./harness";

/** The owner of a demo dataset shares it with another curator from the dataset's desk, then stops sharing it. */

const slug = "soybean-starter-p-placement";
const colleague = { email: "marsh.colleague@tallgrass.test", displayName: "Marsh Colleague", password: "prairie-colleague-2026" };
let server: RunningServer;
let browser: Browser;
beforeAll(async () => {
  server = await startServer();
  await createUser(server.ctx.db, { ...colleague, role: "curator", verified: true });
  await createUser(server.ctx.db, {
    email: "field.member@tallgrass.test",
    displayName: "Field Member",
    password: "prairie-member-2026",
    verified: true,
  });
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

describe.each([
  ["desktop", desktop],
  ["phone", phone],
])("sharing a dataset at %s size", (name, viewport) => {
  it("adds a curator as editor, refuses a member by name, and removes the editor", async () => {
    const context = await newContext(browser, viewport);
    const page = await context.newPage();
    const problems = watchPage(page);
    await page.goto(`${server.url}/sign-in`);
    await page.getByLabel("E-mail").fill("curator@plotbank.test");
    await page.getByLabel("Password", { exact: true }).fill(demoPassword);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.getByText("Signed in as Demo Curator").waitFor();

    await page.goto(`${server.url}/curate/datasets/${slug}`);
    const panel = page.getByTestId("editors-panel");
    await panel.getByText("No editors yet", { exact: false }).waitFor();

    const field = panel.getByLabel("Share with a curator (e-mail)");
    await field.fill("field.member@tallgrass.test");
    await panel.getByRole("button", { name: "Add editor" }).click();
    await panel.getByText("no curator has this address").waitFor();

    await field.fill(colleague.email);
    await panel.getByRole("button", { name: "Add editor" }).click();
    await panel.getByText(colleague.displayName).waitFor();
    await panel.getByText(colleague.email).waitFor();
    expect(await field.inputValue()).toBe("");
    // The server agrees: the colleague is an editor now.
    const editors = await server.ctx.db.query.datasetEditors.findMany();
    expect(editors).toHaveLength(1);
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(viewport.width);
    await panel.scrollIntoViewIfNeeded();
    await screenshot(page, `curation-editors-${name}`);

    await panel.getByRole("button", { name: `Remove ${colleague.displayName} as editor` }).click();
    await panel.getByText("No editors yet", { exact: false }).waitFor();
    expect(await server.ctx.db.query.datasetEditors.findMany()).toHaveLength(0);
    // The refused member is the one expected error: a 404, the same answer as an address without an account.
    expect(problems.filter((p) => !/\b404\b/.test(p))).toEqual([]);
    await context.close();
  });
});
