import { keepPreviousData, queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "@/lib/api-client";
import { metaApiPath, type EvidenceState } from "@/lib/share-link";
import { metaAnalysisResult } from "@/schemas/analysis";

const analysisKeys = {
  all: ["analyses"] as const,
  metas: () => [...analysisKeys.all, "meta"] as const,
  meta: (path: string) => [...analysisKeys.metas(), path] as const,
};

const metaAnalysisQuery = (state: EvidenceState) => {
  const path = metaApiPath(state);
  return queryOptions({
    queryKey: analysisKeys.meta(path),
    queryFn: ({ signal }) => api(path, metaAnalysisResult, { signal }),
    // A named published version never changes, so neither does its answer. Over the latest versions an answer holds
    // until a new version is published: after 10 minutes it is asked again, and the browser sends its ETag, so an
    // unchanged answer comes back as a 304 (no analysis, no quota).
    staleTime: state.filters.dataset && state.filters.version && state.filters.version !== "latest" ? Infinity : 10 * 60_000,
    // Keep the last result on screen while a changed filter loads, so the page does not jump.
    placeholderData: keepPreviousData,
  });
};

export const useMetaAnalysis = (state: EvidenceState) => useQuery(metaAnalysisQuery(state));
