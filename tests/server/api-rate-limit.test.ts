import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createdToken } from "@/schemas/tokens";
import { problemSchema } from "@/schemas/problem";
import { signedInAgent } from "@/tests/support/sign-in";
import { makeUser, testApp, type TestApp } from "@/tests/support/test-app";

/** Small quotas so the limits are reached in a few requests. Each test app has its own counters. */
const anon = 4;
const perToken = 7;

describe("rate limits", () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await testApp({ anonRatePerMinute: anon, tokenRatePerMinute: perToken });
  });
  afterAll(() => t.close());

  it("anonymous callers: RateLimit headers on every answer, then 429 problem+json with Retry-After", async () => {
    for (let i = 1; i <= anon; i++) {
      const res = await request(t.app).get("/api/v1/datasets").expect(200);
      expect(res.headers["ratelimit-policy"]).toMatch(new RegExp(`^"anonymous"; q=${anon}; w=60`));
      expect(res.headers.ratelimit).toMatch(new RegExp(`^"anonymous"; r=${anon - i}; t=\\d+`));
    }
    const over = await request(t.app).get("/api/v1/datasets").expect(429);
    expect(over.headers["content-type"]).toMatch(/^application\/problem\+json/);
    expect(Number(over.headers["retry-after"])).toBeGreaterThan(0);
    expect(over.headers.ratelimit).toMatch(/^"anonymous"; r=0;/);
    expect(problemSchema.parse(over.body)).toMatchObject({ status: 429, title: "Too many requests" });
  });

  it("health and the OpenAPI document are exempt", async () => {
    await request(t.app).get("/api/v1/health").expect(200);
    const doc = await request(t.app).get("/api/v1/openapi.json").expect(200);
    expect(doc.headers.ratelimit).toBeUndefined();
  });

  it("a token has its own, higher quota, keyed by the token", async () => {
    // Signing in still works with the anonymous read quota spent (previous test).
    const user = await makeUser(t.ctx, "member");
    const agent = await signedInAgent(t.app, user.email);
    const first = createdToken.parse((await agent.post("/api/v1/tokens").send({ name: "one" }).expect(201)).body);
    const second = createdToken.parse((await agent.post("/api/v1/tokens").send({ name: "two" }).expect(201)).body);
    // The anonymous quota of this address is spent (previous test); the token still gets through.
    for (let i = 1; i <= perToken; i++) {
      const res = await request(t.app).get("/api/v1/datasets").set("Authorization", `Bearer ${first.secret}`).expect(200);
      expect(res.headers.ratelimit).toMatch(new RegExp(`^"client"; r=${perToken - i};`));
    }
    await request(t.app).get("/api/v1/datasets").set("Authorization", `Bearer ${first.secret}`).expect(429);
    // Another token of the same user counts separately.
    await request(t.app).get("/api/v1/datasets").set("Authorization", `Bearer ${second.secret}`).expect(200);
  });

  it("a signed-in session gets the higher quota too", async () => {
    const user = await makeUser(t.ctx, "member");
    const agent = await signedInAgent(t.app, user.email);
    const res = await agent.get("/api/v1/datasets").expect(200);
    expect(res.headers["ratelimit-policy"]).toMatch(new RegExp(`^"client"; q=${perToken};`));
  });
});

describe("a 304 does not count against the quota", () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await testApp({ anonRatePerMinute: 3 });
  });
  afterAll(() => t.close());

  it("revalidating many times leaves the quota as it was", async () => {
    const first = await request(t.app).get("/api/v1/datasets/none/versions/1.0.0/schema");
    expect(first.status).toBe(404);
    // Any cached read: the cross-dataset responses of an empty catalogue still carry an ETag.
    const ok = await request(t.app).get("/api/v1/responses").expect(200);
    const etag = ok.headers.etag as string;
    for (let i = 0; i < 6; i++) await request(t.app).get("/api/v1/responses").set("If-None-Match", etag).expect(304);
    // Two hits spent (the 404 and the 200): one left.
    const last = await request(t.app).get("/api/v1/responses").expect(200);
    expect(last.headers.ratelimit).toMatch(/r=0;/);
    await request(t.app).get("/api/v1/responses").expect(429);
  });
});
