import type { AppContext } from "@/server/context";
import { loadCitableDataset, publisherName, type CitableDataset, type CitableVersion } from "@/server/services/citation/citable-version";
import type { Creator } from "@/server/services/citation/creators";
import type { TableSchemaDescriptor } from "@/schemas/table-schema";
import { seasonsByVersion } from "./coverage";
import { versionDistributions } from "./distributions";

type Node = Record<string, unknown>;

/**
 * schema.org Dataset markup of a dataset's current published version, as search engines read it from a page.
 * The context is the usual "https://schema.org" string, which every crawler knows without fetching it.
 */
export async function schemaOrgDataset(ctx: AppContext, slug: string): Promise<{ dataset: CitableDataset; version: CitableVersion; jsonLd: Node } | undefined> {
  const dataset = await loadCitableDataset(ctx.db, ctx.config, slug);
  const version = dataset?.current;
  if (!dataset || !version) return undefined;
  const [seasons, distributions] = await Promise.all([
    seasonsByVersion(ctx.db, [version.versionId]),
    // A page view must not wait for a large version's files to be built just to print their sizes.
    versionDistributions(ctx.db, ctx.config, slug, version, { measure: false }),
  ]);
  const span = seasons.get(version.versionId);
  const jsonLd: Node = {
    "@context": "https://schema.org",
    "@type": "Dataset",
    "@id": dataset.landingUrl,
    name: version.title,
    description: version.description,
    url: dataset.landingUrl,
    version: version.semver,
    datePublished: version.publishedAt.toISOString().slice(0, 10),
    ...(version.doi ? { identifier: `https://doi.org/${version.doi}`, sameAs: `https://doi.org/${version.doi}` } : {}),
    license: version.licence.url ?? version.licence.spdx,
    isAccessibleForFree: true,
    keywords: version.keywords,
    creator: version.creators.map(creatorNode),
    publisher: { "@type": "Organization", name: publisherName, url: ctx.config.publicUrl },
    ...(span ? { temporalCoverage: span.from === span.to ? String(span.from) : `${span.from}/${span.to}` } : {}),
    spatialCoverage: { "@type": "Place", name: version.region },
    variableMeasured: variablesMeasured(version.tableSchema),
    distribution: distributions.map((x) => ({
      "@type": "DataDownload",
      name: x.title,
      encodingFormat: x.mediaType,
      contentUrl: x.downloadUrl,
    })),
    ...(dataset.conceptDoi ? { isPartOf: { "@type": "Dataset", "@id": `https://doi.org/${dataset.conceptDoi}`, name: dataset.title } } : {}),
  };
  return { dataset, version, jsonLd };
}

function creatorNode(c: Creator): Node {
  if (!c.personal) return { "@type": "Organization", name: c.name };
  return {
    "@type": "Person",
    name: c.givenName ? `${c.givenName} ${c.familyName}` : c.name,
    ...(c.givenName ? { givenName: c.givenName } : {}),
    ...(c.familyName ? { familyName: c.familyName } : {}),
    ...(c.orcid ? { identifier: `https://orcid.org/${c.orcid}` } : {}),
    ...(c.affiliation ? { affiliation: { "@type": "Organization", name: c.affiliation } } : {}),
  };
}

/** The measured variables: every data-dictionary field that carries a unit, once each. */
function variablesMeasured(schema: TableSchemaDescriptor): Node[] {
  const seen = new Set<string>();
  const out: Node[] = [];
  for (const resource of Object.values(schema.resources)) {
    for (const f of resource?.fields ?? []) {
      if (!f.unit || seen.has(f.name)) continue;
      seen.add(f.name);
      out.push({
        "@type": "PropertyValue",
        name: f.title ?? f.name,
        propertyID: f.name,
        unitText: f.unit,
        ...(f.description ? { description: f.description } : {}),
      });
    }
  }
  return out;
}
