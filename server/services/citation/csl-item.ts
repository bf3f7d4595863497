import { publisherName, type CitableVersion } from "./citable-version";

/** A CSL-JSON item (Citation Style Language 1.0.2 input data), the one source every citation format renders from. */
export interface CslItem {
  id: string;
  type: "dataset";
  title: string;
  author: ({ family: string; given?: string } | { literal: string })[];
  publisher: string;
  issued: { "date-parts": [[number, number?, number?]] };
  version: string;
  DOI?: string;
  URL: string;
  abstract?: string;
  license?: string;
  keyword?: string;
  note?: string;
}

/** A version as CSL-JSON. The DOI appears only once the DOI service has registered it, so it always resolves. */
export function cslItem(version: CitableVersion, slug: string): CslItem {
  const d = version.publishedAt;
  return {
    id: `${slug}-v${version.semver}`,
    type: "dataset",
    title: version.title,
    author: version.creators.map((c) =>
      c.personal && c.familyName ? { family: c.familyName, ...(c.givenName ? { given: c.givenName } : {}) } : { literal: c.name },
    ),
    publisher: publisherName,
    issued: { "date-parts": [[d.getUTCFullYear(), d.getUTCMonth() + 1, d.getUTCDate()]] },
    version: version.semver,
    ...(version.doi ? { DOI: version.doi } : {}),
    URL: version.landingUrl,
    abstract: version.description,
    license: version.licence.spdx,
    // citation-js splits CSL's comma-separated keyword string on the bare comma.
    ...(version.keywords.length ? { keyword: version.keywords.join(",") } : {}),
  };
}
