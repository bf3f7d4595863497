import { queryOptions, useQuery } from "@tanstack/react-query";
import { staleTimeMs } from "@/constants/theme";
import { send } from "@/lib/api-client";

/** The citation formats the API renders, in the order the panel offers them. */
export const citationFormatOptions = [
  { format: "text", label: "Text" },
  { format: "bibtex", label: "BibTeX" },
  { format: "ris", label: "RIS" },
  { format: "csl-json", label: "CSL-JSON" },
] as const;
export type CitationFormat = (typeof citationFormatOptions)[number]["format"];

const citationKeys = {
  all: ["citations"] as const,
  version: (slug: string, semver: string) => [...citationKeys.all, slug, semver] as const,
  detail: (slug: string, semver: string, format: CitationFormat) => [...citationKeys.version(slug, semver), format] as const,
};

const citationPath = (slug: string, semver: string, format: CitationFormat) =>
  `/api/v1/datasets/${encodeURIComponent(slug)}/versions/${encodeURIComponent(semver)}/citation?format=${format}`;

/** A citation is text in its own media type (BibTeX, RIS…), so it is read as text rather than parsed as JSON. */
const citationQuery = (slug: string, semver: string, format: CitationFormat) =>
  queryOptions({
    queryKey: citationKeys.detail(slug, semver, format),
    queryFn: async ({ signal }) => (await send(citationPath(slug, semver, format), { signal, headers: { Accept: "*/*" } })).text(),
    staleTime: staleTimeMs,
  });

export const useCitation = (slug: string, semver: string, format: CitationFormat) => useQuery(citationQuery(slug, semver, format));
