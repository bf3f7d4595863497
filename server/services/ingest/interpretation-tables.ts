import { soilTestClasses, type SoilTestClass } from "@/constants/vocabulary";

/**
 * Soil-test interpretation tables the validator knows by name. A soil-test row that names one of them in its
 * `interpretation` column has its class checked against its value (or derived when the class is blank).
 *
 * "tallgrass-illustrative": illustrative thresholds, common practice, no source. They are invented round numbers
 * in the usual shape of such tables, for the demo region only; they are not a recommendation for any real field.
 */
export interface InterpretationTable {
  name: string;
  title: string;
  note: string;
  /** analyte → extractant → upper bounds (ppm, exclusive) of very_low, low, optimum, high; above is very_high. */
  bounds: Record<string, Record<string, [number, number, number, number]>>;
}

export const interpretationTables: Record<string, InterpretationTable> = {
  "tallgrass-illustrative": {
    name: "tallgrass-illustrative",
    title: "Tallgrass Basin illustrative soil-test interpretation",
    note: "illustrative thresholds, common practice, no source",
    bounds: {
      P: { "Bray-P1": [6, 11, 16, 21], "Mehlich-3": [9, 16, 21, 26] },
      K: { "ammonium-acetate": [91, 131, 171, 211] },
    },
  },
};

const order: readonly SoilTestClass[] = soilTestClasses;

/** The class of a value under a named table, or null when the table does not cover the analyte and extractant. */
export function interpretSoilTest(tableName: string, analyte: string, extractant: string | null, ppm: number): SoilTestClass | null {
  const bounds = interpretationTables[tableName]?.bounds[analyte]?.[extractant ?? ""];
  if (!bounds) return null;
  const i = bounds.findIndex((upper) => ppm < upper);
  return order[i === -1 ? 4 : i] ?? null;
}
