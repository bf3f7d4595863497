import type { TableSchemaField } from "@/schemas/table-schema";

/** A cell of a workbook as the reader gives it: text, a number, a boolean, a date, or empty. */
export type SheetValue = string | number | boolean | Date | null;

const DAY_MS = 86_400_000;
/** Day 0 of Excel's 1900 date system as its serial numbers count it (the 1900 leap-year bug included). */
const EXCEL_EPOCH_MS = Date.UTC(1899, 11, 30);
/** 9999-12-31, the last date a spreadsheet can hold. */
const LAST_SERIAL = 2_958_465;

/** A date cell as YYYY-MM-DD, or with its time when it has one (spreadsheets keep dates as UTC midnights). */
function dateText(d: Date): string {
  const iso = d.toISOString();
  return iso.endsWith("T00:00:00.000Z") ? iso.slice(0, 10) : iso.replace(".000Z", "").replace("Z", "");
}

/**
 * The text of a workbook cell for a field of the given type, so the CSV path's parsers check it. A date field takes
 * a date cell, and also a whole number, read as a spreadsheet date serial (45432 is 2024-05-20): a planting date
 * whose cell lost its date format is still that date.
 */
export function cellText(value: SheetValue, type: TableSchemaField["type"]): string {
  if (value === null) return "";
  if (typeof value === "string") return value;
  if (value instanceof Date) return Number.isNaN(value.getTime()) ? "" : dateText(value);
  if (typeof value === "boolean") return value ? "true" : "false";
  if (type === "date" && Number.isInteger(value) && value > 0 && value <= LAST_SERIAL) {
    return dateText(new Date(EXCEL_EPOCH_MS + value * DAY_MS));
  }
  return String(value);
}
