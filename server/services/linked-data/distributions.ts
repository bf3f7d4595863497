import { createHash } from "node:crypto";
import type { Db } from "@/db/client";
import type { ResourceName } from "@/schemas/table-schema";
import type { AppConfig } from "@/server/config";
import type { CitableVersion } from "@/server/services/citation/citable-version";
import { versionById } from "@/server/services/curation/access";
import { dataPackageZip } from "@/server/services/curation/data-package";
import { resourceCsvChunks, resourceOrder } from "@/server/services/curation/resource-csv";
import { resourceTitles } from "@/constants/vocabulary";

export interface Distribution {
  title: string;
  downloadUrl: string;
  mediaType: string;
  /** Exact size and SHA-256 of the bytes the download sends, when Plotbank can generate them here. */
  byteSize?: number;
  sha256?: string;
  /** The specification the file follows (Frictionless Data Package, or Table Schema for a CSV). */
  conformsTo: string;
}

/** Published versions never change, so the size and digest of a download, once computed, hold for good. */
const factsCache = new Map<string, { byteSize: number; sha256: string }>();

async function measure(key: string, version: CitableVersion, chunks: () => AsyncIterable<string | Buffer>) {
  const cached = factsCache.get(key);
  if (cached) return cached;
  const hash = createHash("sha256");
  let byteSize = 0;
  for await (const chunk of chunks()) {
    const bytes = typeof chunk === "string" ? Buffer.from(chunk, "utf8") : chunk;
    byteSize += bytes.length;
    hash.update(bytes);
  }
  const facts = { byteSize, sha256: hash.digest("hex") };
  // Only published bytes are final; a withdrawn version is not listed and a draft never gets here.
  if (version.state === "published") factsCache.set(key, facts);
  return facts;
}

const csvFacts = (db: Db, version: CitableVersion, resource: ResourceName) =>
  measure(`${version.versionId}/${resource}`, version, () => resourceCsvChunks(db, version.versionId, version.tableSchema, resource));

/** The zip the download route streams: the same builder, so the same bytes (its entries carry the publication time). */
const zipFacts = (db: Db, config: AppConfig, version: CitableVersion) =>
  measure(`${version.versionId}/datapackage.zip@${config.publicUrl}`, version, async function* () {
    const { dataset, version: row } = await versionById(db, version.versionId);
    yield* (await dataPackageZip(db, config.publicUrl, dataset, row)) as AsyncIterable<Buffer>;
  });

/**
 * The downloads of one published version: its Data Package (zip) and one canonical CSV per resource in its data
 * dictionary. Sizes and digests come from generating the same bytes the downloads send (the first time a
 * version is measured that means building its files; `measure: false` skips it where only the links matter).
 */
export async function versionDistributions(
  db: Db,
  config: AppConfig,
  slug: string,
  version: CitableVersion,
  { measure: withFacts = true }: { measure?: boolean } = {},
): Promise<Distribution[]> {
  const base = `${config.publicUrl}/api/v1/datasets/${encodeURIComponent(slug)}/versions/${encodeURIComponent(version.semver)}`;
  const resources = resourceOrder.filter((r) => version.tableSchema.resources[r]);
  const csvs = await Promise.all(
    resources.map(async (resource) => ({
      title: `${resourceTitles[resource]} (CSV)`,
      downloadUrl: `${base}/resources/${resource}.csv`,
      mediaType: "text/csv",
      conformsTo: "https://specs.frictionlessdata.io/table-schema/",
      ...(withFacts ? await csvFacts(db, version, resource) : {}),
    })),
  );
  return [
    {
      title: "Frictionless Data Package (zip: datapackage.json and CSV files)",
      downloadUrl: `${base}/datapackage.zip`,
      mediaType: "application/zip",
      conformsTo: "https://specs.frictionlessdata.io/data-package/",
      ...(withFacts ? await zipFacts(db, config, version) : {}),
    },
    ...csvs,
  ];
}
