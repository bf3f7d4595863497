import type { Response } from "express";
import Papa from "papaparse";

/**
 * The one CSV writer of every file Plotbank serves: resource CSVs and the CSVs inside datapackage.zip, the rows API
 * streams, validation reports and the meta-analysis site-year rows. RFC 4180 as papaparse writes it (comma, CRLF
 * after every record including the last, double quotes doubled, quotes only where a cell needs them), UTF-8 without
 * a byte-order mark.
 *
 * Formula guard, the one policy for every file: a spreadsheet runs a cell that starts with = + - @ (or a tab or CR)
 * as a formula, so a text cell that starts so is written with a leading ' and read as text. Only text is guarded:
 * numbers stay numbers, so a negative response is still -3.2. Where the guard changes a published cell the Data
 * Package says so on the field (see `guardedColumns`), and its hashes and sizes describe the guarded bytes served.
 */
const formulaStart = /^[=+\-@\t\r]/;
export const formulaGuardNote =
  "Cells that begin with =, +, -, @, a tab or a carriage return are written with a leading apostrophe (') so that " +
  "spreadsheets read them as text, not as formulas; the stored value is the cell without that first apostrophe.";

export type CsvValue = string | number | boolean | null | undefined;

const newline = "\r\n";

/**
 * Writes the rows of one CSV file, in as many pieces as the caller likes (streams call `rows` once per batch).
 * `text` marks the columns whose values are text, for callers whose values all arrive as strings (the canonical
 * resource CSVs read as PostgreSQL text); without it every string value is text and every number a number.
 */
export class CsvWriter {
  /** Header names of the columns in which the guard changed at least one cell. */
  readonly guardedColumns = new Set<string>();

  constructor(
    readonly header: readonly string[],
    private readonly text?: readonly boolean[],
  ) {}

  headerLine(): string {
    return Papa.unparse([this.header.map(String)], { newline, escapeFormulae: false }) + newline;
  }

  rows(rows: readonly (readonly CsvValue[])[]): string {
    if (rows.length === 0) return "";
    const cells = rows.map((row) => row.map((value, i) => this.cell(value, i)));
    return Papa.unparse(cells, { newline, escapeFormulae: false }) + newline;
  }

  private cell(value: CsvValue, column: number): string {
    if (value === null || value === undefined) return "";
    if (typeof value === "number") return Number.isFinite(value) ? String(value) : "";
    if (typeof value === "boolean") return value ? "true" : "false";
    if ((this.text?.[column] ?? true) && formulaStart.test(value)) {
      this.guardedColumns.add(this.header[column] ?? String(column));
      return `'${value}`;
    }
    return value;
  }
}

/** A whole small CSV file (header and rows) in one string. */
export function csvFile(header: readonly string[], rows: readonly (readonly CsvValue[])[]): string {
  const writer = new CsvWriter(header);
  return writer.headerLine() + writer.rows(rows);
}

/** One CSV column: its header and how to read it from a row. */
export interface CsvColumn<Row> {
  name: string;
  value: (row: Row) => CsvValue;
}

/**
 * A writer that waits while the socket's buffer is full, so a slow client never makes the server hold rows. It keeps
 * one listener per event for the whole response: with gzip, "drain" listeners land on the compressor, where
 * removing them again does not reach, so a listener per wait would pile up.
 */
function writerFor(res: Response): (chunk: string) => Promise<void> {
  let wake: (() => void) | null = null;
  let failure: Error | null = null;
  const resume = () => {
    const w = wake;
    wake = null;
    w?.();
  };
  res.on("drain", resume);
  res.on("close", resume);
  res.on("error", (error: Error) => {
    failure = error;
    resume();
  });
  return (chunk) => {
    if (failure) return Promise.reject(failure);
    if (res.write(chunk) || res.destroyed) return Promise.resolve();
    return new Promise<void>((resolve, reject) => {
      wake = () => (failure ? reject(failure) : resolve());
    });
  };
}

/**
 * Stream batches of rows as CSV, writing each batch as it arrives: memory stays at one batch whatever the size.
 * Stops early when the client goes away. Returns the number of rows written.
 */
export async function streamCsv<Row>(res: Response, columns: readonly CsvColumn<Row>[], batches: AsyncIterable<Row[]>): Promise<number> {
  let rows = 0;
  const write = writerFor(res);
  const csv = new CsvWriter(columns.map((c) => c.name));
  await write(csv.headerLine());
  for await (const batch of batches) {
    if (res.destroyed) break;
    rows += batch.length;
    await write(csv.rows(batch.map((row) => columns.map((c) => c.value(row)))));
  }
  res.end();
  return rows;
}
