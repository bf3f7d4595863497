import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiTokens } from "@/db/schema";
import { newSecret, sha256Hex } from "@/server/auth/secrets";
import { makeUser, testApp, type TestApp } from "@/tests/support/test-app";

const foreign = "https://field-notes.example";

let t: TestApp;
beforeAll(async () => {
  t = await testApp();
});
afterAll(() => t.close());

describe("cross-origin access: the public read API is open, writes are not", () => {
  it("answers a read from another origin with Access-Control-Allow-Origin: * and the headers a script may read", async () => {
    const res = await request(t.app).get("/api/v1/datasets").set("Origin", foreign).expect(200);
    expect(res.headers["access-control-allow-origin"]).toBe("*");
    expect(res.headers["access-control-expose-headers"]).toContain("ETag");
    const head = await request(t.app).head("/api/v1/datasets").set("Origin", foreign).expect(200);
    expect(head.headers["access-control-allow-origin"]).toBe("*");
  });

  it("grants the preflight of a read, for reads only", async () => {
    const res = await request(t.app)
      .options("/api/v1/datasets")
      .set("Origin", foreign)
      .set("Access-Control-Request-Method", "GET")
      .expect(204);
    expect(res.headers["access-control-allow-origin"]).toBe("*");
    expect(res.headers["access-control-allow-methods"]).toBe("GET,HEAD");
  });

  it("grants nothing to the preflight of a write from another origin", async () => {
    const res = await request(t.app)
      .options("/api/v1/account")
      .set("Origin", foreign)
      .set("Access-Control-Request-Method", "PATCH")
      .set("Access-Control-Request-Headers", "content-type");
    expect(res.status).toBe(204);
    for (const header of [
      "access-control-allow-origin",
      "access-control-allow-methods",
      "access-control-allow-headers",
      "access-control-allow-credentials",
    ]) {
      expect(res.headers[header], header).toBeUndefined();
    }
  });

  it("sends no Access-Control-Allow-Origin on POST, PATCH or DELETE answers, even those that succeed", async () => {
    const user = await makeUser(t.ctx, "member");
    const secret = newSecret("pb_");
    await t.ctx.db
      .insert(apiTokens)
      .values({ userId: user.id, name: "cors", prefix: secret.slice(0, 8), tokenHash: sha256Hex(secret), scope: "write" });
    const patched = await request(t.app)
      .patch("/api/v1/account")
      .set("Authorization", `Bearer ${secret}`)
      .set("Origin", foreign)
      .send({ displayName: "Script" })
      .expect(200);
    const posted = await request(t.app)
      .post("/api/v1/password-reset")
      .set("Origin", "http://plotbank.test")
      .send({ email: user.email })
      .expect(202);
    const refused = await request(t.app).post("/api/v1/password-reset").set("Origin", foreign).send({ email: user.email }).expect(403);
    const deleted = await request(t.app).delete("/api/v1/session").set("Origin", "http://plotbank.test").expect(204);
    for (const [what, res] of Object.entries({ patched, posted, refused, deleted }))
      expect(res.headers["access-control-allow-origin"], what).toBeUndefined();
  });
});

describe("an unexpected server error", () => {
  it("answers 500 as problem+json, with no stack trace and nothing of the error's own message", async () => {
    const broken = await testApp();
    // The database goes away under the running app: the next query fails inside the driver.
    await broken.database.close();
    const res = await request(broken.app).get("/api/v1/datasets").set("Origin", foreign).expect(500);
    expect(res.headers["content-type"]).toMatch(/^application\/problem\+json/);
    expect(res.body).toEqual({
      type: expect.any(String),
      title: expect.any(String),
      status: 500,
      detail: "Something went wrong on the server. It has been logged.",
      instance: "/api/v1/datasets",
    });
    expect(res.text).not.toMatch(/stack|\bat \S+ \(|closed|PGlite|select|Failed query|node_modules|\.ts:\d+/i);
    // A read still says who may read it, so a script on another origin sees the problem instead of a network error.
    expect(res.headers["access-control-allow-origin"]).toBe("*");
  });
});
