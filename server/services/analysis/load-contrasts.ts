import { inArray, sql, type SQL } from "drizzle-orm";
import type { Db } from "@/db/client";
import { responses } from "@/db/schema";
import type { Grouping } from "@/schemas/analysis";
import type { TrialFilters } from "@/schemas/filters";
import type { Moderator } from "@/schemas/meta-regression";
import { conflict } from "@/server/errors";
import { resolveVersions, responseConditions, type ResolvedVersion } from "@/server/services/trial-filter";
import { treatmentLabels } from "./treatment-labels";
import { defaultMeasure } from "@/constants/measures";
import { resolveMeasure } from "@/server/services/measures";

type Response = typeof responses.$inferSelect;

/**
 * The analysis reads in two stages. The first reads, for every filtered response, only what the estimates need (the
 * effect, its error, the site-year it pools into, and the columns of the asked grouping); the second reads the labels
 * (codes, year, soil tests) of the few responses the answer names: the forest rows shown and the excluded ones. At
 * 20,000 site-years the first stage is most of the database time, and leaving the labels out of it halves it.
 */
const estimationColumns = {
  id: responses.id,
  siteYearId: responses.siteYearId,
  crop: responses.crop,
  checkMeanKgHa: responses.checkMeanKgHa,
  treatedMeanKgHa: responses.treatedMeanKgHa,
  mdKgHa: responses.mdKgHa,
  seKgHa: responses.seKgHa,
  dfError: responses.dfError,
  replicates: responses.replicates,
  lnrr: responses.lnrr,
  lnrrVar: responses.lnrrVar,
};
type EstimationKey = keyof typeof estimationColumns | "versionId";

/** The columns the tested-nutrient rule reads (tested-nutrients.ts). */
const testedColumns = {
  testedNutrientsStated: responses.testedNutrientsStated,
  nLbAc: responses.nLbAc,
  p2o5LbAc: responses.p2o5LbAc,
  k2oLbAc: responses.k2oLbAc,
  sLbAc: responses.sLbAc,
};

const groupingColumnsOf = {
  soilTestClass: { ...testedColumns, soilPClass: responses.soilPClass, soilKClass: responses.soilKClass, soilSClass: responses.soilSClass },
  placement: { placements: responses.placements },
  nutrient: testedColumns,
  crop: {},
  tillage: { tillage: responses.tillage },
  plantingWindow: { plantingDate: responses.plantingDate },
  dataset: {},
} satisfies Record<Grouping, Partial<Record<keyof Response, unknown>>>;
type GroupingKey = { [G in Grouping]: keyof (typeof groupingColumnsOf)[G] }[Grouping];

/** The columns a continuous moderator reads (the check mean is always read). */
const moderatorColumnsOf = {
  soilTestValue: { ...testedColumns, soilPValue: responses.soilPValue, soilKValue: responses.soilKValue, soilSValue: responses.soilSValue },
  checkYield: {},
  plantingDayOfYear: { plantingDate: responses.plantingDate },
  rate: testedColumns,
} satisfies Record<Moderator, Partial<Record<keyof Response, unknown>>>;
type ModeratorKey = { [M in Moderator]: keyof (typeof moderatorColumnsOf)[M] }[Moderator];

const labelColumns = {
  id: responses.id,
  siteCode: responses.siteCode,
  siteYearCode: responses.siteYearCode,
  treatmentCode: responses.treatmentCode,
  treatmentId: responses.treatmentId,
  year: responses.year,
  nutrients: responses.nutrients,
  ...testedColumns,
  soilPClass: responses.soilPClass,
  soilPValue: responses.soilPValue,
  soilKClass: responses.soilKClass,
  soilKValue: responses.soilKValue,
  soilSClass: responses.soilSClass,
  soilSValue: responses.soilSValue,
  soilPReportedClass: responses.soilPReportedClass,
  soilPScheme: responses.soilPScheme,
  soilKReportedClass: responses.soilKReportedClass,
  soilKScheme: responses.soilKScheme,
  soilSReportedClass: responses.soilSReportedClass,
  soilSScheme: responses.soilSScheme,
};
type LabelKey = keyof typeof labelColumns;

/** A response as the estimates see it; the grouping columns are present when that grouping was asked. */
export type EstimationContrast = Pick<Response, EstimationKey> & Partial<Pick<Response, GroupingKey | ModeratorKey>>;
/** What a forest row or an exclusion names of a response. */
export type ContrastLabels = Pick<Response, LabelKey>;
/** A response with its labels, its treatment in words among them. */
export type Contrast = EstimationContrast & ContrastLabels & { treatmentLabel: string };

const numeric = new Set<string>([
  "nLbAc",
  "p2o5LbAc",
  "k2oLbAc",
  "sLbAc",
  "checkMeanKgHa",
  "treatedMeanKgHa",
  "mdKgHa",
  "seKgHa",
  "lnrr",
  "lnrrVar",
  "soilPValue",
  "soilKValue",
  "soilSValue",
]);

/** The columns as positional JSON arrays in one json_agg value: at 20,000 rows far cheaper than row-by-row results. */
function jsonArrays(columns: Record<string, unknown>) {
  return sql`json_agg(json_build_array(${sql.join(Object.values(columns) as SQL[], sql`, `)}) ORDER BY ${responses.id})::text`;
}

function toObjects<T>(text: string | null | undefined, keys: string[], versionId?: string): T[] {
  if (!text) return [];
  const isNumeric = keys.map((k) => numeric.has(k));
  return (JSON.parse(text) as unknown[][]).map((values) => {
    // Built key by key from an empty literal (a spread here made every row a slow dictionary object: 10× slower).
    const row: Record<string, unknown> = {};
    for (let i = 0; i < keys.length; i++) {
      const value = values[i] ?? null;
      // json prints NaN and ±Infinity of a double as strings; Number() brings them back.
      row[keys[i]!] = isNumeric[i] && typeof value === "string" ? Number(value) : value;
    }
    if (versionId !== undefined) row.versionId = versionId;
    return row as T;
  });
}

/** Stage one: every filtered response's estimation columns, one aggregate per dataset version (in id order). */
async function selectEstimationRows(
  db: Db,
  where: SQL | undefined,
  groupBy: Grouping | null,
  moderator: Moderator | null,
): Promise<EstimationContrast[]> {
  const columns = {
    ...estimationColumns,
    ...(groupBy ? groupingColumnsOf[groupBy] : {}),
    ...(moderator ? moderatorColumnsOf[moderator] : {}),
  };
  const keys = Object.keys(columns);
  const result = await db.execute(
    sql`SELECT ${responses.versionId} AS version_id, ${jsonArrays(columns)} AS rows FROM ${responses} WHERE ${where} GROUP BY ${responses.versionId} ORDER BY ${responses.versionId}`,
  );
  const groups = (result as unknown as { rows: { version_id: string; rows: string | null }[] }).rows;
  return groups.flatMap((g) => toObjects<EstimationContrast>(g.rows, keys, g.version_id));
}

/** Above this many responses the labels are read with the filter again rather than an id list. */
const labelIdListLimit = 2000;

/**
 * Stage two: the labels of the named responses, merged onto them. A long list (a whole-forest CSV) re-reads the
 * filtered responses' labels instead of sending thousands of ids.
 */
export async function withLabels(
  db: Db,
  where: SQL | undefined,
  rows: EstimationContrast[],
  idListLimit = labelIdListLimit,
): Promise<Map<number, Contrast>> {
  const byId = new Map<number, Contrast>();
  if (rows.length === 0) return byId;
  const keys = Object.keys(labelColumns);
  const condition =
    rows.length <= idListLimit
      ? inArray(
          responses.id,
          rows.map((r) => r.id),
        )
      : where;
  const result = await db.execute(sql`SELECT ${jsonArrays(labelColumns)} AS rows FROM ${responses} WHERE ${condition}`);
  const labels = toObjects<ContrastLabels>((result as unknown as { rows: { rows: string | null }[] }).rows[0]?.rows, keys);
  const labelOf = new Map(labels.map((l) => [l.id, l]));
  const named = rows.flatMap((row) => {
    const label = labelOf.get(row.id);
    return label ? [label.treatmentId] : [];
  });
  const words = await treatmentLabels(db, named);
  for (const row of rows) {
    const label = labelOf.get(row.id);
    // Published rows do not change, but a dataset can be withdrawn between the two reads.
    if (!label) throw conflict("The data changed while the analysis was being computed (a version was withdrawn); ask again.");
    byId.set(row.id, { ...row, ...label, treatmentLabel: words.get(label.treatmentId) ?? label.treatmentCode });
  }
  return byId;
}

/** Forest order: year, site-year code, treatment code. */
export function byForestOrder(a: ContrastLabels, b: ContrastLabels): number {
  return a.year - b.year || compareText(a.siteYearCode, b.siteYearCode) || compareText(a.treatmentCode, b.treatmentCode) || a.id - b.id;
}

/** Code-point order, as PostgreSQL's "C" collation sorts the codes. */
function compareText(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

/** Which versions an analysis reads: the published ones the filters name, or one given version (a draft's preview). */
export type VersionResolver = (db: Db, filters: TrialFilters) => Promise<ResolvedVersion[]>;

/** What an analysis reads beside its filters: the grouping, a continuous moderator, the measure and the versions. */
export interface ContrastOptions {
  groupBy?: Grouping | null;
  moderator?: Moderator | null;
  /** Yield by default; an unknown measure is a 400. */
  measure?: string;
  resolve?: VersionResolver;
}

/** The filtered responses of one measure with the versions read. */
export async function loadContrasts(db: Db, filters: TrialFilters, options: ContrastOptions = {}) {
  const versions = await (options.resolve ?? resolveVersions)(db, filters);
  const versionIds = versions.map((v) => v.versionId);
  const measure = await resolveMeasure(db, options.measure ?? defaultMeasure, versionIds);
  const where = responseConditions(filters, versionIds, measure.name);
  const rows = await selectEstimationRows(db, where, options.groupBy ?? null, options.moderator ?? null);
  return { versions, rows, where, measure };
}

export type { ResolvedVersion };
