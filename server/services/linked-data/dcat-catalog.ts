import type { AppContext } from "@/server/context";
import { loadCitableCatalogue, publisherName, type CitableDataset, type CitableVersion } from "@/server/services/citation/citable-version";
import type { Creator } from "@/server/services/citation/creators";
import { seasonsByVersion, type YearSpan } from "./coverage";
import { versionDistributions, type Distribution } from "./distributions";

type Node = Record<string, unknown>;

/**
 * Inline context with full IRIs: a consumer (or a test) can expand the catalogue without fetching any remote
 * context document.
 */
const dcatContext = {
  dcat: "http://www.w3.org/ns/dcat#",
  dct: "http://purl.org/dc/terms/",
  foaf: "http://xmlns.com/foaf/0.1/",
  spdx: "http://spdx.org/rdf/terms#",
  xsd: "http://www.w3.org/2001/XMLSchema#",
  rdfs: "http://www.w3.org/2000/01/rdf-schema#",
  adms: "http://www.w3.org/ns/adms#",
  locn: "http://www.w3.org/ns/locn#",
  vcard: "http://www.w3.org/2006/vcard/ns#",
} as const;

/**
 * The theme and file-type vocabularies of the EU Publications Office, which DCAT-AP profiles and the harvesters built
 * on them use (from memory of those authority tables: data-theme AGRI is "Agriculture, fisheries, forestry and food").
 */
const themeScheme = "http://publications.europa.eu/resource/authority/data-theme";
const agricultureTheme = { "@id": `${themeScheme}/AGRI` };
const fileTypes: Record<string, string> = {
  "application/zip": "http://publications.europa.eu/resource/authority/file-type/ZIP",
  "text/csv": "http://publications.europa.eu/resource/authority/file-type/CSV",
};

const ianaMediaType = (mediaType: string) => ({ "@id": `https://www.iana.org/assignments/media-types/${mediaType}` });
const doiIri = (doi: string) => `https://doi.org/${doi}`;

export const catalogueTitle = "Plotbank field-trial catalogue";

/**
 * The catalogue as W3C DCAT 3 versioning has it: every published version is a dcat:Dataset of its own, listed under
 * dcat:dataset with its distributions, so a harvester that follows dcat:dataset reaches files. Each dataset as a whole
 * (the concept, no files of its own) is listed under dcat:resource and names its versions with dcat:hasVersion and
 * the newest with dcat:hasCurrentVersion; versions point back with dct:isVersionOf and are chained by
 * dcat:previousVersion. Only published versions are listed (a withdrawn version's files are no longer served).
 */
export async function dcatCatalog(ctx: AppContext): Promise<Node> {
  const { db, config } = ctx;
  const catalogue = await loadCitableCatalogue(db, config);
  const listed = catalogue
    .map((d) => ({ d, published: d.versions.filter((v) => v.state === "published") }))
    .filter((x) => x.published.length);
  const seasons = await seasonsByVersion(
    db,
    listed.flatMap((x) => x.published.map((v) => v.versionId)),
  );
  const concepts: Node[] = [];
  const versions: Node[] = [];
  for (const { d, published } of listed) {
    for (let i = 0; i < published.length; i++) {
      const v = published[i]!;
      const distributions = await versionDistributions(db, config, d.slug, v);
      versions.push(versionNode(config.publicUrl, d, v, published[i - 1], seasons.get(v.versionId), distributions));
    }
    concepts.push({
      "@id": d.landingUrl,
      "@type": "dcat:Dataset",
      "dct:title": d.title,
      "dct:description": d.description,
      ...(d.conceptDoi ? { "dct:identifier": d.conceptDoi, "adms:identifier": { "@id": doiIri(d.conceptDoi) } } : {}),
      "dcat:keyword": d.keywords,
      "dcat:theme": agricultureTheme,
      "dct:license": licenceNode(d.licence),
      "dct:publisher": publisherNode(config.publicUrl),
      "dct:creator": d.creators.map(agentNode),
      "dcat:contactPoint": contactNode(d),
      "dcat:landingPage": { "@id": d.landingUrl },
      "dct:spatial": spatialNode(d.region),
      "dcat:hasCurrentVersion": { "@id": published[published.length - 1]!.landingUrl },
      "dcat:hasVersion": published.map((v) => ({ "@id": v.landingUrl })),
    });
  }
  return {
    "@context": dcatContext,
    "@id": `${config.publicUrl}/api/v1/catalog`,
    "@type": "dcat:Catalog",
    "dct:title": catalogueTitle,
    "dct:description": "Versioned fertilizer field-trial datasets, each version citable and downloadable as a Frictionless Data Package.",
    "dct:publisher": publisherNode(config.publicUrl),
    "foaf:homepage": { "@id": config.publicUrl },
    "dcat:themeTaxonomy": { "@id": themeScheme },
    "dcat:dataset": versions,
    "dcat:resource": concepts,
  };
}

function versionNode(
  publicUrl: string,
  d: CitableDataset,
  v: CitableVersion,
  previous: CitableVersion | undefined,
  seasons: YearSpan | undefined,
  distributions: Distribution[],
): Node {
  return {
    "@id": v.landingUrl,
    "@type": "dcat:Dataset",
    "dct:title": `${v.title} (version ${v.semver})`,
    "dct:description": v.description,
    "dcat:version": v.semver,
    "adms:versionNotes": v.changelog,
    "dct:isVersionOf": { "@id": d.landingUrl },
    ...(previous ? { "dcat:previousVersion": { "@id": previous.landingUrl } } : {}),
    ...(v.doi ? { "dct:identifier": v.doi, "adms:identifier": { "@id": doiIri(v.doi) } } : {}),
    "dct:issued": { "@value": v.publishedAt.toISOString().slice(0, 10), "@type": "xsd:date" },
    "dct:license": licenceNode(v.licence),
    "dct:publisher": { "@id": `${publicUrl}#publisher` },
    "dct:creator": v.creators.map(agentNode),
    "dcat:keyword": v.keywords,
    "dcat:theme": agricultureTheme,
    "dcat:contactPoint": contactNode(d),
    "dcat:landingPage": { "@id": v.landingUrl },
    ...(seasons
      ? {
          "dct:temporal": {
            "@type": "dct:PeriodOfTime",
            "dcat:startDate": { "@value": String(seasons.from), "@type": "xsd:gYear" },
            "dcat:endDate": { "@value": String(seasons.to), "@type": "xsd:gYear" },
          },
        }
      : {}),
    "dct:spatial": spatialNode(v.region),
    "dcat:distribution": distributions.map((x) => distributionNode(x, v)),
  };
}

function distributionNode(x: Distribution, v: CitableVersion): Node {
  return {
    "@id": `${x.downloadUrl}#distribution`,
    "@type": "dcat:Distribution",
    "dct:title": x.title,
    "dcat:downloadURL": { "@id": x.downloadUrl },
    "dcat:accessURL": { "@id": x.downloadUrl },
    "dcat:mediaType": ianaMediaType(x.mediaType),
    ...(fileTypes[x.mediaType] ? { "dct:format": { "@id": fileTypes[x.mediaType] } } : {}),
    "dct:conformsTo": { "@id": x.conformsTo },
    "dct:license": licenceNode(v.licence),
    ...(x.byteSize !== undefined ? { "dcat:byteSize": { "@value": String(x.byteSize), "@type": "xsd:nonNegativeInteger" } } : {}),
    ...(x.sha256
      ? {
          "spdx:checksum": {
            "@type": "spdx:Checksum",
            "spdx:algorithm": { "@id": "spdx:checksumAlgorithm_sha256" },
            "spdx:checksumValue": { "@value": x.sha256, "@type": "xsd:hexBinary" },
          },
        }
      : {}),
  };
}

function licenceNode(licence: CitableVersion["licence"]): Node {
  return licence.url
    ? { "@id": licence.url, "rdfs:label": licence.name }
    : { "@id": `https://spdx.org/licenses/${encodeURIComponent(licence.spdx)}.html`, "rdfs:label": licence.name };
}

/**
 * Whom to ask about a dataset: the dataset's page, where its curators answer (DCAT-AP's vcard:Kind with a URL). No
 * person's e-mail address is published here.
 */
function contactNode(d: CitableDataset): Node {
  const group = d.creators.find((c) => !c.personal);
  return { "@type": "vcard:Organization", "vcard:fn": group?.name ?? `${publisherName} curators`, "vcard:hasURL": { "@id": d.landingUrl } };
}

function publisherNode(publicUrl: string): Node {
  return { "@id": `${publicUrl}#publisher`, "@type": "foaf:Agent", "foaf:name": publisherName, "foaf:homepage": { "@id": publicUrl } };
}

function agentNode(c: Creator): Node {
  return {
    "@type": c.personal ? "foaf:Person" : "foaf:Organization",
    "foaf:name": c.personal && c.givenName ? `${c.givenName} ${c.familyName}` : c.name,
    ...(c.orcid ? { "@id": `https://orcid.org/${c.orcid}` } : {}),
  };
}

/** Coarse region text only: Plotbank never publishes a site's position. */
function spatialNode(region: string): Node {
  return { "@type": "dct:Location", "locn:geographicName": region, "rdfs:label": region };
}
