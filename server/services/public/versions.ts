import { and, count, eq, inArray, max, min } from "drizzle-orm";
import type { Db } from "@/db/client";
import { datasets, plots, responses, sites, siteYears, treatments, versions } from "@/db/schema";
import type { DatasetDetail, VersionDetail, VersionSummary } from "@/schemas/public";
import { notFound } from "@/server/errors";
import { compareSemver, listPublishedDatasets } from "@/server/services/catalogue";
import { latestAlias, pickVersion, versionGone } from "@/server/services/latest-version";
import type { ResolvedVersion } from "@/server/services/trial-filter";

const publicStates = ["published", "withdrawn"] as const;
type VersionRow = typeof versions.$inferSelect;
type DatasetRow = typeof datasets.$inferSelect;

export const versionPath = (slug: string, semver: string) => `/api/v1/datasets/${slug}/versions/${semver}`;

/** A version's licence: the one frozen into it at publication, else the dataset's. */
function licenceOf(v: VersionRow, d: DatasetRow): string {
  const frozen = v.metadataSnapshot?.licence;
  return typeof frozen === "string" ? frozen : d.licence;
}

function summaryOf(v: VersionRow, d: DatasetRow): VersionSummary {
  return {
    semver: v.semver,
    state: v.state === "withdrawn" ? "withdrawn" : "published",
    publishedAt: v.publishedAt?.toISOString() ?? null,
    withdrawnAt: v.withdrawnAt?.toISOString() ?? null,
    withdrawnReason: v.state === "withdrawn" ? v.withdrawnReason : null,
    changelog: v.changelog,
    checksum: v.checksum,
    doi: v.doi,
    licence: licenceOf(v, d),
    url: versionPath(d.slug, v.semver),
  };
}

/** The dataset and its public versions, newest first. Drafts and versions in review are never public. */
async function publicVersionsOf(db: Db, slug: string): Promise<{ dataset: DatasetRow; versions: VersionRow[] }> {
  const [dataset] = await db.select().from(datasets).where(eq(datasets.slug, slug));
  const rows = dataset
    ? await db
        .select()
        .from(versions)
        .where(and(eq(versions.datasetId, dataset.id), inArray(versions.state, [...publicStates])))
    : [];
  if (!dataset || rows.length === 0) throw notFound(`No published dataset is called "${slug}".`);
  return { dataset, versions: rows.sort((a, b) => compareSemver(b.semver, a.semver)) };
}

export async function datasetDetail(db: Db, slug: string): Promise<DatasetDetail> {
  const { dataset: d, versions: vs } = await publicVersionsOf(db, slug);
  const summary = (await listPublishedDatasets(db)).find((s) => s.slug === slug);
  // A dataset whose every version was withdrawn still has a page: its tombstones.
  const base = summary ?? {
    ...(({ id, slug, title, crops, region, description, licence, keywords, contributors }) => ({
      id,
      slug,
      title,
      crops,
      region,
      description,
      licence,
      keywords,
      contributors,
    }))(d),
    latestVersion: null,
    publishedAt: null,
    siteYears: 0,
    yearFrom: null,
    yearTo: null,
  };
  return {
    ...base,
    funding: d.funding,
    methods: d.methods,
    conceptDoi: d.conceptDoi,
    versions: vs.map((v) => summaryOf(v, d)),
  };
}

export async function versionSummaries(db: Db, slug: string): Promise<VersionSummary[]> {
  const { dataset, versions: vs } = await publicVersionsOf(db, slug);
  return vs.map((v) => summaryOf(v, dataset));
}

/** A version named in a path: a semantic version (published or withdrawn), or `latest` (the newest published). */
export interface PathVersion extends ResolvedVersion {
  pinned: boolean;
  withdrawnReason: string | null;
  row: VersionRow;
  dataset: DatasetRow;
}

export async function pathVersion(db: Db, slug: string, semver: string): Promise<PathVersion> {
  const { dataset, versions: vs } = await publicVersionsOf(db, slug);
  const v = pickVersion(vs, semver);
  if (!v)
    throw notFound(semver === latestAlias ? `Dataset "${slug}" has no published version.` : `Dataset "${slug}" has no version ${semver}.`);
  return {
    versionId: v.id,
    datasetId: dataset.id,
    datasetSlug: dataset.slug,
    datasetTitle: dataset.title,
    semver: v.semver,
    licence: licenceOf(v, dataset),
    state: v.state,
    pinned: semver !== latestAlias,
    withdrawnReason: v.withdrawnReason,
    row: v,
    dataset,
  };
}

/** Rows of a withdrawn version are gone: 410 with the reason (its metadata stays readable). */
export function assertRowsServed(v: PathVersion): void {
  if (v.state === "withdrawn") throw versionGone(v.datasetSlug, v.semver, v.withdrawnReason, v.row.withdrawnAt);
}

export async function versionDetail(db: Db, v: PathVersion): Promise<VersionDetail> {
  const base = { ...summaryOf(v.row, v.dataset), dataset: { slug: v.datasetSlug, title: v.datasetTitle } };
  if (v.state === "withdrawn") return { ...base, counts: null, yearFrom: null, yearTo: null, links: {} };
  const id = v.versionId;
  const n = (table: typeof sites | typeof siteYears | typeof treatments | typeof plots | typeof responses) =>
    db
      .select({ n: count() })
      .from(table)
      .where(eq(table.versionId, id))
      .then((r) => r[0]?.n ?? 0);
  const [s, sy, t, p, r, years] = await Promise.all([
    n(sites),
    n(siteYears),
    n(treatments),
    n(plots),
    // Counted as yield responses (a site-year × treatment), whatever other measures the plots record.
    db
      .select({ n: count() })
      .from(responses)
      .where(and(eq(responses.versionId, id), eq(responses.measure, "yield")))
      .then((r) => r[0]?.n ?? 0),
    db
      .select({ from: min(siteYears.year), to: max(siteYears.year) })
      .from(siteYears)
      .where(eq(siteYears.versionId, id)),
  ]);
  const path = versionPath(v.datasetSlug, v.semver);
  return {
    ...base,
    counts: { sites: s, siteYears: sy, treatments: t, plots: p, responses: r },
    yearFrom: years[0]?.from ?? null,
    yearTo: years[0]?.to ?? null,
    links: Object.fromEntries(["schema", "sites", "site-years", "treatments", "observations", "responses"].map((k) => [k, `${path}/${k}`])),
  };
}
