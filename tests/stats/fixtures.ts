/**
 * Loading the reference fixtures in tests/fixtures/reference (sources in its README.md) and comparing numbers
 * relatively.
 */
import { readFileSync } from "node:fs";
import path from "node:path";
import Papa from "papaparse";
import { expect } from "vitest";

/** The repository's own copy of the published reference values, guarded by its SHA256SUMS. */
export const referenceDirectory = path.resolve(__dirname, "../fixtures/reference");

/** Reads a JSON fixture (e.g. "meta_normand1999_md_results.json"). */
export function loadJsonFixture<T = any>(name: string): T {
  return JSON.parse(readFileSync(path.join(referenceDirectory, name), "utf8")) as T;
}

/** Reads a raw text fixture (e.g. a NIST .dat file). */
export function loadTextFixture(name: string): string {
  return readFileSync(path.join(referenceDirectory, name), "utf8");
}

/** Reads a CSV fixture: drops the leading `#` comment lines, then parses header + rows with papaparse. */
export function loadCsvFixture(name: string): Record<string, string>[] {
  const text = loadTextFixture(name)
    .split(/\r?\n/)
    .filter((line) => !line.startsWith("#"))
    .join("\n");
  const parsed = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true, dynamicTyping: false });
  if (parsed.errors.length > 0)
    throw new Error(`${name}: ${parsed.errors.map((error) => `row ${error.row}: ${error.message}`).join("; ")}`);
  return parsed.data;
}

/** Numeric column of CSV rows, failing loudly on a non-number. */
export function numericColumn(rows: Record<string, string>[], column: string): number[] {
  return rows.map((row, index) => {
    const value = Number(row[column]);
    if (!Number.isFinite(value)) throw new Error(`row ${index + 1}, column "${column}": "${row[column]}" is not a number`);
    return value;
  });
}

function relativeError(actual: number, expected: number): number {
  if (expected === 0) return Math.abs(actual);
  return Math.abs(actual - expected) / Math.abs(expected);
}

/** Asserts |actual − expected|/|expected| <= tolerance (absolute when expected is 0), naming the value on failure. */
export function expectClose(
  actual: number | null | undefined,
  expected: number | null | undefined,
  tolerance: number,
  label: string,
): void {
  if (expected === null || expected === undefined) {
    expect(actual ?? null, `${label}: expected no value`).toBeNull();
    return;
  }
  expect(actual, `${label}: missing`).toBeTypeOf("number");
  const error = relativeError(actual as number, expected);
  expect(error, `${label}: got ${actual}, expected ${expected} (relative error ${error.toExponential(2)})`).toBeLessThanOrEqual(tolerance);
}

/** Log relative error (number of correct significant digits), capped at 15. */
export function logRelativeError(actual: number, expected: number): number {
  const error = relativeError(actual, expected);
  return error === 0 ? 15 : Math.min(15, -Math.log10(error));
}

/** Closed-form values (FE, DL, ANOVA): 1e-9 relative. */
export const CLOSED_FORM = 1e-9;
/** Iterative values (REML, ML, PM, EB): 1e-7 relative. */
export const ITERATIVE = 1e-7;
