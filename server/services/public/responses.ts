import { and, eq, gt, sql, type SQL } from "drizzle-orm";
import { alias, type AnyPgColumn } from "drizzle-orm/pg-core";
import { responses, treatments } from "@/db/schema";
import type { TrialFilters } from "@/schemas/filters";
import { responseRow, type ResponseRow } from "@/schemas/public";
import type { Db } from "@/db/client";
import {
  countedSoilAnalyteSql,
  countedSoilClassSql,
  countedSoilTest,
  filterNutrientsOf,
  testedNutrientListSql,
  testedNutrients,
} from "@/server/services/tested-nutrients";
import { responseConditions } from "@/server/services/trial-filter";
import { resolveMeasure } from "@/server/services/measures";
import {
  columnsFromFields,
  encodedPage,
  moistureBasisOf,
  orNull,
  provenanceLookup,
  versionIdsOf,
  yieldConverter,
  yieldConverterSql,
  type RowResource,
  type RowScope,
} from "./row-resource";

const checkTreatment = alias(treatments, "check_treatment");

type ResponseFilters = TrialFilters & { measure?: string };

/** The WHERE of a page: the filters within the versions read, of one measure (yield unless asked), after the cursor. */
function pageConditions(scope: RowScope<ResponseFilters>, afterId: number) {
  const { measure = "yield", ...filters } = scope.filters;
  return and(responseConditions(filters, versionIdsOf(scope), measure), gt(responses.id, afterId));
}

/** Yield converts to the asked units; every other measure is answered in its own unit (null: yield). */
async function measureOf(db: Db, scope: RowScope<ResponseFilters>) {
  const measure = scope.filters.measure ?? "yield";
  return { measure, definition: measure === "yield" ? null : await resolveMeasure(db, measure, versionIdsOf(scope)) };
}

/** The stored responses a page reads, with their check's code: the SELECT both encodings start from (bench/api.ts times it bare). */
export function responseQuery(db: Db, scope: RowScope<ResponseFilters>, afterId: number, limit: number) {
  return db
    .select({ r: responses, checkTreatmentCode: checkTreatment.code })
    .from(responses)
    .innerJoin(checkTreatment, eq(checkTreatment.id, responses.checkTreatmentId))
    .where(pageConditions(scope, afterId))
    .orderBy(responses.id)
    .limit(limit);
}

/**
 * One row per site-year × treatment against its check: the mean difference with its SE and df, the site-year's
 * own p and LSD, and the covariates the filters use. Differences, SEs and LSDs convert like yields (linearly).
 */
export const responseResource: RowResource<ResponseRow, ResponseFilters> = {
  name: "responses",
  row: responseRow,
  async readBatch(db, scope, afterId, limit) {
    const from = provenanceLookup(scope);
    const { measure, definition } = await measureOf(db, scope);
    const rows = await responseQuery(db, scope, afterId, limit);
    return rows.map(({ r, checkTreatmentCode }) => {
      const asYield = yieldConverter(r.crop, scope.units);
      const y = definition ? (x: number) => x : asYield.convert;
      const tested = testedNutrients(r);
      const counted = countedSoilTest(tested, r, filterNutrientsOf(scope.filters));
      return {
        id: r.id,
        ...from(r.versionId),
        siteCode: r.siteCode,
        siteYearCode: r.siteYearCode,
        treatmentCode: r.treatmentCode,
        checkTreatmentCode,
        crop: r.crop,
        year: r.year,
        tillage: r.tillage,
        rowSpacingIn: r.rowSpacingIn,
        plantingDate: r.plantingDate,
        nutrients: r.nutrients,
        testedNutrients: tested,
        testedNutrientsStated: r.testedNutrientsStated !== null,
        placements: r.placements,
        nLbAc: r.nLbAc,
        p2o5LbAc: r.p2o5LbAc,
        k2oLbAc: r.k2oLbAc,
        sLbAc: r.sLbAc,
        soilTestAnalyte: counted.analyte,
        soilTestClass: counted.class,
        soilPClass: r.soilPClass,
        soilPValue: r.soilPValue,
        soilPReportedClass: r.soilPReportedClass,
        soilPScheme: r.soilPScheme,
        soilKClass: r.soilKClass,
        soilKValue: r.soilKValue,
        soilKReportedClass: r.soilKReportedClass,
        soilKScheme: r.soilKScheme,
        soilSClass: r.soilSClass,
        soilSValue: r.soilSValue,
        soilSReportedClass: r.soilSReportedClass,
        soilSScheme: r.soilSScheme,
        yieldUnit: asYield.unit,
        moistureBasisPct: moistureBasisOf(r.crop),
        measure,
        unit: definition ? definition.unit : asYield.unit,
        relativeToCheck: r.checkMeanKgHa > 0 ? r.treatedMeanKgHa / r.checkMeanKgHa : null,
        checkMean: y(r.checkMeanKgHa),
        treatedMean: y(r.treatedMeanKgHa),
        md: y(r.mdKgHa),
        se: y(r.seKgHa),
        df: r.dfError,
        lnrr: r.lnrr,
        lnrrVar: r.lnrrVar,
        pValue: r.pValue,
        lsd05: orNull(y)(r.lsd05KgHa),
        cvPct: r.cvPct,
        replicates: r.replicates,
        balanced: r.balanced,
        fromSummary: r.fromSummary,
      };
    });
  },
  readJsonPage: async (db, scope, afterId, limit) =>
    jsonPage(db, scope, responseFieldsSql(scope, await measureOf(db, scope)), afterId, limit),
  csvColumns: columnsFromFields<ResponseRow>(Object.keys(responseRow.shape) as (keyof ResponseRow)[]),
};

const tested = {
  stated: responses.testedNutrientsStated,
  nLbAc: responses.nLbAc,
  p2o5LbAc: responses.p2o5LbAc,
  k2oLbAc: responses.k2oLbAc,
  sLbAc: responses.sLbAc,
};
const soilClass = { P: responses.soilPClass, K: responses.soilKClass, S: responses.soilSClass };

/**
 * The same row as `readBatch` builds, field by field in SQL, for JSON pages encoded by the database. Keyed by the
 * row's fields, so a field added to the contract and not here is a type error; tests/server/api-rows-sql-json.test.ts
 * compares both paths on random data and filters.
 */
function responseFieldsSql(
  scope: RowScope<ResponseFilters>,
  { measure, definition }: Awaited<ReturnType<typeof measureOf>>,
): Record<keyof ResponseRow, SQL> {
  const asYield = yieldConverterSql(scope, responses.versionId, responses.crop);
  const { provenance, yieldUnit, moistureBasis } = asYield;
  const convert = definition ? (column: AnyPgColumn) => sql`${column}` : asYield.convert;
  const filterNutrients = filterNutrientsOf(scope.filters);
  return {
    id: sql`${responses.id}`,
    ...provenance,
    siteCode: sql`${responses.siteCode}`,
    siteYearCode: sql`${responses.siteYearCode}`,
    treatmentCode: sql`${responses.treatmentCode}`,
    checkTreatmentCode: sql`${checkTreatment.code}`,
    crop: sql`${responses.crop}`,
    year: sql`${responses.year}`,
    tillage: sql`${responses.tillage}`,
    rowSpacingIn: sql`${responses.rowSpacingIn}`,
    plantingDate: sql`${responses.plantingDate}`,
    nutrients: sql`${responses.nutrients}`,
    testedNutrients: testedNutrientListSql(tested),
    testedNutrientsStated: sql`(${responses.testedNutrientsStated} IS NOT NULL)`,
    placements: sql`${responses.placements}`,
    nLbAc: sql`${responses.nLbAc}`,
    p2o5LbAc: sql`${responses.p2o5LbAc}`,
    k2oLbAc: sql`${responses.k2oLbAc}`,
    sLbAc: sql`${responses.sLbAc}`,
    soilTestAnalyte: countedSoilAnalyteSql(tested, soilClass, filterNutrients),
    soilTestClass: countedSoilClassSql(tested, soilClass, filterNutrients),
    soilPClass: sql`${responses.soilPClass}`,
    soilPValue: sql`${responses.soilPValue}`,
    soilPReportedClass: sql`${responses.soilPReportedClass}`,
    soilPScheme: sql`${responses.soilPScheme}`,
    soilKClass: sql`${responses.soilKClass}`,
    soilKValue: sql`${responses.soilKValue}`,
    soilKReportedClass: sql`${responses.soilKReportedClass}`,
    soilKScheme: sql`${responses.soilKScheme}`,
    soilSClass: sql`${responses.soilSClass}`,
    soilSValue: sql`${responses.soilSValue}`,
    soilSReportedClass: sql`${responses.soilSReportedClass}`,
    soilSScheme: sql`${responses.soilSScheme}`,
    yieldUnit,
    moistureBasisPct: moistureBasis,
    measure: sql`${measure}::text`,
    unit: definition ? sql`${definition.unit}::text` : yieldUnit,
    relativeToCheck: sql`(CASE WHEN ${responses.checkMeanKgHa} > 0 THEN ${responses.treatedMeanKgHa} / ${responses.checkMeanKgHa} END)`,
    checkMean: convert(responses.checkMeanKgHa),
    treatedMean: convert(responses.treatedMeanKgHa),
    md: convert(responses.mdKgHa),
    se: convert(responses.seKgHa),
    df: sql`${responses.dfError}`,
    lnrr: sql`${responses.lnrr}`,
    lnrrVar: sql`${responses.lnrrVar}`,
    pValue: sql`${responses.pValue}`,
    lsd05: convert(responses.lsd05KgHa),
    cvPct: sql`${responses.cvPct}`,
    replicates: sql`${responses.replicates}`,
    balanced: sql`${responses.balanced}`,
    fromSummary: sql`${responses.fromSummary}`,
  };
}

function jsonPage(db: Db, scope: RowScope<ResponseFilters>, fields: Record<string, SQL>, afterId: number, limit: number) {
  const select = sql.join(
    Object.entries(fields).map(([name, value]) => sql`${value} AS ${sql.identifier(name)}`),
    sql`, `,
  );
  return encodedPage(
    db,
    sql`SELECT ${select} FROM ${responses} INNER JOIN ${treatments} ${sql.identifier("check_treatment")} ON ${eq(checkTreatment.id, responses.checkTreatmentId)}
        WHERE ${pageConditions(scope, afterId)}
        ORDER BY ${responses.id} LIMIT ${limit + 1}`,
    limit,
  );
}
