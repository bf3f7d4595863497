import { and, desc, eq, like, sql } from "drizzle-orm";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { outbox, roleChanges, users } from "@/db/schema";
import { demoAccounts, demoPassword } from "@/datasets/seed-demo";
import { checkEmail, me, roleChangeList } from "@/schemas/account";
import { passwordWeakness } from "@/server/auth/password-strength";
import { makeUser, testApp, testPassword, type TestApp } from "@/tests/support/test-app";
import { signedInAgent } from "@/tests/support/sign-in";

let t: TestApp;
beforeAll(async () => {
  t = await testApp();
});
afterAll(() => t.close());

/** The newest message of a kind to an address, and the link in it (as the recipient would click it). */
async function lastMail(to: string, kind: string) {
  const [message] = await t.ctx.db
    .select()
    .from(outbox)
    .where(and(eq(outbox.to, to), eq(outbox.kind, kind)))
    .orderBy(desc(outbox.createdAt))
    .limit(1);
  if (!message) throw new Error(`no ${kind} message to ${to}`);
  const link = message.text.match(/https?:\/\/\S+/)?.[0];
  if (!link) throw new Error(`the ${kind} message has no link`);
  const url = new URL(link);
  return { message, url, token: url.searchParams.get("token") ?? "" };
}

const newPassword = "tallgrass-rows-77";

describe("sign-up → confirmation link → sign-in", () => {
  const email = "Prairie.Agronomist@tallgrass.test";

  it("creates an unverified member, ignores role and emailVerified in the body, and mails a /verify link", async () => {
    const res = await request(t.app)
      .post("/api/v1/sign-up")
      .send({ email, displayName: "Rowan Field", password: testPassword, role: "admin", emailVerified: true })
      .expect(202);
    expect(checkEmail.parse(res.body).status).toBe("check-email");
    const [user] = await t.ctx.db.select().from(users).where(eq(users.email, email.toLowerCase()));
    expect(user?.role).toBe("member");
    expect(user?.emailVerifiedAt).toBeNull();

    const { url, message } = await lastMail(email.toLowerCase(), "verification");
    expect(url.origin).toBe("http://plotbank.test");
    expect(url.pathname).toBe("/verify");
    expect(message.html).toContain(url.href.replace(/&/g, "&amp;"));
  });

  it("refuses sign-in until the address is confirmed", async () => {
    const res = await request(t.app).post("/api/v1/session").send({ email, password: testPassword }).expect(401);
    expect(res.body.detail).toMatch(/confirm your e-mail/i);
  });

  it("confirms with the link, then signs in; the link works only once", async () => {
    const { token } = await lastMail(email.toLowerCase(), "verification");
    await request(t.app).post("/api/v1/email-verification").send({ token }).expect(200);
    const agent = await signedInAgent(t.app, email);
    const who = me.parse((await agent.get("/api/v1/account").expect(200)).body);
    expect(who).toMatchObject({ email: email.toLowerCase(), role: "member", emailVerified: true, displayName: "Rowan Field" });
    const again = await request(t.app).post("/api/v1/email-verification").send({ token }).expect(410);
    expect(again.body.detail).toMatch(/already been used/);
  });

  it("answers the same for an address that already has an account, and mails its owner instead", async () => {
    const res = await request(t.app)
      .post("/api/v1/sign-up")
      .send({ email, displayName: "Someone Else", password: "another-long-pass-9" })
      .expect(202);
    expect(res.body.status).toBe("check-email");
    const { message } = await lastMail(email.toLowerCase(), "already-registered");
    expect(message.subject).toMatch(/already have/);
  });

  it("refuses weak passwords at the field, with the strength estimator's own advice", async () => {
    const signUp = (email: string, password: string) => request(t.app).post("/api/v1/sign-up").send({ email, displayName: "X", password });
    const short = await signUp("x1@tallgrass.test", "short").expect(400);
    expect(short.body.errors[0].field).toBe("body.password");
    // Whole entries of zxcvbn's common-password list, and near-variants of them (score below 3).
    const common = await signUp("x2@tallgrass.test", "123456789012").expect(400);
    expect(common.body.errors).toEqual([
      { field: "body.password", message: "This is a commonly used password. Add more words that are less common." },
    ]);
    const similar = await signUp("x3@tallgrass.test", "password1234").expect(400);
    expect(similar.body.errors[0].message).toMatch(/^This is similar to a commonly used password\./);
    const repeated = await signUp("x4@tallgrass.test", "aaaaaaaaaaaa").expect(400);
    expect(repeated.body.errors[0].message).toMatch(/^Repeated characters like "aaa" are easy to guess\./);
    const keyboard = await signUp("x5@tallgrass.test", "qwertyuiop12").expect(400);
    expect(keyboard.body.errors[0].message).toMatch(/common/);
    const fromAddress = await signUp("wren.headland@tallgrass.test", "wren.headland-2026").expect(400);
    expect(fromAddress.body.errors[0].message).toBe("Do not build the password from your e-mail address.");
    expect(await t.ctx.db.select().from(users).where(like(users.email, "x_@tallgrass.test"))).toEqual([]);
  });

  it("accepts passphrases of a few unrelated words, the demo accounts' password among them", async () => {
    for (const { email } of demoAccounts) expect(passwordWeakness(demoPassword, email), email).toBeNull();
    await request(t.app)
      .post("/api/v1/sign-up")
      .send({ email: "demo.like@tallgrass.test", displayName: "Demo Like", password: demoPassword })
      .expect(202);
    await request(t.app)
      .post("/api/v1/sign-up")
      .send({ email: "furrow@tallgrass.test", displayName: "Furrow", password: testPassword })
      .expect(202);
  });

  it("refuses an unknown link with a clear message", async () => {
    const res = await request(t.app).post("/api/v1/email-verification").send({ token: "pbv_not-a-real-token" }).expect(410);
    expect(res.body.detail).toMatch(/not valid/);
  });
});

describe("password reset", () => {
  it("mails a one-hour link; the new password works, the old one fails, the link is refused a second time, sessions end", async () => {
    const user = await makeUser(t.ctx, "member", "reset-me@tallgrass.test");
    const before = await signedInAgent(t.app, user.email);
    await before.get("/api/v1/account").expect(200);

    await request(t.app).post("/api/v1/password-reset").send({ email: "RESET-ME@tallgrass.test" }).expect(202);
    const { url, token, message } = await lastMail(user.email, "password-reset");
    expect(url.pathname).toBe("/reset-password");
    expect(message.text).toMatch(/one hour/);

    await request(t.app).post("/api/v1/password-reset/confirm").send({ token, password: newPassword }).expect(204);
    await before.get("/api/v1/account").expect(401);
    await request(t.app).post("/api/v1/session").send({ email: user.email, password: testPassword }).expect(401);
    await signedInAgent(t.app, user.email, newPassword);

    const second = await request(t.app).post("/api/v1/password-reset/confirm").send({ token, password: "yet-another-pass-42" }).expect(410);
    expect(second.body.detail).toMatch(/already been used.*Forgot password/);
  });

  it("keeps the link usable when the new password is refused", async () => {
    const user = await makeUser(t.ctx, "member");
    await request(t.app).post("/api/v1/password-reset").send({ email: user.email }).expect(202);
    const { token } = await lastMail(user.email, "password-reset");
    await request(t.app).post("/api/v1/password-reset/confirm").send({ token, password: "qwertyuiop123" }).expect(400);
    await request(t.app).post("/api/v1/password-reset/confirm").send({ token, password: newPassword }).expect(204);
  });

  it("refuses an expired link", async () => {
    const user = await makeUser(t.ctx, "member");
    await request(t.app).post("/api/v1/password-reset").send({ email: user.email }).expect(202);
    const { token } = await lastMail(user.email, "password-reset");
    const { emailTokens } = await import("@/db/schema");
    await t.ctx.db
      .update(emailTokens)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(emailTokens.email, user.email));
    const res = await request(t.app).post("/api/v1/password-reset/confirm").send({ token, password: newPassword }).expect(410);
    expect(res.body.detail).toMatch(/expired/);
  });

  it("answers the same for an unknown address and sends nothing", async () => {
    const res = await request(t.app).post("/api/v1/password-reset").send({ email: "nobody@tallgrass.test" }).expect(202);
    expect(res.body.status).toBe("check-email");
    const sent = await t.ctx.db.select().from(outbox).where(eq(outbox.to, "nobody@tallgrass.test"));
    expect(sent).toEqual([]);
  });
});

describe("invitation → accept → sign-in", () => {
  it("an admin invites a curator; the invitee chooses a name and password and signs in as a verified curator", async () => {
    const admin = await makeUser(t.ctx, "admin");
    const adminAgent = await signedInAgent(t.app, admin.email);
    await adminAgent.post("/api/v1/admin/invitations").send({ email: "new.curator@tallgrass.test", role: "curator" }).expect(201);
    const open = await adminAgent.get("/api/v1/admin/invitations").expect(200);
    expect(open.body.items.map((i: { email: string }) => i.email)).toContain("new.curator@tallgrass.test");

    const { url, token, message } = await lastMail("new.curator@tallgrass.test", "invitation");
    expect(url.pathname).toBe("/invite");
    expect(message.subject).toMatch(/curator/);

    const preview = await request(t.app).post("/api/v1/invitations/preview").send({ token }).expect(200);
    expect(preview.body).toMatchObject({ email: "new.curator@tallgrass.test", role: "curator" });

    const accepted = await request(t.app)
      .post("/api/v1/invitations/accept")
      .send({ token, displayName: "Ada Furrow", password: newPassword, role: "admin" })
      .expect(201);
    expect(accepted.body).toMatchObject({ role: "curator", emailVerified: true, displayName: "Ada Furrow" });

    const agent = await signedInAgent(t.app, "new.curator@tallgrass.test", newPassword);
    expect((await agent.get("/api/v1/session").expect(200)).body.user.role).toBe("curator");
    const again = await request(t.app)
      .post("/api/v1/invitations/accept")
      .send({ token, displayName: "X", password: newPassword })
      .expect(410);
    expect(again.body.detail).toMatch(/invitation has already been used/);

    // The grant is in the role-change log like any change of role, made by the inviter.
    const log = roleChangeList.parse((await adminAgent.get("/api/v1/admin/role-changes").expect(200)).body);
    const granted = log.items.filter((c) => c.user.id === accepted.body.id);
    expect(granted).toEqual([
      expect.objectContaining({ fromRole: null, toRole: "curator", actor: { id: admin.id, displayName: admin.displayName } }),
    ]);
  });

  it("creates no account when the role grant cannot be logged, and the link still works afterwards", async () => {
    const fresh = await testApp();
    try {
      const admin = await makeUser(fresh.ctx, "admin");
      const adminAgent = await signedInAgent(fresh.app, admin.email);
      await adminAgent.post("/api/v1/admin/invitations").send({ email: "logged.reviewer@tallgrass.test", role: "reviewer" }).expect(201);
      const [invitation] = await fresh.ctx.db.select().from(outbox).where(eq(outbox.kind, "invitation"));
      const token = new URL(invitation!.text.match(/https?:\/\/\S+/)![0]).searchParams.get("token")!;
      // A database-level fault in the audit log: the account must not exist without its log row.
      await fresh.ctx.db.execute(
        sql`create function refuse_log() returns trigger language plpgsql as $$ begin raise exception 'audit log unavailable'; end $$`,
      );
      await fresh.ctx.db.execute(sql`create trigger refuse_log before insert on role_changes for each row execute function refuse_log()`);
      await request(fresh.app)
        .post("/api/v1/invitations/accept")
        .send({ token, displayName: "Lee Margin", password: newPassword })
        .expect(500);
      expect(await fresh.ctx.db.select().from(users).where(eq(users.email, "logged.reviewer@tallgrass.test"))).toEqual([]);
      await fresh.ctx.db.execute(sql`drop trigger refuse_log on role_changes`);
      const accepted = await request(fresh.app)
        .post("/api/v1/invitations/accept")
        .send({ token, displayName: "Lee Margin", password: newPassword })
        .expect(201);
      const rows = await fresh.ctx.db.select().from(roleChanges).where(eq(roleChanges.userId, accepted.body.id));
      expect(rows).toEqual([expect.objectContaining({ actorId: admin.id, fromRole: null, toRole: "reviewer" })]);
    } finally {
      await fresh.close();
    }
  });

  it("refuses to invite an address that already has an account", async () => {
    const admin = await makeUser(t.ctx, "admin");
    const member = await makeUser(t.ctx, "member");
    const agent = await signedInAgent(t.app, admin.email);
    const res = await agent.post("/api/v1/admin/invitations").send({ email: member.email, role: "curator" }).expect(409);
    expect(res.body.errors[0].field).toBe("body.email");
  });
});

describe("roles", () => {
  it("an admin changes a role; the change is in the audit log with who did it", async () => {
    const admin = await makeUser(t.ctx, "admin");
    const member = await makeUser(t.ctx, "member");
    const agent = await signedInAgent(t.app, admin.email);
    const res = await agent.patch(`/api/v1/admin/users/${member.id}`).send({ role: "reviewer" }).expect(200);
    expect(res.body.role).toBe("reviewer");
    const log = await agent.get("/api/v1/admin/role-changes").expect(200);
    expect(log.body.items[0]).toMatchObject({ fromRole: "member", toRole: "reviewer", user: { id: member.id }, actor: { id: admin.id } });
    const rows = await t.ctx.db.select().from(roleChanges).where(eq(roleChanges.userId, member.id));
    expect(rows).toHaveLength(1);
  });

  it("the last admin cannot stop being one", async () => {
    const lone = await testApp();
    try {
      const admin = await makeUser(lone.ctx, "admin");
      const agent = await signedInAgent(lone.app, admin.email);
      const res = await agent.patch(`/api/v1/admin/users/${admin.id}`).send({ role: "member" }).expect(409);
      expect(res.body.detail).toMatch(/only admin/);
    } finally {
      await lone.close();
    }
  });
});

describe("profile", () => {
  it("changes the name, ignores role and emailVerified, and changes the password only with the current one", async () => {
    const user = await makeUser(t.ctx, "member");
    const agent = await signedInAgent(t.app, user.email);
    const other = await signedInAgent(t.app, user.email);
    const res = await agent
      .patch("/api/v1/account")
      .send({ displayName: "Juniper Strip", role: "admin", emailVerified: false })
      .expect(200);
    expect(res.body).toMatchObject({ displayName: "Juniper Strip", role: "member", emailVerified: true });

    const wrong = await agent.patch("/api/v1/account").send({ currentPassword: "not-my-password", newPassword }).expect(400);
    expect(wrong.body.errors[0].field).toBe("body.currentPassword");
    const missing = await agent.patch("/api/v1/account").send({ newPassword }).expect(400);
    expect(missing.body.errors[0].field).toBe("body.currentPassword");

    await agent.patch("/api/v1/account").send({ currentPassword: testPassword, newPassword }).expect(200);
    await agent.get("/api/v1/account").expect(200);
    await other.get("/api/v1/account").expect(401);
    await signedInAgent(t.app, user.email, newPassword);
  });
});
