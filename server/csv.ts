import type { Response } from "express";

/**
 * CSV as RFC 4180 writes it (comma, CRLF, double quotes doubled), with one guard: a spreadsheet runs a cell that
 * starts with = + - @ (or a tab or CR) as a formula, so such text cells are prefixed with ' and read as text.
 * Numbers are written as numbers, so a negative response stays a number.
 */
const formulaStart = /^[=+\-@\t\r]/;
const needsQuotes = /[",\r\n]/;

export type CsvValue = string | number | boolean | null | undefined;

export function csvCell(value: CsvValue): string {
  if (value === null || value === undefined) return "";
  if (typeof value === "number") return Number.isFinite(value) ? String(value) : "";
  if (typeof value === "boolean") return value ? "true" : "false";
  const text = formulaStart.test(value) ? `'${value}` : value;
  return needsQuotes.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

export function csvLine(values: readonly CsvValue[]): string {
  return `${values.map(csvCell).join(",")}\r\n`;
}

/** One CSV column: its header and how to read it from a row. */
export interface CsvColumn<Row> {
  name: string;
  value: (row: Row) => CsvValue;
}

/** Write a chunk and wait while the socket's buffer is full, so a slow client never makes the server hold rows. */
function write(res: Response, chunk: string): Promise<void> {
  if (res.write(chunk)) return Promise.resolve();
  return new Promise((resolve, reject) => {
    const done = () => {
      res.off("drain", done);
      res.off("close", done);
      res.off("error", reject);
      resolve();
    };
    res.once("drain", done);
    res.once("close", done);
    res.once("error", reject);
  });
}

/**
 * Stream batches of rows as CSV, writing each batch as it arrives: memory stays at one batch whatever the size.
 * Stops early when the client goes away. Returns the number of rows written.
 */
export async function streamCsv<Row>(res: Response, columns: readonly CsvColumn<Row>[], batches: AsyncIterable<Row[]>): Promise<number> {
  let rows = 0;
  await write(res, csvLine(columns.map((c) => c.name)));
  for await (const batch of batches) {
    if (res.destroyed) break;
    let chunk = "";
    for (const row of batch) chunk += csvLine(columns.map((c) => c.value(row)));
    rows += batch.length;
    await write(res, chunk);
  }
  res.end();
  return rows;
}
