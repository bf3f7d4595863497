import { and, eq, sql } from "drizzle-orm";
import { customValues } from "@/db/schema";
import type { ResourceName, TableSchemaResource } from "@/schemas/table-schema";
import { resourceQueries } from "@/server/services/curation/resource-csv";
import type { Cell } from "./field-values";
import type { RowValues } from "./resource-ingest";
import type { Tx } from "./write-rows";

/**
 * Fields a curator adds to a version's data dictionary have no column of their own: their values live in
 * custom_values, one row per resource row, keyed by the resource's primary-key values. The key is written the way
 * PostgreSQL prints those values, so an export can find a row's values again with `customColumnSql`.
 */

/** The primary key of each resource (it cannot change in a dictionary edit, so it is fixed here). */
const primaryKeys: Record<ResourceName, string[]> = {
  sites: ["site"],
  site_years: ["site_year"],
  soil_tests: ["site_year", "analyte"],
  treatments: ["treatment", "application"],
  plots: ["site_year", "plot"],
  summaries: ["site_year", "treatment"],
};

/** A curator's own field name, as the shared field schema allows it (snake_case or lower camelCase). */
export const customFieldName = /^[a-z][a-zA-Z0-9_]{0,63}$/;

export const isStoredField = (resource: ResourceName, name: string): boolean => name in resourceQueries[resource].columns;

/**
 * The fields of a resource's dictionary that Plotbank has no column for. Measures the dictionary adds to plots are
 * not among them: their values go to plots.other_measures, where the analyses read them.
 */
export function customFieldsOf(
  resource: ResourceName,
  schema: TableSchemaResource | undefined,
  measureNames: readonly string[] = [],
): string[] {
  return (schema?.fields ?? [])
    .map((f) => f.name)
    .filter((name) => !isStoredField(resource, name) && !(resource === "plots" && measureNames.includes(name)));
}

const SEPARATOR = "\u001f";

/** The key of a parsed row, as `rowKeySql` prints the same row back from the tables. */
function rowKeyOf(resource: ResourceName, values: RowValues): string {
  return primaryKeys[resource].map((f) => (values[f] === null || values[f] === undefined ? "" : String(values[f]))).join(SEPARATOR);
}

/** SQL for a stored row's key; the treatments' application number is counted, as the export numbers it. */
function rowKeySql(resource: ResourceName): string {
  const columns = resourceQueries[resource].columns;
  const parts = primaryKeys[resource].map((f) =>
    resource === "treatments" && f === "application"
      ? "(SELECT count(*) FROM applications a2 WHERE a2.treatment_id = t.id AND a2.id <= a.id)::text"
      : `(${columns[f]})::text`,
  );
  return parts.length === 1 ? parts[0]! : `concat_ws(chr(31), ${parts.join(", ")})`;
}

const alias: Record<ResourceName, string> = { sites: "s", site_years: "sy", soil_tests: "st", treatments: "t", plots: "p", summaries: "m" };

/** The SQL expression reading one custom field of the resource's rows as text (null when the row has no value). */
export function customColumnSql(resource: ResourceName, field: string): string {
  if (!customFieldName.test(field)) throw new RangeError(`customColumnSql: "${field}" is not a custom field name`);
  return `(SELECT cv."values" ->> '${field}' FROM custom_values cv WHERE cv.version_id = ${alias[resource]}.version_id AND cv.resource = '${resource}' AND cv.row_key = ${rowKeySql(resource)})`;
}

/** The custom values of one upload, kept per row key until the upload's transaction writes them. */
export class CustomValueBuffer {
  private readonly rows = new Map<string, Record<string, Cell>>();

  constructor(
    readonly resource: ResourceName,
    readonly fields: readonly string[],
  ) {}

  add(values: RowValues): void {
    if (this.fields.length === 0) return;
    const own: Record<string, Cell> = {};
    for (const f of this.fields) if (values[f] !== null && values[f] !== undefined) own[f] = values[f]!;
    this.rows.set(rowKeyOf(this.resource, values), own);
  }

  /** Replace mode drops the resource's earlier values; merge mode replaces those of the rows in the file. */
  async write(tx: Tx, versionId: string, mode: "merge" | "replace"): Promise<void> {
    if (mode === "replace")
      await tx.delete(customValues).where(and(eq(customValues.versionId, versionId), eq(customValues.resource, this.resource)));
    const entries = [...this.rows];
    for (let i = 0; i < entries.length; i += 1000) {
      await tx
        .insert(customValues)
        .values(entries.slice(i, i + 1000).map(([rowKey, values]) => ({ versionId, resource: this.resource, rowKey, values })))
        .onConflictDoUpdate({
          target: [customValues.versionId, customValues.resource, customValues.rowKey],
          set: { values: sql`excluded.values` },
        });
    }
  }
}

/** A renamed custom field: its values move to the new name. */
export async function renameCustomValues(tx: Tx, versionId: string, resource: ResourceName, from: string, to: string): Promise<void> {
  await tx.execute(
    sql`UPDATE custom_values SET "values" = ("values" - ${from}::text) || jsonb_build_object(${to}::text, "values" -> ${from}::text)
        WHERE version_id = ${versionId} AND resource = ${resource} AND "values" ? ${from}::text`,
  );
}

/** A removed custom field: its values go with it. */
export async function dropCustomValues(tx: Tx, versionId: string, resource: ResourceName, field: string): Promise<void> {
  await tx.execute(
    sql`UPDATE custom_values SET "values" = "values" - ${field}::text WHERE version_id = ${versionId} AND resource = ${resource} AND "values" ? ${field}::text`,
  );
}
