import { eq, sql } from "drizzle-orm";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiTokens } from "@/db/schema";
import { createdToken, tokenList } from "@/schemas/tokens";
import { sha256Hex } from "@/server/auth/secrets";
import { signedInAgent } from "@/tests/support/sign-in";
import { makeUser, testApp, type TestApp } from "@/tests/support/test-app";

let t: TestApp;
beforeAll(async () => {
  t = await testApp();
});
afterAll(() => t.close());

async function member(role: "member" | "curator" = "member") {
  const user = await makeUser(t.ctx, role);
  return { user, agent: await signedInAgent(t.app, user.email) };
}

describe("API tokens", () => {
  it("a signed-in member makes a read token: the secret is shown once and stored only as its SHA-256", async () => {
    const { user, agent } = await member();
    const res = await agent.post("/api/v1/tokens").send({ name: "nightly pull", expiresInDays: 30 }).expect(201);
    const created = createdToken.parse(res.body);
    expect(created.secret).toMatch(/^pb_[\w-]{43}$/);
    expect(created.token).toMatchObject({ name: "nightly pull", scope: "read", status: "active", prefix: created.secret.slice(0, 10) });
    expect(res.headers["cache-control"]).toBe("no-store");
    const expires = new Date(created.token.expiresAt!).getTime();
    expect(Math.round((expires - Date.now()) / 86_400_000)).toBe(30);

    const [stored] = await t.ctx.db.select().from(apiTokens).where(eq(apiTokens.userId, user.id));
    expect(stored!.tokenHash).toBe(sha256Hex(created.secret));
    expect(JSON.stringify(stored)).not.toContain(created.secret);

    const listed = tokenList.parse((await agent.get("/api/v1/tokens").expect(200)).body);
    expect(listed.items).toHaveLength(1);
    expect(JSON.stringify(listed)).not.toContain(created.secret);
  });

  it("the token authenticates API reads and records when it was last used", async () => {
    const { agent } = await member();
    const { secret, token } = createdToken.parse((await agent.post("/api/v1/tokens").send({ name: "reads" }).expect(201)).body);
    expect(token.lastUsedAt).toBeNull();
    const me = await request(t.app).get("/api/v1/session").set("Authorization", `Bearer ${secret}`).expect(200);
    expect(me.body.user.email).toBeDefined();
    await request(t.app).get("/api/v1/responses").set("Authorization", `Bearer ${secret}`).expect(200);
    const listed = tokenList.parse((await agent.get("/api/v1/tokens").expect(200)).body);
    expect(listed.items[0]!.lastUsedAt).not.toBeNull();
  });

  it("revoking stops the token at once with 401, and the list shows it revoked", async () => {
    const { agent } = await member();
    const { secret, token } = createdToken.parse((await agent.post("/api/v1/tokens").send({ name: "to revoke" }).expect(201)).body);
    await request(t.app).get("/api/v1/datasets").set("Authorization", `Bearer ${secret}`).expect(200);
    await agent.delete(`/api/v1/tokens/${token.id}`).expect(204);
    const refused = await request(t.app).get("/api/v1/datasets").set("Authorization", `Bearer ${secret}`).expect(401);
    expect(refused.headers["content-type"]).toMatch(/problem\+json/);
    const listed = tokenList.parse((await agent.get("/api/v1/tokens").expect(200)).body);
    expect(listed.items[0]).toMatchObject({ status: "revoked" });
    expect(listed.items[0]!.revokedAt).not.toBeNull();
  });

  it("an expired token fails with 401", async () => {
    const { agent } = await member();
    const { secret, token } = createdToken.parse(
      (await agent.post("/api/v1/tokens").send({ name: "short-lived", expiresInDays: 1 }).expect(201)).body,
    );
    await request(t.app).get("/api/v1/datasets").set("Authorization", `Bearer ${secret}`).expect(200);
    await t.ctx.db.execute(sql`UPDATE api_tokens SET expires_at = now() - interval '1 minute' WHERE id = ${token.id}`);
    await request(t.app).get("/api/v1/datasets").set("Authorization", `Bearer ${secret}`).expect(401);
    const listed = tokenList.parse((await agent.get("/api/v1/tokens").expect(200)).body);
    expect(listed.items[0]!.status).toBe("expired");
  });

  it("someone else's token cannot be revoked: 404, as if it did not exist, and it keeps working", async () => {
    const owner = await member();
    const other = await member();
    const { secret, token } = createdToken.parse((await owner.agent.post("/api/v1/tokens").send({ name: "mine" }).expect(201)).body);
    await other.agent.delete(`/api/v1/tokens/${token.id}`).expect(404);
    await other.agent.delete("/api/v1/tokens/00000000-0000-4000-8000-000000000000").expect(404);
    expect(tokenList.parse((await other.agent.get("/api/v1/tokens").expect(200)).body).items).toEqual([]);
    await request(t.app).get("/api/v1/datasets").set("Authorization", `Bearer ${secret}`).expect(200);
  });

  it("write tokens are for curators, reviewers and admins only", async () => {
    const reader = await member("member");
    const res = await reader.agent.post("/api/v1/tokens").send({ name: "w", scope: "write" }).expect(403);
    expect(res.body.detail).toMatch(/curators/);
    const curator = await member("curator");
    const ok = createdToken.parse((await curator.agent.post("/api/v1/tokens").send({ name: "w", scope: "write" }).expect(201)).body);
    expect(ok.token.scope).toBe("write");
  });

  it("tokens are managed from a session: not anonymously (401), not with a token (403)", async () => {
    await request(t.app).post("/api/v1/tokens").send({ name: "x" }).expect(401);
    await request(t.app).get("/api/v1/tokens").expect(401);
    const { agent } = await member();
    const { secret } = createdToken.parse((await agent.post("/api/v1/tokens").send({ name: "a" }).expect(201)).body);
    const withToken = await request(t.app).post("/api/v1/tokens").set("Authorization", `Bearer ${secret}`).send({ name: "b" }).expect(403);
    expect(withToken.body.detail).toMatch(/session/);
    await request(t.app).get("/api/v1/tokens").set("Authorization", `Bearer ${secret}`).expect(403);
  });

  it("names each invalid field of the body", async () => {
    const { agent } = await member();
    const res = await agent.post("/api/v1/tokens").send({ name: "", scope: "admin", expiresInDays: 9999 }).expect(400);
    const fields = res.body.errors.map((e: { field: string }) => e.field);
    expect(fields).toEqual(expect.arrayContaining(["body.name", "body.scope", "body.expiresInDays"]));
  });
});
