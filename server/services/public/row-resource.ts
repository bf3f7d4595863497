import { sql, type SQL } from "drizzle-orm";
import type { AnyPgColumn } from "drizzle-orm/pg-core";
import type { z } from "zod";
import type { Db } from "@/db/client";
import type { YieldUnit } from "@/schemas/public";
import type { CsvColumn, CsvValue } from "@/server/csv";
import type { ResolvedVersion } from "@/server/services/trial-filter";
import { roundConverted } from "@/stats/precision";
import { cropStandards, kilogramsPerHectarePerBushelPerAcre, kilogramsPerHectareToBushelsPerAcre, type StandardCrop } from "@/stats/units";

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
  /**
   * The same rows as `readBatch`, encoded as JSON by the database: a JSON page is then one string from the database
   * to the socket, with no object per row on the way. Optional; pages fall back to `readBatch` + JSON.stringify.
   */
  readJsonPage?(db: Db, scope: RowScope<F>, afterId: number, limit: number): Promise<EncodedPage>;
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
 * `convert` gives a value as it is reported, rounded by the one rule for converted values (stats/precision.ts; kg/ha
 * too, as a yield given in bu/ac was converted on the way in); `scale` is the unrounded factor, for quantities in the
 * square of the unit (an MSE) and other arithmetic.
 */
export function yieldConverter(crop: string, unit: YieldUnit): { unit: YieldUnit; convert: (kgHa: number) => number; scale: number } {
  if (unit === "kg/ha" || !isStandardCrop(crop)) return { unit: "kg/ha", convert: (v) => roundConverted(v), scale: 1 };
  const lbPerBu = cropStandards[crop].poundsPerBushel;
  return {
    unit,
    convert: (v) => roundConverted(kilogramsPerHectareToBushelsPerAcre(v, lbPerBu)),
    scale: kilogramsPerHectareToBushelsPerAcre(1, lbPerBu),
  };
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

/** A JSON page as the database wrote it: the items array's text, how many rows it read (up to limit + 1) and the last item's id. */
export interface EncodedPage {
  itemsJson: string;
  read: number;
  lastId: number | null;
}

/**
 * Run a SELECT of up to limit + 1 rows whose columns are named as the row's fields, and encode the first `limit` of
 * them as a JSON array in the database (row_to_json prints doubles in their shortest exact form, as JSON.stringify
 * does, and dates as ISO strings). The extra row only says whether there is a next page.
 */
export async function encodedPage(db: Db, rows: SQL, limit: number): Promise<EncodedPage> {
  const result = await db.execute(sql`
    SELECT count(*)::int AS read,
           max(p.id) FILTER (WHERE p.rn <= ${limit})::float8 AS last_id,
           coalesce(string_agg(p.j, ',' ORDER BY p.id) FILTER (WHERE p.rn <= ${limit}), '') AS items
    FROM (SELECT o.id, row_number() OVER (ORDER BY o.id) AS rn, row_to_json(o)::text AS j FROM (${rows}) o) p`);
  const row = (result as unknown as { rows: { read: number; last_id: number | null; items: string }[] }).rows[0]!;
  return { itemsJson: `[${row.items}]`, read: Number(row.read), lastId: row.last_id === null ? null : Number(row.last_id) };
}

const literal = (x: number) => sql.raw(`${x}::float8`);
const standardCrops = Object.keys(cropStandards) as StandardCrop[];

/**
 * The SQL twin of `roundConverted` (stats/precision.ts): PostgreSQL casts float8 to numeric through printf("%.15g"),
 * 15 significant digits with ties to even, and row_to_json prints the numeric as it is.
 */
const roundConvertedSql = (value: SQL) => sql`(${value})::numeric`;

/**
 * The SQL twins of `provenanceLookup` and `yieldConverter`, for rows encoded by the database: the same division by
 * the same double, rounded by the same rule, so the numbers are the ones the TypeScript path gives.
 */
export function yieldConverterSql(scope: RowScope<unknown>, versionId: AnyPgColumn, crop: AnyPgColumn) {
  const byVersion = (pick: (v: RowScope<unknown>["versions"][number]) => string) =>
    scope.versions.length === 0
      ? sql`''::text`
      : sql`(CASE ${versionId} ${sql.join(
          scope.versions.map((v) => sql`WHEN ${v.versionId}::uuid THEN ${pick(v)}::text`),
          sql` `,
        )} ELSE '' END)`;
  const perCrop = (value: (c: StandardCrop) => SQL, otherwise: SQL) =>
    sql`(CASE ${crop} ${sql.join(
      standardCrops.map((c) => sql`WHEN ${c}::text THEN ${value(c)}`),
      sql` `,
    )} ELSE ${otherwise} END)`;
  const toBushels = scope.units === "bu/ac";
  return {
    provenance: { dataset: byVersion((v) => v.datasetSlug), version: byVersion((v) => v.semver) },
    yieldUnit: toBushels ? perCrop(() => sql`'bu/ac'::text`, sql`'kg/ha'::text`) : sql`'kg/ha'::text`,
    moistureBasis: perCrop((c) => literal(cropStandards[c].standardMoisturePercent), sql`NULL::float8`),
    convert: (kgHa: AnyPgColumn) =>
      roundConvertedSql(
        toBushels
          ? perCrop((c) => sql`${kgHa} / ${literal(kilogramsPerHectarePerBushelPerAcre(cropStandards[c].poundsPerBushel))}`, sql`${kgHa}`)
          : sql`${kgHa}`,
      ),
  };
}
