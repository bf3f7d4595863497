import { getTableColumns, getTableName, is, sql } from "drizzle-orm";
import { getTableConfig, PgTable } from "drizzle-orm/pg-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as schema from "@/db/schema";
import { versionReferences, versionRowTables } from "@/server/services/curation/copy-version";
import { testApp, type TestApp } from "@/tests/support/test-app";
import { draftWithData, plotsCsv, treatmentsCsv, upload, type Fixture } from "./curation-fixtures";

/**
 * A new draft starts as a copy of the latest published version. Copied, every trial table must hold the same rows,
 * column by column, with only the ids new. The comparison walks the columns Drizzle declares, so a column added to
 * db/schema is compared (and must be copied) without this test changing.
 */
let t: TestApp;
let f: Fixture;
let copyId: string;

type Row = Record<string, unknown>;
const rowsOf = async (table: PgTable, versionId: string): Promise<Row[]> =>
  (
    (await t.ctx.db.execute(
      sql`SELECT * FROM ${sql.identifier(getTableName(table))} WHERE version_id = ${versionId} ORDER BY id`,
    )) as unknown as { rows: Row[] }
  ).rows;

/** A version's rows with ids replaced by what they mean: the version dropped, references by the referenced row's code. */
async function comparable(versionId: string): Promise<Map<string, Row[]>> {
  const codes = new Map<string, Map<string, unknown>>();
  const out = new Map<string, Row[]>();
  for (const table of versionRowTables) {
    const name = getTableName(table);
    const rows = await rowsOf(table, versionId);
    if ("code" in getTableColumns(table)) codes.set(name, new Map(rows.map((row) => [String(row.id), row.code])));
    const references = versionReferences(table);
    out.set(
      name,
      rows.map((row) => {
        const { id: _id, version_id: _version, ...rest } = row;
        for (const { column, table: target } of references) rest[column] = codes.get(target)!.get(String(row[column]));
        return rest;
      }),
    );
  }
  return out;
}

beforeAll(async () => {
  t = await testApp();
  // Plots with every optional measurement, so that no plot column is empty in the source.
  const plots = plotsCsv()
    .trim()
    .split("\n")
    .map((line, i) => (i === 0 ? `${line},stand_count,vigour,test_weight` : `${line},${138000 + i * 100},${(i % 9) + 1},${54 + (i % 4)}`))
    .join("\n");
  // Treatments whose tested nutrients are stated, so that column is filled too.
  const treatments = treatmentsCsv
    .trim()
    .split("\n")
    .map((line, i) => (i === 0 ? `${line},tested_nutrients` : `${line},${line.startsWith("CHK") ? "" : "P"}`))
    .join("\n");
  f = await draftWithData(t.app, t.ctx, { plots: `${plots}\n`, treatments: `${treatments}\n` });
  // A value of a measure a data dictionary adds (tests/server/analysis-measures.test.ts uploads one), so that column is filled too.
  await t.ctx.db.execute(sql`update plots set other_measures = '{"lodging_score": 2}'::jsonb where version_id = ${f.versionId}`);
  // Potassium and sulfur tests too, so every soil column of the responses is filled.
  await upload(
    f.curatorAgent,
    f.versionId,
    "soil_tests",
    "site_year,analyte,value,unit,extractant,depth_in,class,interpretation\nTB-01-2021,K,110,ppm,ammonium-acetate,6,low,tallgrass-illustrative\nTB-01-2021,S,6,ppm,calcium-phosphate,6,low,tallgrass-illustrative\n",
  ).expect(201);
  // A site-year published as means (summary_means), with the variety columns filled.
  // A field of the curator's own, so custom_values has rows to copy.
  await f.curatorAgent
    .post(`/api/v1/curation/versions/${f.versionId}/table-schema/fields`)
    .send({ resource: "sites", field: { name: "drainage", type: "string" } })
    .expect(200);
  await upload(
    f.curatorAgent,
    f.versionId,
    "sites",
    "site,location,soil_series,soil_texture,drainage\nTB-05,Osage Bend County,Marrow,clay loam,tiled\n",
  ).expect(201);
  await upload(
    f.curatorAgent,
    f.versionId,
    "site_years",
    "site_year,site,crop,year,blocks,variety,maturity_group\nTB-05-2021,TB-05,soybean,2021,4,Basin 27X,2.7\n",
  ).expect(201);
  await upload(
    f.curatorAgent,
    f.versionId,
    "summaries",
    "site_year,treatment,mean_kg_ha,replicates,mse,df_error\nTB-05-2021,CHK,3500,4,20000,9\nTB-05-2021,BAND,3800,4,20000,9\n",
  ).expect(201);
  await f.curatorAgent
    .post(`/api/v1/curation/versions/${f.versionId}/submit`)
    .send({ changelog: "First release: 2021 season." })
    .expect(200);
  await f.reviewerAgent.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({}).expect(200);
  copyId = (await f.curatorAgent.post(`/api/v1/datasets/${f.slug}/versions`).send({}).expect(201)).body.id as string;
});
afterAll(async () => t?.close());

describe("a new draft copied from the published version", () => {
  it("copies every table that holds a version's trial rows", () => {
    // Version-scoped tables that are a version's own history, not its data, and stay with it.
    const notCopied = new Set(["uploads", "validation_reports", "version_edits", "review_comments"]);
    const versionScoped = (Object.values(schema) as unknown[])
      .filter((value): value is PgTable => is(value, PgTable))
      .filter((table) => getTableConfig(table).foreignKeys.some((key) => key.reference().foreignTable === schema.versions))
      .map((table) => getTableName(table))
      .filter((name) => !notCopied.has(name));
    expect(versionRowTables.map((table) => getTableName(table)).sort()).toEqual(versionScoped.sort());
  });

  it.each(versionRowTables.map((table) => [getTableName(table), table] as const))(
    "%s: the same rows, column by column, with new ids",
    async (name, table) => {
      const [source, copy] = await Promise.all([comparable(f.versionId), comparable(copyId)]);
      const from = source.get(name)!;
      const to = copy.get(name)!;
      expect(from.length, `${name} has rows in the source`).toBeGreaterThan(0);
      // Every column of the table takes part, and each holds a value in some source row, so a dropped column shows.
      const compared = Object.values(getTableColumns(table))
        .map((column) => column.name)
        .filter((column) => column !== "id" && column !== "version_id");
      expect(Object.keys(from[0]!).sort()).toEqual(compared.sort());
      for (const column of compared)
        expect(
          from.some((row) => row[column] !== null && row[column] !== undefined),
          `${name}.${column} is filled in the source`,
        ).toBe(true);
      expect(to).toEqual(from);

      const [sourceIds, copyIds] = await Promise.all([rowsOf(table, f.versionId), rowsOf(table, copyId)]);
      const shared = new Set(sourceIds.map((row) => String(row.id)));
      expect(copyIds.filter((row) => shared.has(String(row.id)))).toEqual([]);
    },
  );
});
