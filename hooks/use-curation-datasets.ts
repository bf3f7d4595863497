import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { api } from "@/lib/api-client";
import { curationDataset, curationDatasetList, type DatasetCreate, type DatasetPatch } from "@/schemas/curation";
import { curationKeys, curationPaths, draftStaleMs } from "./curation-keys";

/** A curator's datasets: the list they work on, one dataset with its versions and editors, and their edits. */

const myDatasetsQuery = () =>
  queryOptions({
    queryKey: curationKeys.myDatasets(),
    queryFn: ({ signal }) => api(curationPaths.myDatasets, curationDatasetList, { signal }),
    staleTime: draftStaleMs,
  });

const curationDatasetQuery = (slug: string) =>
  queryOptions({
    queryKey: curationKeys.dataset(slug),
    queryFn: ({ signal }) => api(curationPaths.dataset(slug), curationDataset, { signal }),
    staleTime: draftStaleMs,
  });

export const useMyDatasets = (enabled = true) => useQuery({ ...myDatasetsQuery(), enabled });
export const useCurationDataset = (slug: string) => useQuery({ ...curationDatasetQuery(slug), enabled: slug !== "" });

export function useCreateDatasetMutation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: DatasetCreate) => api(curationPaths.createDataset, curationDataset, { method: "POST", body }),
    onSuccess: (dataset) => {
      qc.setQueryData(curationKeys.dataset(dataset.slug), dataset);
      return qc.invalidateQueries({ queryKey: curationKeys.lists() });
    },
  });
}

export function useUpdateDatasetMutation(slug: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: DatasetPatch) => api(curationPaths.datasetEdit(slug), curationDataset, { method: "PATCH", body }),
    onSuccess: (dataset) => {
      qc.setQueryData(curationKeys.dataset(slug), dataset);
      return qc.invalidateQueries({ queryKey: curationKeys.lists() });
    },
  });
}

/** Share a dataset with a curator (by e-mail), or stop sharing it; the answer is the dataset with its editors. */
export function useAddEditorMutation(slug: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (email: string) => api(curationPaths.editors(slug), curationDataset, { method: "POST", body: { email } }),
    onSuccess: (dataset) => qc.setQueryData(curationKeys.dataset(slug), dataset),
  });
}

export function useRemoveEditorMutation(slug: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (userId: string) => api(curationPaths.editor(slug, userId), curationDataset, { method: "DELETE" }),
    onSuccess: (dataset) => qc.setQueryData(curationKeys.dataset(slug), dataset),
  });
}
