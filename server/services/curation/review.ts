import { and, asc, count, eq } from "drizzle-orm";
import { datasets, siteYears, users, versions } from "@/db/schema";
import type { AppContext } from "@/server/context";
import { conflict, forbidden } from "@/server/errors";
import { notifyReviewDecision, notifyReviewRequested, sendReviewMail } from "@/server/services/accounts/notifications";
import { queueDoiWork } from "@/server/services/citation/doi-queue";
import { runPublishHooks } from "@/server/services/publish-hooks";
import { assertCanEdit, canApprove, canEditDataset, contentAuthors, isReviewer, versionById, type User } from "./access";
import { versionChecksum } from "./resource-csv";
import { assertSemverIncreases } from "./versions";

/** Draft → in review. The changelog entry says what the version changes; it is required. */
export async function submitVersion(ctx: AppContext, user: User, versionId: string, changelog: string) {
  const { db } = ctx;
  const { version, dataset } = await versionById(db, versionId);
  await assertCanEdit(db, user, dataset);
  if (version.state !== "draft")
    throw conflict(`Version ${version.semver} is ${version.state.replace("_", " ")}; only a draft can be submitted.`);
  await assertSemverIncreases(db, dataset.id, version.semver, "semver");
  const [n] = await db.select({ n: count() }).from(siteYears).where(eq(siteYears.versionId, versionId));
  if (!n?.n) throw conflict(`Version ${version.semver} has no site-years yet; upload its data before submitting it.`);
  const now = new Date();
  const [submitted] = await db
    .update(versions)
    .set({ state: "in_review", changelog, submittedBy: user.id, submittedAt: now, updatedAt: now, reviewComment: null })
    .where(and(eq(versions.id, versionId), eq(versions.state, "draft")))
    .returning({ id: versions.id });
  if (submitted) await sendReviewMail(`Review request for version ${versionId}`, () => notifyReviewRequested(ctx, versionId));
}

async function reviewable(ctx: AppContext, user: User, versionId: string, verb: string) {
  if (!isReviewer(user)) throw forbidden(`Only reviewers ${verb} versions.`);
  const found = await versionById(ctx.db, versionId);
  if (found.version.state !== "in_review")
    throw conflict(`Version ${found.version.semver} is ${found.version.state.replace("_", " ")}, not in review.`);
  return found;
}

/**
 * In review → published: the checksum over every resource's canonical CSV and the dataset's metadata are frozen
 * with the version in one transaction; the publish hooks (DOI, follower notices) run after it commits.
 */
export async function approveVersion(ctx: AppContext, user: User, versionId: string, comment?: string) {
  const { version, dataset } = await reviewable(ctx, user, versionId, "approve");
  if ((await contentAuthors(ctx.db, version)).has(user.id)) {
    throw forbidden("You created, changed or submitted this version, so another reviewer must approve it.");
  }
  await assertSemverIncreases(ctx.db, dataset.id, version.semver, "semver");
  await ctx.db.transaction(async (tx) => {
    const checksum = await versionChecksum(tx, versionId, version.tableSchema);
    const [d] = await tx.select().from(datasets).where(eq(datasets.id, dataset.id));
    const { id: _id, ownerId: _owner, createdAt, updatedAt, ...metadata } = d!;
    const now = new Date();
    await tx
      .update(versions)
      .set({
        state: "published",
        checksum,
        metadataSnapshot: { ...metadata, datasetCreatedAt: createdAt.toISOString(), metadataUpdatedAt: updatedAt.toISOString() },
        publishedAt: now,
        updatedAt: now,
        reviewedBy: user.id,
        reviewComment: comment ?? null,
      })
      .where(and(eq(versions.id, versionId), eq(versions.state, "in_review")));
  });
  await sendReviewMail(`Approval of version ${versionId}`, () => notifyReviewDecision(ctx, versionId, "approved", comment ?? ""));
  await runPublishHooks(ctx, versionId);
}

/** In review → draft, with the reviewer's comment for the curator. */
export async function returnVersion(ctx: AppContext, user: User, versionId: string, comment: string) {
  await reviewable(ctx, user, versionId, "return");
  const [returned] = await ctx.db
    .update(versions)
    .set({ state: "draft", reviewComment: comment, reviewedBy: user.id, updatedAt: new Date() })
    .where(and(eq(versions.id, versionId), eq(versions.state, "in_review")))
    .returning({ id: versions.id });
  if (returned) await sendReviewMail(`Return of version ${versionId}`, () => notifyReviewDecision(ctx, versionId, "returned", comment));
}

/** Published → withdrawn: a tombstone keeps the metadata and the reason; the rows are no longer served. */
export async function withdrawVersion(ctx: AppContext, user: User, versionId: string, reason: string) {
  const { version, dataset } = await versionById(ctx.db, versionId);
  if (!isReviewer(user) && !(await canEditDataset(ctx.db, user, dataset))) {
    throw forbidden(`Only reviewers and the editors of dataset "${dataset.slug}" may withdraw its versions.`);
  }
  if (version.state !== "published")
    throw conflict(`Version ${version.semver} is ${version.state.replace("_", " ")}; only a published version can be withdrawn.`);
  const now = new Date();
  await ctx.db
    .update(versions)
    .set({ state: "withdrawn", withdrawnReason: reason, withdrawnAt: now, updatedAt: now })
    .where(eq(versions.id, versionId));
  // The DOI stays and keeps resolving to the tombstone; its metadata is updated in the background to say why.
  await queueDoiWork(ctx, versionId, ["registered", "pending"]);
}

export async function reviewQueue(ctx: AppContext, user: User) {
  if (!isReviewer(user)) throw forbidden("The review queue is for reviewers.");
  const rows = await ctx.db
    .select({ v: versions, slug: datasets.slug, title: datasets.title, submitter: users.displayName })
    .from(versions)
    .innerJoin(datasets, eq(datasets.id, versions.datasetId))
    .leftJoin(users, eq(users.id, versions.submittedBy))
    .where(eq(versions.state, "in_review"))
    .orderBy(asc(versions.submittedAt));
  return Promise.all(
    rows.map(async (r) => ({
      versionId: r.v.id,
      datasetSlug: r.slug,
      datasetTitle: r.title,
      semver: r.v.semver,
      changelog: r.v.changelog,
      submittedAt: r.v.submittedAt?.toISOString() ?? null,
      submittedBy: r.v.submittedBy,
      submittedByName: r.submitter,
      canApprove: await canApprove(ctx.db, user, r.v),
    })),
  );
}
