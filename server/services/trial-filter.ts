import { and, arrayOverlaps, eq, gte, inArray, lte, or, sql, type SQL } from "drizzle-orm";
import type { AnyPgColumn } from "drizzle-orm/pg-core";
import type { Db } from "@/db/client";
import { datasets, responses, versions } from "@/db/schema";
import type { TrialFilters } from "@/schemas/filters";
import { notFound } from "@/server/errors";
import { compareSemver } from "./catalogue";

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
  if (filters.version && filters.version !== "latest") {
    const match = rows.find((r) => r.semver === filters.version);
    if (!match) throw notFound(`Dataset "${filters.dataset}" has no published version ${filters.version}.`);
    return [match];
  }
  const latest = new Map<string, ResolvedVersion>();
  for (const r of rows) {
    const current = latest.get(r.datasetId);
    if (!current || compareSemver(r.semver, current.semver) > 0) latest.set(r.datasetId, r);
  }
  return [...latest.values()].sort((a, b) => a.datasetSlug.localeCompare(b.datasetSlug));
}

const classColumn = { P: responses.soilPClass, K: responses.soilKClass, S: responses.soilSClass } as const;

/** WHERE conditions on the responses table for one set of filters, within the resolved versions. */
export function responseConditions(filters: TrialFilters, versionIds: string[]): SQL | undefined {
  const c: (SQL | undefined)[] = [versionIds.length ? inArray(responses.versionId, versionIds) : sql`false`];
  if (filters.crop) c.push(inArray(responses.crop, filters.crop));
  if (filters.nutrient) c.push(arrayOverlaps(responses.nutrients, filters.nutrient));
  if (filters.placement) c.push(arrayOverlaps(responses.placements, filters.placement));
  if (filters.soilTestClass) {
    const tested = (filters.nutrient ?? []).filter((n): n is "P" | "K" | "S" => n in classColumn);
    if (tested.length) {
      c.push(or(...tested.map((n) => inArray(classColumn[n], filters.soilTestClass!))));
    } else {
      // The treatment's primary nutrient decides which soil test is meant: P before K before S.
      c.push(sql`(CASE WHEN 'P' = ANY(${responses.nutrients}) THEN ${responses.soilPClass}
                       WHEN 'K' = ANY(${responses.nutrients}) THEN ${responses.soilKClass}
                       WHEN 'S' = ANY(${responses.nutrients}) THEN ${responses.soilSClass} END) IN (${sql.join(
                         filters.soilTestClass.map((v) => sql`${v}`),
                         sql`, `,
                       )})`);
    }
  }
  if (filters.yearFrom) c.push(gte(responses.year, filters.yearFrom));
  if (filters.yearTo) c.push(lte(responses.year, filters.yearTo));
  if (filters.tillage) c.push(inArray(responses.tillage, filters.tillage));
  if (filters.rowSpacingMin !== undefined) c.push(gte(responses.rowSpacingIn, filters.rowSpacingMin));
  if (filters.rowSpacingMax !== undefined) c.push(lte(responses.rowSpacingIn, filters.rowSpacingMax));
  if (filters.plantedFrom) c.push(sql`to_char(${responses.plantingDate}, 'MM-DD') >= ${filters.plantedFrom}`);
  if (filters.plantedTo) c.push(sql`to_char(${responses.plantingDate}, 'MM-DD') <= ${filters.plantedTo}`);
  const ranges: [number | undefined, number | undefined, AnyPgColumn][] = [
    [filters.nRateMin, filters.nRateMax, responses.nLbAc],
    [filters.p2o5RateMin, filters.p2o5RateMax, responses.p2o5LbAc],
    [filters.k2oRateMin, filters.k2oRateMax, responses.k2oLbAc],
    [filters.sRateMin, filters.sRateMax, responses.sLbAc],
  ];
  for (const [min, max, column] of ranges) {
    if (min !== undefined) c.push(gte(column, min));
    if (max !== undefined) c.push(lte(column, max));
  }
  return and(...c);
}
