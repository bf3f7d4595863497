import type { Database } from "@/db/client";
import type { UploadOptions } from "@/schemas/curation";
import type { SoilTestScheme } from "@/schemas/soil-test-schemes";
import type { DictionaryMeasure, ResourceName } from "@/schemas/table-schema";
import type { DraftState } from "./draft-state";
import type { Cell } from "./field-values";
import type { PlotOutcomeRequest } from "./plot-outcomes";
import type { Reporter } from "./report";
import type { Tx } from "./write-rows";

/** A parsed row: field name → typed value (null when missing or when the field has no column). */
export type RowValues = Record<string, Cell>;

export interface IngestContext {
  state: DraftState;
  options: UploadOptions;
  report: Reporter;
  versionId: string;
  /** Rows will go in by COPY (PGlite), so a resource may keep them as CSV text (RowBuffer). */
  bulkCopy: boolean;
  /** Soil-test interpretation schemes registered in the version's data dictionary (beside the built-in ones). */
  soilTestSchemes: SoilTestScheme[];
  /** Measures the version's data dictionary adds; plots files carry their values in fields of the same names. */
  measures: DictionaryMeasure[];
  /** The unit the data dictionary states for stand_count (plants/ac, or plants/10 ft row to convert). */
  standUnit: string | undefined;
}

/** Which site-years' responses must be computed again after a write. */
export type Affected = { siteYearCodes: string[] } | "all";

/**
 * One resource's part of an upload: it checks each parsed row against the domain rules, keeps the canonical rows,
 * runs the whole-file rules at the end, and writes the rows inside the upload's transaction.
 */
export interface ResourceIngest {
  resource: ResourceName;
  row(values: RowValues, row: number): void;
  /**
   * Merge mode, after the file is read and before finish(): fold in the draft's rows that the file's keys touch but do
   * not replace, so the whole-file rules judge the version as the merge will leave it.
   */
  mergeExisting?(tx: Tx): Promise<void>;
  finish(): void;
  /** Rows the file contributes (for the upload record). */
  count(): number;
  write(database: Database, tx: Tx): Promise<Affected>;
  /** Plots files: the plots with a yield per site-year, so responses can be computed from the file itself. */
  plotOutcomeRequest?(): PlotOutcomeRequest;
}

export const str = (v: Cell | undefined): string | null => (v === null || v === undefined ? null : String(v));
export const num = (v: Cell | undefined): number | null => (typeof v === "number" ? v : null);
