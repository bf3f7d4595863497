import { eq } from "drizzle-orm";
import { datasets, sites, siteYears, versions } from "@/db/schema";
import type { Contributor } from "@/schemas/dataset-metadata";
import type { AppContext } from "@/server/context";
import { drainDoiQueue } from "@/server/services/citation/doi-queue";
import { runPublishHooks } from "@/server/services/publish-hooks";
import { defaultTableSchema } from "@/datasets/default-table-schema";
import { makeUser } from "./test-app";

const fixtureContributors: Contributor[] = [
  { name: "Marta Quillon", role: "project_leader", orcid: "0000-0002-1825-0097", affiliation: "Tallgrass Basin Agronomy Network" },
  { name: "Tallgrass Basin Agronomy Network", role: "creator" },
  { name: "Basin Soil Fund", role: "funder" },
];

export interface CitableFixture {
  datasetId: string;
  slug: string;
  ownerId: string;
  /** Make and publish a version (a draft with two site-years, then published), running the publish hooks and the DOI pass they start. */
  publish(semver: string, options?: { publishedAt?: Date; years?: [number, number]; hooks?: boolean }): Promise<string>;
}

/**
 * A dataset in the invented Tallgrass Basin, written straight into the database: a draft version gets a site and
 * site-years, then becomes published by the same UPDATE the publishing service makes, and the publish hooks run
 * after it as they do there.
 */
export async function citableFixture(
  ctx: AppContext,
  slug = "tallgrass-starter-p",
  contributors: Contributor[] = fixtureContributors,
): Promise<CitableFixture> {
  const owner = await makeUser(ctx, "curator");
  const [dataset] = await ctx.db
    .insert(datasets)
    .values({
      slug,
      title: "Soybean starter phosphorus placement in the Tallgrass Basin",
      crops: ["soybean"],
      region: "Tallgrass Basin (invented), temperate uplands",
      description:
        "Invented demonstration trials: starter P placement (check, in-furrow, 2x2 band, broadcast) on soybean across soil-test P classes.",
      licence: "CC-BY-4.0",
      keywords: ["soybean", "phosphorus", "starter fertilizer"],
      contributors,
      ownerId: owner.id,
    })
    .returning();
  const d = dataset!;
  return {
    datasetId: d.id,
    slug,
    ownerId: owner.id,
    async publish(semver, options = {}) {
      const [from, to] = options.years ?? [2021, 2022];
      const [v] = await ctx.db
        .insert(versions)
        .values({ datasetId: d.id, semver, createdBy: owner.id, tableSchema: defaultTableSchema(), changelog: `Version ${semver}` })
        .returning();
      const [site] = await ctx.db
        .insert(sites)
        .values({ versionId: v!.id, code: "TB-01", location: "Tallgrass County (invented)" })
        .returning();
      for (let year = from; year <= to; year++) {
        await ctx.db
          .insert(siteYears)
          .values({ versionId: v!.id, siteId: site!.id, code: `TB-01-${year}`, crop: "soybean", year, blocks: 4 });
      }
      const publishedAt = options.publishedAt ?? new Date(Date.UTC(2025, 2, 14, 12));
      await ctx.db
        .update(versions)
        .set({ state: "published", publishedAt, checksum: `sha256:${"ab".repeat(32)}`, reviewedBy: owner.id, updatedAt: publishedAt })
        .where(eq(versions.id, v!.id));
      if (options.hooks !== false) {
        await runPublishHooks(ctx, v!.id);
        // Registration runs in the background; these tests read its outcome, so wait for the pass to end.
        await drainDoiQueue(ctx);
      }
      return v!.id;
    },
  };
}
