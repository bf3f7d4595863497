import { and, arrayOverlaps, eq, inArray, sql, type SQL } from "drizzle-orm";
import type { AnyPgColumn } from "drizzle-orm/pg-core";
import type { Db } from "@/db/client";
import { datasets, plots, responses, siteYears, soilTests, treatments, versions } from "@/db/schema";
import type { TrialFilters } from "@/schemas/filters";
import { notFound } from "@/server/errors";
import { defaultMeasure } from "@/constants/measures";
import { latestAlias, latestPublishedByDataset, versionGone } from "./latest-version";
import { countedSoilClassSql, filterNutrientsOf, testsAnyOf } from "./tested-nutrients";

export interface ResolvedVersion {
  versionId: string;
  datasetId: string;
  datasetSlug: string;
  datasetTitle: string;
  semver: string;
  licence: string;
  state: "published" | "withdrawn" | "draft" | "in_review";
}

/**
 * Which versions a filtered read uses: by default the latest published version of every dataset; with `dataset`
 * (and optionally `version`) just that one. A named version must be published (withdrawn data are not served).
 */
export async function resolveVersions(db: Db, filters: Pick<TrialFilters, "dataset" | "version">): Promise<ResolvedVersion[]> {
  const rows = await db
    .select({
      versionId: versions.id,
      datasetId: versions.datasetId,
      datasetSlug: datasets.slug,
      datasetTitle: datasets.title,
      semver: versions.semver,
      licence: datasets.licence,
      state: versions.state,
    })
    .from(versions)
    .innerJoin(datasets, eq(datasets.id, versions.datasetId))
    .where(and(eq(versions.state, "published"), filters.dataset ? eq(datasets.slug, filters.dataset) : undefined));
  if (filters.dataset && rows.length === 0) throw notFound(`No published dataset is called "${filters.dataset}".`);
  if (filters.version && filters.version !== latestAlias) {
    const match = rows.find((r) => r.semver === filters.version);
    if (!match) {
      const [withdrawn] = await db
        .select({ reason: versions.withdrawnReason, at: versions.withdrawnAt })
        .from(versions)
        .innerJoin(datasets, eq(datasets.id, versions.datasetId))
        .where(and(eq(datasets.slug, filters.dataset!), eq(versions.semver, filters.version), eq(versions.state, "withdrawn")));
      if (withdrawn) throw versionGone(filters.dataset!, filters.version, withdrawn.reason, withdrawn.at);
      throw notFound(`Dataset "${filters.dataset}" has no published version ${filters.version}.`);
    }
    return [match];
  }
  return [...latestPublishedByDataset(rows).values()].sort((a, b) => a.datasetSlug.localeCompare(b.datasetSlug));
}

/** Anything that can stand in a WHERE clause as a column: a real column or a correlated sub-select. */
type ColumnLike = AnyPgColumn | SQL;

/**
 * Where each filter looks on a table (or a join). Filters a table has no place for are left out, so the same
 * filters read the same way on every resource.
 */
export interface FilterColumns {
  versionId: AnyPgColumn;
  siteYear?: { crop: ColumnLike; year: ColumnLike; tillage: ColumnLike; rowSpacingIn: ColumnLike; plantingDate: ColumnLike };
  treatment?: {
    nutrients: AnyPgColumn;
    placements: AnyPgColumn;
    testedNutrientsStated: ColumnLike;
    nLbAc: ColumnLike;
    p2o5LbAc: ColumnLike;
    k2oLbAc: ColumnLike;
    sLbAc: ColumnLike;
  };
  /** Soil-test class by analyte; needs `treatment` too, whose tested nutrients say which test is meant. */
  soilClass?: { P: ColumnLike; K: ColumnLike; S: ColumnLike };
}

const responseColumns: FilterColumns = {
  versionId: responses.versionId,
  siteYear: {
    crop: responses.crop,
    year: responses.year,
    tillage: responses.tillage,
    rowSpacingIn: responses.rowSpacingIn,
    plantingDate: responses.plantingDate,
  },
  treatment: {
    nutrients: responses.nutrients,
    placements: responses.placements,
    testedNutrientsStated: responses.testedNutrientsStated,
    nLbAc: responses.nLbAc,
    p2o5LbAc: responses.p2o5LbAc,
    k2oLbAc: responses.k2oLbAc,
    sLbAc: responses.sLbAc,
  },
  soilClass: { P: responses.soilPClass, K: responses.soilKClass, S: responses.soilSClass },
};

const inList = (column: ColumnLike, values: readonly string[]) =>
  sql`${column} IN (${sql.join(
    values.map((v) => sql`${v}`),
    sql`, `,
  )})`;

/** WHERE conditions for one set of filters on any table described by `columns`, within the resolved versions. */
export function filterConditions(filters: Partial<TrialFilters>, versionIds: string[], columns: FilterColumns): SQL | undefined {
  const c: (SQL | undefined)[] = [versionIds.length ? inArray(columns.versionId, versionIds) : sql`false`];
  const sy = columns.siteYear;
  if (sy) {
    if (filters.crop) c.push(inList(sy.crop, filters.crop));
    if (filters.yearFrom) c.push(sql`${sy.year} >= ${filters.yearFrom}`);
    if (filters.yearTo) c.push(sql`${sy.year} <= ${filters.yearTo}`);
    if (filters.tillage) c.push(inList(sy.tillage, filters.tillage));
    if (filters.rowSpacingMin !== undefined) c.push(sql`${sy.rowSpacingIn} >= ${filters.rowSpacingMin}`);
    if (filters.rowSpacingMax !== undefined) c.push(sql`${sy.rowSpacingIn} <= ${filters.rowSpacingMax}`);
    if (filters.plantedFrom) c.push(sql`to_char(${sy.plantingDate}, 'MM-DD') >= ${filters.plantedFrom}`);
    if (filters.plantedTo) c.push(sql`to_char(${sy.plantingDate}, 'MM-DD') <= ${filters.plantedTo}`);
  }
  const tr = columns.treatment;
  if (tr) {
    const tested = { stated: tr.testedNutrientsStated, nLbAc: tr.nLbAc, p2o5LbAc: tr.p2o5LbAc, k2oLbAc: tr.k2oLbAc, sLbAc: tr.sLbAc };
    if (filters.nutrient) c.push(testsAnyOf(tested, filters.nutrient));
    if (filters.nutrientSupplied) c.push(arrayOverlaps(tr.nutrients, filters.nutrientSupplied));
    if (filters.placement) c.push(arrayOverlaps(tr.placements, filters.placement));
    const ranges: [number | undefined, number | undefined, ColumnLike][] = [
      [filters.nRateMin, filters.nRateMax, tr.nLbAc],
      [filters.p2o5RateMin, filters.p2o5RateMax, tr.p2o5LbAc],
      [filters.k2oRateMin, filters.k2oRateMax, tr.k2oLbAc],
      [filters.sRateMin, filters.sRateMax, tr.sLbAc],
    ];
    for (const [min, max, column] of ranges) {
      if (min !== undefined) c.push(sql`${column} >= ${min}`);
      if (max !== undefined) c.push(sql`${column} <= ${max}`);
    }
    const soil = columns.soilClass;
    if (soil && filters.soilTestClass) c.push(inList(countedSoilClassSql(tested, soil, filterNutrientsOf(filters)), filters.soilTestClass));
  }
  return and(...c);
}

/** WHERE conditions on the responses table for one set of filters, within the resolved versions. */
/** Responses of one measure (yield unless named; constants/measures.ts) that match the filters. */
export function responseConditions(filters: TrialFilters, versionIds: string[], measure: string = defaultMeasure): SQL | undefined {
  return and(filterConditions(filters, versionIds, responseColumns), eq(responses.measure, measure));
}

const treatmentColumns: FilterColumns["treatment"] = {
  nutrients: treatments.nutrients,
  placements: treatments.placements,
  testedNutrientsStated: treatments.testedNutrientsStated,
  nLbAc: treatments.nLbAc,
  p2o5LbAc: treatments.p2o5LbAc,
  k2oLbAc: treatments.k2oLbAc,
  sLbAc: treatments.sLbAc,
};
const siteYearColumns: FilterColumns["siteYear"] = {
  crop: siteYears.crop,
  year: siteYears.year,
  tillage: siteYears.tillage,
  rowSpacingIn: siteYears.rowSpacingIn,
  plantingDate: siteYears.plantingDate,
};

/** A site-year's soil-test class for one analyte, as a correlated sub-select (one index probe per row). */
const soilClassOf = (siteYearId: AnyPgColumn, analyte: "P" | "K" | "S") =>
  sql`(SELECT ${soilTests.class} FROM ${soilTests} WHERE ${soilTests.siteYearId} = ${siteYearId} AND ${soilTests.analyte} = ${analyte})`;

/** WHERE conditions on plots joined to their site-year and treatment (soil tests looked up per site-year). */
export function observationConditions(filters: Partial<TrialFilters>, versionIds: string[]): SQL | undefined {
  return filterConditions(filters, versionIds, {
    versionId: plots.versionId,
    siteYear: siteYearColumns,
    treatment: treatmentColumns,
    soilClass: { P: soilClassOf(plots.siteYearId, "P"), K: soilClassOf(plots.siteYearId, "K"), S: soilClassOf(plots.siteYearId, "S") },
  });
}

const treatmentFilterKeys = [
  "nutrient",
  "nutrientSupplied",
  "placement",
  "soilTestClass",
  "nRateMin",
  "nRateMax",
  "p2o5RateMin",
  "p2o5RateMax",
  "k2oRateMin",
  "k2oRateMax",
  "sRateMin",
  "sRateMax",
] as const;

/**
 * WHERE conditions on site-years. Site-year filters apply directly; treatment filters (and the soil-test class,
 * which depends on the treatment's nutrient) keep the site-years that have at least one matching response, so
 * these filters select the same site-years as the responses endpoint.
 */
export function siteYearConditions(filters: Partial<TrialFilters>, versionIds: string[]): SQL | undefined {
  const direct = filterConditions(filters, versionIds, {
    versionId: siteYears.versionId,
    siteYear: siteYearColumns,
  });
  const treatmentFilters = Object.fromEntries(treatmentFilterKeys.filter((k) => filters[k] !== undefined).map((k) => [k, filters[k]]));
  if (Object.keys(treatmentFilters).length === 0) return direct;
  const { siteYear: _siteYear, ...treatmentOnly } = responseColumns;
  const matching = filterConditions(treatmentFilters, versionIds, treatmentOnly);
  return and(direct, sql`EXISTS (SELECT 1 FROM ${responses} WHERE ${responses.siteYearId} = ${siteYears.id} AND ${matching})`);
}

/** WHERE conditions on treatments: what they supply, how it is placed and how much. */
export function treatmentConditions(filters: Partial<TrialFilters>, versionIds: string[]): SQL | undefined {
  const { soilTestClass: _ignored, ...rest } = filters;
  return filterConditions(rest, versionIds, {
    versionId: treatments.versionId,
    treatment: treatmentColumns,
  });
}
