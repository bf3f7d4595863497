import { and, desc, eq, inArray, or } from "drizzle-orm";
import type { Db } from "@/db/client";
import { datasetEditors, datasets, users, versions } from "@/db/schema";
import type { CurationDataset, DatasetCreate, DatasetPatch, VersionBrief } from "@/schemas/curation";
import { datasetCreate } from "@/schemas/curation";
import { conflict, forbidden, HttpProblem, notFound } from "@/server/errors";
import { findUserByEmail } from "@/server/services/users";
import { compareSemver, datasetDescription } from "@/server/services/catalogue";
import { assertCanEdit, canEditDataset, canStartVersion, type Dataset, type User } from "./access";

export const iso = (d: Date | null) => (d ? d.toISOString() : null);

function versionBrief(v: typeof versions.$inferSelect): VersionBrief {
  return {
    id: v.id,
    semver: v.semver,
    state: v.state,
    changelog: v.changelog,
    createdAt: v.createdAt.toISOString(),
    submittedAt: iso(v.submittedAt),
    publishedAt: iso(v.publishedAt),
    withdrawnAt: iso(v.withdrawnAt),
  };
}

async function describe(db: Db, user: User | undefined, d: Dataset): Promise<CurationDataset> {
  const [vs, editors, canEdit] = await Promise.all([
    db.select().from(versions).where(eq(versions.datasetId, d.id)),
    db
      .select({ userId: datasetEditors.userId, displayName: users.displayName, email: users.email })
      .from(datasetEditors)
      .innerJoin(users, eq(users.id, datasetEditors.userId))
      .where(eq(datasetEditors.datasetId, d.id))
      .orderBy(users.displayName),
    canEditDataset(db, user, d),
  ]);
  // Reviewers and co-editors see who edits, by name; addresses are for whoever chooses the editors (owner, admins).
  const seesAddresses = !!user && (user.role === "admin" || user.id === d.ownerId);
  vs.sort((a, b) => compareSemver(b.semver, a.semver));
  return {
    ...datasetDescription(d),
    funding: d.funding,
    methods: d.methods,
    ownerId: d.ownerId,
    editorIds: editors.map((e) => e.userId),
    editors: editors.map((e) => ({
      id: e.userId,
      displayName: e.displayName,
      email: seesAddresses || e.userId === user?.id ? e.email : "",
    })),
    canShare: !!user && (user.role === "admin" || user.id === d.ownerId),
    canEdit,
    canStartVersion: canStartVersion(
      user,
      canEdit,
      vs.map((v) => v.state),
    ),
    versions: vs.map(versionBrief),
    createdAt: d.createdAt.toISOString(),
    updatedAt: d.updatedAt.toISOString(),
  };
}

export async function createDataset(db: Db, user: User, input: DatasetCreate): Promise<CurationDataset> {
  const body = datasetCreate.parse(input);
  const [existing] = await db.select({ id: datasets.id }).from(datasets).where(eq(datasets.slug, body.slug));
  if (existing)
    throw conflict(`A dataset is already called "${body.slug}"; choose another slug.`, [{ field: "body.slug", message: "already taken" }]);
  const [d] = await db
    .insert(datasets)
    .values({ ...body, funding: body.funding ?? null, methods: body.methods ?? null, ownerId: user.id })
    .returning();
  return describe(db, user, d!);
}

export async function patchDataset(db: Db, user: User, dataset: Dataset, patch: DatasetPatch): Promise<CurationDataset> {
  await assertCanEdit(db, user, dataset);
  const [d] = await db
    .update(datasets)
    .set({ ...patch, updatedAt: new Date() })
    .where(eq(datasets.id, dataset.id))
    .returning();
  return describe(db, user, d!);
}

/** Datasets the user works on (all of them for reviewers and admins), drafts included. */
export async function listCurationDatasets(db: Db, user: User): Promise<CurationDataset[]> {
  let rows: Dataset[];
  if (user.role === "admin" || user.role === "reviewer") rows = await db.select().from(datasets).orderBy(desc(datasets.updatedAt));
  else {
    const shared = await db.select({ id: datasetEditors.datasetId }).from(datasetEditors).where(eq(datasetEditors.userId, user.id));
    rows = await db
      .select()
      .from(datasets)
      .where(
        or(
          eq(datasets.ownerId, user.id),
          shared.length
            ? inArray(
                datasets.id,
                shared.map((s) => s.id),
              )
            : undefined,
        ),
      )
      .orderBy(desc(datasets.updatedAt));
  }
  return Promise.all(rows.map((d) => describe(db, user, d)));
}

export async function datasetDetail(db: Db, user: User | undefined, dataset: Dataset) {
  return describe(db, user, dataset);
}

function assertCanShare(user: User, dataset: Dataset) {
  if (user.role !== "admin" && dataset.ownerId !== user.id) {
    throw forbidden(`Only the owner of dataset "${dataset.slug}" (or an admin) may choose its editors.`);
  }
}

/** The owner (or an admin) shares a dataset with another curator. */
export async function addEditor(db: Db, user: User, dataset: Dataset, email: string): Promise<CurationDataset> {
  assertCanShare(user, dataset);
  const editor = await findUserByEmail(db, email);
  if (editor && editor.id === dataset.ownerId)
    throw conflict(`${email} owns this dataset already.`, [{ field: "body.email", message: "this is the owner" }]);
  // One answer for "no account" and "an account that cannot be an editor": sharing must not tell a curator who has
  // an account here, or with which role.
  if (!editor || (editor.role !== "curator" && editor.role !== "admin") || editor.disabledAt) {
    throw new HttpProblem(404, "Not found", `No curator has the e-mail ${email}.`, {
      errors: [{ field: "body.email", message: "no curator has this address" }],
    });
  }
  await db.insert(datasetEditors).values({ datasetId: dataset.id, userId: editor.id }).onConflictDoNothing();
  return describe(db, user, dataset);
}

/** The owner (or an admin) stops sharing a dataset with an editor. Removing someone who is not an editor is a 404. */
export async function removeEditor(db: Db, user: User, dataset: Dataset, editorId: string): Promise<CurationDataset> {
  assertCanShare(user, dataset);
  const removed = await db
    .delete(datasetEditors)
    .where(and(eq(datasetEditors.datasetId, dataset.id), eq(datasetEditors.userId, editorId)))
    .returning({ userId: datasetEditors.userId });
  if (!removed.length) throw notFound(`That user is not an editor of dataset "${dataset.slug}".`);
  return describe(db, user, dataset);
}
