import { getTableColumns, getTableName, sql, type SQL } from "drizzle-orm";
import { getTableConfig, type PgTable } from "drizzle-orm/pg-core";
import { writableKeys } from "@/db/columns";
import { applications, customValues, plots, responses, sites, siteYears, soilTests, summaryMeans, treatments, versions } from "@/db/schema";
import type { Tx } from "@/server/services/ingest/write-rows";

/**
 * The tables holding a version's trial rows, each after the tables it refers to (the order a copy writes them in).
 * A version's uploads and validation reports are its own history and are not copied.
 */
export const versionRowTables: readonly PgTable[] = [
  sites,
  siteYears,
  soilTests,
  treatments,
  applications,
  plots,
  summaryMeans,
  responses,
  customValues,
];

/** A column that points at another version-scoped row: the copy points it at the row with the same code in the new version. */
interface Reference {
  column: string;
  table: string;
}

/** The references of a table to other trial rows, read from its foreign keys (the one to `versions` is set directly). */
export function versionReferences(table: PgTable): Reference[] {
  return getTableConfig(table)
    .foreignKeys.map((key) => key.reference())
    .filter((reference) => reference.foreignTable !== versions)
    .map((reference) => {
      const [column, ...more] = reference.columns;
      const target = reference.foreignTable;
      if (!column || more.length) throw new Error(`${getTableName(table)}: only single-column references can be copied`);
      if (!versionRowTables.includes(target))
        throw new Error(`${getTableName(table)}.${column.name} refers to ${getTableName(target)}, which a copy does not carry`);
      if (!("code" in getTableColumns(target))) throw new Error(`${getTableName(target)} has no code to match its rows across versions`);
      return { column: column.name, table: getTableName(target) };
    });
}

/** INSERT … SELECT of one table's rows of `from` into `to`: every column but the id, references remapped by code. */
function copyStatement(table: PgTable, from: string, to: string): SQL {
  const name = getTableName(table);
  const columns = getTableColumns(table);
  const references = new Map(versionReferences(table).map((reference) => [reference.column, reference]));
  const targets: SQL[] = [];
  const values: SQL[] = [];
  for (const key of writableKeys(table)) {
    const column = columns[key]!.name;
    targets.push(sql`${sql.identifier(column)}`);
    if (column === "version_id") values.push(sql`${to}`);
    else if (references.has(column)) values.push(sql`${sql.identifier(`new_${column}`)}.id`);
    else values.push(sql`o.${sql.identifier(column)}`);
  }
  const joins = [...references.values()].map(({ column, table: target }) => {
    const [into, old, fresh] = [sql.identifier(target), sql.identifier(`old_${column}`), sql.identifier(`new_${column}`)];
    return sql` JOIN ${into} ${old} ON ${old}.id = o.${sql.identifier(column)} JOIN ${into} ${fresh} ON ${fresh}.version_id = ${to} AND ${fresh}.code = ${old}.code`;
  });
  return sql`INSERT INTO ${sql.identifier(name)} (${sql.join(targets, sql`, `)})
    SELECT ${sql.join(values, sql`, `)} FROM ${sql.identifier(name)} o${sql.join(joins, sql``)}
    WHERE o.version_id = ${from} ORDER BY o.id`;
}

/**
 * Copies every row of one version into another, server-side with INSERT … SELECT. Ids are new; references are
 * remapped through the codes (site, site-year, treatment), which are unique within a version. The column lists come
 * from db/schema, so a new column is copied without touching this file; rows keep their order (ORDER BY id).
 */
export async function copyVersionRows(tx: Tx, from: string, to: string): Promise<void> {
  for (const table of versionRowTables) await tx.execute(copyStatement(table, from, to));
}
