import ExcelJS from "exceljs";
import JSZip from "jszip";
import { Readable } from "node:stream";
import { HttpProblem } from "@/server/errors";
import type { SheetValue } from "./sheet-cells";

/** One row of a sheet: its line number in the sheet (1-based, as the spreadsheet shows it) and its cells. */
interface SheetRow {
  line: number;
  cells: SheetValue[];
}

/** A cell whose value came from a formula: the value read is the one the spreadsheet last calculated. */
interface FormulaCell {
  line: number;
  column: number;
  address: string;
  value: SheetValue;
}

export interface SheetRead {
  name: string;
  rows: SheetRow[];
  formulas: FormulaCell[];
  /** Formula cells counted, listed or not. */
  formulaCount: number;
}

/** First bytes of a zip (every .xlsx) and of an OLE compound file (an encrypted .xlsx, or an old .xls). */
const zipMagic = Buffer.from([0x50, 0x4b, 0x03, 0x04]);
const oleMagic = Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1]);

const badWorkbook = (detail: string, message: string) =>
  new HttpProblem(400, "Bad request", detail, { errors: [{ field: "file", message }] });

/** Keeps formula cells listed per sheet up to this many (all are counted). */
const MAX_FORMULAS_LISTED = 1000;

/** The parts of ExcelJS's streaming reader that name sheets (not in its typings). */
interface NamingInternals {
  model: { sheets?: { name: string; rId: string }[] };
  properties?: { model?: { date1904?: boolean } };
}

const xmlText = (s: string) =>
  s.replace(/&(amp|lt|gt|quot|apos|#\d+|#x[0-9a-f]+);/gi, (_, e: string) => {
    const named: Record<string, string> = { amp: "&", lt: "<", gt: ">", quot: '"', apos: "'" };
    if (e[0] !== "#") return named[e.toLowerCase()]!;
    return String.fromCodePoint(e[1] === "x" || e[1] === "X" ? parseInt(e.slice(2), 16) : parseInt(e.slice(1), 10));
  });
const attribute = (tag: string, name: string) => new RegExp(`\\s${name}="([^"]*)"`).exec(tag)?.[1];

/** Sheet names by worksheet part number (xl/worksheets/sheet<N>.xml), from xl/workbook.xml and its relationships. */
async function sheetNamesByPart(buffer: Buffer): Promise<Map<string, string>> {
  const zip = await JSZip.loadAsync(buffer);
  const workbook = await zip.file("xl/workbook.xml")?.async("string");
  const rels = await zip.file("xl/_rels/workbook.xml.rels")?.async("string");
  const names = new Map<string, string>();
  if (!workbook || !rels) return names;
  const targets = new Map<string, string>();
  for (const tag of rels.match(/<Relationship\b[^>]*>/g) ?? []) {
    const id = attribute(tag, "Id");
    const target = attribute(tag, "Target");
    if (id && target) targets.set(id, target);
  }
  for (const tag of workbook.match(/<sheet\b[^>]*>/g) ?? []) {
    const name = attribute(tag, "name");
    const rid = attribute(tag, "r:id");
    const part = rid ? /worksheets\/sheet(\d+)\.xml$/.exec(targets.get(rid) ?? "")?.[1] : undefined;
    if (name !== undefined && part) names.set(part, xmlText(name));
  }
  return names;
}

/** The parts ExcelJS's streaming reader must have read before a worksheet to parse it in place. */
const partsFirst = [
  "[Content_Types].xml",
  "_rels/.rels",
  "xl/workbook.xml",
  "xl/_rels/workbook.xml.rels",
  "xl/sharedStrings.xml",
  "xl/styles.xml",
];
const emptySharedStrings =
  '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<sst xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main" count="0" uniqueCount="0"/>';

/**
 * The workbook's zip with the parts a worksheet depends on first, stored uncompressed. ExcelJS's streaming reader
 * parks a worksheet that comes before the shared strings or the workbook's relationships in a temporary file, and
 * while it does the zip stream runs on and parts after it can be lost (some writers, ExcelJS among them, put the
 * worksheets first): a sheet then goes missing or its text cells read as objects. In this order every worksheet
 * is parsed as it streams. A workbook without shared strings (inline strings only) gets an empty table for the same
 * reason.
 */
async function readerOrder(buffer: Buffer): Promise<Buffer> {
  const zip = await JSZip.loadAsync(buffer);
  const names = Object.keys(zip.files).filter((n) => !zip.files[n]!.dir);
  const out = new JSZip();
  for (const name of [...partsFirst, ...names.filter((n) => !partsFirst.includes(n))]) {
    const file = zip.file(name);
    if (file) out.file(name, await file.async("nodebuffer"));
    else if (name === "xl/sharedStrings.xml") out.file(name, emptySharedStrings);
  }
  return out.generateAsync({ type: "nodebuffer", compression: "STORE" });
}

type RawCellValue = ExcelJS.CellValue | undefined;

/** A cell value as ExcelJS reads it, reduced to what a sheet holds: a formula gives its cached result. */
function plainValue(value: RawCellValue): { value: SheetValue; formula: boolean } {
  if (value === null || value === undefined) return { value: null, formula: false };
  if (typeof value === "string" || typeof value === "number" || typeof value === "boolean") return { value, formula: false };
  if (value instanceof Date) return { value, formula: false };
  if (typeof value === "object") {
    if ("formula" in value || "sharedFormula" in value) {
      const result = (value as { result?: unknown }).result;
      const inner = plainValue(result as RawCellValue);
      return { value: inner.value, formula: true };
    }
    if ("richText" in value) return { value: value.richText.map((r) => r.text).join(""), formula: false };
    if ("text" in value && "hyperlink" in value) return { value: String(value.text), formula: false };
    if ("error" in value) return { value: String(value.error), formula: false };
  }
  return { value: String(value), formula: false };
}

/**
 * Reads every sheet of an .xlsx workbook with ExcelJS's streaming reader: each row's cells as typed values (text,
 * number, boolean, date), empty rows left out, formula cells read as their cached values and listed. Files that are
 * no workbook get a 400 that says what the file is and what to do.
 */
export async function readWorkbook(buffer: Buffer): Promise<SheetRead[]> {
  if (buffer.length === 0) throw badWorkbook("The file is empty.", "empty file: expected an .xlsx workbook");
  if (buffer.subarray(0, 8).equals(oleMagic)) {
    throw badWorkbook(
      "The workbook is password-protected (encrypted) or an old .xls file. Remove the password, or save it as an Excel Workbook (.xlsx), and upload it again.",
      "encrypted workbook or .xls, not .xlsx",
    );
  }
  if (!buffer.subarray(0, 4).equals(zipMagic)) {
    throw badWorkbook(
      "The file is not an .xlsx workbook (an .xlsx file is a zip archive, and this one is not). Save it as an Excel Workbook (.xlsx), or upload each sheet as CSV.",
      "not an .xlsx workbook",
    );
  }
  const sheets: SheetRead[] = [];
  try {
    const reader = new ExcelJS.stream.xlsx.WorkbookReader(Readable.from([await readerOrder(buffer)]), {
      sharedStrings: "cache",
      hyperlinks: "ignore",
      styles: "cache",
      worksheets: "emit",
      entries: "ignore",
    });
    // ExcelJS names a sheet from xl/workbook.xml; some writers (ExcelJS itself) put that part after the sheets, so
    // a sheet read first is named at the end, from the workbook's relationships, by its part number.
    const internals = reader as unknown as NamingInternals;
    internals.model ??= {};
    internals.properties ??= {};
    const unnamed = new Map<SheetRead, string>();
    for await (const worksheet of reader) {
      const w = worksheet as unknown as { name: string; id: string | number };
      const sheet: SheetRead = { name: w.name, rows: [], formulas: [], formulaCount: 0 };
      if (!internals.model.sheets) unnamed.set(sheet, String(w.id));
      for await (const row of worksheet) {
        const cells: SheetValue[] = [];
        let filled = false;
        row.eachCell({ includeEmpty: false }, (cell, column) => {
          const { value, formula } = plainValue(cell.value);
          while (cells.length < column - 1) cells.push(null);
          cells[column - 1] = typeof value === "string" && value.trim() === "" ? null : value;
          if (cells[column - 1] !== null) filled = true;
          if (formula) {
            sheet.formulaCount += 1;
            if (sheet.formulas.length < MAX_FORMULAS_LISTED)
              sheet.formulas.push({ line: row.number, column, address: cell.address, value });
          }
        });
        if (filled) sheet.rows.push({ line: row.number, cells });
      }
      sheets.push(sheet);
    }
    if (unnamed.size > 0 || sheets.length === 0) {
      // The streaming reader missed xl/workbook.xml (it comes last in some files): read the names from the zip's
      // directory, and refuse a workbook of which a sheet was not read rather than lose its rows.
      const parts = await sheetNamesByPart(buffer);
      for (const [sheet, part] of unnamed) sheet.name = parts.get(part) ?? sheet.name;
      if (parts.size > sheets.length)
        throw badWorkbook(
          `The workbook lists ${parts.size} sheets but ${sheets.length} could be read. Save it again as an Excel Workbook (.xlsx).`,
          "sheets could not be read",
        );
    }
  } catch (error) {
    if (error instanceof HttpProblem) throw error;
    throw badWorkbook(
      `The file is a zip archive but cannot be read as an .xlsx workbook (${(error as Error).message}). Save it again as an Excel Workbook (.xlsx).`,
      "unreadable workbook",
    );
  }
  if (sheets.length === 0)
    throw badWorkbook("The workbook holds no sheets. Save it as an Excel Workbook (.xlsx) with one sheet per resource.", "no sheets");
  return sheets;
}
