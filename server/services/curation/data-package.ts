import { createHash } from "node:crypto";
import { and, eq, inArray } from "drizzle-orm";
import yazl from "yazl";
import type { Db } from "@/db/client";
import { versions } from "@/db/schema";
import type { Contributor } from "@/schemas/dataset-metadata";
import { resourceName, type ResourceName, type TableSchemaResource } from "@/schemas/table-schema";
import { HttpProblem, notFound } from "@/server/errors";
import { compareSemver } from "@/server/services/catalogue";
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
  const rows = await db.select().from(versions).where(and(eq(versions.datasetId, dataset.id), inArray(versions.state, ["published", "withdrawn"])));
  const version = semver === "latest" ? rows.filter((v) => v.state === "published").sort((a, b) => compareSemver(b.semver, a.semver))[0] : rows.find((v) => v.semver === semver);
  if (!version) throw notFound(`Dataset "${slug}" has no published version ${semver}.`);
  if (version.state === "withdrawn") {
    throw new HttpProblem(410, "Gone", `Version ${version.semver} of "${slug}" was withdrawn: ${version.withdrawnReason ?? "no reason given"}. Its metadata stays available; its rows are no longer served.`, {
      withdrawnReason: version.withdrawnReason,
      withdrawnAt: version.withdrawnAt?.toISOString(),
    });
  }
  return { dataset, version };
}

export function resourceSchema(version: Version, resource: ResourceName): TableSchemaResource {
  const r = version.tableSchema.resources[resource]!;
  const keep = new Set(fieldsOf(version.tableSchema, resource));
  return { ...r, fields: r.fields.filter((f) => keep.has(f.name)) };
}

export interface BuiltResource {
  name: ResourceName;
  csv: Buffer;
  sha256: string;
}

export async function buildResource(db: Db, version: Version, resource: ResourceName): Promise<BuiltResource> {
  const csv = await resourceCsv(db, version.id, version.tableSchema, resource);
  return { name: resource, csv, sha256: createHash("sha256").update(csv).digest("hex") };
}

/**
 * A resource's Table Schema as the package publishes it: Table Schema v2, written so Table Schema v1 readers accept it
 * too. Missing values are plain strings (v1 knows no `{ value, label }` objects; v2 accepts both), and their labels
 * go into the schema's description. `categories` (v2) is an extra property v1 readers skip.
 */
export function packageResourceSchema(version: Version, resource: ResourceName) {
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
export function dataPackageDescriptor(publicUrl: string, dataset: Dataset, version: Version, built: BuiltResource[], { paths = "relative" }: { paths?: "relative" | "absolute" } = {}) {
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
    plotbank: { checksum: version.checksum, changelog: version.changelog, units: "yields kg/ha at the crop's standard moisture; nutrient rates lb/ac of N, P2O5, K2O and S" },
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
      schema: packageResourceSchema(version, r.name),
    })),
  };
}

/** The whole version as a zip: datapackage.json and one CSV per resource, streamed out by yazl. */
export async function dataPackageZip(db: Db, publicUrl: string, dataset: Dataset, version: Version): Promise<NodeJS.ReadableStream> {
  const built: BuiltResource[] = [];
  for (const resource of resourceOrder) built.push(await buildResource(db, version, resource));
  const zip = new yazl.ZipFile();
  const mtime = version.publishedAt ?? new Date(0);
  zip.addBuffer(Buffer.from(JSON.stringify(dataPackageDescriptor(publicUrl, dataset, version, built), null, 2) + "\n"), "datapackage.json", { mtime });
  for (const r of built) zip.addBuffer(r.csv, `data/${r.name}.csv`, { mtime });
  zip.end();
  return zip.outputStream;
}

export const resourceParam = resourceName;
