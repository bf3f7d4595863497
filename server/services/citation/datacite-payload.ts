import type { DataCiteAttributes, DataCiteContributor, DataCiteCreator, DataCiteRelatedIdentifier } from "@/server/doi/datacite-metadata";
import { neighbours, publisherName, type CitableDataset, type CitableMetadata, type CitableVersion } from "./citable-version";
import type { CitationContributor, Creator } from "./creators";
import type { LicenceInfo } from "./licences";

const resourceType = "Fertilizer field-trial data";

/**
 * DataCite attributes of one version's DOI, with its concept DOI and the neighbouring versions' DOIs. Only DOIs the
 * service has (a version's `doi` is set once registered) are linked: a link to a DOI still pending, or refused, would
 * not resolve. Registering a version refreshes its neighbours and the concept DOI, so the links fill in.
 */
export function versionDoiAttributes(dataset: CitableDataset, version: CitableVersion): DataCiteAttributes {
  const { previous, next } = neighbours(dataset, version.versionId);
  const related: DataCiteRelatedIdentifier[] = [
    { relatedIdentifier: dataset.intendedConceptDoi, relatedIdentifierType: "DOI", relationType: "IsVersionOf" },
  ];
  if (previous?.doi) related.push({ relatedIdentifier: previous.doi, relatedIdentifierType: "DOI", relationType: "IsNewVersionOf" });
  if (next?.doi) related.push({ relatedIdentifier: next.doi, relatedIdentifierType: "DOI", relationType: "IsPreviousVersionOf" });
  const base = describe(version, version.intendedDoi, version.landingUrl, version.publishedAt);
  const withdrawn = version.state === "withdrawn" ? withdrawal(version) : undefined;
  return {
    ...base,
    version: version.semver,
    descriptions: [...base.descriptions!, ...(withdrawn ? [{ description: withdrawn.note, descriptionType: "Other" as const }] : [])],
    dates: [
      { date: day(version.publishedAt), dateType: "Issued" },
      ...(withdrawn ? [{ date: withdrawn.date, dateType: "Withdrawn" as const, dateInformation: withdrawn.reason }] : []),
    ],
    relatedIdentifiers: related,
  };
}

const day = (d: Date) => d.toISOString().slice(0, 10);

/** What a withdrawn version's DOI says: the DOI stays and resolves to the tombstone, which keeps the reason. */
function withdrawal(version: CitableVersion) {
  const reason = version.withdrawnReason ?? "no reason given";
  const date = day(version.withdrawnAt ?? version.publishedAt);
  return {
    date,
    reason,
    note: `Withdrawn on ${date}: ${reason}. The data of this version are no longer served; its landing page keeps this record.`,
  };
}

/** DataCite attributes of the concept DOI: the dataset as a whole, pointing at each of its registered versions. */
export function conceptDoiAttributes(dataset: CitableDataset): DataCiteAttributes {
  return {
    ...describe(dataset, dataset.intendedConceptDoi, dataset.landingUrl, dataset.versions[0]!.publishedAt),
    relatedIdentifiers: dataset.versions.flatMap((v) =>
      v.doi ? [{ relatedIdentifier: v.doi, relatedIdentifierType: "DOI" as const, relationType: "HasVersion" as const }] : [],
    ),
  };
}

/** The dataset as it will be once the service has confirmed `versionId`'s DOI: what its neighbours may link to. */
export function withRegisteredDoi(dataset: CitableDataset, versionId: string, doi: string): CitableDataset {
  return { ...dataset, versions: dataset.versions.map((v) => (v.versionId === versionId ? { ...v, doi } : v)) };
}

/** The properties a version and its concept DOI share. */
function describe(meta: CitableMetadata, doi: string, url: string, firstPublished: Date): DataCiteAttributes {
  return {
    doi,
    event: "publish",
    url,
    creators: meta.creators.map(dataciteCreator),
    ...(meta.contributors.length ? { contributors: meta.contributors.map(dataciteContributor) } : {}),
    ...(meta.funders.length ? { fundingReferences: meta.funders.map((funderName) => ({ funderName })) } : {}),
    titles: [{ title: meta.title }],
    publisher: publisherName,
    publicationYear: firstPublished.getUTCFullYear(),
    types: { resourceTypeGeneral: "Dataset", resourceType },
    language: "en",
    subjects: meta.keywords.map((subject) => ({ subject })),
    descriptions: [
      { description: meta.description, descriptionType: "Abstract" },
      ...(meta.methods ? [{ description: meta.methods, descriptionType: "Methods" as const }] : []),
    ],
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
    ...(c.orcid
      ? {
          nameIdentifiers: [
            { nameIdentifier: `https://orcid.org/${c.orcid}`, nameIdentifierScheme: "ORCID", schemeUri: "https://orcid.org" },
          ],
        }
      : {}),
    ...(c.affiliation ? { affiliation: [{ name: c.affiliation }] } : {}),
  };
}

function dataciteContributor(c: CitationContributor): DataCiteContributor {
  return { ...dataciteCreator(c), contributorType: c.contributorType };
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
