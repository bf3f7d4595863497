import { and, eq, inArray } from "drizzle-orm";
import { z } from "zod";
import type { Db } from "@/db/client";
import { datasets, users, versions } from "@/db/schema";
import { contributor } from "@/schemas/dataset-metadata";
import type { TableSchemaDescriptor } from "@/schemas/table-schema";
import type { AppConfig } from "@/server/config";
import { compareSemver } from "@/server/services/catalogue";
import { latestPublishedOf, pickVersion } from "@/server/services/latest-version";
import { citationContributors, citationCreators, citationFunders, type CitationContributor, type Creator } from "./creators";
import { licenceInfo, type LicenceInfo } from "./licences";

/** The name every Plotbank DOI and citation gives as publisher. */
export const publisherName = "Plotbank";

/** The descriptive metadata a citation names, as frozen for a version or current for the dataset. */
export interface CitableMetadata {
  title: string;
  description: string;
  licence: LicenceInfo;
  keywords: string[];
  region: string;
  crops: string[];
  creators: Creator[];
  /** Everyone else who worked on it (curators, data collectors, project leaders …), by their role. */
  contributors: CitationContributor[];
  /** Who paid for the trials: funder contributors and the dataset's funding statement. */
  funders: string[];
  /** How the trials were run (design, harvest, soil sampling), as the curator wrote it. */
  methods: string | null;
}

export interface CitableVersion extends CitableMetadata {
  versionId: string;
  semver: string;
  state: "published" | "withdrawn";
  publishedAt: Date;
  withdrawnReason: string | null;
  withdrawnAt: Date | null;
  changelog: string;
  tableSchema: TableSchemaDescriptor;
  checksum: string | null;
  /** Registered DOI: null until the DOI service has confirmed it, and kept while a metadata update is pending. */
  doi: string | null;
  doiStatus: "none" | "pending" | "registered" | "failed";
  /** The DOI this version is registered under, registered or not. */
  intendedDoi: string;
  landingUrl: string;
  apiUrl: string;
}

export interface CitableDataset extends CitableMetadata {
  datasetId: string;
  slug: string;
  conceptDoi: string | null;
  intendedConceptDoi: string;
  landingUrl: string;
  /** Versions that were published (withdrawn ones stay as tombstones), oldest first by semantic version. */
  versions: CitableVersion[];
  /** The newest published (not withdrawn) version. */
  current: CitableVersion | undefined;
}

/** Fields of the dataset metadata frozen at publication; anything absent falls back to the dataset's own row. */
const snapshot = z
  .object({
    title: z.string(),
    description: z.string(),
    licence: z.string(),
    keywords: z.array(z.string()),
    region: z.string(),
    crops: z.array(z.string()),
    contributors: z.array(contributor),
    funding: z.string().nullable(),
    methods: z.string().nullable(),
  })
  .partial();

/** Deterministic, readable DOI names: the dataset's concept DOI and one per version. */
const conceptDoiName = (prefix: string, slug: string) => `${prefix}/plotbank.${slug}`.toLowerCase();
export const versionDoiName = (prefix: string, slug: string, semver: string) => `${prefix}/plotbank.${slug}.v${semver}`.toLowerCase();

export const datasetLandingUrl = (config: AppConfig, slug: string) => `${config.publicUrl}/datasets/${encodeURIComponent(slug)}`;
export const versionLandingUrl = (config: AppConfig, slug: string, semver: string) =>
  `${datasetLandingUrl(config, slug)}?version=${encodeURIComponent(semver)}`;
const versionApiUrl = (config: AppConfig, slug: string, semver: string) =>
  `${config.publicUrl}/api/v1/datasets/${encodeURIComponent(slug)}/versions/${encodeURIComponent(semver)}`;

type DatasetRow = typeof datasets.$inferSelect;
type VersionRow = typeof versions.$inferSelect;

/** A dataset with its released versions, or undefined when it has none (drafts are not citable). */
export async function loadCitableDataset(db: Db, config: AppConfig, slug: string): Promise<CitableDataset | undefined> {
  const [dataset] = await db.select().from(datasets).where(eq(datasets.slug, slug)).limit(1);
  if (!dataset) return undefined;
  const [built] = await buildCitable(db, config, [dataset]);
  return built;
}

/** Every dataset that has a released version, ordered by title. */
export async function loadCitableCatalogue(db: Db, config: AppConfig): Promise<CitableDataset[]> {
  const rows = await db.select().from(datasets).orderBy(datasets.title);
  return buildCitable(db, config, rows);
}

export async function loadCitableDatasetOfVersion(db: Db, config: AppConfig, versionId: string): Promise<CitableDataset | undefined> {
  const [row] = await db
    .select({ dataset: datasets })
    .from(versions)
    .innerJoin(datasets, eq(datasets.id, versions.datasetId))
    .where(eq(versions.id, versionId));
  if (!row) return undefined;
  const [built] = await buildCitable(db, config, [row.dataset]);
  return built;
}

/** Resolve a semantic version or the `latest` alias among a dataset's released versions. */
export function findVersion(dataset: CitableDataset, semver: string): CitableVersion | undefined {
  return pickVersion(dataset.versions, semver);
}

async function buildCitable(db: Db, config: AppConfig, rows: DatasetRow[]): Promise<CitableDataset[]> {
  if (rows.length === 0) return [];
  const released = await db
    .select()
    .from(versions)
    .where(
      and(
        inArray(
          versions.datasetId,
          rows.map((d) => d.id),
        ),
        inArray(versions.state, ["published", "withdrawn"]),
      ),
    );
  const ownerIds = [...new Set(rows.map((d) => d.ownerId))];
  const owners = new Map(
    (await db.select({ id: users.id, name: users.displayName }).from(users).where(inArray(users.id, ownerIds))).map((u) => [u.id, u.name]),
  );
  const out: CitableDataset[] = [];
  for (const d of rows) {
    const mine = released.filter((v) => v.datasetId === d.id).sort((a, b) => compareSemver(a.semver, b.semver));
    if (mine.length === 0) continue;
    const owner = owners.get(d.ownerId) ?? publisherName;
    const list = mine.map((v) => toCitableVersion(config, d, v, owner));
    const current = latestPublishedOf(list);
    const head = current ?? list[list.length - 1]!;
    out.push({
      datasetId: d.id,
      slug: d.slug,
      ...metadataOf(head),
      conceptDoi: d.conceptDoi,
      intendedConceptDoi: conceptDoiName(config.datacite.prefix, d.slug),
      landingUrl: datasetLandingUrl(config, d.slug),
      versions: list,
      current,
    });
  }
  return out;
}

function toCitableVersion(config: AppConfig, d: DatasetRow, v: VersionRow, ownerName: string): CitableVersion {
  const parsed = snapshot.safeParse(v.metadataSnapshot ?? {});
  const frozen = parsed.success ? parsed.data : {};
  return {
    versionId: v.id,
    semver: v.semver,
    state: v.state as "published" | "withdrawn",
    // A released version always has published_at; created_at only stands in for rows made before that rule.
    publishedAt: v.publishedAt ?? v.createdAt,
    withdrawnReason: v.withdrawnReason,
    withdrawnAt: v.withdrawnAt,
    title: frozen.title ?? d.title,
    description: frozen.description ?? d.description,
    licence: licenceInfo(frozen.licence ?? d.licence),
    keywords: frozen.keywords ?? d.keywords,
    region: frozen.region ?? d.region,
    crops: frozen.crops ?? d.crops,
    creators: citationCreators(frozen.contributors ?? d.contributors, ownerName),
    contributors: citationContributors(frozen.contributors ?? d.contributors),
    funders: citationFunders(frozen.contributors ?? d.contributors, frozen.funding !== undefined ? frozen.funding : d.funding),
    methods: (frozen.methods !== undefined ? frozen.methods : d.methods) || null,
    changelog: v.changelog,
    tableSchema: v.tableSchema,
    checksum: v.checksum,
    // Only a successful registration writes the column.
    doi: v.doi,
    doiStatus: v.doiStatus,
    intendedDoi: versionDoiName(config.datacite.prefix, d.slug, v.semver),
    landingUrl: versionLandingUrl(config, d.slug, v.semver),
    apiUrl: versionApiUrl(config, d.slug, v.semver),
  };
}

function metadataOf({
  title,
  description,
  licence,
  keywords,
  region,
  crops,
  creators,
  contributors,
  funders,
  methods,
}: CitableMetadata): CitableMetadata {
  return { title, description, licence, keywords, region, crops, creators, contributors, funders, methods };
}

/** The released versions just before and after one, by semantic version. */
export function neighbours(dataset: CitableDataset, versionId: string): { previous?: CitableVersion; next?: CitableVersion } {
  const i = dataset.versions.findIndex((v) => v.versionId === versionId);
  if (i < 0) return {};
  return { previous: dataset.versions[i - 1], next: dataset.versions[i + 1] };
}
