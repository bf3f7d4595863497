import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import type { Server } from "node:http";
import type { AddressInfo } from "node:net";
import { tmpdir } from "node:os";
import path from "node:path";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { evidenceStateFromParams, metaApiPath } from "@/lib/share-link";
import { appCookieLifetimeMs, appCookieName, appCookieValue, readAppCookie } from "@/server/auth/app-cookie";
import { testApp, type TestApp } from "@/tests/support/test-app";

/** A stand-in for the web export: the server only needs an index.html to serve pages (and give the app cookie). */
function fakeDist(): string {
  const dist = mkdtempSync(path.join(tmpdir(), "plotbank-quota-"));
  writeFileSync(
    path.join(dist, "index.html"),
    `<!doctype html><html><head><title>Plotbank</title></head><body><div id="root"></div></body></html>`,
  );
  return dist;
}

/** The app cookie a page answer sets, as `name=value` for a Cookie header; null when it sets none. */
function appCookieOf(setCookie: string | string[] | null | undefined): string | null {
  const lines = Array.isArray(setCookie) ? setCookie : setCookie ? [setCookie] : [];
  const line = lines.find((l) => l.startsWith(`${appCookieName}=`));
  return line ? line.split(";")[0]! : null;
}
const cookieValue = (cookie: string) => decodeURIComponent(cookie.slice(appCookieName.length + 1));

describe("the web app's own requests are counted per browser, not per address", () => {
  // The real quotas are per minute: 60 anonymous requests per address, 600 per browser for the app; one busy user of
  // the app made 14 requests in 11 s (about 76 a minute). Here a window is one second and the quotas are scaled down
  // harder than the traffic: 2 anonymous, 20 per browser; each of ten browsers behind the one loopback address sends 6
  // a second for ten windows. So the address sends 30 times its anonymous quota (real case: about 13 times) and each
  // browser uses 30 % of its own (real case: about 13 %).
  const windowMs = 1000;
  const anon = 2;
  const perBrowser = 20;
  const people = 10;
  const windows = 10;
  const perWindow = 6;
  let t: TestApp;
  let dist: string;
  let server: Server;
  let base: string;
  beforeAll(async () => {
    dist = fakeDist();
    t = await testApp({ anonRatePerMinute: anon, appRatePerMinute: perBrowser, rateWindowMs: windowMs }, { webDistDir: dist });
    server = await new Promise<Server>((resolve) => {
      const s = t.app.listen(0, "127.0.0.1", () => resolve(s));
    });
    base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    // The first test app of a file builds the migrated database template, slow on a busy machine.
  }, 180_000);
  afterAll(async () => {
    await new Promise<void>((resolve) => server.close(() => resolve()));
    await t.close();
    rmSync(dist, { recursive: true, force: true });
  });

  it("ten people using the app at once never see a quota error; a script hammering anonymously gets 429 with RateLimit headers", async () => {
    const paths = ["/api/v1/session", "/api/v1/datasets", metaApiPath(evidenceStateFromParams({ crop: "soybean", nutrient: "P" }))];
    const appStatuses = new Map<number, number>();
    const policies = new Set<string>();
    const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

    async function person(n: number) {
      const page = await fetch(`${base}/?crop=soybean`);
      expect(page.status).toBe(200);
      const cookie = appCookieOf(page.headers.getSetCookie());
      expect(cookie, `person ${n} got no app cookie`).not.toBeNull();
      const started = Date.now();
      for (let i = 0; i < windows * perWindow; i++) {
        // Evenly spread: perWindow requests in each window.
        await sleep(Math.max(0, started + (i * windowMs) / perWindow - Date.now()));
        const res = await fetch(`${base}${paths[i % paths.length]}`, { headers: { Cookie: cookie!, Accept: "application/json" } });
        await res.arrayBuffer();
        appStatuses.set(res.status, (appStatuses.get(res.status) ?? 0) + 1);
        policies.add(res.headers.get("ratelimit-policy") ?? "");
      }
    }

    const script = { statuses: [] as number[], limited: null as Response | null };
    async function hammer() {
      // A burst of 8 at once in each window: at most `anon` of them may pass.
      for (let w = 0; w < windows; w++) {
        const burst = await Promise.all(Array.from({ length: 8 }, () => fetch(`${base}/api/v1/datasets`)));
        for (const res of burst) {
          script.statuses.push(res.status);
          if (res.status === 429 && !script.limited) script.limited = res;
          else await res.arrayBuffer();
        }
        await sleep(windowMs);
      }
    }

    await Promise.all([...Array.from({ length: people }, (_, n) => person(n)), hammer()]);
    expect(Object.fromEntries(appStatuses)).toEqual({ 200: people * windows * perWindow });
    // Every answer counted against the app quota, with one partition key (pk) per browser.
    expect([...policies].every((p) => p.startsWith(`"app"; q=${perBrowser}; w=${windowMs / 1000}; pk=`))).toBe(true);
    expect(policies.size).toBe(people);

    // Most of the script's requests are refused (a burst may straddle a window's reset, so not exactly 6 of 8).
    expect(script.statuses.filter((s) => s === 429).length).toBeGreaterThan(script.statuses.length / 2);
    const limited = script.limited!;
    expect(limited.headers.get("ratelimit-policy")).toMatch(new RegExp(`^"anonymous"; q=${anon}; w=${windowMs / 1000}\\b`));
    expect(limited.headers.get("ratelimit")).toMatch(/^"anonymous"; r=0; t=\d+$/);
    expect(Number(limited.headers.get("retry-after"))).toBeGreaterThanOrEqual(0);
    expect(limited.headers.get("content-type")).toMatch(/^application\/problem\+json/);
    expect(((await limited.json()) as { status: number }).status).toBe(429);
  }, 180_000);
});

describe("the app cookie", () => {
  let t: TestApp;
  let dist: string;
  beforeAll(async () => {
    dist = fakeDist();
    t = await testApp({ anonRatePerMinute: 50, appRatePerMinute: 500, appBrowsersPerIpHour: 3 }, { webDistDir: dist });
  });
  afterAll(async () => {
    await t.close();
    rmSync(dist, { recursive: true, force: true });
  });

  const policyWith = async (cookie?: string) => {
    const req = request(t.app).get("/api/v1/datasets");
    const res = await (cookie ? req.set("Cookie", cookie) : req).expect(200);
    return String(res.headers["ratelimit-policy"]).split(";")[0];
  };

  it("comes with the app's pages: signed, HttpOnly, SameSite=Lax, short-lived; the API counts its bearer per browser", async () => {
    const page = await request(t.app).get("/").expect(200);
    const line = (page.headers["set-cookie"] as unknown as string[]).find((l) => l.startsWith(`${appCookieName}=`))!;
    expect(line).toMatch(/; HttpOnly/);
    expect(line).toMatch(/; SameSite=Lax/);
    expect(line).toMatch(/; Path=\//);
    expect(line).toMatch(new RegExp(`; Max-Age=${appCookieLifetimeMs / 1000}`));
    const cookie = appCookieOf(line)!;
    expect(readAppCookie(t.ctx.config.secret, cookieValue(cookie))).not.toBeNull();
    expect(await policyWith(cookie)).toBe('"app"');
    expect(await policyWith()).toBe('"anonymous"');
    // A page load with a current cookie leaves it as it is.
    const again = await request(t.app).get("/datasets").set("Cookie", cookie).expect(200);
    expect(appCookieOf(again.headers["set-cookie"] as unknown as string[])).toBeNull();
  });

  it("a forged, altered, foreign or expired cookie counts as anonymous", async () => {
    const secret = t.ctx.config.secret;
    const id = "AAAAAAAAAAAAAAAAAAAAAA";
    const valid = appCookieValue(secret, { id, expiresAt: Date.now() + 60_000 });
    expect(await policyWith(`${appCookieName}=${valid}`)).toBe('"app"');
    // Another browser id under the same signature.
    expect(await policyWith(`${appCookieName}=${valid.replace(id, "BBBBBBBBBBBBBBBBBBBBBB")}`)).toBe('"anonymous"');
    // A later expiry under the same signature.
    const [v, i, exp, sig] = valid.split(".");
    expect(await policyWith(`${appCookieName}=${[v, i, Number(exp) + 3600, sig].join(".")}`)).toBe('"anonymous"');
    // Signed with another key.
    const foreign = appCookieValue("not-the-server-secret-not-the-server-secret", { id, expiresAt: Date.now() + 60_000 });
    expect(await policyWith(`${appCookieName}=${foreign}`)).toBe('"anonymous"');
    // Made up, or just a header anyone can send.
    expect(await policyWith(`${appCookieName}=app`)).toBe('"anonymous"');
    // Expired.
    const expired = appCookieValue(secret, { id, expiresAt: Date.now() - 1000 });
    expect(await policyWith(`${appCookieName}=${expired}`)).toBe('"anonymous"');
  });

  it("an expired cookie is renewed on the next page for the same browser id, so a reload does not reset the count", async () => {
    const id = "CCCCCCCCCCCCCCCCCCCCCC";
    const expired = appCookieValue(t.ctx.config.secret, { id, expiresAt: Date.now() - 1000 });
    const page = await request(t.app).get("/").set("Cookie", `${appCookieName}=${expired}`).expect(200);
    const renewed = readAppCookie(t.ctx.config.secret, cookieValue(appCookieOf(page.headers["set-cookie"] as unknown as string[])!));
    expect(renewed?.id).toBe(id);
    expect(renewed!.expiresAt).toBeGreaterThan(Date.now());
  });

  it("the API renews a cookie past half its life, for the same browser", async () => {
    const id = "DDDDDDDDDDDDDDDDDDDDDD";
    const old = appCookieValue(t.ctx.config.secret, { id, expiresAt: Date.now() + appCookieLifetimeMs / 4 });
    const res = await request(t.app).get("/api/v1/datasets").set("Cookie", `${appCookieName}=${old}`).expect(200);
    const renewed = readAppCookie(t.ctx.config.secret, cookieValue(appCookieOf(res.headers["set-cookie"] as unknown as string[])!));
    expect(renewed?.id).toBe(id);
    expect(renewed!.expiresAt).toBeGreaterThan(Date.now() + appCookieLifetimeMs * 0.9);
  });

  it("one address gets a limited number of new browser ids; past it, pages come without a cookie", async () => {
    // The first test used one new id; two more are allowed in this hour, then none.
    const got: boolean[] = [];
    for (let i = 0; i < 4; i++)
      got.push(appCookieOf((await request(t.app).get("/").expect(200)).headers["set-cookie"] as unknown as string[]) !== null);
    expect(got).toEqual([true, true, false, false]);
  });
});

describe("the Evidence page", () => {
  let t: TestApp;
  let dist: string;
  beforeAll(async () => {
    dist = fakeDist();
    t = await testApp({}, { webDistDir: dist });
  });
  afterAll(async () => {
    await t.close();
    rmSync(dist, { recursive: true, force: true });
  });

  it("preloads the analysis its address names, with the URL the app asks for; other pages do not", async () => {
    const html = (await request(t.app).get("/?crop=soybean&nutrient=P&placement=2x2-band&soilTestClass=low").expect(200)).text;
    const href = metaApiPath(evidenceStateFromParams({ crop: "soybean", nutrient: "P", placement: "2x2-band", soilTestClass: "low" }));
    expect(href).toBe("/api/v1/analyses/meta?crop=soybean&groupBy=soilTestClass&nutrient=P&placement=2x2-band&soilTestClass=low");
    expect(html).toContain(`<link rel="preload" as="fetch" crossorigin="use-credentials" href="${href.replace(/&/g, "&amp;")}">`);
    expect((await request(t.app).get("/").expect(200)).text).toContain('href="/api/v1/analyses/meta?groupBy=soilTestClass"');
    expect((await request(t.app).get("/datasets").expect(200)).text).not.toContain('rel="preload"');
  });

  it("declares the web fonts with font-display: swap in the page itself", async () => {
    const html = (await request(t.app).get("/datasets").expect(200)).text;
    expect(html).toMatch(/<style id="web-fonts">@font-face\{font-family:Inter_400Regular;src:url\(\/fonts\/Inter_400Regular\.woff2\)/);
    expect(html.match(/font-display:swap/g)).toHaveLength(4);
  });
});

describe("analysis answers are revalidated with an ETag", () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await testApp({ anonRatePerMinute: 3 });
  });
  afterAll(() => t.close());

  it("an unchanged analysis is a 304, which costs no quota; another query has another ETag", async () => {
    const path = "/api/v1/analyses/meta?crop=soybean&groupBy=soilTestClass";
    const first = await request(t.app).get(path).expect(200);
    const etag = first.headers.etag as string;
    expect(etag).toMatch(/^"[\w-]+"$/);
    expect(first.headers["cache-control"]).toBe("public, max-age=60");
    for (let i = 0; i < 5; i++) await request(t.app).get(path).set("If-None-Match", etag).expect(304);
    const other = await request(t.app).get("/api/v1/analyses/meta?crop=corn&groupBy=soilTestClass").expect(200);
    expect(other.headers.etag).not.toBe(etag);
    expect(other.headers.ratelimit).toMatch(/r=1;/);
  });
});
