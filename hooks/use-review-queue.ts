import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "@/lib/api-client";
import { reviewQueue } from "@/schemas/curation";
import { curationKeys, curationPaths, draftStaleMs } from "./curation-keys";

/** The versions waiting for a reviewer. */

const reviewQueueQuery = () =>
  queryOptions({
    queryKey: curationKeys.reviewQueue(),
    queryFn: ({ signal }) => api(curationPaths.reviewQueue, reviewQueue, { signal }),
    staleTime: draftStaleMs,
  });

export const useReviewQueue = (enabled = true) => useQuery({ ...reviewQueueQuery(), enabled });
