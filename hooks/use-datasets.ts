import { queryOptions, useQuery } from "@tanstack/react-query";
import { staleTimeMs } from "@/constants/theme";
import { api } from "@/lib/api-client";
import { datasetList } from "@/schemas/dataset";

export const datasetKeys = {
  all: ["datasets"] as const,
  lists: () => [...datasetKeys.all, "list"] as const,
  detail: (slug: string) => [...datasetKeys.all, "detail", slug] as const,
};

const datasetListQuery = () =>
  queryOptions({
    queryKey: datasetKeys.lists(),
    queryFn: ({ signal }) => api("/api/v1/datasets", datasetList, { signal }),
    staleTime: staleTimeMs,
  });

export const useDatasetList = () => useQuery(datasetListQuery());
