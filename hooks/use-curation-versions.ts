import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { datasetKeys } from "@/hooks/use-datasets";
import { api } from "@/lib/api-client";
import { versionDetail, versionDiff, type TableSchemaUpdate } from "@/schemas/curation";
import { curationKeys, curationPaths, draftStaleMs } from "./curation-keys";

/** One version on the workbench: its detail, its changes against another, its edits and its review-flow steps. */

export const versionQuery = (id: string) =>
  queryOptions({
    queryKey: curationKeys.version(id),
    queryFn: ({ signal }) => api(curationPaths.version(id), versionDetail, { signal }),
    staleTime: draftStaleMs,
  });

const diffQuery = (from: string, to: string) =>
  queryOptions({
    queryKey: curationKeys.diff(from, to),
    queryFn: ({ signal }) => api(curationPaths.diff(from, to), versionDiff, { signal }),
    staleTime: draftStaleMs,
  });

export const useVersion = (id: string) => useQuery(versionQuery(id));
export const useVersionDiff = (from: string | undefined, to: string | undefined) =>
  useQuery({ ...diffQuery(from ?? "", to ?? ""), enabled: !!from && !!to && from !== to });

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
    mutationFn: (body: TableSchemaUpdate) => api(curationPaths.tableSchema(id), z.unknown(), { method: "PUT", body }),
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
