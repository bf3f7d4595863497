import type { DataCiteAttributes, DataCiteCreator, DataCiteRelatedIdentifier } from "@/server/doi/datacite-metadata";
import { neighbours, publisherName, type CitableDataset, type CitableMetadata, type CitableVersion } from "./citable-version";
import type { Creator } from "./creators";
import type { LicenceInfo } from "./licences";

const resourceType = "Fertilizer field-trial data";

/** DataCite attributes of one version's DOI, with its version chain and its concept DOI. */
export function versionDoiAttributes(dataset: CitableDataset, version: CitableVersion): DataCiteAttributes {
  const { previous, next } = neighbours(dataset, version.versionId);
  const related: DataCiteRelatedIdentifier[] = [{ relatedIdentifier: dataset.intendedConceptDoi, relatedIdentifierType: "DOI", relationType: "IsVersionOf" }];
  if (previous) related.push({ relatedIdentifier: previous.intendedDoi, relatedIdentifierType: "DOI", relationType: "IsNewVersionOf" });
  if (next) related.push({ relatedIdentifier: next.intendedDoi, relatedIdentifierType: "DOI", relationType: "IsPreviousVersionOf" });
  const base = describe(version, version.intendedDoi, version.landingUrl, version.publishedAt);
  return {
    ...base,
    version: version.semver,
    descriptions: [
      ...base.descriptions!,
      ...(version.state === "withdrawn" ? [{ description: `Withdrawn: ${version.withdrawnReason ?? "no reason given"}`, descriptionType: "Other" as const }] : []),
    ],
    dates: [{ date: version.publishedAt.toISOString().slice(0, 10), dateType: "Issued" }],
    relatedIdentifiers: related,
  };
}

/** DataCite attributes of the concept DOI: the dataset as a whole, pointing at each of its versions. */
export function conceptDoiAttributes(dataset: CitableDataset): DataCiteAttributes {
  return {
    ...describe(dataset, dataset.intendedConceptDoi, dataset.landingUrl, dataset.versions[0]!.publishedAt),
    relatedIdentifiers: dataset.versions.map((v) => ({ relatedIdentifier: v.intendedDoi, relatedIdentifierType: "DOI" as const, relationType: "HasVersion" as const })),
  };
}

/** The properties a version and its concept DOI share. */
function describe(meta: CitableMetadata, doi: string, url: string, firstPublished: Date): DataCiteAttributes {
  return {
    doi,
    event: "publish",
    url,
    creators: meta.creators.map(dataciteCreator),
    titles: [{ title: meta.title }],
    publisher: publisherName,
    publicationYear: firstPublished.getUTCFullYear(),
    types: { resourceTypeGeneral: "Dataset", resourceType },
    language: "en",
    subjects: meta.keywords.map((subject) => ({ subject })),
    descriptions: [{ description: meta.description, descriptionType: "Abstract" }],
    rightsList: [rights(meta.licence)],
    geoLocations: [{ geoLocationPlace: meta.region }],
  };
}

function dataciteCreator(c: Creator): DataCiteCreator {
  return {
    name: c.name,
    nameType: c.personal ? "Personal" : "Organizational",
    ...(c.givenName ? { givenName: c.givenName } : {}),
    ...(c.familyName && c.personal ? { familyName: c.familyName } : {}),
    ...(c.orcid ? { nameIdentifiers: [{ nameIdentifier: `https://orcid.org/${c.orcid}`, nameIdentifierScheme: "ORCID", schemeUri: "https://orcid.org" }] } : {}),
    ...(c.affiliation ? { affiliation: [{ name: c.affiliation }] } : {}),
  };
}

function rights(licence: LicenceInfo) {
  return {
    rights: licence.name,
    ...(licence.url ? { rightsUri: licence.url } : {}),
    rightsIdentifier: licence.spdx.toLowerCase(),
    rightsIdentifierScheme: "SPDX",
    schemeUri: "https://spdx.org/licenses/",
  };
}
