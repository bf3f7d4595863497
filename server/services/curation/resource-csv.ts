import { createHash } from "node:crypto";
import { sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import type { ResourceName, TableSchemaDescriptor } from "@/schemas/table-schema";
import { CsvWriter } from "@/server/csv";
import { customColumnSql, customFieldName } from "@/server/services/ingest/custom-fields";
import type { Tx } from "@/server/services/ingest/write-rows";

/** Resources in the fixed order of exports and of the version checksum. */
export const resourceOrder: ResourceName[] = ["sites", "site_years", "soil_tests", "treatments", "plots", "summaries"];

interface ResourceQuery {
  from: string;
  orderBy: string;
  /** field → SQL expression over the FROM clause. Every data-dictionary field the database stores is here. */
  columns: Record<string, string>;
}

const C = 'COLLATE "C"';
/** How each resource is read back from the tables as canonical rows (stored units, stable order). */
export const resourceQueries: Record<ResourceName, ResourceQuery> = {
  sites: {
    from: "sites s",
    orderBy: `s.code ${C}`,
    columns: { site: "s.code", location: "s.location", soil_series: "s.soil_series", soil_texture: "s.soil_texture" },
  },
  site_years: {
    from: "site_years sy JOIN sites s ON s.id = sy.site_id",
    orderBy: `sy.code ${C}`,
    columns: {
      site_year: "sy.code",
      site: "s.code",
      crop: "sy.crop",
      year: "sy.year",
      design: "sy.design",
      blocks: "sy.blocks",
      tillage: "sy.tillage",
      previous_crop: "sy.previous_crop",
      planting_date: "to_char(sy.planting_date, 'YYYY-MM-DD')",
      row_spacing_in: "sy.row_spacing_in",
      variety: "sy.variety",
      maturity_group: "sy.maturity_group",
    },
  },
  soil_tests: {
    from: "soil_tests st JOIN site_years sy ON sy.id = st.site_year_id",
    orderBy: `sy.code ${C}, st.analyte ${C}`,
    columns: {
      site_year: "sy.code",
      analyte: "st.analyte",
      value: "st.value",
      unit: "st.unit",
      extractant: "st.extractant",
      depth_in: "st.depth_in",
      class: "coalesce(st.reported_class, st.class)",
      interpretation: "st.interpretation",
    },
  },
  treatments: {
    from: "treatments t LEFT JOIN applications a ON a.treatment_id = t.id",
    orderBy: `t.code ${C}, a.id`,
    columns: {
      treatment: "t.code",
      name: "t.name",
      is_check: "t.is_check",
      tested_nutrients: "array_to_string(t.tested_nutrients_stated, ';')",
      application: "row_number() OVER (PARTITION BY t.id ORDER BY a.id)",
      product: "a.product",
      grade: "a.grade",
      product_rate: "a.product_rate",
      rate_unit: "a.rate_unit",
      density_lb_gal: "a.density_lb_gal",
      placement: "a.placement",
      timing: "a.timing",
      n_lb_ac: "coalesce(a.n_lb_ac, 0)",
      p2o5_lb_ac: "coalesce(a.p2o5_lb_ac, 0)",
      k2o_lb_ac: "coalesce(a.k2o_lb_ac, 0)",
      s_lb_ac: "coalesce(a.s_lb_ac, 0)",
    },
  },
  plots: {
    from: "plots p JOIN site_years sy ON sy.id = p.site_year_id JOIN treatments t ON t.id = p.treatment_id",
    orderBy: `sy.code ${C}, p.plot ${C}`,
    columns: {
      site_year: "sy.code",
      plot: "p.plot",
      block: "p.block",
      treatment: "t.code",
      yield_kg_ha: "p.yield_kg_ha",
      harvest_moisture_pct: "p.harvest_moisture_pct",
      stand_count: "p.stand_count",
      vigour: "p.vigour",
      test_weight: "p.test_weight",
    },
  },
  summaries: {
    from: "summary_means m JOIN site_years sy ON sy.id = m.site_year_id JOIN treatments t ON t.id = m.treatment_id",
    orderBy: `sy.code ${C}, t.code ${C}`,
    columns: {
      site_year: "sy.code",
      treatment: "t.code",
      mean_kg_ha: "m.mean_kg_ha",
      replicates: "m.replicates",
      mse: "m.mse",
      df_error: "m.df_error",
    },
  },
};

/** The alias of each resource's own table in its FROM clause (whose version_id selects the version). */
export const firstAlias: Record<ResourceName, string> = {
  sites: "s",
  site_years: "sy",
  soil_tests: "st",
  treatments: "t",
  plots: "p",
  summaries: "m",
};

/**
 * The SQL expression of one field, or undefined when Plotbank stores no such field: the table's columns; for plots
 * the measures the data dictionary adds (kept by name in plots.other_measures; measure names are snake_case by the
 * contract, so they are safe inside the literal); and the curator's own fields, kept in custom_values.
 */
export function columnOf(schema: TableSchemaDescriptor, resource: ResourceName, field: string): string | undefined {
  const stored = resourceQueries[resource].columns[field];
  if (stored !== undefined) return stored;
  if (resource === "plots" && /^[a-z][a-z0-9_]*$/.test(field) && (schema.measures ?? []).some((m) => m.name === field))
    return `p.other_measures->>'${field}'`;
  if (customFieldName.test(field)) return customColumnSql(resource, field);
  return undefined;
}

/** The fields of a resource in the version's data dictionary order: stored columns, added measures and the curator's own fields. */
export function fieldsOf(schema: TableSchemaDescriptor, resource: ResourceName): string[] {
  return (schema.resources[resource]?.fields ?? []).map((f) => f.name).filter((f) => columnOf(schema, resource, f) !== undefined);
}

const PAGE = 100_000;

/**
 * The rows of one resource of a version, in pages, as PostgreSQL prints each value (so PGlite and PostgreSQL give the
 * same text), null for missing, in the data dictionary's field order and a stable row order.
 */
async function* resourcePages(
  db: Db | Tx,
  versionId: string,
  schema: TableSchemaDescriptor,
  fields: string[],
  resource: ResourceName,
): AsyncGenerator<(string | null)[][]> {
  const q = resourceQueries[resource];
  const select = fields.map((f, i) => `(${columnOf(schema, resource, f)})::text AS c${i}`).join(", ");
  for (let offset = 0; ; offset += PAGE) {
    const result = await db.execute(
      sql.raw(
        `SELECT ${select} FROM ${q.from} WHERE ${firstAlias[resource]}.version_id = '${versionId.replace(/[^0-9a-f-]/gi, "")}' ORDER BY ${q.orderBy} LIMIT ${PAGE} OFFSET ${offset}`,
      ),
    );
    const rows = (result as unknown as { rows: Record<string, string | null>[] }).rows;
    if (rows.length === 0) return;
    yield rows.map((row) => fields.map((_, i) => row[`c${i}`] ?? null));
    if (rows.length < PAGE) return;
  }
}

/**
 * The CSV of one resource of a version as it is served (resource downloads, the files in datapackage.zip, the sizes
 * and hashes in DCAT): the one CSV writer, with the formula guard on the data dictionary's string fields. The names
 * of fields in which the guard changed a cell are added to `guarded`, for the Data Package's note.
 */
export async function* resourceCsvChunks(
  db: Db | Tx,
  versionId: string,
  schema: TableSchemaDescriptor,
  resource: ResourceName,
  guarded?: Set<string>,
): AsyncGenerator<string> {
  const fields = fieldsOf(schema, resource);
  const types = new Map((schema.resources[resource]?.fields ?? []).map((f) => [f.name, f.type]));
  const writer = new CsvWriter(
    fields,
    fields.map((f) => types.get(f) === "string"),
  );
  yield writer.headerLine();
  for await (const page of resourcePages(db, versionId, schema, fields, resource)) yield writer.rows(page);
  for (const name of writer.guardedColumns) guarded?.add(name);
}

export async function resourceCsv(
  db: Db | Tx,
  versionId: string,
  schema: TableSchemaDescriptor,
  resource: ResourceName,
  guarded?: Set<string>,
): Promise<Buffer> {
  const parts: Buffer[] = [];
  for await (const chunk of resourceCsvChunks(db, versionId, schema, resource, guarded)) parts.push(Buffer.from(chunk, "utf8"));
  return Buffer.concat(parts);
}

/**
 * The version checksum: SHA-256 over, for each resource in `resourceOrder`, its name, a newline and its CSV exactly
 * as served (so anyone can re-derive it from the downloaded files). Written as "sha256:<hex>".
 */
export async function versionChecksum(db: Db | Tx, versionId: string, schema: TableSchemaDescriptor): Promise<string> {
  const hash = createHash("sha256");
  for (const resource of resourceOrder) {
    hash.update(`${resource}\n`);
    for await (const chunk of resourceCsvChunks(db, versionId, schema, resource)) hash.update(chunk);
  }
  return `sha256:${hash.digest("hex")}`;
}

/**
 * The rows of one resource whose key fields print as the given text (e.g. site_year "TB-01-2021" and plot "203"), as
 * the resource CSV writes them: the rows a cell edit starts from. Field names come from `resourceQueries`, values go
 * as parameters.
 */
export async function resourceRowsByKey(
  db: Db | Tx,
  versionId: string,
  schema: TableSchemaDescriptor,
  fields: string[],
  resource: ResourceName,
  key: Record<string, string>,
): Promise<(string | null)[][]> {
  const q = resourceQueries[resource];
  const select = fields.map((f, i) => `(${columnOf(schema, resource, f)})::text AS c${i}`).join(", ");
  // Row numbers (treatments' application) are computed over the whole version before the key narrows the rows.
  const inner = sql.raw(`SELECT ${select} FROM ${q.from} WHERE ${firstAlias[resource]}.version_id = `);
  const conditions = Object.entries(key).map(([field, value]) => {
    const i = fields.indexOf(field);
    if (i < 0) throw new RangeError(`resourceRowsByKey: ${field} is not a field of ${resource}`);
    return sql` AND k.${sql.raw(`c${i}`)} = ${value}`;
  });
  const result = await db.execute(
    sql`SELECT * FROM (${inner}${versionId} ORDER BY ${sql.raw(q.orderBy)}) k WHERE true${sql.join(conditions, sql``)}`,
  );
  const rows = (result as unknown as { rows: Record<string, string | null>[] }).rows;
  return rows.map((row) => fields.map((_, i) => row[`c${i}`] ?? null));
}
