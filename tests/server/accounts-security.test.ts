import { spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import { createServer, type Socket } from "node:net";
import { tmpdir } from "node:os";
import path from "node:path";
import { and, asc, eq, sql } from "drizzle-orm";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiTokens, datasets, follows, outbox, versions } from "@/db/schema";
import { invitationList } from "@/schemas/account";
import { newSecret, sha256Hex } from "@/server/auth/secrets";
import { loadConfig, refuseUndeliverableMail } from "@/server/config";
import type { AppContext } from "@/server/context";
import { mailDeliveriesEnded } from "@/server/mail/mailer";
import { runPublishHooks } from "@/server/services/publish-hooks";
import { makeUser, testApp, testPassword, type TestApp } from "@/tests/support/test-app";
import { signedInAgent } from "@/tests/support/sign-in";
import { draftWithData } from "@/tests/server/curation-fixtures";

let t: TestApp;
beforeAll(async () => {
  t = await testApp({ authLimits: { windowMs: 60_000, perIp: 6, perAccount: 3 } });
});
afterAll(() => t.close());

async function insertDataset(ctx: AppContext, slug: string, state: "draft" | "published") {
  const owner = await makeUser(ctx, "curator");
  const [dataset] = await ctx.db
    .insert(datasets)
    .values({
      slug,
      title: `Tallgrass ${slug}`,
      crops: ["corn"],
      region: "Tallgrass Basin",
      description: "Invented trials",
      ownerId: owner.id,
    })
    .returning();
  const [version] = await ctx.db
    .insert(versions)
    .values({
      datasetId: dataset!.id,
      semver: "1.0.0",
      tableSchema: { resources: {} } as never,
      createdBy: owner.id,
      changelog: "First release.",
    })
    .returning();
  if (state !== "draft") {
    await ctx.db.update(versions).set({ state, submittedBy: owner.id, publishedAt: new Date() }).where(eq(versions.id, version!.id));
  }
  return { owner, dataset: dataset!, versionId: version!.id };
}

async function tokenFor(userId: string, scope: "read" | "write") {
  const secret = newSecret("pb_");
  await t.ctx.db.insert(apiTokens).values({ userId, name: "test", prefix: secret.slice(0, 8), tokenHash: sha256Hex(secret), scope });
  return secret;
}

describe("abuse limits", () => {
  it("limits failed sign-ins per account with a 429 problem and Retry-After; successes do not count", async () => {
    const user = await makeUser(t.ctx, "member");
    for (let i = 0; i < 3; i++) await signedInAgent(t.app, user.email);
    for (let i = 0; i < 3; i++) {
      await request(t.app).post("/api/v1/session").send({ email: user.email, password: "wrong-password-1" }).expect(401);
    }
    const res = await request(t.app).post("/api/v1/session").send({ email: user.email.toUpperCase(), password: testPassword }).expect(429);
    expect(res.headers["content-type"]).toMatch(/^application\/problem\+json/);
    expect(Number(res.headers["retry-after"])).toBeGreaterThan(0);
    expect(res.body.detail).toMatch(/Too many sign-in attempts\. Wait 1 minute/);
    expect(res.body.retryAfter).toBe(Number(res.headers["retry-after"]));
  });

  it("limits failed sign-ins per address across accounts", async () => {
    const fresh = await testApp({ authLimits: { windowMs: 60_000, perIp: 4, perAccount: 100 } });
    try {
      for (let i = 0; i < 4; i++) {
        await request(fresh.app)
          .post("/api/v1/session")
          .send({ email: `spray${i}@tallgrass.test`, password: "wrong-password-1" })
          .expect(401);
      }
      const res = await request(fresh.app)
        .post("/api/v1/session")
        .send({ email: "spray9@tallgrass.test", password: "wrong-password-1" })
        .expect(429);
      expect(res.headers["retry-after"]).toBeDefined();
    } finally {
      await fresh.close();
    }
  });

  it("limits reset requests per e-mail address", async () => {
    const user = await makeUser(t.ctx, "member");
    for (let i = 0; i < 3; i++) await request(t.app).post("/api/v1/password-reset").send({ email: user.email }).expect(202);
    const res = await request(t.app).post("/api/v1/password-reset").send({ email: user.email }).expect(429);
    expect(res.body.detail).toMatch(/requests for e-mailed links/);
    const sent = await t.ctx.db
      .select()
      .from(outbox)
      .where(and(eq(outbox.to, user.email), eq(outbox.kind, "password-reset")));
    expect(sent).toHaveLength(3);
  });
});

describe("reset requests per client", () => {
  it("limits reset requests per client IP across many e-mail addresses; another IP is not slowed", async () => {
    const fresh = await testApp({ authLimits: { windowMs: 60_000, perIp: 3, perAccount: 100 }, trustProxy: ["loopback"] });
    try {
      const people = [];
      for (let i = 0; i < 5; i++) people.push(await makeUser(fresh.ctx, "member"));
      // Behind a loopback proxy the app is configured to trust (PLOTBANK_TRUST_PROXY=loopback), X-Forwarded-For names the client.
      const from = (ip: string, email: string) =>
        request(fresh.app).post("/api/v1/password-reset").set("X-Forwarded-For", ip).send({ email });
      for (const person of people.slice(0, 3)) await from("203.0.113.7", person.email).expect(202);
      const refused = await from("203.0.113.7", people[3]!.email).expect(429);
      expect(refused.headers["content-type"]).toMatch(/^application\/problem\+json/);
      expect(refused.body.detail).toMatch(/Too many requests for e-mailed links/);
      expect(Number(refused.headers["retry-after"])).toBeGreaterThan(0);
      await from("198.51.100.4", people[4]!.email).expect(202);

      const sent = (await fresh.ctx.db.select().from(outbox).where(eq(outbox.kind, "password-reset"))).map((m) => m.to);
      expect(sent.sort()).toEqual([people[0]!, people[1]!, people[2]!, people[4]!].map((p) => p.email).sort());
    } finally {
      await fresh.close();
    }
  });
});

describe("cross-site request guard", () => {
  it("refuses a cookie write from a foreign Origin or Referer, accepts our own and none", async () => {
    const user = await makeUser(t.ctx, "member");
    const agent = await signedInAgent(t.app, user.email);
    const foreign = await agent.patch("/api/v1/account").set("Origin", "https://evil.example").send({ displayName: "Hacked" }).expect(403);
    expect(foreign.body.detail).toMatch(/Cross-site/);
    await agent.patch("/api/v1/account").set("Referer", "https://evil.example/page").send({ displayName: "Hacked" }).expect(403);
    await agent.patch("/api/v1/account").set("Origin", "null").send({ displayName: "Hacked" }).expect(403);
    await agent.patch("/api/v1/account").set("Origin", "http://plotbank.test").send({ displayName: "Own origin" }).expect(200);
    const res = await agent.patch("/api/v1/account").send({ displayName: "No origin" }).expect(200);
    expect(res.body.displayName).toBe("No origin");
  });

  it("refuses bodies a cross-site form could send", async () => {
    const user = await makeUser(t.ctx, "member");
    const agent = await signedInAgent(t.app, user.email);
    const res = await agent.patch("/api/v1/account").set("Content-Type", "text/plain").send('{"displayName":"x"}').expect(415);
    expect(res.body.errors[0].field).toBe("header.content-type");
    await agent.patch("/api/v1/account").type("form").send({ displayName: "x" }).expect(415);
  });

  it("guards sign-up and sign-in too (login CSRF), but not bearer-token requests", async () => {
    await request(t.app)
      .post("/api/v1/sign-up")
      .set("Origin", "https://evil.example")
      .send({ email: "z@tallgrass.test", displayName: "Z", password: testPassword })
      .expect(403);
    const user = await makeUser(t.ctx, "member");
    const token = await tokenFor(user.id, "write");
    await request(t.app)
      .patch("/api/v1/account")
      .set("Authorization", `Bearer ${token}`)
      .set("Origin", "https://script.example")
      .send({ displayName: "Script" })
      .expect(200);
  });
});

describe("session cookie and headers", () => {
  it("sets an httpOnly SameSite=Lax cookie and security headers, and never returns a hash", async () => {
    const user = await makeUser(t.ctx, "member");
    const res = await request(t.app).post("/api/v1/session").send({ email: user.email, password: testPassword }).expect(200);
    const cookie = String(res.headers["set-cookie"]);
    expect(cookie).toMatch(/pb_session=pbs_/);
    expect(cookie).toMatch(/HttpOnly/);
    expect(cookie).toMatch(/SameSite=Lax/);
    expect(res.headers["x-content-type-options"]).toBe("nosniff");
    expect(res.headers["content-security-policy"]).toContain("default-src 'self'");
    expect(JSON.stringify(res.body)).not.toMatch(/scrypt|passwordHash|tokenHash/);
  });
});

describe("outbox screen", () => {
  it("is for admins in development, and absent in production", async () => {
    const admin = await makeUser(t.ctx, "admin");
    const member = await makeUser(t.ctx, "member");
    await request(t.app).post("/api/v1/password-reset").send({ email: member.email }).expect(202);
    const agent = await signedInAgent(t.app, admin.email);
    const list = await agent.get("/api/v1/admin/outbox").expect(200);
    const item = list.body.items.find((m: { to: string }) => m.to === member.email);
    const one = await agent.get(`/api/v1/admin/outbox/${item.id}`).expect(200);
    expect(one.body.links[0]).toMatch(/^http:\/\/plotbank\.test\/reset-password\?token=pbr_/);
    await (await signedInAgent(t.app, member.email)).get("/api/v1/admin/outbox").expect(403);
    await agent.get("/api/v1/admin/outbox/not-a-uuid").expect(404);

    expect(invitationList.parse((await agent.get("/api/v1/admin/invitations").expect(200)).body).outboxAvailable).toBe(true);

    const prod = await testApp({ development: false, smtpUrl: "smtp://127.0.0.1:9" });
    try {
      const prodAdmin = await makeUser(prod.ctx, "admin");
      const prodAgent = await signedInAgent(prod.app, prodAdmin.email);
      await prodAgent.get("/api/v1/admin/outbox").expect(404);
      await request(prod.app).get("/api/v1/admin/outbox").expect(404);
      // The admin screen hides its Outbox link on this answer.
      expect(invitationList.parse((await prodAgent.get("/api/v1/admin/invitations").expect(200)).body).outboxAvailable).toBe(false);
    } finally {
      await prod.close();
    }
  });

  it("is there in production only when the operator chose outbox-only mail, which then keeps every link", async () => {
    const env = { NODE_ENV: "production", PLOTBANK_MAIL_OUTBOX_ONLY: "1", SMTP_URL: "smtp://127.0.0.1:9" } as NodeJS.ProcessEnv;
    const chosen = loadConfig(env);
    expect(() => refuseUndeliverableMail(chosen)).not.toThrow();
    const prod = await testApp({ development: false, mailOutboxOnly: chosen.mailOutboxOnly, smtpUrl: chosen.smtpUrl });
    try {
      const admin = await makeUser(prod.ctx, "admin");
      const member = await makeUser(prod.ctx, "member");
      const agent = await signedInAgent(prod.app, admin.email);
      expect((await agent.get("/api/v1/admin/invitations").expect(200)).body.outboxAvailable).toBe(true);
      await request(prod.app).post("/api/v1/password-reset").send({ email: member.email }).expect(202);
      const [sent] = await prod.ctx.db.select().from(outbox).where(eq(outbox.to, member.email));
      expect(sent?.transport).toBe("outbox");
      const one = await agent.get(`/api/v1/admin/outbox/${sent!.id}`).expect(200);
      expect(one.body.links[0]).toMatch(/reset-password\?token=pbr_/);
    } finally {
      await prod.close();
    }
  });
});

describe("mail configuration at start-up", () => {
  it("refuses to start in production without SMTP_URL unless outbox-only mail is chosen, and says how to fix it", () => {
    const { SMTP_URL: _smtp, PLOTBANK_MAIL_OUTBOX_ONLY: _only, ...env } = process.env;
    const started = spawnSync(process.execPath, ["--import", "tsx", "server/main.ts"], {
      cwd: path.resolve(__dirname, "../.."),
      env: {
        ...env,
        NODE_ENV: "production",
        PLOTBANK_DEMO: "off",
        PLOTBANK_DATA_DIR: path.join(tmpdir(), "plotbank-never-created"),
        PORT: "0",
      },
      encoding: "utf8",
      timeout: 60_000,
    });
    expect(started.status).toBe(1);
    expect(started.stderr).toContain("NODE_ENV is production but SMTP_URL is not set");
    expect(started.stderr).toContain("PLOTBANK_MAIL_OUTBOX_ONLY=1");
    expect(existsSync(path.join(tmpdir(), "plotbank-never-created"))).toBe(false);

    expect(() =>
      refuseUndeliverableMail(loadConfig({ NODE_ENV: "production", SMTP_URL: "smtp://mail.tallgrass.test:587" } as NodeJS.ProcessEnv)),
    ).not.toThrow();
    expect(() => refuseUndeliverableMail(loadConfig({ NODE_ENV: "development" } as NodeJS.ProcessEnv))).not.toThrow();
    expect(() => loadConfig({ NODE_ENV: "production", PLOTBANK_MAIL_OUTBOX_ONLY: "maybe" } as NodeJS.ProcessEnv)).toThrow();
  }, 90_000);
});

describe("real mail in production", () => {
  it("answers at once when the mail server accepts the connection and then says nothing; the failure is recorded when it hangs up", async () => {
    const sockets: Socket[] = [];
    const silent = createServer((socket) => sockets.push(socket)); // never sends the SMTP greeting
    await new Promise<void>((resolve) => silent.listen(0, "127.0.0.1", resolve));
    const port = (silent.address() as { port: number }).port;
    const prod = await testApp({ development: false, smtpUrl: `smtp://127.0.0.1:${port}` });
    const original = console.error;
    console.error = () => undefined;
    try {
      const user = await makeUser(prod.ctx, "member");
      await request(prod.app).post("/api/v1/password-reset").send({ email: user.email }).expect(202);
      const [waiting] = await prod.ctx.db.select().from(outbox).where(eq(outbox.to, user.email));
      expect(waiting?.kind).toBe("password-reset");
      expect((waiting?.meta as { deliveryError?: string }).deliveryError).toBeUndefined();
      await expect.poll(() => sockets.length).toBe(1);
      for (const socket of sockets) socket.destroy();
      await mailDeliveriesEnded(prod.ctx);
      const [failed] = await prod.ctx.db.select().from(outbox).where(eq(outbox.to, user.email));
      expect((failed?.meta as { deliveryError?: string }).deliveryError).toBeTruthy();
    } finally {
      console.error = original;
      await prod.close();
      await new Promise<void>((resolve) => silent.close(() => resolve()));
    }
  });

  it("records SMTP mail without its link secret, and keeps a delivery failure beside the message", async () => {
    const prod = await testApp({ development: false, smtpUrl: "smtp://127.0.0.1:9" });
    try {
      const user = await makeUser(prod.ctx, "member");
      const errors: unknown[] = [];
      const original = console.error;
      console.error = (...args: unknown[]) => errors.push(args);
      try {
        await request(prod.app).post("/api/v1/password-reset").send({ email: user.email }).expect(202);
        await mailDeliveriesEnded(prod.ctx);
      } finally {
        console.error = original;
      }
      const [sent] = await prod.ctx.db.select().from(outbox).where(eq(outbox.to, user.email));
      expect(sent?.transport).toBe("smtp");
      expect(sent?.text).toContain("/reset-password?token=[redacted]");
      expect(sent?.text).not.toMatch(/pbr_/);
      expect(sent?.html).not.toMatch(/pbr_/);
      expect((sent?.meta as { deliveryError?: string }).deliveryError).toBeTruthy();
      expect(errors).toHaveLength(1);
    } finally {
      await prod.close();
    }
  });
});

describe("following datasets and the e-mails that go with it", () => {
  it("follows a published dataset, lists it, refuses a draft, unfollows", async () => {
    const { dataset } = await insertDataset(t.ctx, "basin-corn-n", "published");
    const draft = await insertDataset(t.ctx, "basin-draft", "draft");
    const member = await makeUser(t.ctx, "member");
    const agent = await signedInAgent(t.app, member.email);
    expect((await agent.post(`/api/v1/datasets/${dataset.slug}/follow`).expect(200)).body).toEqual({ slug: dataset.slug, following: true });
    await agent.post(`/api/v1/datasets/${dataset.slug}/follow`).expect(200);
    const list = await agent.get("/api/v1/account/follows").expect(200);
    expect(list.body.items).toEqual([expect.objectContaining({ slug: dataset.slug, latestVersion: "1.0.0" })]);
    await agent.post(`/api/v1/datasets/${draft.dataset.slug}/follow`).expect(404);
    await agent.delete(`/api/v1/datasets/${dataset.slug}/follow`).expect(200);
    expect((await agent.get("/api/v1/account/follows").expect(200)).body.items).toEqual([]);
    await request(t.app).post(`/api/v1/datasets/${dataset.slug}/follow`).expect(401);
  });

  it("e-mails each follower once when a version is published", async () => {
    const { dataset, versionId } = await insertDataset(t.ctx, "basin-soy-p", "published");
    const a = await makeUser(t.ctx, "member");
    const b = await makeUser(t.ctx, "reviewer");
    const bystander = await makeUser(t.ctx, "member");
    await t.ctx.db.insert(follows).values([
      { datasetId: dataset.id, userId: a.id },
      { datasetId: dataset.id, userId: b.id },
    ]);
    await runPublishHooks(t.ctx, versionId);
    await runPublishHooks(t.ctx, versionId);
    const notices = await t.ctx.db.select().from(outbox).where(eq(outbox.kind, "new-version"));
    const mine = notices.filter((n) => (n.meta as { versionId?: string }).versionId === versionId);
    expect(mine.map((n) => n.to).sort()).toEqual([a.email, b.email].sort());
    expect(mine.map((n) => n.to)).not.toContain(bystander.email);
    expect(mine[0]!.text).toContain(`http://plotbank.test/datasets/${dataset.slug}`);
    expect(mine[0]!.text).toContain("First release.");
  });
});

describe("review e-mails", () => {
  const mails = async (ctx: AppContext, kind: string) =>
    (await ctx.db.select().from(outbox).where(eq(outbox.kind, kind)).orderBy(asc(outbox.createdAt))).map((m) => ({
      to: m.to,
      subject: m.subject,
      text: m.text,
      meta: m.meta as Record<string, unknown>,
    }));

  it("asks reviewers (not the submitter) on submit, and tells the submitter each decision with the comment", async () => {
    const fresh = await testApp();
    try {
      const f = await draftWithData(fresh.app, fresh.ctx);
      const secondReviewer = await makeUser(fresh.ctx, "reviewer");
      const admin = await makeUser(fresh.ctx, "admin");
      const submit = () =>
        f.curatorAgent
          .post(`/api/v1/curation/versions/${f.versionId}/submit`)
          .send({ changelog: "First release: 2021 season." })
          .expect(200);

      await submit();
      const asked = await mails(fresh.ctx, "review-requested");
      expect(asked.map((m) => m.to).sort()).toEqual([f.reviewer.email, secondReviewer.email].sort());
      expect(asked.map((m) => m.to)).not.toContain(f.curator.email);
      expect(asked.map((m) => m.to)).not.toContain(admin.email);
      expect(asked[0]!.text).toContain("First release: 2021 season.");
      expect(asked[0]!.meta.versionId).toBe(f.versionId);

      await f.reviewerAgent
        .post(`/api/v1/curation/versions/${f.versionId}/return`)
        .send({ comment: "Site TB-02 lacks the soil-test K value." })
        .expect(200);
      const returned = await mails(fresh.ctx, "review-returned");
      expect(returned).toHaveLength(1);
      expect(returned[0]).toMatchObject({ to: f.curator.email, subject: expect.stringMatching(/^Returned for changes/) });
      expect(returned[0]!.text).toContain("Site TB-02 lacks the soil-test K value.");

      await submit();
      expect(await mails(fresh.ctx, "review-requested")).toHaveLength(4);

      await f.reviewerAgent
        .post(`/api/v1/curation/versions/${f.versionId}/approve`)
        .send({ comment: "Soil tests complete now." })
        .expect(200);
      const approved = await mails(fresh.ctx, "review-approved");
      expect(approved).toHaveLength(1);
      expect(approved[0]).toMatchObject({ to: f.curator.email, subject: expect.stringMatching(/^Approved/) });
      expect(approved[0]!.text).toContain("Soil tests complete now.");
      expect(approved[0]!.text).toContain(`http://plotbank.test/datasets/${f.slug}`);
    } finally {
      await fresh.close();
    }
  });

  it("keeps the submission and the decision when mail cannot be sent, with the failure kept in the outbox", async () => {
    // Port 9 (discard) refuses SMTP connections here: every send fails at the transport.
    const prod = await testApp({ development: false, smtpUrl: "smtp://127.0.0.1:9" });
    const logged: unknown[][] = [];
    const original = console.error;
    console.error = (...args: unknown[]) => logged.push(args);
    try {
      const f = await draftWithData(prod.app, prod.ctx);
      await f.curatorAgent.post(`/api/v1/curation/versions/${f.versionId}/submit`).send({ changelog: "First release." }).expect(200);
      const approve = await f.reviewerAgent.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({ comment: "Fine." }).expect(200);
      expect(approve.body.state).toBe("published");
      await mailDeliveriesEnded(prod.ctx);
      const [asked] = await mails(prod.ctx, "review-requested");
      const [approved] = await mails(prod.ctx, "review-approved");
      expect(asked?.meta.deliveryError).toBeTruthy();
      expect(approved?.meta.deliveryError).toBeTruthy();
      expect(logged.length).toBeGreaterThanOrEqual(2);
    } finally {
      console.error = original;
      await prod.close();
    }
  });

  it("keeps the state change when the outbox itself cannot be written, and logs why", async () => {
    const fresh = await testApp();
    const logged: unknown[][] = [];
    const original = console.error;
    try {
      const f = await draftWithData(fresh.app, fresh.ctx);
      // A database-level fault: every insert into the outbox fails from here on.
      await fresh.ctx.db.execute(
        sql`create function refuse_mail() returns trigger language plpgsql as $$ begin raise exception 'outbox is full'; end $$`,
      );
      await fresh.ctx.db.execute(sql`create trigger refuse_mail before insert on outbox for each row execute function refuse_mail()`);
      console.error = (...args: unknown[]) => logged.push(args);
      await f.curatorAgent.post(`/api/v1/curation/versions/${f.versionId}/submit`).send({ changelog: "First release." }).expect(200);
      await f.reviewerAgent.post(`/api/v1/curation/versions/${f.versionId}/return`).send({ comment: "Add the K rates." }).expect(200);
      console.error = original;
      const [v] = await fresh.ctx.db.select().from(versions).where(eq(versions.id, f.versionId));
      expect(v).toMatchObject({ state: "draft", reviewComment: "Add the K rates.", changelog: "First release." });
      expect(logged.map((args) => String(args[0]))).toEqual([
        `Review request for version ${f.versionId} e-mail failed; the review state change stands:`,
        `Return of version ${f.versionId} e-mail failed; the review state change stands:`,
      ]);
      expect(String((logged[0]![1] as Error).cause)).toMatch(/outbox is full/);
    } finally {
      console.error = original;
      await fresh.close();
    }
  });
});
