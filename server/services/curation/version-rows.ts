import { sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import type { ResourceName } from "@/schemas/table-schema";
import type { VersionRowsPage } from "@/schemas/review";
import { columnOf, firstAlias, fieldsOf, resourceQueries } from "./resource-csv";
import { rowKey } from "./cell-edit";
import { versionById } from "./access";

const rowsOf = <T>(r: unknown) => (r as { rows: T[] }).rows;

/**
 * One page of a resource's rows in a version, as the resource files print them (stored units, the dictionary's
 * field order, the files' row order), for the review screen's data grid. The caller checks who may see the version.
 */
export async function versionRows(
  db: Db,
  versionId: string,
  resource: ResourceName,
  { page, limit }: { page: number; limit: number },
): Promise<VersionRowsPage> {
  const { version } = await versionById(db, versionId);
  const q = resourceQueries[resource];
  const fields = fieldsOf(version.tableSchema, resource);
  const where = `${firstAlias[resource]}.version_id = '${version.id.replace(/[^0-9a-f-]/gi, "")}'`;
  const select = fields.map((f, i) => `(${columnOf(version.tableSchema, resource, f)})::text AS c${i}`).join(", ");
  // Counted as the file's rows: a treatment with two applications is two rows.
  const [counted] = rowsOf<{ n: number | string }>(
    await db.execute(sql.raw(`SELECT count(*) AS n FROM (SELECT 1 FROM ${q.from} WHERE ${where}) r`)),
  );
  const found = rowsOf<Record<string, string | null>>(
    await db.execute(
      sql.raw(`SELECT ${select} FROM ${q.from} WHERE ${where} ORDER BY ${q.orderBy} LIMIT ${limit} OFFSET ${(page - 1) * limit}`),
    ),
  );
  return {
    versionId: version.id,
    resource,
    fields,
    keyFields: rowKey[resource],
    page,
    limit,
    total: Number(counted?.n ?? 0),
    rows: found.map((r) => fields.map((_, i) => r[`c${i}`] ?? null)),
  };
}
