import { createHash } from "node:crypto";
import type { Readable } from "node:stream";
import { resourceNames } from "@/constants/vocabulary";
import type { UploadOptions, WorkbookSheetResult, WorkbookUploadResult } from "@/schemas/curation";
import type { ResourceName } from "@/schemas/table-schema";
import type { AppContext } from "@/server/context";
import { HttpProblem } from "@/server/errors";
import { CsvWriter } from "@/server/csv";
import { tooLarge } from "./csv-stream";
import { loadDraftState } from "./draft-state";
import {
  checkRows,
  draftVersion,
  lockDraft,
  saveRejection,
  uploadResultOf,
  writeChecked,
  type CheckedRows,
  type RowSource,
  type SourceRead,
} from "./ingest-upload";
import { cellText } from "./sheet-cells";
import { readWorkbook, type SheetRead } from "./xlsx-reader";

/** The sheet that explains the columns (the workbook template has one); it holds no data and is skipped. */
const README_SHEET = "readme";

export interface WorkbookInput {
  versionId: string;
  filename: string;
  source: Readable;
  options: UploadOptions;
  userId: string | null;
}

/** Reads the whole upload, refusing more than the limit (a workbook is a zip and cannot be read as it streams). */
async function readAll(source: Readable, limitBytes: number): Promise<Buffer> {
  const parts: Buffer[] = [];
  let size = 0;
  for await (const chunk of source) {
    size += (chunk as Buffer).length;
    if (size > limitBytes) {
      source.resume();
      throw tooLarge(limitBytes);
    }
    parts.push(chunk as Buffer);
  }
  return Buffer.concat(parts);
}

/** Which resource each sheet holds, by name (case and surrounding spaces ignored); a 422 names any other sheet. */
function sheetsByResource(filename: string, sheets: SheetRead[]): Map<ResourceName, SheetRead> {
  const byResource = new Map<ResourceName, SheetRead>();
  const unknown: string[] = [];
  const twice: string[] = [];
  for (const sheet of sheets) {
    const key = sheet.name.trim().toLowerCase();
    if (key === README_SHEET) continue;
    const resource = resourceNames.find((r) => r === key);
    if (!resource) unknown.push(sheet.name);
    else if (byResource.has(resource)) twice.push(sheet.name);
    else byResource.set(resource, sheet);
  }
  const found = sheets.map((s) => `"${s.name}"`).join(", ");
  const expected = resourceNames.join(", ");
  if (unknown.length || twice.length || byResource.size === 0) {
    const errors = [
      ...unknown.map((name) => ({
        file: filename,
        field: "file",
        message: `sheet "${name}" is not a resource of this version; name each sheet after its resource: ${expected} (a README sheet is skipped)`,
      })),
      ...twice.map((name) => ({ file: filename, field: "file", message: `sheet "${name}" is a second sheet for the same resource` })),
    ];
    if (errors.length === 0)
      errors.push({ file: filename, field: "file", message: `no sheet is named after a resource; expected one or more of: ${expected}` });
    throw new HttpProblem(
      422,
      "Unprocessable content",
      `${filename}: the sheets are ${found}, but sheets must be named ${expected} (one per resource, in any case; a README sheet is skipped). Rename the sheets and upload again; nothing was stored.`,
      { errors, sheetsFound: sheets.map((s) => s.name), sheetsExpected: [...resourceNames] },
    );
  }
  return byResource;
}

/**
 * One sheet as a row source: rows numbered as the CSV path numbers them (the header is row 0, a data row's number is
 * its spreadsheet line minus the header's line), short rows padded to the header, and the sheet's CSV kept as the
 * upload's raw content. Formula cells become warnings naming the cell.
 */
function sheetSource(sheet: SheetRead): RowSource {
  const headerLine = sheet.rows[0]?.line ?? 1;
  return {
    async read(onRow) {
      const hash = createHash("sha256");
      const chunks: Buffer[] = [];
      let byteSize = 0;
      const keep = (text: string) => {
        const b = Buffer.from(text, "utf8");
        hash.update(b);
        byteSize += b.length;
        chunks.push(b);
      };
      const [head, ...data] = sheet.rows;
      if (!head) {
        throw new HttpProblem(400, "Bad request", `Sheet "${sheet.name}" is empty: it needs a header row and at least one data row.`, {
          errors: [{ field: "file", message: `sheet ${sheet.name} is empty` }],
        });
      }
      const header = head.cells.map((c) => cellText(c, "string").trim());
      const writer = new CsvWriter(
        header,
        header.map(() => false),
      );
      keep(writer.headerLine());
      onRow(header, 0, ",");
      const width = header.length;
      let batch: string[][] = [];
      for (const row of data) {
        let cells = row.cells;
        if (cells.length < width) cells = [...cells, ...new Array<null>(width - cells.length).fill(null)];
        else if (cells.length > width && cells.slice(width).every((c) => c === null)) cells = cells.slice(0, width);
        onRow(cells, row.line - headerLine, ",");
        batch.push(cells.map((c) => cellText(c, "string")));
        if (batch.length === 2000) {
          keep(writer.rows(batch));
          batch = [];
        }
      }
      keep(writer.rows(batch));
      const read: SourceRead = { sha256: hash.digest("hex"), byteSize, chunks, delimiter: ",", rows: data.length };
      return read;
    },
    notes(report, header) {
      for (const f of sheet.formulas)
        report.warn(
          f.line - headerLine,
          header[f.column - 1] ?? f.address,
          f.value === null ? null : cellText(f.value, "string"),
          `cell ${f.address} of sheet ${sheet.name} holds a formula; its last calculated value was read (check it is current, or paste the values)`,
        );
      if (sheet.formulaCount > sheet.formulas.length)
        report.warn(
          null,
          null,
          null,
          `sheet ${sheet.name} holds ${sheet.formulaCount} formula cells; the first ${sheet.formulas.length} are listed`,
        );
    },
  };
}

class Rejected extends Error {}

/**
 * A workbook upload: one sheet per resource, each checked exactly as its CSV would be, in the order resources refer
 * to each other (sites before site-years before plots…). Everything happens in one transaction: every sheet is
 * stored, or none is. A sheet with errors stops the upload; sheets after it are not checked, because their
 * references would point at rows that were not stored.
 */
export async function ingestWorkbook(ctx: AppContext, input: WorkbookInput): Promise<WorkbookUploadResult> {
  const buffer = await readAll(input.source, ctx.config.uploadLimitBytes);
  const sheets = await readWorkbook(buffer);
  const byResource = sheetsByResource(input.filename, sheets);
  const version = await draftVersion(ctx, input.versionId);
  const stamp = version.updatedAt.getTime();
  const sha256 = createHash("sha256").update(buffer).digest("hex");
  const order = resourceNames.filter((r) => byResource.has(r));
  const results: WorkbookSheetResult[] = [];
  const passed: CheckedRows[] = [];
  let failed: { checked: CheckedRows; sheet: string } | null = null;

  try {
    await ctx.db.transaction(async (tx) => {
      await lockDraft(tx, input.versionId, stamp);
      for (const resource of order) {
        const sheet = byResource.get(resource)!;
        const state = await loadDraftState(tx, input.versionId);
        const checked = await checkRows(ctx, version, {
          resource,
          filename: `${input.filename}, sheet ${sheet.name}`,
          options: input.options,
          state,
          source: sheetSource(sheet),
        });
        if (checked.report.errors > 0) {
          failed = { checked, sheet: sheet.name };
          throw new Rejected();
        }
        const stored = await writeChecked(
          ctx,
          tx,
          input.versionId,
          checked,
          { workbook: input.filename, workbookSha256: sha256, sheet: sheet.name },
          input.userId,
        );
        results.push({ sheet: sheet.name, status: "stored", ...uploadResultOf(checked, stored) });
        passed.push(checked);
      }
    });
  } catch (error) {
    if (!(error instanceof Rejected)) throw error;
  }

  const base = { filename: input.filename, sha256, byteSize: buffer.length };
  if (!failed) {
    return {
      ...base,
      accepted: true,
      errors: 0,
      warnings: results.reduce((n, r) => n + r.warnings, 0),
      sheets: results,
      notChecked: [],
    };
  }
  const { checked, sheet }: { checked: CheckedRows; sheet: string } = failed as { checked: CheckedRows; sheet: string };
  const reportId = await saveRejection(ctx, input.versionId, checked);
  // The sheets checked before it were valid but went back with the transaction: their reports say so.
  const rolledBack: WorkbookSheetResult[] = [];
  for (const [i, c] of passed.entries()) {
    c.problems.push({
      severity: "warning",
      file: c.filename,
      row: null,
      column: null,
      value: null,
      message: `this sheet is valid but was not stored, because sheet ${sheet} has errors: a workbook is stored whole or not at all`,
    });
    c.report.warnings += 1;
    const id = await saveRejection(ctx, input.versionId, c);
    rolledBack.push({
      ...uploadResultOf(c, { reportId: id, uploadId: null, recomputed: null }),
      sheet: results[i]!.sheet,
      status: "not stored",
    });
  }
  const at = order.indexOf(checked.resource);
  return {
    ...base,
    accepted: false,
    errors: checked.report.errors,
    warnings: checked.report.warnings + rolledBack.reduce((n, r) => n + r.warnings, 0),
    sheets: [...rolledBack, { sheet, status: "rejected", ...uploadResultOf(checked, { reportId, uploadId: null, recomputed: null }) }],
    notChecked: order.slice(at + 1).map((r) => ({ sheet: byResource.get(r)!.name, resource: r })),
  };
}
