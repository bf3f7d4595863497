import { and, eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { datasetEditors, datasets, versions } from "@/db/schema";
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
  const [row] = await db.select().from(datasetEditors).where(and(eq(datasetEditors.datasetId, dataset.id), eq(datasetEditors.userId, user.id)));
  return !!row;
}

export const isReviewer = (user: User | undefined) => user?.role === "reviewer" || user?.role === "admin";

/** Approving publishes, so it needs a second person: a reviewer approves a version in review they neither created nor submitted. */
export const canApprove = (user: User | undefined, version: Pick<Version, "state" | "createdBy" | "submittedBy">) =>
  version.state === "in_review" && isReviewer(user) && user!.id !== version.createdBy && user!.id !== version.submittedBy;

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
  const [row] = await db.select({ version: versions, dataset: datasets }).from(versions).innerJoin(datasets, eq(datasets.id, versions.datasetId)).where(eq(versions.id, id));
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

export async function assertCanEdit(db: Db, user: User | undefined, dataset: Dataset) {
  if (!(await canEditDataset(db, user, dataset))) {
    throw forbidden(`Only the owner and editors of dataset "${dataset.slug}" (or an admin) may change it.`);
  }
}
