import { and, asc, count, eq } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import type { Db } from "@/db/client";
import { reviewComments, siteYears, users } from "@/db/schema";
import type { ReviewComment } from "@/schemas/review";
import { badRequest, conflict, forbidden, notFound } from "@/server/errors";
import { assertEditorOrReviewer, canComment, canEditDataset, canResolveComment, versionById, type User } from "./access";

const resolver = alias(users, "resolver");

/** Every comment on a version's site-years, oldest first; the comments survive returns and re-submissions. */
export async function listComments(db: Db, user: User | undefined, versionId: string): Promise<ReviewComment[]> {
  const { dataset } = await versionById(db, versionId);
  await assertEditorOrReviewer(db, user, dataset);
  const rows = await db
    .select({ c: reviewComments, author: users.displayName, resolvedByName: resolver.displayName })
    .from(reviewComments)
    .innerJoin(users, eq(users.id, reviewComments.authorId))
    .leftJoin(resolver, eq(resolver.id, reviewComments.resolvedBy))
    .where(eq(reviewComments.versionId, versionId))
    .orderBy(asc(reviewComments.createdAt), asc(reviewComments.id));
  return rows.map(({ c, author, resolvedByName }) => ({
    id: c.id,
    versionId: c.versionId,
    siteYear: c.siteYearCode,
    body: c.body,
    authorId: c.authorId,
    authorName: author,
    createdAt: c.createdAt.toISOString(),
    stateWhenMade: c.stateWhenMade,
    resolvedAt: c.resolvedAt?.toISOString() ?? null,
    resolvedByName: resolvedByName ?? null,
  }));
}

/** A reviewer's comment on one site-year of a version in review. */
export async function addComment(db: Db, user: User, versionId: string, input: { siteYear: string; body: string }) {
  const { version, dataset } = await versionById(db, versionId);
  await assertEditorOrReviewer(db, user, dataset);
  if (!canComment(user, version)) {
    if (version.state !== "in_review")
      throw conflict(`Version ${version.semver} is ${version.state.replace("_", " ")}; comments are made while it is in review.`);
    throw forbidden("Only reviewers comment on the site-years of a version in review.");
  }
  const [known] = await db
    .select({ id: siteYears.id })
    .from(siteYears)
    .where(and(eq(siteYears.versionId, versionId), eq(siteYears.code, input.siteYear)));
  if (!known)
    throw badRequest(`Version ${version.semver} has no site-year "${input.siteYear}".`, [
      { field: "body.siteYear", message: "not a site-year of this version" },
    ]);
  const [row] = await db
    .insert(reviewComments)
    .values({ versionId, siteYearCode: input.siteYear, body: input.body, authorId: user.id, stateWhenMade: version.state })
    .returning({ id: reviewComments.id });
  return row!.id;
}

/** Marks a comment as dealt with (the curator answered it, or the reviewer is satisfied); the comment stays. */
export async function resolveComment(db: Db, user: User, versionId: string, commentId: string) {
  const { dataset } = await versionById(db, versionId);
  await assertEditorOrReviewer(db, user, dataset);
  if (!canResolveComment(user, await canEditDataset(db, user, dataset)))
    throw forbidden("Only the dataset's editors and reviewers resolve comments.");
  const [row] = await db
    .update(reviewComments)
    .set({ resolvedAt: new Date(), resolvedBy: user.id })
    .where(and(eq(reviewComments.id, commentId), eq(reviewComments.versionId, versionId)))
    .returning({ id: reviewComments.id });
  if (!row) throw notFound("No such comment on this version.");
}

/** Comments per site-year code, for the review summary. */
export async function commentCounts(db: Db, versionId: string): Promise<Map<string, number>> {
  const rows = await db
    .select({ code: reviewComments.siteYearCode, n: count() })
    .from(reviewComments)
    .where(eq(reviewComments.versionId, versionId))
    .groupBy(reviewComments.siteYearCode);
  return new Map(rows.map((r) => [r.code, Number(r.n)]));
}
