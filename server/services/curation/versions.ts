import { and, count, desc, eq, inArray, ne } from "drizzle-orm";
import type { Db } from "@/db/client";
import { plots, responses, siteYears, sites, soilTests, summaryMeans, treatments, uploads, validationReports, versions } from "@/db/schema";
import { defaultTableSchema } from "@/datasets/default-table-schema";
import type { TableSchemaUpdate, VersionDetail } from "@/schemas/curation";
import type { ResourceName } from "@/schemas/table-schema";
import type { AppContext } from "@/server/context";
import { badRequest, conflict } from "@/server/errors";
import { compareSemver } from "@/server/services/catalogue";
import { customFieldsOf, dropCustomValues, renameCustomValues } from "@/server/services/ingest/custom-fields";
import { computeResponses } from "@/server/services/ingest/recompute-responses";
import { latestPublishedOf } from "@/server/services/latest-version";
import {
  assertCanEdit,
  canApprove,
  canEditDataset,
  canReturn,
  canWithdraw,
  isReviewer,
  recordContentEdit,
  versionById,
  type Dataset,
  type User,
  type Version,
} from "./access";
import { copyVersionRows } from "./copy-version";
import { iso } from "./datasets";
import { bumpSemver, diffVersions } from "./diff";
import { checkRenames, checkTableSchemaEdit } from "./table-schema-rules";
import { resourceOrder } from "./resource-csv";
import { doiRegistrationOf } from "./version-doi";

async function latestPublished(db: Db, datasetId: string): Promise<Version | null> {
  const rows = await db
    .select()
    .from(versions)
    .where(and(eq(versions.datasetId, datasetId), eq(versions.state, "published")));
  return latestPublishedOf(rows) ?? null;
}

/** Any version ever published (withdrawn ones too) blocks its number and every lower one. */
async function highestReleased(db: Db, datasetId: string): Promise<string | null> {
  const rows = await db
    .select({ semver: versions.semver })
    .from(versions)
    .where(and(eq(versions.datasetId, datasetId), inArray(versions.state, ["published", "withdrawn"])));
  return (
    rows
      .map((r) => r.semver)
      .sort(compareSemver)
      .at(-1) ?? null
  );
}

export async function assertSemverIncreases(db: Db, datasetId: string, semver: string, field = "body.semver") {
  const highest = await highestReleased(db, datasetId);
  if (highest && compareSemver(semver, highest) <= 0) {
    throw conflict(`Version ${semver} must be higher than ${highest}, the latest published version.`, [
      { field, message: `must be above ${highest}` },
    ]);
  }
}

/** A new draft: a copy of the latest published version (all its rows, new ids), or empty for a first version. */
export async function createVersion(ctx: AppContext, user: User, dataset: Dataset, requested?: string): Promise<Version> {
  const { db } = ctx;
  await assertCanEdit(db, user, dataset);
  const open = await db
    .select({ semver: versions.semver, state: versions.state })
    .from(versions)
    .where(and(eq(versions.datasetId, dataset.id), inArray(versions.state, ["draft", "in_review"])));
  if (open.length)
    throw conflict(
      `Dataset "${dataset.slug}" already has version ${open[0]!.semver} in ${open[0]!.state === "draft" ? "draft" : "review"}; finish it first.`,
    );
  const base = await latestPublished(db, dataset.id);
  const highest = await highestReleased(db, dataset.id);
  const semver = requested ?? (highest ? bumpSemver(highest, "minor") : "1.0.0");
  await assertSemverIncreases(db, dataset.id, semver);
  return db.transaction(async (tx) => {
    const [v] = await tx
      .insert(versions)
      .values({
        datasetId: dataset.id,
        semver,
        tableSchema: base?.tableSchema ?? defaultTableSchema(),
        basedOnVersionId: base?.id ?? null,
        createdBy: user.id,
      })
      .returning();
    if (base) await copyVersionRows(tx, base.id, v!.id);
    return v!;
  });
}

async function resourceCounts(db: Db, versionId: string): Promise<Record<ResourceName, number> & { responses: number }> {
  const n = async (
    table: typeof sites | typeof siteYears | typeof soilTests | typeof treatments | typeof plots | typeof summaryMeans | typeof responses,
  ) => (await db.select({ n: count() }).from(table).where(eq(table.versionId, versionId)))[0]?.n ?? 0;
  const [a, b, c, d, e, f, g] = await Promise.all([
    n(sites),
    n(siteYears),
    n(soilTests),
    n(treatments),
    n(plots),
    n(summaryMeans),
    // Yield responses, one per site-year × treatment (other measures' responses sit beside them).
    db
      .select({ n: count() })
      .from(responses)
      .where(and(eq(responses.versionId, versionId), eq(responses.measure, "yield")))
      .then((r) => r[0]?.n ?? 0),
  ]);
  return { sites: a, site_years: b, soil_tests: c, treatments: d, plots: e, summaries: f, responses: g };
}

/** Site-years without responses, with the reason, as the ingest found it. */
async function uncomputedSiteYears(db: Db, versionId: string) {
  const [all, withResponses] = await Promise.all([
    db.select({ id: siteYears.id, code: siteYears.code }).from(siteYears).where(eq(siteYears.versionId, versionId)),
    db
      .selectDistinct({ id: responses.siteYearId })
      .from(responses)
      .where(and(eq(responses.versionId, versionId), eq(responses.measure, "yield"))),
  ]);
  const have = new Set(withResponses.map((r) => r.id));
  const missing = all.filter((s) => !have.has(s.id));
  if (missing.length === 0) return [];
  const r = await computeResponses(db, versionId, { siteYearCodes: missing.map((m) => m.code) });
  return r.uncomputed;
}

export async function versionDetail(ctx: AppContext, user: User | undefined, versionId: string): Promise<VersionDetail> {
  const { db } = ctx;
  const { version: v, dataset } = await versionById(db, versionId);
  const tombstone = v.state === "withdrawn";
  const [counts, ups, reps, latest, basedOn, canEdit] = await Promise.all([
    tombstone ? null : resourceCounts(db, v.id),
    // Everything but the raw content: a million-plot file is 28 MB, and the desk lists only its record.
    tombstone
      ? []
      : db
          .select({
            id: uploads.id,
            resource: uploads.resource,
            filename: uploads.filename,
            byteSize: uploads.byteSize,
            sha256: uploads.sha256,
            rowCount: uploads.rowCount,
            options: uploads.options,
            createdAt: uploads.createdAt,
          })
          .from(uploads)
          .where(eq(uploads.versionId, v.id))
          .orderBy(desc(uploads.createdAt)),
    tombstone
      ? []
      : db.select().from(validationReports).where(eq(validationReports.versionId, v.id)).orderBy(desc(validationReports.createdAt)),
    latestPublished(db, dataset.id),
    v.basedOnVersionId ? db.select({ semver: versions.semver }).from(versions).where(eq(versions.id, v.basedOnVersionId)) : [],
    canEditDataset(db, user, dataset),
  ]);
  // Reports of rejected files (what someone tried to upload) are for the dataset's editors and reviewers only.
  const visibleReports = canEdit || isReviewer(user) ? reps : reps.filter((r) => r.accepted);
  const editable = v.state === "draft" || v.state === "in_review";
  let suggestedBump: VersionDetail["suggestedBump"] = null;
  let suggestedSemver: string | null = null;
  if (editable && v.basedOnVersionId) {
    const d = await diffVersions(db, v.basedOnVersionId, v.id);
    suggestedBump = d.suggestedBump;
    suggestedSemver = d.suggestedSemver;
  } else if (editable) suggestedSemver = "1.0.0";
  const { responses: responseCount, ...perResource } = counts ?? { responses: null };
  return {
    id: v.id,
    datasetId: dataset.id,
    datasetSlug: dataset.slug,
    datasetTitle: dataset.title,
    semver: v.semver,
    state: v.state,
    changelog: v.changelog,
    tableSchema: v.tableSchema,
    metadataSnapshot: v.metadataSnapshot ?? null,
    checksum: v.checksum,
    basedOnVersionId: v.basedOnVersionId,
    basedOnSemver: basedOn[0]?.semver ?? null,
    createdBy: v.createdBy,
    submittedBy: v.submittedBy,
    reviewedBy: v.reviewedBy,
    reviewComment: v.reviewComment,
    withdrawnReason: v.withdrawnReason,
    createdAt: v.createdAt.toISOString(),
    updatedAt: v.updatedAt.toISOString(),
    submittedAt: iso(v.submittedAt),
    publishedAt: iso(v.publishedAt),
    withdrawnAt: iso(v.withdrawnAt),
    counts: counts ? (perResource as Record<ResourceName, number>) : null,
    responses: responseCount ?? null,
    uncomputedSiteYears: tombstone || !editable ? [] : await uncomputedSiteYears(db, v.id),
    uploads: ups.map((u) => ({
      id: u.id,
      resource: u.resource as ResourceName,
      filename: u.filename,
      byteSize: u.byteSize,
      sha256: u.sha256,
      rowCount: u.rowCount,
      options: u.options,
      createdAt: u.createdAt.toISOString(),
    })),
    reports: visibleReports.map((r) => ({
      id: r.id,
      resource: r.resource as ResourceName,
      filename: r.filename,
      accepted: r.accepted,
      errors: r.problems.filter((p) => p.severity === "error").length,
      warnings: r.problems.filter((p) => p.severity === "warning").length,
      createdAt: r.createdAt.toISOString(),
    })),
    canEdit: canEdit && v.state === "draft",
    canReview: await canApprove(ctx.db, user, v),
    canReturn: canReturn(user, v),
    canWithdraw: canWithdraw(user, v, canEdit),
    latestPublishedSemver: latest?.semver ?? null,
    suggestedBump,
    suggestedSemver,
    doiRegistration: doiRegistrationOf(ctx, user, dataset, v, canEdit),
  };
}

async function assertDraft(v: Version) {
  if (v.state !== "draft") throw conflict(`Version ${v.semver} is ${v.state.replace("_", " ")}; only a draft can change.`);
}

export async function patchVersion(db: Db, user: User, versionId: string, patch: { semver?: string; changelog?: string }) {
  const { version, dataset } = await versionById(db, versionId);
  await assertCanEdit(db, user, dataset);
  await assertDraft(version);
  if (patch.semver) {
    await assertSemverIncreases(db, dataset.id, patch.semver);
    const [clash] = await db
      .select({ id: versions.id })
      .from(versions)
      .where(and(eq(versions.datasetId, dataset.id), eq(versions.semver, patch.semver), ne(versions.id, versionId)));
    if (clash)
      throw conflict(`Dataset "${dataset.slug}" already has a version ${patch.semver}.`, [{ field: "body.semver", message: "taken" }]);
  }
  await db
    .update(versions)
    .set({ ...patch, updatedAt: new Date() })
    .where(eq(versions.id, versionId));
  await recordContentEdit(db, versionId, user.id);
}

export async function putTableSchema(db: Db, user: User, versionId: string, update: TableSchemaUpdate) {
  const { version, dataset } = await versionById(db, versionId);
  await assertCanEdit(db, user, dataset);
  await assertDraft(version);
  const { renames = [], ...schema } = update;
  const problems = [...checkTableSchemaEdit(schema), ...checkRenames(version.tableSchema, schema, renames)];
  if (problems.length) throw badRequest("The data dictionary cannot be changed so.", problems);
  await db.transaction(async (tx) => {
    await tx.update(versions).set({ tableSchema: schema, updatedAt: new Date() }).where(eq(versions.id, versionId));
    // Values of the curator's own fields follow a rename and leave with a removed field.
    for (const r of renames) await renameCustomValues(tx, versionId, r.resource, r.from, r.to);
    for (const resource of resourceOrder) {
      const kept = new Set(customFieldsOf(resource, schema.resources[resource]));
      const renamed = new Set(renames.filter((r) => r.resource === resource).map((r) => r.from));
      for (const name of customFieldsOf(resource, version.tableSchema.resources[resource]))
        if (!kept.has(name) && !renamed.has(name)) await dropCustomValues(tx, versionId, resource, name);
    }
  });
  await recordContentEdit(db, versionId, user.id);
}
