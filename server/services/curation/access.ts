import { and, eq, inArray } from "drizzle-orm";
import type { Db } from "@/db/client";
import { datasetEditors, datasets, uploads, versionEdits, versions } from "@/db/schema";
import { forbidden, notFound } from "@/server/errors";

export type Dataset = typeof datasets.$inferSelect;
export type Version = typeof versions.$inferSelect;
export type User = Express.User;

/** Curators edit datasets they own or were made editors of; admins edit every dataset. */
export async function canEditDataset(db: Db, user: User | undefined, dataset: Dataset): Promise<boolean> {
  if (!user) return false;
  if (user.role === "admin") return true;
  if (user.role !== "curator") return false;
  if (dataset.ownerId === user.id) return true;
  const [row] = await db
    .select()
    .from(datasetEditors)
    .where(and(eq(datasetEditors.datasetId, dataset.id), eq(datasetEditors.userId, user.id)));
  return !!row;
}

/** The dataset has a version the public can see (published, or withdrawn with its tombstone). */
async function isPublic(db: Db, dataset: Dataset): Promise<boolean> {
  const [row] = await db
    .select({ id: versions.id })
    .from(versions)
    .where(and(eq(versions.datasetId, dataset.id), inArray(versions.state, ["published", "withdrawn"])))
    .limit(1);
  return !!row;
}

export const isReviewer = (user: User | undefined) => user?.role === "reviewer" || user?.role === "admin";

/**
 * Who may start a new version of a dataset: a curator or admin who edits it, while no version is open (a draft or
 * one in review). Starting one also refuses these cases; the answer carries this so screens need not work it out.
 */
export const canStartVersion = (user: User | undefined, datasetEditable: boolean, versionStates: readonly Version["state"][]) =>
  !!user &&
  datasetEditable &&
  (user.role === "curator" || user.role === "admin") &&
  !versionStates.some((s) => s === "draft" || s === "in_review");

/** Any reviewer may send a version in review back to its curators, their own included. */
export const canReturn = (user: User | undefined, version: Pick<Version, "state">) => version.state === "in_review" && isReviewer(user);

/** Reviewers and the dataset's editors withdraw published versions. */
export const canWithdraw = (user: User | undefined, version: Pick<Version, "state">, datasetEditable: boolean) =>
  version.state === "published" && (isReviewer(user) || datasetEditable);

export async function datasetBySlug(db: Db, slug: string): Promise<Dataset> {
  const [d] = await db.select().from(datasets).where(eq(datasets.slug, slug));
  if (!d) throw notFound(`No dataset is called "${slug}".`);
  return d;
}

export async function versionById(db: Db, id: string): Promise<{ version: Version; dataset: Dataset }> {
  const [row] = await db
    .select({ version: versions, dataset: datasets })
    .from(versions)
    .innerJoin(datasets, eq(datasets.id, versions.datasetId))
    .where(eq(versions.id, id));
  if (!row) throw notFound("No such version.");
  return row;
}

/**
 * Who may see a version: published and withdrawn ones are public; drafts and versions in review only their
 * dataset's editors and reviewers. Others get 404, so drafts do not leak their existence.
 */
export async function assertCanView(db: Db, user: User | undefined, dataset: Dataset, version: Version) {
  if (version.state === "published" || version.state === "withdrawn") return;
  if (isReviewer(user) || (await canEditDataset(db, user, dataset))) return;
  throw notFound("No such version.");
}

/**
 * The review screen's own reads (the draft's Evidence preview, per-site-year results, comments) are for the
 * dataset's editors and reviewers only, whatever the version's state; anyone else is told the version does not exist.
 */
export async function assertEditorOrReviewer(db: Db, user: User | undefined, dataset: Dataset) {
  if (isReviewer(user) || (await canEditDataset(db, user, dataset))) return;
  throw notFound("No such version.");
}

/** Reviewers (and admins) comment on the site-years of a version while it is in review. */
export const canComment = (user: User | undefined, version: Pick<Version, "state">) => version.state === "in_review" && isReviewer(user);

/** Resolving a comment: the dataset's editors (who answer it) and reviewers. */
export const canResolveComment = (user: User | undefined, datasetEditable: boolean) => isReviewer(user) || datasetEditable;

export async function assertCanEdit(db: Db, user: User | undefined, dataset: Dataset) {
  if (!(await canEditDataset(db, user, dataset))) {
    // A dataset nobody published is known only to its editors and reviewers: to anyone else it does not exist.
    if (!isReviewer(user) && !(await isPublic(db, dataset))) throw notFound(`No dataset is called "${dataset.slug}".`);
    throw forbidden(`Only the owner and editors of dataset "${dataset.slug}" (or an admin) may change it.`);
  }
}

/**
 * Four eyes: the people who made a version's content (its creator, its submitter, whoever uploaded a file into it or
 * edited its data dictionary, semver or changelog) may not approve it, whatever their role.
 */
export async function contentAuthors(db: Db, version: Pick<Version, "id" | "createdBy" | "submittedBy">): Promise<Set<string>> {
  const [uploaders, editors] = await Promise.all([
    db.selectDistinct({ id: uploads.uploadedBy }).from(uploads).where(eq(uploads.versionId, version.id)),
    db.select({ id: versionEdits.userId }).from(versionEdits).where(eq(versionEdits.versionId, version.id)),
  ]);
  const ids = [version.createdBy, version.submittedBy, ...uploaders.map((u) => u.id), ...editors.map((e) => e.id)];
  return new Set(ids.filter((id): id is string => !!id));
}

/** Approving publishes, so it needs a second person: a reviewer who made none of the version's content. */
export async function canApprove(
  db: Db,
  user: User | undefined,
  version: Pick<Version, "id" | "state" | "createdBy" | "submittedBy">,
): Promise<boolean> {
  if (!user || !isReviewer(user) || version.state !== "in_review") return false;
  return !(await contentAuthors(db, version)).has(user.id);
}

/** Note that a user changed a draft's content other than by an upload. */
export async function recordContentEdit(db: Db, versionId: string, userId: string) {
  await db
    .insert(versionEdits)
    .values({ versionId, userId })
    .onConflictDoUpdate({ target: [versionEdits.versionId, versionEdits.userId], set: { lastAt: new Date() } });
}
