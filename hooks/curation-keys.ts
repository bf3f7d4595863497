import type { ResourceName } from "@/schemas/table-schema";

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
  report: (versionId: string, reportId: string) =>
    `/api/v1/curation/versions/${encodeURIComponent(versionId)}/reports/${encodeURIComponent(reportId)}`,
  reportCsv: (versionId: string, reportId: string) =>
    `/api/v1/curation/versions/${encodeURIComponent(versionId)}/reports/${encodeURIComponent(reportId)}.csv`,
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
export const draftStaleMs = 5_000;
