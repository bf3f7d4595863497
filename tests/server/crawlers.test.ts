import { eq } from "drizzle-orm";
import { JSDOM } from "jsdom";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { versions } from "@/db/schema";
import { citableFixture } from "@/tests/support/citable-fixture";
import { testApp, type TestApp } from "@/tests/support/test-app";

let t: TestApp;
let draftSlug: string;
beforeAll(async () => {
  t = await testApp();
  const f = await citableFixture(t.ctx, "tb-crawled");
  await f.publish("1.0.0", { publishedAt: new Date(Date.UTC(2023, 10, 1)), hooks: false });
  await f.publish("1.1.0", { publishedAt: new Date(Date.UTC(2024, 10, 1)), hooks: false });
  const gone = await f.publish("1.2.0", { publishedAt: new Date(Date.UTC(2025, 2, 1)), hooks: false });
  const now = new Date();
  await t.ctx.db
    .update(versions)
    .set({ state: "withdrawn", withdrawnReason: "A site's plot map was wrong.", withdrawnAt: now, updatedAt: now })
    .where(eq(versions.id, gone));
  // A dataset with only a draft has no public page yet.
  const draftOnly = await citableFixture(t.ctx, "tb-draft-only");
  await t.ctx.db
    .insert(versions)
    .values({ datasetId: draftOnly.datasetId, semver: "1.0.0", createdBy: draftOnly.ownerId, tableSchema: {} as never });
  draftSlug = draftOnly.slug;
});
afterAll(async () => {
  await t?.close();
});

describe("robots.txt", () => {
  it("is plain text that lets crawlers read the public pages, keeps out account-only screens and the API, and names the sitemap", async () => {
    const res = await request(t.app).get("/robots.txt").expect(200);
    expect(res.headers["content-type"]).toMatch(/^text\/plain/);
    const lines = res.text.split("\n");
    expect(lines[0]).toBe("User-agent: *");
    expect(lines).toContain("Allow: /");
    for (const path of ["/curate", "/admin", "/account", "/api/"]) expect(lines).toContain(`Disallow: ${path}`);
    for (const path of ["/datasets", "/developers", "/"]) expect(lines).not.toContain(`Disallow: ${path}`);
    // Sitemap lines must be absolute URLs (sitemaps.org, "Specifying the Sitemap location in your robots.txt file").
    expect(lines).toContain(`Sitemap: ${t.ctx.config.publicUrl}/sitemap.xml`);
  });
});

describe("sitemap.xml", () => {
  const parse = (xml: string) => new new JSDOM("").window.DOMParser().parseFromString(xml, "application/xml");

  it("lists each published dataset page and each published version's page, with lastmod, from the database", async () => {
    const res = await request(t.app).get("/sitemap.xml").expect(200);
    expect(res.headers["content-type"]).toMatch(/^application\/xml/);
    const doc = parse(res.text);
    expect(doc.getElementsByTagName("parsererror")).toHaveLength(0);
    expect(doc.documentElement.localName).toBe("urlset");
    expect(doc.documentElement.namespaceURI).toBe("http://www.sitemaps.org/schemas/sitemap/0.9");
    const entries = [...doc.getElementsByTagName("url")].map((u) => ({
      loc: u.getElementsByTagName("loc")[0]?.textContent,
      lastmod: u.getElementsByTagName("lastmod")[0]?.textContent,
    }));
    const base = `${t.ctx.config.publicUrl}/datasets/tb-crawled`;
    expect(entries).toEqual([
      { loc: base, lastmod: "2024-11-01T00:00:00.000Z" },
      { loc: `${base}?version=1.0.0`, lastmod: "2023-11-01T00:00:00.000Z" },
      { loc: `${base}?version=1.1.0`, lastmod: "2024-11-01T00:00:00.000Z" },
    ]);
    expect(res.text).not.toContain(draftSlug);
    expect(res.text).not.toContain("version=1.2.0");
  });

  it("follows a new publication at once", async () => {
    const f = await citableFixture(t.ctx, "tb-crawled-later");
    await f.publish("1.0.0", { publishedAt: new Date(Date.UTC(2026, 0, 15)), hooks: false });
    const res = await request(t.app).get("/sitemap.xml").expect(200);
    expect(res.text).toContain(
      `<url><loc>${t.ctx.config.publicUrl}/datasets/tb-crawled-later</loc><lastmod>2026-01-15T00:00:00.000Z</lastmod></url>`,
    );
  });
});
