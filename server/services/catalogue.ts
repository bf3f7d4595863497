import { and, desc, eq, inArray, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { datasets, siteYears, versions } from "@/db/schema";
import type { DatasetSummary } from "@/schemas/dataset";
import { latestPublishedByDataset } from "./latest-version";

/**
 * Datasets that have at least one published version, each with its latest published version's figures.
 * Ordering by semver happens in code: text order would put 1.10.0 before 1.9.0.
 */
export async function listPublishedDatasets(db: Db): Promise<DatasetSummary[]> {
  const published = await db
    .select({
      id: versions.id,
      datasetId: versions.datasetId,
      semver: versions.semver,
      state: versions.state,
      publishedAt: versions.publishedAt,
    })
    .from(versions)
    .where(eq(versions.state, "published"))
    .orderBy(desc(versions.publishedAt));
  const latestByDataset = latestPublishedByDataset(published);
  if (latestByDataset.size === 0) return [];
  const latestIds = [...latestByDataset.values()].map((v) => v.id);
  const [rows, counts] = await Promise.all([
    db
      .select()
      .from(datasets)
      .where(inArray(datasets.id, [...latestByDataset.keys()]))
      .orderBy(datasets.title),
    db
      .select({
        versionId: siteYears.versionId,
        n: sql<number>`count(*)`.mapWith(Number),
        yearFrom: sql<number>`min(${siteYears.year})`.mapWith(Number),
        yearTo: sql<number>`max(${siteYears.year})`.mapWith(Number),
      })
      .from(siteYears)
      .where(and(inArray(siteYears.versionId, latestIds)))
      .groupBy(siteYears.versionId),
  ]);
  const countByVersion = new Map(counts.map((c) => [c.versionId, c]));
  return rows.map((d) => {
    const latest = latestByDataset.get(d.id)!;
    const count = countByVersion.get(latest.id);
    return {
      ...datasetDescription(d),
      latestVersion: latest.semver,
      publishedAt: latest.publishedAt?.toISOString() ?? null,
      siteYears: count?.n ?? 0,
      yearFrom: count?.yearFrom ?? null,
      yearTo: count?.yearTo ?? null,
    };
  });
}

/** What a dataset says about itself, as both the public catalogue and the curation screens show it. */
export function datasetDescription(d: typeof datasets.$inferSelect) {
  return {
    id: d.id,
    slug: d.slug,
    title: d.title,
    crops: d.crops,
    region: d.region,
    description: d.description,
    licence: d.licence,
    keywords: d.keywords,
    contributors: d.contributors,
  };
}

export function compareSemver(a: string, b: string): number {
  const pa = a.split(".").map(Number);
  const pb = b.split(".").map(Number);
  for (let i = 0; i < 3; i++) {
    const d = (pa[i] ?? 0) - (pb[i] ?? 0);
    if (d !== 0) return d;
  }
  return 0;
}
