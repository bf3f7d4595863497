/**
 * The DataCite REST API's DOI attributes (Metadata Schema 4.x in its JSON form), as far as Plotbank sends them.
 * Both the client and the local fake use these types, and the fake checks the mandatory properties with
 * `missingMandatoryProperties`, the way the real service refuses to make a DOI findable without them.
 */
interface DataCiteNameIdentifier {
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

/** DataCite 4 contributorType values Plotbank sends (the schema's list is longer). */
export interface DataCiteContributor extends DataCiteCreator {
  contributorType: string;
}

interface DataCiteFundingReference {
  funderName: string;
  funderIdentifier?: string;
  funderIdentifierType?: string;
  awardNumber?: string;
}

type DataCiteRelationType = "IsNewVersionOf" | "IsPreviousVersionOf" | "HasVersion" | "IsVersionOf";

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
  contributors?: DataCiteContributor[];
  fundingReferences?: DataCiteFundingReference[];
  titles?: { title: string }[];
  publisher?: string;
  publicationYear?: number | string;
  types?: { resourceTypeGeneral?: string; resourceType?: string };
  version?: string;
  language?: string;
  subjects?: { subject: string }[];
  descriptions?: { description: string; descriptionType: "Abstract" | "Methods" | "Other" }[];
  rightsList?: { rights: string; rightsUri?: string; rightsIdentifier?: string; rightsIdentifierScheme?: string; schemeUri?: string }[];
  dates?: { date: string; dateType: "Issued" | "Available" | "Updated" | "Collected" | "Withdrawn"; dateInformation?: string }[];
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
  if (!Array.isArray(a.creators) || a.creators.length === 0)
    errors.push({ source: "creators", title: "DOI must have at least one creator" });
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

/**
 * DataCite Metadata Schema 4.6's controlled list for resourceTypeGeneral (from memory of the schema documentation;
 * 4.5 added Instrument and StudyRegistration, 4.6 Award and Project).
 */
const resourceTypesGeneral = [
  "Audiovisual",
  "Award",
  "Book",
  "BookChapter",
  "Collection",
  "ComputationalNotebook",
  "ConferencePaper",
  "ConferenceProceeding",
  "DataPaper",
  "Dataset",
  "Dissertation",
  "Event",
  "Image",
  "Instrument",
  "InteractiveResource",
  "Journal",
  "JournalArticle",
  "Model",
  "OutputManagementPlan",
  "PeerReview",
  "PhysicalObject",
  "Preprint",
  "Project",
  "Report",
  "Service",
  "Software",
  "Sound",
  "Standard",
  "StudyRegistration",
  "Text",
  "Workflow",
  "Other",
] as const;

const creatorNameTypes = ["Personal", "Organizational"] as const;

/** DataCite Metadata Schema 4.6's controlled list for contributorType (from memory of the schema documentation). */
const contributorTypes = [
  "ContactPerson",
  "DataCollector",
  "DataCurator",
  "DataManager",
  "Distributor",
  "Editor",
  "HostingInstitution",
  "Producer",
  "ProjectLeader",
  "ProjectManager",
  "ProjectMember",
  "RegistrationAgency",
  "RegistrationAuthority",
  "RelatedPerson",
  "Researcher",
  "ResearchGroup",
  "RightsHolder",
  "Sponsor",
  "Supervisor",
  "Translator",
  "WorkPackageLeader",
  "Other",
] as const;

/**
 * Values outside the schema's controlled lists, which the service refuses when it validates a registered or findable
 * DOI: resourceTypeGeneral, a creator's or contributor's nameType and a contributor's contributorType, and a funding
 * reference needs a funderName. The match is exact, as in the schema's XSD enumerations.
 */
export function controlledListProblems(a: DataCiteAttributes): DataCiteError[] {
  const errors: DataCiteError[] = [];
  const general = a.types?.resourceTypeGeneral;
  if (!blank(general) && !(resourceTypesGeneral as readonly string[]).includes(general!)) {
    errors.push({
      source: "types.resourceTypeGeneral",
      title: `"${general}" is not one of DataCite's resource types (${resourceTypesGeneral.join(", ")})`,
    });
  }
  (Array.isArray(a.creators) ? a.creators : []).forEach((c, i) => {
    const nameType: unknown = c?.nameType;
    if (nameType !== undefined && !(creatorNameTypes as readonly unknown[]).includes(nameType)) {
      errors.push({ source: `creators[${i}].nameType`, title: `nameType "${String(nameType)}" must be Personal or Organizational` });
    }
  });
  (Array.isArray(a.contributors) ? a.contributors : []).forEach((c, i) => {
    if (blank(c?.name)) errors.push({ source: `contributors[${i}].name`, title: "Each contributor needs a name" });
    if (!(contributorTypes as readonly unknown[]).includes(c?.contributorType)) {
      errors.push({
        source: `contributors[${i}].contributorType`,
        title: `contributorType "${String(c?.contributorType)}" is not one of ${contributorTypes.join(", ")}`,
      });
    }
    if (c?.nameType !== undefined && !(creatorNameTypes as readonly unknown[]).includes(c.nameType)) {
      errors.push({ source: `contributors[${i}].nameType`, title: `nameType "${String(c.nameType)}" must be Personal or Organizational` });
    }
  });
  (Array.isArray(a.fundingReferences) ? a.fundingReferences : []).forEach((f, i) => {
    if (blank(f?.funderName))
      errors.push({ source: `fundingReferences[${i}].funderName`, title: "A funding reference needs a funderName" });
  });
  return errors;
}
