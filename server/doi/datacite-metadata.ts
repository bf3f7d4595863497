/**
 * The DataCite REST API's DOI attributes (Metadata Schema 4.x in its JSON form), as far as Plotbank sends them.
 * Both the client and the local fake use these types, and the fake checks the mandatory properties with
 * `missingMandatoryProperties`, the way the real service refuses to make a DOI findable without them.
 */
export interface DataCiteNameIdentifier {
  nameIdentifier: string;
  nameIdentifierScheme: string;
  schemeUri?: string;
}

export interface DataCiteCreator {
  name: string;
  nameType?: "Personal" | "Organizational";
  givenName?: string;
  familyName?: string;
  nameIdentifiers?: DataCiteNameIdentifier[];
  affiliation?: { name: string }[];
}

export type DataCiteRelationType = "IsNewVersionOf" | "IsPreviousVersionOf" | "HasVersion" | "IsVersionOf";

export interface DataCiteRelatedIdentifier {
  relatedIdentifier: string;
  relatedIdentifierType: "DOI" | "URL";
  relationType: DataCiteRelationType;
}

export interface DataCiteAttributes {
  doi?: string;
  prefix?: string;
  event?: "publish" | "register" | "hide";
  url?: string;
  creators?: DataCiteCreator[];
  titles?: { title: string }[];
  publisher?: string;
  publicationYear?: number | string;
  types?: { resourceTypeGeneral?: string; resourceType?: string };
  version?: string;
  language?: string;
  subjects?: { subject: string }[];
  descriptions?: { description: string; descriptionType: "Abstract" | "Methods" | "Other" }[];
  rightsList?: { rights: string; rightsUri?: string; rightsIdentifier?: string; rightsIdentifierScheme?: string; schemeUri?: string }[];
  dates?: { date: string; dateType: "Issued" | "Available" | "Updated" | "Collected" }[];
  geoLocations?: { geoLocationPlace: string }[];
  relatedIdentifiers?: DataCiteRelatedIdentifier[];
  /** Set by the service in its answers. */
  state?: "draft" | "registered" | "findable";
  created?: string;
  updated?: string;
}

export interface DataCiteDoiDocument {
  data: { id?: string; type: "dois"; attributes: DataCiteAttributes };
}

/** A JSON:API error object as the DataCite API writes it. */
export interface DataCiteError {
  status?: string;
  source?: string;
  title: string;
}

const blank = (s: unknown) => typeof s !== "string" || s.trim() === "";

/**
 * The properties a findable DOI must have (DataCite Metadata Schema 4, mandatory properties 1–6 and 10, plus the
 * landing-page URL the DOI resolves to). Each answer names the property (`source`) and says what is wrong.
 */
export function missingMandatoryProperties(a: DataCiteAttributes): DataCiteError[] {
  const errors: DataCiteError[] = [];
  if (blank(a.doi) && blank(a.prefix)) errors.push({ source: "doi", title: "Can't be blank: give a doi or a prefix" });
  if (!Array.isArray(a.creators) || a.creators.length === 0) errors.push({ source: "creators", title: "DOI must have at least one creator" });
  else a.creators.forEach((c, i) => blank(c?.name) && errors.push({ source: `creators[${i}].name`, title: "Each creator needs a name" }));
  if (!Array.isArray(a.titles) || a.titles.length === 0 || a.titles.some((t) => blank(t?.title))) {
    errors.push({ source: "titles", title: "DOI must have at least one title" });
  }
  if (blank(a.publisher)) errors.push({ source: "publisher", title: "DOI must have a publisher" });
  const year = Number(a.publicationYear);
  if (a.publicationYear === undefined || !Number.isInteger(year) || year < 1000 || year > 9999) {
    errors.push({ source: "publicationYear", title: "DOI must have a four-digit publication year" });
  }
  if (blank(a.types?.resourceTypeGeneral)) errors.push({ source: "types", title: "DOI must have a resourceTypeGeneral" });
  if (blank(a.url)) errors.push({ source: "url", title: "A findable DOI needs the URL it resolves to" });
  else if (!/^https?:\/\//.test(a.url!)) errors.push({ source: "url", title: "url must be an http or https URL" });
  return errors;
}
