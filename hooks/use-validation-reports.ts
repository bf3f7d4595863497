import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "@/lib/api-client";
import { validationReport } from "@/schemas/curation";
import { curationKeys, curationPaths } from "./curation-keys";

/** A whole validation report (the server caps a page at 10,000 problems, which is also what it keeps). */
const reportQuery = (versionId: string, reportId: string) =>
  queryOptions({
    queryKey: curationKeys.report(reportId),
    queryFn: ({ signal }) => api(`${curationPaths.report(versionId, reportId)}?limit=10000`, validationReport, { signal }),
    // A stored report never changes.
    staleTime: Infinity,
  });

export const useReport = (versionId: string, reportId: string) => useQuery(reportQuery(versionId, reportId));
