import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import type { Cell } from "@/server/services/ingest/field-values";
import { RowBuffer } from "@/server/services/ingest/write-rows";

describe("RowBuffer", () => {
  const rows: Cell[][] = Array.from({ length: 4_503 }, (_, i) => [
    "0b9f3c1e-1111-4222-8333-944445555666",
    i,
    i % 7 === 0 ? null : 3500.25 + i,
    i % 11 === 0 ? `plot "${i}", east\nedge` : String(i),
    i % 2 === 0,
  ]);

  it("keeps rows for COPY as CSV text in chunks of 2,000 lines that read back to the same values", () => {
    const buffer = new RowBuffer(true);
    for (const row of rows) buffer.push(row);
    expect(buffer.length).toBe(rows.length);
    const chunks = buffer.csvChunks();
    expect(chunks).toHaveLength(3);
    const parsed = Papa.parse<string[]>(chunks.join(""), { skipEmptyLines: true }).data;
    expect(parsed).toHaveLength(rows.length);
    // COPY's CSV: an empty unquoted field is NULL; strings are quoted with doubled quotes.
    expect(parsed[0]).toEqual(["0b9f3c1e-1111-4222-8333-944445555666", "0", "", 'plot "0", east\nedge', "true"]);
    expect(parsed[4_502]).toEqual(["0b9f3c1e-1111-4222-8333-944445555666", "4502", String(3500.25 + 4502), "4502", "true"]);
    expect(chunks[0]!.startsWith('"0b9f3c1e-1111-4222-8333-944445555666",0,,"plot ""0"", east\nedge",true\n')).toBe(true);
  });

  it("keeps rows as arrays for PostgreSQL's INSERT and refuses to hand CSV out as arrays", () => {
    const arrays = new RowBuffer(false);
    for (const row of rows.slice(0, 3)) arrays.push(row);
    expect(arrays.rowArrays()).toEqual(rows.slice(0, 3));
    const csv = new RowBuffer(true);
    csv.push(rows[0]!);
    expect(() => csv.rowArrays()).toThrow(/CSV/);
  });
});
