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
  await write(csvLine(columns.map((c) => c.name)));
  for await (const batch of batches) {
    if (res.destroyed) break;
    let chunk = "";
    for (const row of batch) chunk += csvLine(columns.map((c) => c.value(row)));
    rows += batch.length;
    await write(chunk);
  }
  res.end();
  return rows;
}
