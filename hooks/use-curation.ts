import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { datasetKeys } from "@/hooks/use-datasets";
import { api } from "@/lib/api-client";
import {
  curationDataset,
  curationDatasetList,
  reviewQueue,
  uploadResult,
  validationReport,
  versionDetail,
  versionDiff,
  type DatasetCreate,
  type DatasetPatch,
  type UploadOptions,
} from "@/schemas/curation";
import type { ResourceName, TableSchemaDescriptor } from "@/schemas/table-schema";
import { uploadWithProgress, type PickedFile } from "./use-curation-upload";

/** Every curation endpoint in one place, so the screens never spell a URL. */
export const curationPaths = {
  myDatasets: "/api/v1/curation/datasets",
  createDataset: "/api/v1/datasets",
  dataset: (slug: string) => `/api/v1/curation/datasets/${encodeURIComponent(slug)}`,
  datasetEdit: (slug: string) => `/api/v1/datasets/${encodeURIComponent(slug)}`,
  editors: (slug: string) => `/api/v1/curation/datasets/${encodeURIComponent(slug)}/editors`,
  editor: (slug: string, userId: string) => `/api/v1/curation/datasets/${encodeURIComponent(slug)}/editors/${encodeURIComponent(userId)}`,
  versions: (slug: string) => `/api/v1/datasets/${encodeURIComponent(slug)}/versions`,
  version: (id: string) => `/api/v1/curation/versions/${encodeURIComponent(id)}`,
  tableSchema: (id: string) => `/api/v1/curation/versions/${encodeURIComponent(id)}/table-schema`,
  upload: (id: string, resource: ResourceName) => `/api/v1/curation/versions/${encodeURIComponent(id)}/uploads/${resource}`,
  action: (id: string, action: VersionAction) => `/api/v1/curation/versions/${encodeURIComponent(id)}/${action}`,
  requeueDoi: (id: string) => `/api/v1/curation/versions/${encodeURIComponent(id)}/doi/requeue`,
  report: (versionId: string, reportId: string) => `/api/v1/curation/versions/${encodeURIComponent(versionId)}/reports/${encodeURIComponent(reportId)}`,
  reportCsv: (versionId: string, reportId: string) => `/api/v1/curation/versions/${encodeURIComponent(versionId)}/reports/${encodeURIComponent(reportId)}.csv`,
  diff: (from: string, to: string) => `/api/v1/curation/diff?from=${encodeURIComponent(from)}&to=${encodeURIComponent(to)}`,
  reviewQueue: "/api/v1/curation/review-queue",
} as const;

export type VersionAction = "submit" | "approve" | "return" | "withdraw";

/** Query keys, general to specific; invalidating `all` refreshes the whole workbench. */
export const curationKeys = {
  all: ["curation"] as const,
  lists: () => [...curationKeys.all, "list"] as const,
  myDatasets: () => [...curationKeys.lists(), "mine"] as const,
  reviewQueue: () => [...curationKeys.lists(), "review-queue"] as const,
  details: () => [...curationKeys.all, "detail"] as const,
  dataset: (slug: string) => [...curationKeys.details(), "dataset", slug] as const,
  version: (id: string) => [...curationKeys.details(), "version", id] as const,
  report: (reportId: string) => [...curationKeys.details(), "report", reportId] as const,
  diff: (from: string, to: string) => [...curationKeys.details(), "diff", from, to] as const,
};

// Drafts change under the curator's hands: a short stale time, unlike published data.
const draftStaleMs = 5_000;

export const myDatasetsQuery = () =>
  queryOptions({
    queryKey: curationKeys.myDatasets(),
    queryFn: ({ signal }) => api(curationPaths.myDatasets, curationDatasetList, { signal }),
    staleTime: draftStaleMs,
  });

export const reviewQueueQuery = () =>
  queryOptions({
    queryKey: curationKeys.reviewQueue(),
    queryFn: ({ signal }) => api(curationPaths.reviewQueue, reviewQueue, { signal }),
    staleTime: draftStaleMs,
  });

export const curationDatasetQuery = (slug: string) =>
  queryOptions({
    queryKey: curationKeys.dataset(slug),
    queryFn: ({ signal }) => api(curationPaths.dataset(slug), curationDataset, { signal }),
    staleTime: draftStaleMs,
  });

export const versionQuery = (id: string) =>
  queryOptions({
    queryKey: curationKeys.version(id),
    queryFn: ({ signal }) => api(curationPaths.version(id), versionDetail, { signal }),
    staleTime: draftStaleMs,
  });

/** A whole validation report (the server caps a page at 10,000 problems, which is also what it keeps). */
export const reportQuery = (versionId: string, reportId: string) =>
  queryOptions({
    queryKey: curationKeys.report(reportId),
    queryFn: ({ signal }) => api(`${curationPaths.report(versionId, reportId)}?limit=10000`, validationReport, { signal }),
    // A stored report never changes.
    staleTime: Infinity,
  });

export const diffQuery = (from: string, to: string) =>
  queryOptions({
    queryKey: curationKeys.diff(from, to),
    queryFn: ({ signal }) => api(curationPaths.diff(from, to), versionDiff, { signal }),
    staleTime: draftStaleMs,
  });

export const useMyDatasets = (enabled = true) => useQuery({ ...myDatasetsQuery(), enabled });
export const useReviewQueue = (enabled = true) => useQuery({ ...reviewQueueQuery(), enabled });
export const useCurationDataset = (slug: string) => useQuery({ ...curationDatasetQuery(slug), enabled: slug !== "" });
export const useVersion = (id: string) => useQuery(versionQuery(id));
export const useReport = (versionId: string, reportId: string) => useQuery(reportQuery(versionId, reportId));
export const useVersionDiff = (from: string | undefined, to: string | undefined) =>
  useQuery({ ...diffQuery(from ?? "", to ?? ""), enabled: !!from && !!to && from !== to });

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

export function useCreateVersionMutation(slug: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { semver?: string } = {}) => api(curationPaths.versions(slug), versionDetail, { method: "POST", body }),
    onSuccess: (version) => {
      qc.setQueryData(curationKeys.version(version.id), version);
      return qc.invalidateQueries({ queryKey: curationKeys.all });
    },
  });
}

export function useUpdateVersionMutation(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { semver?: string; changelog?: string }) => api(curationPaths.version(id), versionDetail, { method: "PATCH", body }),
    onSuccess: (version) => {
      qc.setQueryData(curationKeys.version(id), version);
      return qc.invalidateQueries({ queryKey: curationKeys.all });
    },
  });
}

export function useSaveTableSchemaMutation(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: TableSchemaDescriptor) => api(curationPaths.tableSchema(id), z.unknown(), { method: "PUT", body }),
    onSuccess: () => qc.invalidateQueries({ queryKey: curationKeys.version(id) }),
  });
}

/** The body each review-flow step takes; the server validates it with the same contracts. */
export type ActionBody =
  | { action: "submit"; changelog: string }
  | { action: "approve"; comment?: string }
  | { action: "return"; comment: string }
  | { action: "withdraw"; reason: string };

export function useVersionActionMutation(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ action, ...body }: ActionBody) => api(curationPaths.action(id, action), z.unknown(), { method: "POST", body }),
    onSuccess: async (_data, { action }) => {
      await qc.invalidateQueries({ queryKey: curationKeys.all });
      // Approving publishes; publishing and withdrawing change what the public catalogue lists.
      if (action === "withdraw" || action === "approve") await qc.invalidateQueries({ queryKey: datasetKeys.all });
    },
  });
}

/** Send a failed or pending DOI registration again now; the answer is the version with its registration pending. */
export function useRequeueDoiMutation(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api(curationPaths.requeueDoi(id), versionDetail, { method: "POST" }),
    onSuccess: (detail) => qc.setQueryData(curationKeys.version(id), detail),
  });
}

export interface UploadVariables {
  resource: ResourceName;
  file: PickedFile;
  options: UploadOptions;
  onProgress?: (fraction: number) => void;
}

export function useUploadMutation(versionId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: async ({ resource, file, options, onProgress }: UploadVariables) =>
      uploadResult.parse(
        await uploadWithProgress(
          curationPaths.upload(versionId, resource),
          { mapping: JSON.stringify(options.mapping), units: JSON.stringify(options.units), mode: options.mode, file },
          onProgress,
        ),
      ),
    onSettled: () => qc.invalidateQueries({ queryKey: curationKeys.version(versionId) }),
  });
}
