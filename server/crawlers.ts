import { eq } from "drizzle-orm";
import { Router } from "express";
import { navItems } from "@/constants/navigation";
import { datasets, versions } from "@/db/schema";
import type { AppContext } from "./context";
import { datasetLandingUrl, versionLandingUrl } from "./services/citation/citable-version";

const escapeXml = (s: string) => s.replace(/[<>&'"]/g, (c) => `&#${c.charCodeAt(0)};`);

/**
 * What crawlers read before the pages: robots.txt and a sitemap of the published dataset pages. The screens that
 * need an account (the navigation's role-only items) and the API (read it through its own documents) are kept out
 * of search indexes; everything else may be crawled.
 */
export function crawlerRoutes({ db, config }: AppContext): Router {
  const router = Router();

  router.get("/robots.txt", (_req, res) => {
    const signedInOnly = navItems.filter((item) => item.roles).map((item) => item.href);
    const lines = [
      "User-agent: *",
      "Allow: /",
      ...signedInOnly.map((href) => `Disallow: ${href}`),
      "Disallow: /api/",
      "",
      `Sitemap: ${config.publicUrl}/sitemap.xml`,
      "",
    ];
    res.set("Cache-Control", "public, max-age=3600").type("text/plain").send(lines.join("\n"));
  });

  /**
   * The sitemap (sitemaps.org 0.9): each dataset with a published version, at its page (lastmod: its newest
   * publication) and at each published version's own page, where its DOI lands (lastmod: that publication).
   * Withdrawn versions keep a tombstone page but are left out: there is nothing new for a search index there.
   */
  router.get("/sitemap.xml", async (_req, res) => {
    const published = await db
      .select({ slug: datasets.slug, semver: versions.semver, publishedAt: versions.publishedAt })
      .from(versions)
      .innerJoin(datasets, eq(datasets.id, versions.datasetId))
      .where(eq(versions.state, "published"))
      .orderBy(datasets.slug, versions.publishedAt);
    const newest = new Map<string, Date>();
    for (const v of published) {
      const at = v.publishedAt ?? new Date(0);
      if (at > (newest.get(v.slug) ?? new Date(0))) newest.set(v.slug, at);
    }
    const entries = [
      ...[...newest].map(([slug, at]) => ({ loc: datasetLandingUrl(config, slug), lastmod: at })),
      ...published.map((v) => ({ loc: versionLandingUrl(config, v.slug, v.semver), lastmod: v.publishedAt ?? new Date(0) })),
    ];
    const body =
      `<?xml version="1.0" encoding="UTF-8"?>\n<urlset xmlns="http://www.sitemaps.org/schemas/sitemap/0.9">\n` +
      entries.map((e) => `  <url><loc>${escapeXml(e.loc)}</loc><lastmod>${e.lastmod.toISOString()}</lastmod></url>\n`).join("") +
      `</urlset>\n`;
    res.set("Cache-Control", "public, max-age=300").type("application/xml").send(body);
  });

  return router;
}
