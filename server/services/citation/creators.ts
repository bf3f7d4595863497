import type { Contributor } from "@/schemas/dataset-metadata";

export interface Creator {
  name: string;
  personal: boolean;
  givenName?: string;
  familyName?: string;
  orcid?: string;
  affiliation?: string;
}

/** Words that mark a contributor as a group rather than a person (no role says so). */
const organisationWords =
  /\b(network|group|university|college|institute|station|laboratory|lab|council|association|cooperative|co-op|service|centre|center|program|programme|project|consortium|society|department|agency|board|team)\b/i;

/**
 * The creators a citation names: contributors in the creator or project-leader role, in their given order; when
 * none has either role, every contributor except funders. A person's name splits into given and family names
 * ("Family, Given" is taken as written; otherwise the last word is the family name).
 */
export function citationCreators(contributors: Contributor[], fallbackName: string): Creator[] {
  const leading = contributors.filter((c) => c.role === "creator" || c.role === "project_leader");
  const chosen = leading.length ? leading : contributors.filter((c) => c.role !== "funder");
  if (chosen.length === 0) return [toCreator({ name: fallbackName, role: "creator" })];
  return chosen.map(toCreator);
}

function toCreator(c: Contributor): Creator {
  const name = c.name.trim().replace(/\s+/g, " ");
  const base = { orcid: c.orcid, affiliation: c.affiliation };
  if (!c.orcid && organisationWords.test(name)) return { name, personal: false, ...base };
  const comma = name.indexOf(",");
  if (comma > 0) {
    const familyName = name.slice(0, comma).trim();
    const givenName = name.slice(comma + 1).trim();
    return { name: `${familyName}, ${givenName}`, personal: true, givenName, familyName, ...base };
  }
  const words = name.split(" ");
  if (words.length < 2) return { name, personal: true, familyName: name, ...base };
  const familyName = words[words.length - 1]!;
  const givenName = words.slice(0, -1).join(" ");
  return { name: `${familyName}, ${givenName}`, personal: true, givenName, familyName, ...base };
}

/** A contributor who is not a creator, with the DataCite contributorType of their role. */
export interface CitationContributor extends Creator {
  contributorType: "DataCurator" | "DataCollector" | "ProjectLeader" | "Other";
}

const contributorTypes: Partial<Record<Contributor["role"], CitationContributor["contributorType"]>> = {
  curator: "DataCurator",
  data_collector: "DataCollector",
  project_leader: "ProjectLeader",
  other: "Other",
};

/** Contributors with a role other than creator and funder (funders are funding, not contributors, in DataCite 4). */
export function citationContributors(contributors: Contributor[]): CitationContributor[] {
  return contributors.flatMap((c) => {
    const contributorType = contributorTypes[c.role];
    return contributorType ? [{ ...toCreator(c), contributorType }] : [];
  });
}

/** Funders: contributors in the funder role, then the dataset's funding statement when it names someone else. */
export function citationFunders(contributors: Contributor[], funding: string | null | undefined): string[] {
  const named = contributors.filter((c) => c.role === "funder").map((c) => c.name.trim());
  const statement = funding?.trim();
  return statement && !named.includes(statement) ? [...named, statement] : named;
}
