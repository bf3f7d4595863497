import { queryOptions, useQuery } from "@tanstack/react-query";
import { staleTimeMs } from "@/constants/theme";
import { api } from "@/lib/api-client";
import { datasetDetail } from "@/schemas/public";
import { tableSchemaDescriptor } from "@/schemas/table-schema";
import { datasetKeys } from "./use-datasets";

const datasetPageKeys = {
  detail: (slug: string) => datasetKeys.detail(slug),
  schema: (slug: string, semver: string) => [...datasetKeys.detail(slug), "schema", semver] as const,
};

const path = (slug: string) => `/api/v1/datasets/${encodeURIComponent(slug)}`;

const datasetDetailQuery = (slug: string) =>
  queryOptions({
    queryKey: datasetPageKeys.detail(slug),
    queryFn: ({ signal }) => api(path(slug), datasetDetail, { signal }),
    staleTime: staleTimeMs,
  });

const versionSchemaQuery = (slug: string, semver: string) =>
  queryOptions({
    queryKey: datasetPageKeys.schema(slug, semver),
    queryFn: ({ signal }) => api(`${path(slug)}/versions/${encodeURIComponent(semver)}/schema`, tableSchemaDescriptor, { signal }),
    staleTime: staleTimeMs,
  });

export const useDatasetDetail = (slug: string) => useQuery(datasetDetailQuery(slug));
export const useVersionSchema = (slug: string, semver: string | null) =>
  useQuery({ ...versionSchemaQuery(slug, semver ?? ""), enabled: !!semver });

/** Download links of a published version, as the API serves them. */
export function versionDownloads(slug: string, semver: string, resources: string[]) {
  const base = `${path(slug)}/versions/${encodeURIComponent(semver)}`;
  return {
    dataPackage: `${base}/datapackage.zip`,
    resources: resources.map((resource) => ({ resource, url: `${base}/resources/${resource}.csv` })),
  };
}
