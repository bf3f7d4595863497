import type { AppContext } from "@/server/context";
import {
  findVersion,
  loadCitableDataset,
  publisherName,
  type CitableDataset,
  type CitableVersion,
} from "@/server/services/citation/citable-version";
import type { Creator } from "@/server/services/citation/creators";
import type { TableSchemaDescriptor } from "@/schemas/table-schema";
import { seasonsByVersion } from "./coverage";
import { catalogueTitle } from "./dcat-catalog";
import { versionDistributions } from "./distributions";
import { latestAlias } from "@/server/services/latest-version";

type Node = Record<string, unknown>;

/**
 * schema.org Dataset markup, as search engines read it from a page: of the dataset's current published version, or
 * of the released version `semver` names (the page a version's DOI resolves to). A pinned version is its own node
 * (@id its page), part of the dataset as a whole; a withdrawn one is described as a tombstone, without downloads.
 * The unversioned page describes the dataset as a whole: its identifier is the concept DOI, and the current version
 * (with its own DOI) is a part of it.
 * The context is the usual "https://schema.org" string, which every crawler knows without fetching it.
 */
export async function schemaOrgDataset(
  ctx: AppContext,
  slug: string,
  semver?: string,
): Promise<{ dataset: CitableDataset; version: CitableVersion; pinned: boolean; jsonLd: Node } | undefined> {
  const dataset = await loadCitableDataset(ctx.db, ctx.config, slug);
  if (!dataset) return undefined;
  const asked = semver ? findVersion(dataset, semver) : undefined;
  const version = asked ?? dataset.current;
  if (!version) return undefined;
  const pinned = !!asked && semver !== latestAlias;
  const withdrawn = version.state === "withdrawn";
  const [seasons, distributions] = await Promise.all([
    seasonsByVersion(ctx.db, [version.versionId]),
    // A page view must not wait for a large version's files to be built just to print their sizes.
    withdrawn ? [] : versionDistributions(ctx.db, ctx.config, slug, version, { measure: false }),
  ]);
  const span = seasons.get(version.versionId);
  const url = pinned ? version.landingUrl : dataset.landingUrl;
  const versionDoi = version.doi ? `https://doi.org/${version.doi}` : undefined;
  const conceptDoi = dataset.conceptDoi ? `https://doi.org/${dataset.conceptDoi}` : undefined;
  const doi = pinned ? versionDoi : conceptDoi;
  const wholeDataset: Node = {
    "@type": "Dataset",
    "@id": dataset.landingUrl,
    url: dataset.landingUrl,
    name: dataset.title,
    ...(dataset.conceptDoi ? { sameAs: `https://doi.org/${dataset.conceptDoi}` } : {}),
  };
  const jsonLd: Node = {
    "@context": "https://schema.org",
    "@type": "Dataset",
    "@id": url,
    name: version.title,
    description: withdrawn ? `Withdrawn: ${version.withdrawnReason ?? "no reason given"}. ${version.description}` : version.description,
    url,
    version: version.semver,
    ...(withdrawn ? { creativeWorkStatus: "Withdrawn" } : {}),
    datePublished: version.publishedAt.toISOString().slice(0, 10),
    ...(doi ? { identifier: doi, sameAs: doi } : {}),
    // schema.org reads a string license as a URL (the context types it @id): a licence without a known deed URL is
    // named as a CreativeWork instead, not left as a bare identifier that would read as a relative IRI.
    license: version.licence.url ?? { "@type": "CreativeWork", name: version.licence.name, identifier: version.licence.spdx },
    isAccessibleForFree: true,
    keywords: version.keywords,
    creator: version.creators.map(creatorNode),
    ...(version.funders.length ? { funder: version.funders.map((name) => ({ "@type": "Organization", name })) } : {}),
    ...(version.methods ? { measurementTechnique: version.methods } : {}),
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
    includedInDataCatalog: {
      "@type": "DataCatalog",
      "@id": `${ctx.config.publicUrl}/api/v1/catalog`,
      name: catalogueTitle,
      url: ctx.config.publicUrl,
    },
    ...(pinned
      ? { isPartOf: wholeDataset }
      : {
          hasPart: {
            "@type": "Dataset",
            "@id": version.landingUrl,
            url: version.landingUrl,
            name: `${version.title} (version ${version.semver})`,
            version: version.semver,
            ...(versionDoi ? { identifier: versionDoi, sameAs: versionDoi } : {}),
          },
        }),
  };
  return { dataset, version, pinned, jsonLd };
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
