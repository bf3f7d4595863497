import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { problemSchema } from "@/schemas/problem";
import { appRoutes } from "@/server/app-routes";
import { testApp, type TestApp } from "@/tests/support/test-app";

// The web app answers every path it does not know with index.html (deep links); that must never swallow an API error.
const marker = "plotbank-web-fallback-marker";
let dist: string;
let t: TestApp;
beforeAll(async () => {
  dist = mkdtempSync(path.join(tmpdir(), "plotbank-dist-"));
  writeFileSync(
    path.join(dist, "index.html"),
    `<!doctype html><html><head><title>Plotbank</title></head><body><div id="root">${marker}</div></body></html>`,
  );
  t = await testApp({}, { webDistDir: dist });
});
afterAll(async () => {
  await t.close();
  rmSync(dist, { recursive: true, force: true });
});

function expectProblem(res: request.Response, status: number) {
  expect(res.status).toBe(status);
  expect(res.headers["content-type"]).toMatch(/^application\/problem\+json/);
  expect(res.text).not.toContain("<html");
  expect(res.text).not.toContain(marker);
  expect(problemSchema.parse(res.body).status).toBe(status);
}

describe("with the web app mounted, API errors stay problem+json", () => {
  it.each(["/api/v1/no-such-thing", "/api/v1/datasets/x/y/z/nope", "/api/no-such-thing", "/api", "/api/docs/no-such"])(
    "GET %s is a 404 problem",
    async (url) => {
      expectProblem(await request(t.app).get(url).set("Accept", "text/html,*/*"), 404);
    },
  );
  it("a POST to an unknown API path is a 404 problem", async () => {
    expectProblem(await request(t.app).post("/api/v1/no-such-thing").send({ a: 1 }), 404);
  });
  it("a malformed JSON body is a 400 problem naming the body", async () => {
    const res = await request(t.app).post("/api/v1/session").set("Content-Type", "application/json").send('{"email": ');
    expectProblem(res, 400);
    expect(res.body.errors[0].field).toBe("body");
  });
  it("an over-size body is a 413 problem naming the limit", async () => {
    const big = JSON.stringify({ email: "a@b.c", password: "x".repeat(2 * 1024 * 1024) });
    const res = await request(t.app).post("/api/v1/session").set("Content-Type", "application/json").send(big);
    expectProblem(res, 413);
    expect(res.body.limit).toBe(1024 * 1024);
  });
});

describe("non-API paths get the web app", () => {
  it.each(["/", "/datasets", "/curate/datasets/x/details", "/developers"])(
    "GET %s, a screen's address, serves index.html with 200",
    async (url) => {
      const res = await request(t.app).get(url).expect(200);
      expect(res.headers["content-type"]).toMatch(/^text\/html/);
      expect(res.text).toContain(marker);
    },
  );

  it("every route file in app/ is answered 200 (the server reads the same files the app is built from)", async () => {
    const routes = appRoutes();
    expect(routes.map((r) => r.file)).toEqual(
      expect.arrayContaining(["index", "datasets/index", "datasets/[slug]", "curate/versions/[id]"]),
    );
    for (const r of routes) {
      const url = r.pattern.replace(/\[\.{3}[^\]]+\]/g, "a/b").replace(/\[[^\]]+\]/g, "some-id");
      // This app has no datasets, so a dataset page's address names nothing: 404 (with the app), as below.
      expect((await request(t.app).get(url)).status, url).toBe(r.file === "datasets/[slug]" ? 404 : 200);
    }
  });

  it.each(["/datasets/some-slug", "/datasets/some-slug/", "/datasets/some-slug?version=1.0.0"])(
    "GET %s, a dataset page of a dataset nobody published, is a 404 that still carries the app",
    async (url) => {
      const res = await request(t.app).get(url).expect(404);
      expect(res.text).toContain(marker);
    },
  );

  it.each(["/evidence/deep/link", "/apiary", "/datasets/some-slug/extra", "/no-such-page", "/robots", "/sitemap"])(
    "GET %s, which no screen has, is a 404 that still carries the app (its not-found screen)",
    async (url) => {
      const res = await request(t.app).get(url).expect(404);
      expect(res.headers["content-type"]).toMatch(/^text\/html/);
      expect(res.text).toContain(marker);
    },
  );
});
