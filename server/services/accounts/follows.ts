import { and, desc, eq, inArray } from "drizzle-orm";
import { datasets, follows, versions } from "@/db/schema";
import type { FollowList } from "@/schemas/account";
import type { AppContext } from "@/server/context";
import { notFound } from "@/server/errors";
import { latestPublishedByDataset } from "@/server/services/latest-version";

/** A dataset can be followed once it is public, i.e. has a published version; drafts stay invisible (404). */
async function publicDatasetId(ctx: AppContext, slug: string): Promise<string> {
  const [row] = await ctx.db
    .select({ id: datasets.id })
    .from(datasets)
    .innerJoin(versions, and(eq(versions.datasetId, datasets.id), eq(versions.state, "published")))
    .where(eq(datasets.slug, slug))
    .limit(1);
  if (!row) throw notFound(`No published dataset is called “${slug}”.`);
  return row.id;
}

export async function follow(ctx: AppContext, userId: string, slug: string) {
  const datasetId = await publicDatasetId(ctx, slug);
  await ctx.db.insert(follows).values({ datasetId, userId }).onConflictDoNothing();
  return { slug, following: true };
}

export async function unfollow(ctx: AppContext, userId: string, slug: string) {
  const [dataset] = await ctx.db.select({ id: datasets.id }).from(datasets).where(eq(datasets.slug, slug));
  if (dataset) await ctx.db.delete(follows).where(and(eq(follows.datasetId, dataset.id), eq(follows.userId, userId)));
  return { slug, following: false };
}

export async function listFollows(ctx: AppContext, userId: string): Promise<FollowList> {
  const rows = await ctx.db
    .select({ id: datasets.id, slug: datasets.slug, title: datasets.title, followedAt: follows.createdAt })
    .from(follows)
    .innerJoin(datasets, eq(datasets.id, follows.datasetId))
    .where(eq(follows.userId, userId))
    .orderBy(desc(follows.createdAt));
  const published = rows.length
    ? await ctx.db
        .select({ datasetId: versions.datasetId, semver: versions.semver, state: versions.state })
        .from(versions)
        .where(
          and(
            inArray(
              versions.datasetId,
              rows.map((r) => r.id),
            ),
            eq(versions.state, "published"),
          ),
        )
    : [];
  const latest = latestPublishedByDataset(published);
  return {
    items: rows.map((r) => ({
      slug: r.slug,
      title: r.title,
      followedAt: r.followedAt.toISOString(),
      latestVersion: latest.get(r.id)?.semver ?? null,
    })),
  };
}
