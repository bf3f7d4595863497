/**
 * Regressions of a security review: each test names what it proves. They run the real app on a real in-memory
 * database over HTTP.
 */
import { and, eq, isNull } from "drizzle-orm";
import http from "node:http";
import type { AddressInfo } from "node:net";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiTokens, datasets, outbox, users } from "@/db/schema";
import { issueEmailToken } from "@/server/services/accounts/email-tokens";
import { draftWithData, sitesCsv } from "@/tests/server/curation-fixtures";
import { signedInAgent } from "@/tests/support/sign-in";
import { makeUser, testApp, testPassword, type TestApp } from "@/tests/support/test-app";

let t: TestApp;
beforeAll(async () => {
  t = await testApp();
});
afterAll(async () => {
  await t.close();
});

async function writeToken(agent: ReturnType<typeof request.agent>) {
  const res = await agent.post("/api/v1/tokens").send({ name: "nightly pull", scope: "write" }).expect(201);
  return res.body.secret as string;
}

describe("partial dataset edits", () => {
  it("a PATCH changes only the fields it sends: keywords, contributors and licence survive {} and a title-only edit", async () => {
    const curator = await makeUser(t.ctx, "curator");
    const agent = await signedInAgent(t.app, curator.email);
    const slug = `keep-metadata-${Date.now().toString(36)}`;
    await agent
      .post("/api/v1/datasets")
      .send({
        slug, title: "Keep metadata", crops: ["corn"], region: "Tallgrass Basin", description: "Test.", licence: "CC0-1.0",
        keywords: ["starter", "potassium"], contributors: [{ name: "Ada Fieldhand", role: "creator" }],
      })
      .expect(201);
    await agent.patch(`/api/v1/datasets/${slug}`).send({}).expect(200);
    const res = await agent.patch(`/api/v1/datasets/${slug}`).send({ title: "Keep metadata, renamed" }).expect(200);
    expect(res.body).toMatchObject({ title: "Keep metadata, renamed", licence: "CC0-1.0", keywords: ["starter", "potassium"], contributors: [{ name: "Ada Fieldhand", role: "creator" }] });
    const [row] = await t.ctx.db.select().from(datasets).where(eq(datasets.slug, slug));
    expect(row).toMatchObject({ licence: "CC0-1.0", keywords: ["starter", "potassium"] });
  });

  it("no PATCH or PUT body schema in the OpenAPI registry fills in a default for a field the request left out", async () => {
    const checked: string[] = [];
    for (const def of t.ctx.registry.definitions) {
      if (def.type !== "route" || !["patch", "put"].includes(def.route.method)) continue;
      const media = def.route.request?.body?.content["application/json"] as { schema?: unknown } | undefined;
      const schema = media?.schema as { safeParse?: (v: unknown) => { success: boolean; data?: unknown } } | undefined;
      if (!schema?.safeParse) continue;
      const parsed = schema.safeParse({});
      checked.push(`${def.route.method} ${def.route.path}`);
      if (parsed.success) expect(parsed.data, `${def.route.method} ${def.route.path}`).toEqual({});
    }
    expect(checked).toContain("patch /api/v1/datasets/{slug}");
    expect(checked).toContain("patch /api/v1/account");
  });

  it("a JSON body sent as text/plain with a write token is refused with 415, not ignored", async () => {
    const curator = await makeUser(t.ctx, "curator");
    const agent = await signedInAgent(t.app, curator.email);
    const slug = `typed-body-${Date.now().toString(36)}`;
    await agent.post("/api/v1/datasets").send({ slug, title: "Typed body", crops: ["corn"], region: "Tallgrass Basin", description: "Test." }).expect(201);
    const secret = await writeToken(agent);
    const res = await request(t.app)
      .patch(`/api/v1/datasets/${slug}`)
      .set("Authorization", `Bearer ${secret}`)
      .set("Content-Type", "text/plain")
      .send(JSON.stringify({ title: "Renamed by text" }));
    expect(res.status).toBe(415);
    expect(res.body.errors[0].field).toBe("body");
  });
});

describe("control characters", () => {
  it("NUL in a query parameter, a path segment or a JSON string is a 400 naming the field, anonymous or signed in", async () => {
    const query = await request(t.app).get("/api/v1/responses?dataset=%00");
    expect(query.status).toBe(400);
    expect(query.body.errors.map((e: { field: string }) => e.field)).toContain("query.dataset");
    const path = await request(t.app).get("/api/v1/datasets/%00");
    expect(path.status).toBe(400);
    expect(path.body.errors[0].field).toBe("path.slug");
    const curator = await makeUser(t.ctx, "curator");
    const agent = await signedInAgent(t.app, curator.email);
    const body = await agent.post("/api/v1/datasets").send({ slug: "nul-title", title: "Bad\u0000title", crops: ["corn"], region: "Tallgrass Basin", description: "Test." });
    expect(body.status).toBe(400);
    expect(body.body.errors.map((e: { field: string }) => e.field)).toContain("body.title");
  });

  it("a one-line field refuses a line break, while a paragraph field keeps tabs and line breaks", async () => {
    const curator = await makeUser(t.ctx, "curator");
    const agent = await signedInAgent(t.app, curator.email);
    const forged = await agent.post("/api/v1/datasets").send({ slug: "forged-ris", title: "Trial\r\nER  -\r\nTY  - DATA", crops: ["corn"], region: "Tallgrass Basin", description: "Test." });
    expect(forged.status).toBe(400);
    expect(forged.body.errors.map((e: { field: string }) => e.field)).toContain("body.title");
    const ok = await agent.post("/api/v1/datasets").send({ slug: `paragraphs-${Date.now().toString(36)}`, title: "Paragraphs", crops: ["corn"], region: "Tallgrass Basin", description: "One.\n\n\tTwo." });
    expect(ok.status).toBe(201);
  });
});

describe("cut-off uploads", () => {
  it("a multipart upload cut off before its closing boundary is a 400, and the server keeps serving", async () => {
    const f = await draftWithData(t.app, t.ctx, { plots: false });
    const secret = await writeToken(f.curatorAgent);
    const server = http.createServer(t.app).listen(0, "127.0.0.1");
    await new Promise((resolve) => server.once("listening", resolve));
    const { port } = server.address() as AddressInfo;
    try {
      const boundary = "----plotbankcut";
      const head = `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="sites.csv"\r\nContent-Type: text/csv\r\n\r\n${sitesCsv}`;
      const answer = await new Promise<{ status: number; body: string }>((resolve, reject) => {
        const req = http.request(
          { port, host: "127.0.0.1", method: "POST", path: `/api/v1/curation/versions/${f.versionId}/uploads/sites`, headers: { Authorization: `Bearer ${secret}`, "Content-Type": `multipart/form-data; boundary=${boundary}` } },
          (res) => {
            let body = "";
            res.on("data", (c) => (body += c));
            res.on("end", () => resolve({ status: res.statusCode!, body }));
          },
        );
        req.on("error", reject);
        // The body ends in the middle of the file part: no closing boundary ever comes.
        req.end(head);
      });
      expect(answer.status).toBe(400);
      expect(JSON.parse(answer.body).detail).toMatch(/cut off/);
      const health = await fetch(`http://127.0.0.1:${port}/api/v1/health`);
      expect(health.status).toBe(200);
    } finally {
      await new Promise((resolve) => server.close(resolve));
    }
  });

  it("a multipart upload without a boundary is a 400 problem, not a 500", async () => {
    const f = await draftWithData(t.app, t.ctx, { plots: false });
    const res = await f.curatorAgent.post(`/api/v1/curation/versions/${f.versionId}/uploads/sites`).set("Content-Type", "multipart/form-data").send("site,location\n");
    expect(res.status).toBe(400);
    expect(res.type).toBe("application/problem+json");
  });
});

describe("tokens end with the password", () => {
  async function liveTokens(userId: string) {
    return t.ctx.db.select().from(apiTokens).where(and(eq(apiTokens.userId, userId), isNull(apiTokens.revokedAt)));
  }

  it("changing the password revokes every API token (401 at once) and e-mails the account; revokeApiTokens: false keeps them", async () => {
    const member = await makeUser(t.ctx, "member");
    const agent = await signedInAgent(t.app, member.email);
    const { body } = await agent.post("/api/v1/tokens").send({ name: "pull" }).expect(201);
    await request(t.app).get("/api/v1/account").set("Authorization", `Bearer ${body.secret}`).expect(200);
    await agent.patch("/api/v1/account").send({ currentPassword: testPassword, newPassword: "furrow-openers-2027!" }).expect(200);
    await request(t.app).get("/api/v1/account").set("Authorization", `Bearer ${body.secret}`).expect(401);
    const mail = await t.ctx.db.select().from(outbox).where(and(eq(outbox.to, member.email), eq(outbox.kind, "password-changed")));
    expect(mail).toHaveLength(1);
    expect(mail[0]!.text).toMatch(/1 API token was revoked/);

    await agent.post("/api/v1/tokens").send({ name: "kept" }).expect(201);
    await agent.patch("/api/v1/account").send({ currentPassword: "furrow-openers-2027!", newPassword: "seed-firmers-2028!", revokeApiTokens: false }).expect(200);
    expect(await liveTokens(member.id)).toHaveLength(1);
  });

  it("a password reset revokes every API token of the account and e-mails it", async () => {
    const member = await makeUser(t.ctx, "member");
    const agent = await signedInAgent(t.app, member.email);
    const { body } = await agent.post("/api/v1/tokens").send({ name: "pull" }).expect(201);
    const { secret } = await issueEmailToken(t.ctx.db, { purpose: "reset", email: member.email, userId: member.id });
    await request(t.app).post("/api/v1/password-reset/confirm").send({ token: secret, password: "closing-wheels-2027!" }).expect(204);
    await request(t.app).get("/api/v1/account").set("Authorization", `Bearer ${body.secret}`).expect(401);
    expect(await liveTokens(member.id)).toHaveLength(0);
    const mail = await t.ctx.db.select().from(outbox).where(and(eq(outbox.to, member.email), eq(outbox.kind, "password-changed")));
    expect(mail[0]!.text).toMatch(/reset/);
  });
});

describe("accounts", () => {
  it("four sign-ups of one new address at the same moment all get the normal answer, and one account exists", async () => {
    const email = `race-${Date.now().toString(36)}@plotbank.test`;
    const answers = await Promise.all(
      [1, 2, 3, 4].map(() => request(t.app).post("/api/v1/sign-up").send({ email, displayName: "Racer", password: "strip-till-bars-2026!" })),
    );
    expect(answers.map((a) => a.status)).toEqual([202, 202, 202, 202]);
    expect(await t.ctx.db.select().from(users).where(eq(users.email, email))).toHaveLength(1);
  });

  it("sign-up of an existing address runs the same password hashing as a new one (timing within a factor of 2)", async () => {
    const existing = await makeUser(t.ctx, "member");
    const time = async (email: string) => {
      const start = performance.now();
      await request(t.app).post("/api/v1/sign-up").send({ email, displayName: "Timer", password: "strip-till-bars-2026!" }).expect(202);
      return performance.now() - start;
    };
    // Warm up, then take the median of three of each.
    await time(`warm-${Date.now().toString(36)}@plotbank.test`);
    const known: number[] = [];
    const fresh: number[] = [];
    for (let i = 0; i < 3; i++) {
      known.push(await time(existing.email));
      fresh.push(await time(`new-${i}-${Date.now().toString(36)}@plotbank.test`));
    }
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[1]!;
    expect(median(known) / median(fresh)).toBeGreaterThan(0.5);
  });

  it("wrong current passwords in PATCH /account are rate-limited per account (429)", async () => {
    const fresh = await testApp({ authLimits: { windowMs: 60_000, perIp: 100, perAccount: 3 } });
    try {
      const member = await makeUser(fresh.ctx, "member");
      const agent = await signedInAgent(fresh.app, member.email);
      const statuses: number[] = [];
      for (let i = 0; i < 5; i++) statuses.push((await agent.patch("/api/v1/account").send({ currentPassword: `wrong-guess-${i}`, newPassword: "closing-wheels-2027!" })).status);
      expect(statuses.slice(0, 3)).toEqual([400, 400, 400]);
      expect(statuses.slice(3)).toEqual([429, 429]);
      // A name change carries no password and is not slowed.
      await agent.patch("/api/v1/account").send({ displayName: "Still here" }).expect(200);
    } finally {
      await fresh.close();
    }
  });

  it("X-Forwarded-For is ignored unless PLOTBANK_TRUST_PROXY names the proxy, so it cannot dodge the per-IP limits", async () => {
    const fresh = await testApp({ authLimits: { windowMs: 60_000, perIp: 2, perAccount: 100 } });
    try {
      const from = (ip: string) => request(fresh.app).post("/api/v1/password-reset").set("X-Forwarded-For", ip).send({ email: `x-${ip}@plotbank.test` });
      expect((await from("203.0.113.1")).status).toBe(202);
      expect((await from("203.0.113.2")).status).toBe(202);
      expect((await from("203.0.113.3")).status).toBe(429);
    } finally {
      await fresh.close();
    }
  });
});
