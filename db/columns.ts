import { getTableColumns, getTableName } from "drizzle-orm";
import type { PgTable } from "drizzle-orm/pg-core";

/**
 * Column lists for raw SQL (COPY, multi-row INSERT, INSERT … SELECT), taken from the Drizzle tables so that a column
 * added to db/schema reaches them without a second list to keep in step.
 */

/** A table's columns by property name, as db/schema declares them. */
export type ColumnKey<T extends PgTable> = keyof T["_"]["columns"] & string;

/** The columns an insert writes: every one but the generated identity (all our tables call it `id`). */
export type WritableKey<T extends PgTable> = Exclude<ColumnKey<T>, "id">;

/** One row to insert with a value for every writable column; the type fails to compile when a column is added. */
export type FullRow<T extends PgTable, V> = { [K in WritableKey<T>]: V };

/** The SQL name of a table. */
export const tableName = (table: PgTable): string => getTableName(table);

/** The SQL names of the named columns, in the order given. */
export function columnNames<T extends PgTable>(table: T, keys: readonly ColumnKey<T>[]): string[] {
  const columns = getTableColumns(table) as Record<string, { name: string }>;
  return keys.map((key) => {
    const column = columns[key];
    if (!column) throw new Error(`${getTableName(table)} has no column "${key}"`);
    return column.name;
  });
}

/** Every column but the generated identity, by property name, in db/schema's order. */
export function writableKeys<T extends PgTable>(table: T): WritableKey<T>[] {
  return Object.entries(getTableColumns(table))
    .filter(([, column]) => !(column.primary && (column as { generatedIdentity?: unknown }).generatedIdentity))
    .map(([key]) => key as WritableKey<T>);
}
