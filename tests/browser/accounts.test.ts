import { and, desc, eq } from "drizzle-orm";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { outbox, roleChanges, users } from "@/db/schema";
import { acceptInvitation, inviteUser } from "@/server/services/accounts/invitations";
import { createUser } from "@/server/services/users";
import { desktop, launchBrowser, newContext, phone, screenshot, startServer, watchPage, type RunningServer } from "./harness";

let server: RunningServer;
let browser: Browser;
beforeAll(async () => {
  server = await startServer({ demo: false });
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

describe("accounts on a phone (390x844)", () => {
  it("creates an account, confirms it through the e-mailed link and signs in", async () => {
    const email = "newcomer@tallgrass.test";
    const password = "strip-trial-basin-42";
    const context = await newContext(browser, phone);
    const page = await context.newPage();
    const problems = watchPage(page);

    await page.goto(`${server.url}/sign-up`);
    await page.getByRole("heading", { name: "Create account" }).first().waitFor();
    await page.getByLabel("Your name").fill("Basin Newcomer");
    await page.getByLabel("E-mail").fill(email);
    await page.getByLabel("Password", { exact: true }).fill("too-short");
    await page.getByRole("button", { name: "Create account" }).click();
    // Checked in the form by the shared schema, shown at the field.
    await page.getByText("Use at least 12 characters.").waitFor();
    await screenshot(page, "accounts-sign-up-error-phone");

    await page.getByLabel("Password", { exact: true }).fill(password);
    await page.getByRole("button", { name: "Create account" }).click();
    await page.getByRole("heading", { name: "Check your e-mail" }).waitFor();
    await page.getByText(`We sent a link to ${email}`).waitFor();
    const signUpButton = await page.getByRole("link", { name: "No message? Send the link again" }).boundingBox();
    expect(signUpButton!.height).toBeGreaterThanOrEqual(44);

    const [message] = await server.ctx.db
      .select()
      .from(outbox)
      .where(and(eq(outbox.to, email), eq(outbox.kind, "verification")))
      .orderBy(desc(outbox.createdAt))
      .limit(1);
    const link = message!.text.match(/https?:\/\/\S+/)![0];
    expect(link.startsWith(`${server.url}/verify?token=`)).toBe(true);

    await page.goto(link);
    await page.getByRole("heading", { name: "Address confirmed" }).waitFor();
    const [user] = await server.ctx.db.select().from(users).where(eq(users.email, email));
    expect(user!.emailVerifiedAt).not.toBeNull();
    await screenshot(page, "accounts-verified-phone");

    await page.getByRole("link", { name: "Go to sign in" }).click();
    await page.getByRole("heading", { name: "Sign in" }).first().waitFor();
    expect(await page.getByLabel("E-mail").inputValue()).toBe(email);
    await page.getByLabel("Password", { exact: true }).fill(password);
    await page.getByRole("button", { name: "Sign in" }).click();

    await page.getByText("Signed in as Basin Newcomer").waitFor();
    expect(new URL(page.url()).pathname).toBe("/account");
    await page.getByRole("link", { name: "Account" }).first().waitFor();
    expect(await page.getByRole("link", { name: "Sign in" }).count()).toBe(0);
    const scrollWidth = await page.evaluate(() => document.documentElement.scrollWidth);
    expect(scrollWidth).toBeLessThanOrEqual(phone.width);
    await screenshot(page, "accounts-account-phone");

    await page.getByRole("button", { name: "Sign out" }).click();
    await page.getByRole("heading", { name: "Sign in" }).first().waitFor();
    expect(problems).toEqual([]);
    await context.close();
  });

  it("lets an admin change a role, see it in the log, and open an e-mailed link from the outbox", async () => {
    const password = "admin-basin-plots-7";
    const admin = await createUser(server.ctx.db, {
      email: "basin.admin@tallgrass.test",
      displayName: "Basin Admin",
      password,
      role: "admin",
      verified: true,
    });
    const member = await createUser(server.ctx.db, {
      email: "basin.member@tallgrass.test",
      displayName: "Basin Member",
      password,
      verified: true,
    });
    // An invitation accepted earlier: the grant is in the log, made by the inviter.
    await inviteUser(server.ctx, admin, { email: "basin.invitee@tallgrass.test", role: "curator" });
    const [invitation] = await server.ctx.db.select().from(outbox).where(eq(outbox.to, "basin.invitee@tallgrass.test"));
    const token = new URL(invitation!.text.match(/https?:\/\/\S+/)![0]).searchParams.get("token")!;
    await acceptInvitation(server.ctx, { token, displayName: "Basin Invitee", password: "loam-furrow-sieve-31" });
    const context = await newContext(browser, phone);
    const page = await context.newPage();
    const problems = watchPage(page);

    await page.goto(`${server.url}/sign-in?next=/admin`);
    await page.getByLabel("E-mail").fill("basin.admin@tallgrass.test");
    await page.getByLabel("Password", { exact: true }).fill(password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.getByRole("heading", { name: "People & roles" }).waitFor();
    await page.getByRole("link", { name: "Admin" }).first().waitFor();

    await page.getByRole("radio", { name: "Role of Basin Member: Curator" }).click();
    await page.getByText("Basin Member: member → curator").waitFor();
    await page.getByText("Basin Invitee: joined as curator by invitation").waitFor();
    const [change] = await server.ctx.db.select().from(roleChanges).where(eq(roleChanges.userId, member.id));
    expect(change?.toRole).toBe("curator");
    await screenshot(page, "accounts-admin-people-phone");

    await page.getByLabel("E-mail").fill("new.reviewer@tallgrass.test");
    await page.getByRole("radio", { name: "Role: Reviewer", exact: true }).click();
    await page.getByRole("button", { name: "Send invitation" }).click();
    await page.getByText("Invitation sent to new.reviewer@tallgrass.test.").waitFor();

    await page.getByRole("link", { name: "Outbox (mail kept here, not sent)" }).click();
    await page.getByRole("link", { name: /You are invited to Plotbank as a reviewer/ }).click();
    await page.getByRole("heading", { name: "You are invited to Plotbank as a reviewer" }).waitFor();
    await page.getByRole("link", { name: /^Open http.*\/invite\?token=/ }).click();
    await page.getByText("You are invited as a reviewer.").waitFor();
    await page.getByRole("button", { name: "Accept and sign in" }).waitFor();
    expect(new URL(page.url()).pathname).toBe("/invite");

    // Where mail goes out by SMTP there is no outbox, and no link to one.
    server.ctx.config.development = false;
    try {
      await page.goto(`${server.url}/admin`);
      await page.getByText("Waiting to be accepted").waitFor();
      expect(await page.getByRole("link", { name: /Outbox/ }).count()).toBe(0);
    } finally {
      server.ctx.config.development = true;
    }
    expect(problems).toEqual([]);
    await context.close();
  });

  it("keeps the account screen in two columns on a wide screen", async () => {
    const context = await newContext(browser, desktop);
    const page = await context.newPage();
    const problems = watchPage(page);
    await page.goto(`${server.url}/sign-in`);

    await page.getByLabel("E-mail").fill("basin.admin@tallgrass.test");
    await page.getByLabel("Password", { exact: true }).fill("admin-basin-plots-7");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.getByText("Signed in as Basin Admin").waitFor();
    const profile = await page.getByRole("heading", { name: "Profile" }).boundingBox();
    const follows = await page.getByRole("heading", { name: "Datasets you follow" }).boundingBox();
    expect(follows!.x).toBeGreaterThan(profile!.x + 200);
    await screenshot(page, "accounts-account-desktop");
    expect(problems).toEqual([]);
    await context.close();
  });
});
