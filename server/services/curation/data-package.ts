import { createHash } from "node:crypto";
import { and, eq, inArray } from "drizzle-orm";
import yazl from "yazl";
import type { Db } from "@/db/client";
import { versions } from "@/db/schema";
import type { Contributor } from "@/schemas/dataset-metadata";
import type { ResourceName, TableSchemaResource } from "@/schemas/table-schema";
import { formulaGuardNote } from "@/server/csv";
import { notFound } from "@/server/errors";
import { pickVersion, versionGone } from "@/server/services/latest-version";
import { datasetBySlug, type Dataset, type Version } from "./access";
import { fieldsOf, resourceCsv, resourceOrder } from "./resource-csv";

const licences: Record<string, { path: string; title: string }> = {
  "CC-BY-4.0": { path: "https://creativecommons.org/licenses/by/4.0/", title: "Creative Commons Attribution 4.0" },
  "CC0-1.0": { path: "https://creativecommons.org/publicdomain/zero/1.0/", title: "CC0 1.0 Public Domain Dedication" },
  "ODbL-1.0": { path: "https://opendatacommons.org/licenses/odbl/1-0/", title: "Open Data Commons Open Database License 1.0" },
};

/** A published version by slug and semver (`latest` = highest published). Withdrawn ones answer 410 with the reason. */
export async function publishedVersion(db: Db, slug: string, semver: string): Promise<{ dataset: Dataset; version: Version }> {
  const dataset = await datasetBySlug(db, slug);
  const rows = await db
    .select()
    .from(versions)
    .where(and(eq(versions.datasetId, dataset.id), inArray(versions.state, ["published", "withdrawn"])));
  const version = pickVersion(rows, semver);
  if (!version) throw notFound(`Dataset "${slug}" has no published version ${semver}.`);
  if (version.state === "withdrawn") throw versionGone(slug, version.semver, version.withdrawnReason, version.withdrawnAt);
  return { dataset, version };
}

function resourceSchema(version: Version, resource: ResourceName): TableSchemaResource {
  const r = version.tableSchema.resources[resource]!;
  const keep = new Set(fieldsOf(version.tableSchema, resource));
  return { ...r, fields: r.fields.filter((f) => keep.has(f.name)) };
}

export interface BuiltResource {
  name: ResourceName;
  csv: Buffer;
  sha256: string;
  /** Fields in which the CSV writer's formula guard changed at least one cell. */
  guarded: Set<string>;
}

export async function buildResource(db: Db, version: Version, resource: ResourceName): Promise<BuiltResource> {
  const guarded = new Set<string>();
  const csv = await resourceCsv(db, version.id, version.tableSchema, resource, guarded);
  return { name: resource, csv, sha256: createHash("sha256").update(csv).digest("hex"), guarded };
}

/** The resource's schema, with the formula guard's note on each field whose published cells it changed. */
function servedSchema(version: Version, built: BuiltResource) {
  const schema = packageResourceSchema(version, built.name);
  return {
    ...schema,
    fields: schema.fields.map((f) =>
      built.guarded.has(f.name) ? { ...f, description: [f.description, formulaGuardNote].filter(Boolean).join(" ") } : f,
    ),
  };
}

/**
 * A resource's Table Schema as the package publishes it: Table Schema v2, written so Table Schema v1 readers accept it
 * too. Missing values are plain strings (v1 knows no `{ value, label }` objects; v2 accepts both), and their labels
 * go into the schema's description. `categories` (v2) is an extra property v1 readers skip.
 */
function packageResourceSchema(version: Version, resource: ResourceName) {
  const { missingValues, ...schema } = resourceSchema(version, resource);
  return {
    $schema: "https://datapackage.org/profiles/2.0/tableschema.json",
    ...schema,
    ...(missingValues
      ? {
          missingValues: missingValues.map((m) => m.value),
          description: `Missing values: ${missingValues.map((m) => `"${m.value}" = ${m.label}`).join("; ")}.`,
        }
      : {}),
  };
}

/**
 * datapackage.json as Frictionless Data Package v2 (`$schema`), with the v1 `profile` names that v1 readers use to
 * recognise a tabular package. Inside the zip the paths are relative (`data/sites.csv`); the descriptor served on its
 * own (`paths: "absolute"`) names each file by the URL that serves it, so it works from its address.
 */
export function dataPackageDescriptor(
  publicUrl: string,
  dataset: Dataset,
  version: Version,
  built: BuiltResource[],
  { paths = "relative" }: { paths?: "relative" | "absolute" } = {},
) {
  const meta = (version.metadataSnapshot ?? {}) as Partial<Dataset>;
  const licence = meta.licence ?? dataset.licence;
  const known = licences[licence];
  const contributors = (meta.contributors ?? dataset.contributors) as Contributor[];
  const keywords = (meta.keywords ?? dataset.keywords) as string[];
  const base = `${publicUrl}/api/v1/datasets/${dataset.slug}/versions/${version.semver}`;
  return {
    $schema: "https://datapackage.org/profiles/2.0/datapackage.json",
    profile: "tabular-data-package",
    id: base,
    name: dataset.slug,
    title: meta.title ?? dataset.title,
    description: meta.description ?? dataset.description,
    version: version.semver,
    created: version.publishedAt?.toISOString(),
    homepage: `${publicUrl}/datasets/${dataset.slug}`,
    // Both profiles want at least one keyword and one contributor when the property is there at all.
    ...(keywords.length ? { keywords } : {}),
    licenses: [{ name: licence, ...(known ?? {}) }],
    ...(contributors.length
      ? {
          contributors: contributors.map((c) => ({
            title: c.name,
            roles: [c.role],
            ...(c.orcid ? { path: `https://orcid.org/${c.orcid}` } : {}),
            ...(c.affiliation ? { organization: c.affiliation } : {}),
          })),
        }
      : {}),
    plotbank: {
      checksum: version.checksum,
      checksumOf:
        "SHA-256 over, for each resource in the order sites, site_years, soil_tests, treatments, plots, summaries, its name, a line feed and its CSV file as served",
      csv: `CRLF line ends, UTF-8 without a byte-order mark. ${formulaGuardNote}`,
      changelog: version.changelog,
      units: "yields kg/ha at the crop's standard moisture; nutrient rates lb/ac of N, P2O5, K2O and S",
      // The schemes soil_tests rows name in `interpretation` (the built-in ones are listed in the API's OpenAPI document).
      ...(version.tableSchema.soilTestSchemes?.length ? { soilTestSchemes: version.tableSchema.soilTestSchemes } : {}),
      // The measures the plots resource adds beside the built-in ones, with their unit and better direction.
      ...(version.tableSchema.measures?.length ? { measures: version.tableSchema.measures } : {}),
    },
    resources: built.map((r) => ({
      name: r.name,
      type: "table",
      profile: "tabular-data-resource",
      path: paths === "absolute" ? `${base}/resources/${r.name}.csv` : `data/${r.name}.csv`,
      format: "csv",
      mediatype: "text/csv",
      encoding: "utf-8",
      bytes: r.csv.length,
      hash: `sha256:${r.sha256}`,
      schema: servedSchema(version, r),
    })),
  };
}

/** The whole version as a zip: datapackage.json and one CSV per resource, streamed out by yazl. */
export async function dataPackageZip(db: Db, publicUrl: string, dataset: Dataset, version: Version): Promise<NodeJS.ReadableStream> {
  const built: BuiltResource[] = [];
  for (const resource of resourceOrder) built.push(await buildResource(db, version, resource));
  const zip = new yazl.ZipFile();
  const mtime = version.publishedAt ?? new Date(0);
  zip.addBuffer(
    Buffer.from(JSON.stringify(dataPackageDescriptor(publicUrl, dataset, version, built), null, 2) + "\n"),
    "datapackage.json",
    { mtime },
  );
  for (const r of built) zip.addBuffer(r.csv, `data/${r.name}.csv`, { mtime });
  zip.end();
  return zip.outputStream;
}
