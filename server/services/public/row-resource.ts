import type { z } from "zod";
import type { Db } from "@/db/client";
import type { YieldUnit } from "@/schemas/public";
import type { CsvColumn, CsvValue } from "@/server/csv";
import type { ResolvedVersion } from "@/server/services/trial-filter";
import { cropStandards, kilogramsPerHectareToBushelsPerAcre, type StandardCrop } from "@/stats/units";

/** What a read is about: the versions it reads, its filters and (where yields appear) the unit asked for. */
export interface RowScope<F> {
  versions: ResolvedVersion[];
  filters: F;
  units: YieldUnit;
}

/**
 * A readable resource: rows in id order after a cursor, and the CSV columns they are written with. Both the JSON
 * pages and the CSV stream read through `readBatch`, so they can never disagree.
 */
export interface RowResource<Row extends { id: number }, F> {
  name: string;
  /** The row's contract schema: JSON pages are its items, and the CSV's Table Schema is derived from it. */
  row: z.ZodObject;
  readBatch(db: Db, scope: RowScope<F>, afterId: number, limit: number): Promise<Row[]>;
  csvColumns: readonly CsvColumn<Row>[];
  /** Table Schema facts of CSV columns that are not a field of the row (flattened ones). */
  csvFields?: Record<string, { type: "string" | "number" | "integer"; description: string }>;
}

export function versionIdsOf(scope: RowScope<unknown>): string[] {
  return scope.versions.map((v) => v.versionId);
}

/** Each row says which dataset and version it is from. */
export function provenanceLookup(scope: RowScope<unknown>): (versionId: string) => { dataset: string; version: string } {
  const byId = new Map(scope.versions.map((v) => [v.versionId, { dataset: v.datasetSlug, version: v.semver }]));
  return (versionId) => byId.get(versionId) ?? { dataset: "", version: "" };
}

const isStandardCrop = (crop: string): crop is StandardCrop => crop in cropStandards;

/** The standard moisture (% wet basis) a crop's stored yields are expressed at. */
export function moistureBasisOf(crop: string): number | null {
  return isStandardCrop(crop) ? cropStandards[crop].standardMoisturePercent : null;
}

/**
 * How a crop's yield-like quantities (yields, differences, SEs, LSDs) come out of canonical kg/ha in the unit asked
 * for. bu/ac needs the crop's test weight; a crop without one stays in kg/ha, and its rows say so in `yieldUnit`.
 */
export function yieldConverter(crop: string, unit: YieldUnit): { unit: YieldUnit; convert: (kgHa: number) => number } {
  if (unit === "kg/ha" || !isStandardCrop(crop)) return { unit: "kg/ha", convert: (v) => v };
  const lbPerBu = cropStandards[crop].poundsPerBushel;
  return { unit, convert: (v) => kilogramsPerHectareToBushelsPerAcre(v, lbPerBu) };
}

/** The same for a quantity that may be missing. */
export const orNull = (convert: (v: number) => number) => (v: number | null) => (v === null ? null : convert(v));

/** CSV columns named after the row's own fields, lists joined by ";"; `replace` swaps a field for other columns. */
export function columnsFromFields<Row extends object>(
  fields: readonly (keyof Row & string)[],
  replace: Partial<Record<keyof Row & string, CsvColumn<Row>[]>> = {},
): CsvColumn<Row>[] {
  return fields.flatMap(
    (name) =>
      replace[name] ?? [
        {
          name,
          value: (row: Row): CsvValue => {
            const v = row[name] as unknown;
            return Array.isArray(v) ? v.join(";") : (v as CsvValue);
          },
        },
      ],
  );
}
