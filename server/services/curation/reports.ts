import { groupProblems } from "@/server/services/ingest/report";
import { and, eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { validationReports } from "@/db/schema";
import type { ValidationProblem, ValidationReport } from "@/schemas/curation";
import type { ResourceName } from "@/schemas/table-schema";
import { csvFile } from "@/server/csv";
import { notFound } from "@/server/errors";

export interface ReportFilter {
  severity?: "error" | "warning";
  column?: string;
  row?: number;
  q?: string;
  limit: number;
  offset: number;
}

/**
 * A report of a version. A rejected file never became part of the version, so its report (what someone tried to
 * upload) stays with the dataset's editors and reviewers: `acceptedOnly` callers get 404 for it.
 */
async function load(db: Db, versionId: string, reportId: string, acceptedOnly = false) {
  const [r] = await db
    .select()
    .from(validationReports)
    .where(and(eq(validationReports.id, reportId), eq(validationReports.versionId, versionId)));
  if (!r || (acceptedOnly && !r.accepted)) throw notFound("No such validation report for this version.");
  return r;
}

function matches(p: ValidationProblem, f: Omit<ReportFilter, "limit" | "offset">) {
  if (f.severity && p.severity !== f.severity) return false;
  if (f.column && p.column !== f.column) return false;
  if (f.row && p.row !== f.row) return false;
  if (f.q && !p.message.toLowerCase().includes(f.q.toLowerCase())) return false;
  return true;
}

export async function getReport(
  db: Db,
  versionId: string,
  reportId: string,
  filter: ReportFilter,
  acceptedOnly = false,
): Promise<ValidationReport> {
  const r = await load(db, versionId, reportId, acceptedOnly);
  const problems = r.problems as unknown as ValidationProblem[];
  const selected = problems.filter((p) => matches(p, filter));
  return {
    id: r.id,
    versionId: r.versionId,
    resource: r.resource as ResourceName,
    filename: r.filename,
    accepted: r.accepted,
    errors: problems.filter((p) => p.severity === "error").length,
    warnings: problems.filter((p) => p.severity === "warning").length,
    total: selected.length,
    groups: groupProblems(problems),
    problems: selected.slice(filter.offset, filter.offset + filter.limit),
    createdAt: r.createdAt.toISOString(),
  };
}

/** The report as CSV: severity, file, row (1-based data row, header not counted), column, value, message. */
export async function reportCsv(
  db: Db,
  versionId: string,
  reportId: string,
  filter: Omit<ReportFilter, "limit" | "offset">,
  acceptedOnly = false,
): Promise<string> {
  const r = await load(db, versionId, reportId, acceptedOnly);
  const rows = (r.problems as unknown as ValidationProblem[])
    .filter((p) => matches(p, filter))
    .map((p) => [p.severity, p.file, p.row, p.column, p.value, p.message]);
  // The values are what an uploader sent, the text most likely to be hostile: the writer's formula guard applies.
  return csvFile(["severity", "file", "row", "column", "value", "message"], rows);
}
