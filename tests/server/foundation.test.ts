import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { health, datasetList } from "@/schemas/dataset";
import { problemSchema } from "@/schemas/problem";
import { makeUser, testApp, type TestApp } from "@/tests/support/test-app";
import { signedInAgent } from "@/tests/support/sign-in";

let t: TestApp;
beforeAll(async () => {
  t = await testApp();
});
afterAll(() => t.close());

describe("health", () => {
  it("reports the database and the version", async () => {
    const res = await request(t.app).get("/api/v1/health").expect(200);
    const body = health.parse(res.body);
    expect(body.status).toBe("ok");
    expect(body.database.connected).toBe(true);
    expect(body.version).toBe(t.ctx.config.version);
  });
  it("answers 503 degraded, not a 500, when the database is gone", async () => {
    const down = await testApp();
    await down.close();
    const res = await request(down.app).get("/api/v1/health").expect(503);
    expect(res.headers["content-type"]).toMatch(/^application\/json/);
    expect(res.headers["cache-control"]).toBe("no-store");
    const body = health.parse(res.body);
    expect(body).toMatchObject({
      status: "degraded",
      version: down.ctx.config.version,
      database: { kind: down.database.kind, connected: false },
    });
  });
});

describe("bad requests get problem+json, never HTML or a 500", () => {
  it("an unknown API path is a 404 problem", async () => {
    const res = await request(t.app).get("/api/v1/no-such-thing").expect(404);
    expect(res.headers["content-type"]).toMatch(/^application\/problem\+json/);
    expect(problemSchema.parse(res.body).detail).toContain("/no-such-thing");
  });
  it("a malformed JSON body is a 400 problem naming the body", async () => {
    const res = await request(t.app).post("/api/v1/session").set("Content-Type", "application/json").send('{"email": ').expect(400);
    expect(res.headers["content-type"]).toMatch(/^application\/problem\+json/);
    expect(res.body.errors[0].field).toBe("body");
  });
  it("an over-size body is a 413 problem naming the limit", async () => {
    const big = JSON.stringify({ email: "a@b.c", password: "x".repeat(2 * 1024 * 1024) });
    const res = await request(t.app).post("/api/v1/session").set("Content-Type", "application/json").send(big).expect(413);
    expect(res.headers["content-type"]).toMatch(/^application\/problem\+json/);
    expect(res.body.limit).toBe(1024 * 1024);
  });
  it("an invalid field is named", async () => {
    const res = await request(t.app).post("/api/v1/session").send({ email: "not-an-email", password: "x" }).expect(400);
    expect(res.body.errors.map((e: { field: string }) => e.field)).toContain("body.email");
  });
});

describe("catalogue", () => {
  it("is empty on a fresh database", async () => {
    const res = await request(t.app).get("/api/v1/datasets").expect(200);
    expect(datasetList.parse(res.body).items).toEqual([]);
  });
});

describe("session", () => {
  it("signs in with a cookie, answers who I am, and signs out", async () => {
    const user = await makeUser(t.ctx, "member");
    const agent = await signedInAgent(t.app, user.email);
    const me = await agent.get("/api/v1/session").expect(200);
    expect(me.body.user).toMatchObject({ email: user.email, role: "member" });
    expect(JSON.stringify(me.body)).not.toContain("scrypt");
    await agent.delete("/api/v1/session").expect(204);
    expect((await agent.get("/api/v1/session").expect(200)).body).toEqual({ user: null });
  });
  it('answers a visitor\'s "who am I" with 200 and no user (a 401 would be logged as an error by every browser)', async () => {
    const res = await request(t.app).get("/api/v1/session").expect(200);
    expect(res.body).toEqual({ user: null });
    expect(res.headers["cache-control"]).toBe("private, no-store");
  });
  it("refuses a wrong password with 401", async () => {
    const user = await makeUser(t.ctx, "member");
    await request(t.app).post("/api/v1/session").send({ email: user.email, password: "wrong-password-123" }).expect(401);
  });
  it("refuses an unknown bearer token at once", async () => {
    await request(t.app).get("/api/v1/datasets").set("Authorization", "Bearer pb_nope").expect(401);
  });
});

describe("OpenAPI", () => {
  it("serves an OpenAPI 3.1 document with the registered paths", async () => {
    const res = await request(t.app).get("/api/v1/openapi.json").expect(200);
    expect(res.body.openapi).toBe("3.1.0");
    expect(Object.keys(res.body.paths)).toEqual(expect.arrayContaining(["/api/v1/health", "/api/v1/datasets", "/api/v1/session"]));
    expect(res.body.components.schemas.Problem).toBeDefined();
  });
  it("serves interactive docs at /api/docs/ with the files the page loads", async () => {
    await request(t.app).get("/api/docs").expect(301).expect("Location", "/api/docs/");
    const res = await request(t.app)
      .get("/api/docs/")
      .expect(200)
      .expect("Content-Type", /^text\/html/);
    expect(res.text).toContain("swagger-ui");
    const files = [...res.text.matchAll(/(?:src|href)="\.\/([^"]+)"/g)].map((m) => m[1]);
    expect(files).toEqual(expect.arrayContaining(["swagger-ui.css", "swagger-ui-bundle.js", "swagger-ui-init.js"]));
    for (const file of files) await request(t.app).get(`/api/docs/${file}`).expect(200);
    const init = await request(t.app).get("/api/docs/swagger-ui-init.js").expect(200);
    expect(init.text).toContain("/api/v1/openapi.json");
  });
  it.each(["/api/docs/no-such", "/api/docs/v1/nope.json", "/api/docs/index.html", "/api/docs/package.json", "/api/nope"])(
    "answers %s, which is not a docs file, with a 404 problem",
    async (path) => {
      const res = await request(t.app).get(path).expect(404);
      expect(res.headers["content-type"]).toMatch(/^application\/problem\+json/);
      expect(problemSchema.parse(res.body).status).toBe(404);
    },
  );
});
