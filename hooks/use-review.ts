import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { metaAnalysisResult } from "@/schemas/analysis";
import { cellEditResult, type CellEdit } from "@/schemas/curation";
import { reviewComments, reviewSummary, versionDiffRows, versionRowsPage } from "@/schemas/review";
import type { ResourceName } from "@/schemas/table-schema";
import { api } from "@/lib/api-client";
import { curationKeys, draftStaleMs } from "./curation-keys";

/** The review screen's reads: per-site-year results, rows, diffs with values, the draft's Evidence preview, comments. */

const v = (id: string) => `/api/v1/curation/versions/${encodeURIComponent(id)}`;
const qs = (params: Record<string, string | number | undefined>) =>
  new URLSearchParams(Object.entries(params).flatMap(([k, x]) => (x === undefined ? [] : [[k, String(x)]]))).toString();

const reviewPaths = {
  summary: (id: string, page: number, flagged: boolean) => `${v(id)}/review?${qs({ page, flagged: flagged ? "true" : undefined })}`,
  rows: (id: string, resource: ResourceName, page: number, limit?: number) => `${v(id)}/rows/${resource}?${qs({ page, limit })}`,
  diffRows: (from: string, to: string, resource: ResourceName, page: number) =>
    `/api/v1/curation/diff/rows?${qs({ from, to, resource, page, limit: 20 })}`,
  preview: (id: string, filters: Record<string, string | undefined>) => `${v(id)}/preview/meta?${qs(filters)}`,
  comments: (id: string) => `${v(id)}/comments`,
  cells: (id: string) => `${v(id)}/cells`,
  resolve: (id: string, commentId: string) => `${v(id)}/comments/${encodeURIComponent(commentId)}/resolve`,
};

/** Under the workbench's detail keys, so a review decision (which invalidates them all) refreshes these too. */
const reviewKeys = {
  all: (id: string) => [...curationKeys.details(), "review", id] as const,
  summary: (id: string, page: number, flagged: boolean) => [...reviewKeys.all(id), "summary", page, flagged] as const,
  rows: (id: string, resource: ResourceName, page: number, limit?: number) =>
    [...reviewKeys.all(id), "rows", resource, page, limit ?? "default"] as const,
  diffRows: (from: string, to: string, resource: ResourceName, page: number) =>
    [...reviewKeys.all(to), "diff-rows", from, resource, page] as const,
  preview: (id: string, filters: Record<string, string | undefined>) => [...reviewKeys.all(id), "preview", filters] as const,
  comments: (id: string) => [...reviewKeys.all(id), "comments"] as const,
};

export const useReviewSummary = (id: string, page: number, flagged: boolean) =>
  useQuery(
    queryOptions({
      queryKey: reviewKeys.summary(id, page, flagged),
      queryFn: ({ signal }) => api(reviewPaths.summary(id, page, flagged), reviewSummary, { signal }),
      staleTime: draftStaleMs,
      placeholderData: keepPreviousData,
    }),
  );

export const useVersionRows = (id: string, resource: ResourceName, page: number, limit?: number) =>
  useQuery({
    queryKey: reviewKeys.rows(id, resource, page, limit),
    queryFn: ({ signal }) => api(reviewPaths.rows(id, resource, page, limit), versionRowsPage, { signal }),
    staleTime: draftStaleMs,
    placeholderData: keepPreviousData,
  });

export const useDiffRows = (from: string, to: string, resource: ResourceName, page: number) =>
  useQuery({
    queryKey: reviewKeys.diffRows(from, to, resource, page),
    queryFn: ({ signal }) => api(reviewPaths.diffRows(from, to, resource, page), versionDiffRows, { signal }),
    staleTime: draftStaleMs,
    placeholderData: keepPreviousData,
  });

export const useDraftPreview = (id: string, filters: Record<string, string | undefined>) =>
  useQuery({
    queryKey: reviewKeys.preview(id, filters),
    queryFn: ({ signal }) => api(reviewPaths.preview(id, filters), metaAnalysisResult, { signal }),
    staleTime: draftStaleMs,
  });

export const useReviewComments = (id: string) =>
  useQuery({
    queryKey: reviewKeys.comments(id),
    queryFn: ({ signal }) => api(reviewPaths.comments(id), reviewComments, { signal }),
    staleTime: draftStaleMs,
  });

export function useCommentMutation(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { siteYear: string; body: string }) => api(reviewPaths.comments(id), reviewComments, { method: "POST", body }),
    onSuccess: (comments) => {
      qc.setQueryData(reviewKeys.comments(id), comments);
      return qc.invalidateQueries({ queryKey: reviewKeys.all(id) });
    },
  });
}

export function useResolveCommentMutation(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (commentId: string) => api(reviewPaths.resolve(id, commentId), reviewComments, { method: "POST" }),
    onSuccess: (comments) => qc.setQueryData(reviewKeys.comments(id), comments),
  });
}

/**
 * One cell of a draft changed with a reason. An accepted edit changes the rows, the responses, the diff and the
 * changelog, so every detail of the workbench is read again.
 */
export function useCellEditMutation(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: CellEdit) => api(reviewPaths.cells(id), cellEditResult, { method: "POST", body }),
    onSuccess: () => qc.invalidateQueries({ queryKey: curationKeys.details() }),
  });
}
