import { eq, sql } from "drizzle-orm";
import type { Readable } from "node:stream";
import { validationReports, versions } from "@/db/schema";
import type { UploadOptions, UploadResult, ValidationProblem } from "@/schemas/curation";
import type { ResourceName, TableSchemaResource } from "@/schemas/table-schema";
import type { AppContext } from "@/server/context";
import { conflict, HttpProblem } from "@/server/errors";
import { rowName } from "@/schemas/messages";
import { readCsvStream } from "./csv-stream";
import { loadDraftState } from "./draft-state";
import { compileResource, type CompiledField } from "./field-values";
import { plotOutcomes } from "./plot-outcomes";
import { recomputeResponses, type RecomputeResult } from "./recompute-responses";
import { groupProblems, Reporter } from "./report";
import { storeUpload } from "./upload-store";
import type { Tx } from "./write-rows";
import type { IngestContext, ResourceIngest, RowValues } from "./resource-ingest";
import { plotsIngest } from "./resources/plots";
import { siteYearsIngest } from "./resources/site-years";
import { sitesIngest } from "./resources/sites";
import { soilTestsIngest } from "./resources/soil-tests";
import { summariesIngest } from "./resources/summaries";
import { treatmentsIngest } from "./resources/treatments";

const ingestFor: Record<ResourceName, (c: IngestContext) => ResourceIngest> = {
  sites: sitesIngest,
  site_years: siteYearsIngest,
  soil_tests: soilTestsIngest,
  treatments: treatmentsIngest,
  plots: plotsIngest,
  summaries: summariesIngest,
};

export interface IngestInput {
  versionId: string;
  resource: ResourceName;
  filename: string;
  source: Readable;
  options: UploadOptions;
  userId: string | null;
  /** Runs inside the write transaction after the rows are stored (a cell edit records itself there). */
  afterWrite?: (tx: Tx) => Promise<void>;
}

/** Which file column feeds which field, and the problems of the header. */
function mapHeader(
  header: string[],
  schema: TableSchemaResource,
  compiled: Map<string, CompiledField>,
  options: UploadOptions,
  report: Reporter,
) {
  const byLower = new Map(schema.fields.map((f) => [f.name.toLowerCase(), f.name]));
  const columns: (CompiledField | null)[] = [];
  const seen = new Map<string, string>();
  const trimmed = header.map((h) => h.trim());
  for (const key of Object.keys(options.mapping)) {
    if (!trimmed.includes(key)) report.error(null, key, null, `the column mapping names column "${key}", which the file does not have`);
  }
  trimmed.forEach((h) => {
    const mapped = options.mapping[h];
    if (mapped !== undefined && !compiled.has(mapped)) {
      report.error(null, h, null, `column "${h}" is mapped to "${mapped}", which is not a field of this resource's data dictionary`);
      columns.push(null);
      return;
    }
    const target = mapped ?? (compiled.has(h) ? h : byLower.get(h.toLowerCase()));
    if (!target) {
      if (h !== "") report.warn(null, h, null, `column "${h}" is not in the data dictionary and was ignored (the raw file keeps it)`);
      columns.push(null);
      return;
    }
    if (seen.has(target)) {
      report.error(null, h, null, `columns "${seen.get(target)}" and "${h}" both map to field ${target}`);
      columns.push(null);
      return;
    }
    seen.set(target, h);
    columns.push(compiled.get(target)!);
  });
  for (const [name, field] of compiled) {
    if (field.required && !seen.has(name))
      report.error(null, name, null, `required field ${name} has no column; add it or map a column to it`);
  }
  return { columns, columnOf: (field: string) => seen.get(field) ?? field };
}

/**
 * One CSV upload into a draft: stream, validate every row and field against the version's Table Schema and the
 * domain rules, and only when the whole file is valid store it, its raw bytes and the recomputed responses in one
 * transaction. A rejected file leaves the draft exactly as it was; its report is kept either way.
 */
export async function ingestUpload(ctx: AppContext, input: IngestInput): Promise<UploadResult> {
  const { db, database, config } = ctx;
  const [version] = await db.select().from(versions).where(eq(versions.id, input.versionId));
  if (!version) throw new HttpProblem(404, "Not found", "No such version.");
  if (version.state !== "draft") throw conflict(`Version ${version.semver} is ${version.state}; files go into drafts only.`);
  const schema = version.tableSchema.resources[input.resource];
  if (!schema) throw conflict(`The data dictionary of version ${version.semver} has no ${input.resource} resource.`);
  const stamp = version.updatedAt.getTime();

  const state = await loadDraftState(db, input.versionId);
  const report = new Reporter(input.filename);
  const handler = ingestFor[input.resource]({
    state,
    options: input.options,
    report,
    versionId: input.versionId,
    bulkCopy: database.kind === "pglite",
    soilTestSchemes: version.tableSchema.soilTestSchemes ?? [],
  });
  let columns: (CompiledField | null)[] = [];
  let header: string[] = [];
  const fieldNames = schema.fields.map((f) => f.name);

  const read = await readCsvStream(input.source, config.uploadLimitBytes, (cells, index, delimiter) => {
    if (index === 0) {
      header = cells.map((h) => h.trim());
      // Decimal commas are read as such only in semicolon files, where the comma cannot be the delimiter.
      const compiled = compileResource(schema, delimiter === ";");
      columns = mapHeader(cells, schema, compiled, input.options, report).columns;
      return;
    }
    if (cells.length !== header.length) {
      report.error(index, null, null, `row has ${cells.length} fields but the header has ${header.length}`);
      return;
    }
    const values: RowValues = {};
    for (const name of fieldNames) values[name] = null;
    let failed: { at: number; message: string }[] | null = null;
    for (let i = 0; i < cells.length; i++) {
      const column = columns[i];
      if (!column) continue;
      const parsed = column.parse(cells[i]!);
      if (parsed.ok) values[column.field.name] = parsed.value;
      else (failed ??= []).push({ at: i, message: parsed.message });
    }
    if (!failed) return handler.row(values, index);
    // Each message starts with the row's name ("Plot 203 of TB-01-2021: …"), read from its key cells as written.
    const raw: Record<string, string> = {};
    columns.forEach((column, i) => {
      if (column) raw[column.field.name] = cells[i]!.trim();
    });
    const name = rowName(input.resource, raw);
    for (const { at, message } of failed) report.error(index, header[at]!, cells[at]!, name ? `${name}: ${message}` : message);
  });
  if (read.rows === 0) report.error(null, null, null, "the file has a header but no data rows");
  // Read outside the write transaction; the stale-draft stamp below refuses the write if the draft moved meanwhile.
  if (input.options.mode === "merge") await handler.mergeExisting?.(db);
  handler.finish();

  const problems = report.all();
  // Plots files: responses from the file's rows, so the plots need not be read back inside the transaction.
  const fileOutcomes = report.errors === 0 && handler.plotOutcomeRequest ? plotOutcomes(handler.plotOutcomeRequest()) : undefined;
  const base = {
    resource: input.resource,
    filename: input.filename,
    rows: read.rows,
    sha256: read.sha256,
    byteSize: read.byteSize,
    delimiter: read.delimiter,
  };
  if (report.errors > 0) {
    const [saved] = await db
      .insert(validationReports)
      .values({ versionId: input.versionId, resource: input.resource, filename: input.filename, accepted: false, problems })
      .returning({ id: validationReports.id });
    return {
      ...base,
      accepted: false,
      reportId: saved!.id,
      uploadId: null,
      errors: report.errors,
      warnings: report.warnings,
      groups: groupProblems(problems),
      problems: problems.slice(0, 200),
      responses: null,
    };
  }

  let recomputed: RecomputeResult | null = null;
  const { uploadId, reportId } = await db.transaction(async (tx) => {
    const locked = await tx.execute<{ state: string; updated_at: string | Date }>(
      sql`select state, updated_at from versions where id = ${input.versionId} for update`,
    );
    const row = (locked as unknown as { rows: { state: string; updated_at: string | Date }[] }).rows[0];
    if (!row || row.state !== "draft" || new Date(row.updated_at).getTime() !== stamp) {
      throw conflict("The draft changed while the file was being checked (another upload or a submission); upload it again.");
    }
    const affected = await handler.write(database, tx);
    if (input.resource !== "sites") recomputed = await recomputeResponses(database, tx, input.versionId, affected, fileOutcomes);
    const uploadId = await storeUpload(database, tx, {
      versionId: input.versionId,
      resource: input.resource,
      filename: input.filename,
      byteSize: read.byteSize,
      sha256: read.sha256,
      rowCount: handler.count(),
      options: { ...input.options, delimiter: read.delimiter },
      chunks: read.chunks,
      uploadedBy: input.userId,
    });
    const notes: ValidationProblem[] = (recomputed?.uncomputed ?? []).map((u) => ({
      severity: "warning",
      file: input.filename,
      row: null,
      column: null,
      value: u.siteYear,
      message: `Site-year ${u.siteYear} has no responses yet: ${u.reason}`,
      kind: `no-responses:${u.reason}`,
      place: u.siteYear,
    }));
    const [saved] = await tx
      .insert(validationReports)
      .values({
        versionId: input.versionId,
        resource: input.resource,
        filename: input.filename,
        accepted: true,
        problems: [...problems, ...notes],
      })
      .returning({ id: validationReports.id });
    await input.afterWrite?.(tx);
    await tx.update(versions).set({ updatedAt: new Date() }).where(eq(versions.id, input.versionId));
    report.warnings += notes.length;
    problems.push(...notes);
    return { uploadId, reportId: saved!.id };
  });
  const r = recomputed as RecomputeResult | null;
  return {
    ...base,
    accepted: true,
    reportId,
    uploadId,
    errors: 0,
    warnings: report.warnings,
    groups: groupProblems(problems),
    problems: problems.slice(0, 200),
    responses: r ? { siteYears: r.siteYears, rows: r.rows, uncomputed: r.uncomputed } : null,
  };
}
