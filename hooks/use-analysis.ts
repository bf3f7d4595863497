import { keepPreviousData, queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "@/lib/api-client";
import { metaApiPath, seedSafetyApiPath, type EvidenceState } from "@/lib/share-link";
import { seedSafetyResult } from "@/schemas/seed-safety";
import { metaAnalysisResult } from "@/schemas/analysis";

const analysisKeys = {
  all: ["analyses"] as const,
  metas: () => [...analysisKeys.all, "meta"] as const,
  meta: (path: string) => [...analysisKeys.metas(), path] as const,
};

/**
 * How long an answer stays fresh: a named published version never changes, so neither does its answer. Over the
 * latest versions an answer holds until a new version is published: after 10 minutes it is asked again, and the
 * browser sends its ETag, so an unchanged answer comes back as a 304 (no analysis, no quota).
 */
const staleTimeOf = (state: EvidenceState) =>
  state.filters.dataset && state.filters.version && state.filters.version !== "latest" ? Infinity : 10 * 60_000;

const metaAnalysisQuery = (state: EvidenceState) => {
  const path = metaApiPath(state);
  return queryOptions({
    queryKey: analysisKeys.meta(path),
    queryFn: ({ signal }) => api(path, metaAnalysisResult, { signal }),
    staleTime: staleTimeOf(state),
    // Keep the last result on screen while a changed filter loads, so the page does not jump.
    placeholderData: keepPreviousData,
  });
};

export const useMetaAnalysis = (state: EvidenceState) => useQuery(metaAnalysisQuery(state));

/**
 * The response along the soil test: the same question with moderator=soilTestValue and no forest rows, asked only
 * when the scatter is open, so the screen's first answer stays small. A 422 (soil tests on several scales) is an
 * answer to show, not a failure to retry.
 */
export const useSoilTestLine = (state: EvidenceState) => {
  const path = `${metaApiPath(state)}&moderator=soilTestValue&forestLimit=0`;
  return useQuery({
    queryKey: [...analysisKeys.metas(), "soilTestValue", path],
    queryFn: ({ signal }) => api(path, metaAnalysisResult, { signal }),
    staleTime: staleTimeOf(state),
    placeholderData: keepPreviousData,
    retry: (count, error) =>
      count < 1 && !(error instanceof Error && "status" in error && [400, 422].includes((error as { status: number }).status)),
  });
};

const seedSafetyQuery = (state: EvidenceState) => {
  const path = seedSafetyApiPath(state);
  return queryOptions({
    queryKey: [...analysisKeys.all, "seed-safety", path] as const,
    queryFn: ({ signal }) => api(path, seedSafetyResult, { signal }),
    staleTime: staleTimeOf(state),
    placeholderData: keepPreviousData,
  });
};

/** The seed-safety evidence of the screen's filters; asked only when stand or early growth is compared. */
export const useSeedSafety = (state: EvidenceState, enabled: boolean) => useQuery({ ...seedSafetyQuery(state), enabled });
