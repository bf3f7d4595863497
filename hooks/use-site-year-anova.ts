import { keepPreviousData, queryOptions, useQuery } from "@tanstack/react-query";
import { staleTimeMs } from "@/constants/theme";
import { api } from "@/lib/api-client";
import { siteYearPage, type YieldUnit } from "@/schemas/public";
import { siteYearAnova, type AnovaMeasure } from "@/schemas/site-year-anova";
import { curationKeys, draftStaleMs } from "./curation-keys";
import { datasetKeys } from "./use-datasets";

/**
 * Where a site-year's ANOVA is read from: a published version by dataset and semver (open to all), or any version by
 * its id through the curation route (drafts for their editors and reviewers; the reviewer's screen uses this).
 */
export type AnovaSource = { slug: string; semver: string } | { versionId: string };
export interface AnovaChoice {
  measure: AnovaMeasure;
  units: YieldUnit;
}

const enc = encodeURIComponent;
const versionBase = (slug: string, semver: string) => `/api/v1/datasets/${enc(slug)}/versions/${enc(semver)}`;

const siteYearAnovaPath = (source: AnovaSource, code: string, { measure, units }: AnovaChoice) =>
  `${"versionId" in source ? `/api/v1/curation/versions/${enc(source.versionId)}` : versionBase(source.slug, source.semver)}` +
  `/site-years/${enc(code)}/anova?measure=${measure}&units=${enc(units)}`;

/** Keys under the version they read, so refreshing a draft (or a dataset) refreshes its ANOVAs too. */
const anovaKeys = {
  one: (source: AnovaSource, code: string, choice: AnovaChoice) =>
    "versionId" in source
      ? ([...curationKeys.version(source.versionId), "site-year-anova", code, choice.measure, choice.units] as const)
      : ([...datasetKeys.detail(source.slug), source.semver, "site-year-anova", code, choice.measure, choice.units] as const),
  siteYears: (slug: string, semver: string) => [...datasetKeys.detail(slug), semver, "site-years"] as const,
};

const siteYearAnovaQuery = (source: AnovaSource, code: string, choice: AnovaChoice) =>
  queryOptions({
    queryKey: anovaKeys.one(source, code, choice),
    queryFn: ({ signal }) => api(siteYearAnovaPath(source, code, choice), siteYearAnova, { signal }),
    staleTime: "versionId" in source ? draftStaleMs : staleTimeMs,
    // Switching measure or unit keeps the last table on screen until the new one arrives.
    placeholderData: keepPreviousData,
  });

export const useSiteYearAnova = (source: AnovaSource, code: string, choice: AnovaChoice) =>
  useQuery(siteYearAnovaQuery(source, code, choice));

/** The site-years of a published version (one page of up to 1,000), to choose one from. */
const versionSiteYearsQuery = (slug: string, semver: string) =>
  queryOptions({
    queryKey: anovaKeys.siteYears(slug, semver),
    queryFn: ({ signal }) => api(`${versionBase(slug, semver)}/site-years?limit=1000`, siteYearPage, { signal }),
    staleTime: staleTimeMs,
  });

export const useVersionSiteYears = (slug: string, semver: string | null, enabled = true) =>
  useQuery({ ...versionSiteYearsQuery(slug, semver ?? ""), enabled: enabled && !!semver });
