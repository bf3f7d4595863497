import { desc, eq, inArray, or } from "drizzle-orm";
import type { Db } from "@/db/client";
import { datasetEditors, datasets, versions } from "@/db/schema";
import type { CurationDataset, DatasetCreate, DatasetPatch, VersionBrief } from "@/schemas/curation";
import { datasetCreate } from "@/schemas/curation";
import { conflict, notFound } from "@/server/errors";
import { findUserByEmail } from "@/server/services/users";
import { compareSemver, datasetDescription } from "@/server/services/catalogue";
import { assertCanEdit, canEditDataset, type Dataset, type User } from "./access";

export const iso = (d: Date | null) => (d ? d.toISOString() : null);

export function versionBrief(v: typeof versions.$inferSelect): VersionBrief {
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
  const [vs, editors] = await Promise.all([
    db.select().from(versions).where(eq(versions.datasetId, d.id)),
    db.select({ userId: datasetEditors.userId }).from(datasetEditors).where(eq(datasetEditors.datasetId, d.id)),
  ]);
  vs.sort((a, b) => compareSemver(b.semver, a.semver));
  return {
    ...datasetDescription(d),
    funding: d.funding,
    methods: d.methods,
    ownerId: d.ownerId,
    editorIds: editors.map((e) => e.userId),
    canEdit: await canEditDataset(db, user, d),
    versions: vs.map(versionBrief),
    createdAt: d.createdAt.toISOString(),
    updatedAt: d.updatedAt.toISOString(),
  };
}

export async function createDataset(db: Db, user: User, input: DatasetCreate): Promise<CurationDataset> {
  const body = datasetCreate.parse(input);
  const [existing] = await db.select({ id: datasets.id }).from(datasets).where(eq(datasets.slug, body.slug));
  if (existing) throw conflict(`A dataset is already called "${body.slug}"; choose another slug.`, [{ field: "body.slug", message: "already taken" }]);
  const [d] = await db
    .insert(datasets)
    .values({ ...body, funding: body.funding ?? null, methods: body.methods ?? null, ownerId: user.id })
    .returning();
  return describe(db, user, d!);
}

export async function patchDataset(db: Db, user: User, dataset: Dataset, patch: DatasetPatch): Promise<CurationDataset> {
  await assertCanEdit(db, user, dataset);
  const [d] = await db.update(datasets).set({ ...patch, updatedAt: new Date() }).where(eq(datasets.id, dataset.id)).returning();
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
      .where(or(eq(datasets.ownerId, user.id), shared.length ? inArray(datasets.id, shared.map((s) => s.id)) : undefined))
      .orderBy(desc(datasets.updatedAt));
  }
  return Promise.all(rows.map((d) => describe(db, user, d)));
}

export async function datasetDetail(db: Db, user: User | undefined, dataset: Dataset) {
  return describe(db, user, dataset);
}

/** The owner (or an admin) shares a dataset with another curator. */
export async function addEditor(db: Db, user: User, dataset: Dataset, email: string): Promise<CurationDataset> {
  if (user.role !== "admin" && dataset.ownerId !== user.id) await assertCanEdit(db, undefined, dataset);
  const editor = await findUserByEmail(db, email);
  if (!editor) throw notFound(`No user has the e-mail ${email}.`);
  if (editor.role !== "curator" && editor.role !== "admin") throw conflict(`${email} is a ${editor.role}; only curators can be editors.`);
  await db.insert(datasetEditors).values({ datasetId: dataset.id, userId: editor.id }).onConflictDoNothing();
  return describe(db, user, dataset);
}
