import { eq, sql } from "drizzle-orm";
import type { Readable } from "node:stream";
import { validationReports, versions } from "@/db/schema";
import type { UploadOptions, UploadResult, ValidationProblem } from "@/schemas/curation";
import type { ResourceName, TableSchemaResource } from "@/schemas/table-schema";
import type { AppContext } from "@/server/context";
import { conflict, HttpProblem } from "@/server/errors";
import { rowName } from "@/schemas/messages";
import { readCsvStream } from "./csv-stream";
import { CustomValueBuffer, customFieldsOf } from "./custom-fields";
import { loadDraftState, type DraftState } from "./draft-state";
import { compileResource, type CompiledField } from "./field-values";
import { cellText, type SheetValue } from "./sheet-cells";
import { plotOutcomes } from "./plot-outcomes";
import { recomputeResponses, type RecomputeResult } from "./recompute-responses";
import { groupProblems, Reporter } from "./report";
import { storeUpload } from "./upload-store";
import type { IngestContext, ResourceIngest, RowValues } from "./resource-ingest";
import type { Tx } from "./write-rows";
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

type Version = typeof versions.$inferSelect;

/** What a row source read: the raw bytes kept as the upload and their facts. */
export interface SourceRead {
  sha256: string;
  byteSize: number;
  chunks: Buffer[];
  delimiter: string;
  rows: number;
}

/**
 * Where the rows of one resource come from: a CSV stream, or one sheet of a workbook. `read` hands each record to
 * `onRow` (the header at index 0, then data rows by their number). Cells are text (CSV) or the typed values a sheet
 * holds, which are turned into text by the field's type. `notes` adds the source's own remarks to the report.
 */
export interface RowSource {
  read(onRow: (cells: readonly (string | SheetValue)[], index: number, delimiter: string) => void): Promise<SourceRead>;
  notes?(report: Reporter, header: readonly string[]): void;
}

/** One resource's rows checked against the dictionary and the domain rules, ready to be written when clean. */
export interface CheckedRows {
  resource: ResourceName;
  filename: string;
  options: UploadOptions;
  report: Reporter;
  handler: ResourceIngest;
  custom: CustomValueBuffer;
  read: SourceRead;
  problems: ValidationProblem[];
  fileOutcomes: ReturnType<typeof plotOutcomes> | undefined;
}

/** Streams a source through the header mapping, the cell parsers and the resource's handler. */
export async function checkRows(
  ctx: AppContext,
  version: Version,
  input: { resource: ResourceName; filename: string; options: UploadOptions; state: DraftState; source: RowSource },
): Promise<CheckedRows> {
  const schema = version.tableSchema.resources[input.resource];
  if (!schema) throw conflict(`The data dictionary of version ${version.semver} has no ${input.resource} resource.`);
  const report = new Reporter(input.filename);
  const handler = ingestFor[input.resource]({
    state: input.state,
    options: input.options,
    report,
    versionId: version.id,
    bulkCopy: ctx.database.kind === "pglite",
    soilTestSchemes: version.tableSchema.soilTestSchemes ?? [],
    measures: version.tableSchema.measures ?? [],
    standUnit: version.tableSchema.resources.plots?.fields.find((f) => f.name === "stand_count")?.unit,
  });
  const measureNames = (version.tableSchema.measures ?? []).map((m) => m.name);
  const custom = new CustomValueBuffer(input.resource, customFieldsOf(input.resource, schema, measureNames));
  let columns: (CompiledField | null)[] = [];
  let header: string[] = [];
  const fieldNames = schema.fields.map((f) => f.name);

  const read = await input.source.read((cells, index, delimiter) => {
    if (index === 0) {
      header = cells.map((h) => cellText(h, "string").trim());
      // Decimal commas are read as such only in semicolon files, where the comma cannot be the delimiter.
      const compiled = compileResource(schema, delimiter === ";");
      columns = mapHeader(header, schema, compiled, input.options, report).columns;
      return;
    }
    if (cells.length !== header.length) {
      report.error(index, null, null, `row has ${cells.length} fields but the header has ${header.length}`);
      return;
    }
    const values: RowValues = {};
    for (const name of fieldNames) values[name] = null;
    let failed: { at: number; message: string; text: string }[] | null = null;
    for (let i = 0; i < cells.length; i++) {
      const column = columns[i];
      if (!column) continue;
      const raw = cells[i]!;
      const text = typeof raw === "string" ? raw : cellText(raw, column.field.type);
      const parsed = column.parse(text);
      if (parsed.ok) values[column.field.name] = parsed.value;
      else (failed ??= []).push({ at: i, message: parsed.message, text });
    }
    if (!failed) {
      handler.row(values, index);
      custom.add(values);
      return;
    }
    // Each message starts with the row's name ("Plot 203 of TB-01-2021: …"), read from its key cells as written.
    const named: Record<string, string> = {};
    columns.forEach((column, i) => {
      if (column) named[column.field.name] = cellText(cells[i]!, column.field.type).trim();
    });
    const name = rowName(input.resource, named);
    for (const { at, message, text } of failed) report.error(index, header[at]!, text, name ? `${name}: ${message}` : message);
  });
  if (read.rows === 0) report.error(null, null, null, "the file has a header but no data rows");
  input.source.notes?.(report, header);
  // Read outside the write transaction; the stale-draft stamp refuses the write if the draft moved meanwhile.
  if (input.options.mode === "merge") await handler.mergeExisting?.(ctx.db);
  handler.finish();
  // Plots files: responses from the file's rows, so the plots need not be read back inside the transaction.
  const fileOutcomes = report.errors === 0 && handler.plotOutcomeRequest ? plotOutcomes(handler.plotOutcomeRequest()) : undefined;
  return { ...input, report, handler, custom, read, problems: report.all(), fileOutcomes };
}

/** The answer for one checked resource, stored or not. */
export function uploadResultOf(
  c: CheckedRows,
  stored: { reportId: string; uploadId: string | null; recomputed: RecomputeResult | null },
): UploadResult {
  return {
    accepted: stored.uploadId !== null,
    reportId: stored.reportId,
    uploadId: stored.uploadId,
    resource: c.resource,
    filename: c.filename,
    rows: c.read.rows,
    sha256: c.read.sha256,
    byteSize: c.read.byteSize,
    delimiter: c.read.delimiter,
    errors: c.report.errors,
    warnings: c.report.warnings,
    groups: groupProblems(c.problems),
    problems: c.problems.slice(0, 200),
    responses: stored.recomputed
      ? { siteYears: stored.recomputed.siteYears, rows: stored.recomputed.rows, uncomputed: stored.recomputed.uncomputed }
      : null,
  };
}

/** Keeps the report of a rejected file (outside any transaction, so it survives the refusal). */
export async function saveRejection(ctx: AppContext, versionId: string, c: CheckedRows): Promise<string> {
  const [saved] = await ctx.db
    .insert(validationReports)
    .values({ versionId, resource: c.resource, filename: c.filename, accepted: false, problems: c.problems })
    .returning({ id: validationReports.id });
  return saved!.id;
}

/** Locks the draft's row and refuses when it changed since `stamp` (another upload, an edit or a submission). */
export async function lockDraft(tx: Tx, versionId: string, stamp: number): Promise<void> {
  const locked = await tx.execute<{ state: string; updated_at: string | Date }>(
    sql`select state, updated_at from versions where id = ${versionId} for update`,
  );
  const row = (locked as unknown as { rows: { state: string; updated_at: string | Date }[] }).rows[0];
  if (!row || row.state !== "draft" || new Date(row.updated_at).getTime() !== stamp) {
    throw conflict("The draft changed while the file was being checked (another upload or a submission); upload it again.");
  }
}

/** Writes clean rows, their custom values, the recomputed responses, the raw file and the report, inside `tx`. */
export async function writeChecked(
  ctx: AppContext,
  tx: Tx,
  versionId: string,
  c: CheckedRows,
  uploadOptions: Record<string, unknown>,
  userId: string | null,
): Promise<{ reportId: string; uploadId: string; recomputed: RecomputeResult | null }> {
  const { database } = ctx;
  const affected = await c.handler.write(database, tx);
  await c.custom.write(tx, versionId, c.options.mode);
  const recomputed = c.resource !== "sites" ? await recomputeResponses(database, tx, versionId, affected, c.fileOutcomes) : null;
  const uploadId = await storeUpload(database, tx, {
    versionId,
    resource: c.resource,
    filename: c.filename,
    byteSize: c.read.byteSize,
    sha256: c.read.sha256,
    rowCount: c.handler.count(),
    options: { ...c.options, delimiter: c.read.delimiter, ...uploadOptions },
    chunks: c.read.chunks,
    uploadedBy: userId,
  });
  const notes: ValidationProblem[] = (recomputed?.uncomputed ?? []).map((u) => ({
    severity: "warning",
    file: c.filename,
    row: null,
    column: null,
    value: u.siteYear,
    message: `Site-year ${u.siteYear} has no responses yet: ${u.reason}`,
    kind: `no-responses:${u.reason}`,
    place: u.siteYear,
  }));
  c.problems.push(...notes);
  c.report.warnings += notes.length;
  const [saved] = await tx
    .insert(validationReports)
    .values({ versionId, resource: c.resource, filename: c.filename, accepted: true, problems: c.problems })
    .returning({ id: validationReports.id });
  await tx.update(versions).set({ updatedAt: new Date() }).where(eq(versions.id, versionId));
  return { reportId: saved!.id, uploadId, recomputed };
}

/** The draft a file goes into, refused unless it is one. */
export async function draftVersion(ctx: AppContext, versionId: string): Promise<Version> {
  const [version] = await ctx.db.select().from(versions).where(eq(versions.id, versionId));
  if (!version) throw new HttpProblem(404, "Not found", "No such version.");
  if (version.state !== "draft") throw conflict(`Version ${version.semver} is ${version.state}; files go into drafts only.`);
  return version;
}

/**
 * One CSV upload into a draft: stream, validate every row and field against the version's Table Schema and the
 * domain rules, and only when the whole file is valid store it, its raw bytes and the recomputed responses in one
 * transaction. A rejected file leaves the draft exactly as it was; its report is kept either way.
 */
export async function ingestUpload(ctx: AppContext, input: IngestInput): Promise<UploadResult> {
  const version = await draftVersion(ctx, input.versionId);
  if (!version.tableSchema.resources[input.resource])
    throw conflict(`The data dictionary of version ${version.semver} has no ${input.resource} resource.`);
  const stamp = version.updatedAt.getTime();
  const state = await loadDraftState(ctx.db, input.versionId);
  const source: RowSource = { read: (onRow) => readCsvStream(input.source, ctx.config.uploadLimitBytes, onRow) };
  const checked = await checkRows(ctx, version, { ...input, state, source });
  if (checked.report.errors > 0) {
    const reportId = await saveRejection(ctx, input.versionId, checked);
    return uploadResultOf(checked, { reportId, uploadId: null, recomputed: null });
  }
  const stored = await ctx.db.transaction(async (tx) => {
    await lockDraft(tx, input.versionId, stamp);
    const written = await writeChecked(ctx, tx, input.versionId, checked, {}, input.userId);
    await input.afterWrite?.(tx);
    return written;
  });
  return uploadResultOf(checked, stored);
}
