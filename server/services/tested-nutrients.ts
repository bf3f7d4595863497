import { sql, type SQL } from "drizzle-orm";
import type { AnyPgColumn } from "drizzle-orm/pg-core";
import { nutrients, type TrialFilters } from "@/schemas/filters";

/**
 * Which nutrients a response tests, and which soil test counts for it: the one home of both rules. The TypeScript
 * functions serve the grouping, the labels and the upload; the SQL builders beside them serve the filters, and a
 * property test (tests/server/tested-nutrients-sql.test.ts) shows that the two agree on real PGlite.
 *
 * A response tests the nutrients its treatment adds over its check beyond a carrier amount. The check is untreated
 * (the upload refuses a product on a check), so what a treatment adds is its own totals. A nutrient is a *carrier*
 * when the treatment adds less than half as much of it as of its largest nutrient, compared in label units (lb/ac
 * of N, P2O5, K2O and S): the N in MAP 11-52-0 (11 against 52), DAP 18-46-0 or 10-34-0, and the N in ammonium
 * thiosulfate 12-0-0-26S. Ammonium sulfate 21-0-0-24S tests N and S; 15 N + 15 K2O tests both. The one-half share is
 * common practice, no source. A curator may state the tested nutrients of a treatment instead (`tested_nutrients`,
 * e.g. "P" or "N;S"); a stated value always wins.
 */
export type Nutrient = (typeof nutrients)[number];
export type Analyte = "P" | "K" | "S";

/** Below this share of the largest nutrient's rate a nutrient is carried, not tested (common practice, no source). */
const carrierShare = 0.5;

/** Nutrient → the rate column that measures it, in label units. */
const rateOf = { N: "nLbAc", P: "p2o5LbAc", K: "k2oLbAc", S: "sLbAc" } as const;
const analytes: readonly Analyte[] = ["P", "K", "S"];

export interface NutrientRates {
  nLbAc: number;
  p2o5LbAc: number;
  k2oLbAc: number;
  sLbAc: number;
}

/** The rule in one sentence, as the API's provenance and the README state it. */
const testedNutrientRule =
  `A response tests the nutrients its treatment adds over its check, leaving out a carrier amount: a nutrient added at less than ` +
  `${carrierShare * 100} % of the treatment's largest nutrient rate (lb/ac of N, P2O5, K2O, S), such as the N in MAP or 10-34-0 ` +
  `(a threshold of common practice, no source). A curator's stated tested nutrients replace the derived ones.`;

const suppliedNutrientRule =
  "nutrientSupplied= keeps treatments that supply any amount of the nutrient, carriers included (the N in MAP counts).";

/** The nutrients a treatment's own rates test, in N, P, K, S order. */
export function derivedTestedNutrients(rates: NutrientRates): Nutrient[] {
  const largest = Math.max(rates.nLbAc, rates.p2o5LbAc, rates.k2oLbAc, rates.sLbAc);
  return nutrients.filter((n) => rates[rateOf[n]] > 0 && rates[rateOf[n]] >= carrierShare * largest);
}

/** The nutrients a response or treatment tests: the curator's statement when there is one, else derived from its rates. */
export function testedNutrients(row: NutrientRates & { testedNutrientsStated?: readonly string[] | null }): Nutrient[] {
  if (row.testedNutrientsStated) return nutrients.filter((n) => row.testedNutrientsStated!.includes(n));
  return derivedTestedNutrients(row);
}

/**
 * A curator's statement as written in a CSV cell ("P", "N;S", "N, S"): the nutrients in N, P, K, S order, or the
 * message of what is wrong.
 */
export function parseTestedNutrients(cell: string): { ok: true; value: Nutrient[] } | { ok: false; message: string } {
  const parts = cell
    .split(/[;,\s]+/)
    .map((p) => p.trim())
    .filter(Boolean);
  const unknown = parts.filter((p) => !(nutrients as readonly string[]).includes(p));
  if (unknown.length)
    return {
      ok: false,
      message: `tested_nutrients "${cell}" names ${unknown.map((u) => `"${u}"`).join(", ")}; use N, P, K and S separated by ";" (e.g. "N;S")`,
    };
  if (parts.length === 0) return { ok: false, message: "tested_nutrients is empty; leave it blank to derive it from the products" };
  return { ok: true, value: nutrients.filter((n) => parts.includes(n)) };
}

/** Which nutrient rule a set of filters applies, for the answer's provenance. */
export function nutrientRuleInForce(filters: Partial<Pick<TrialFilters, "nutrient" | "nutrientSupplied">>) {
  const mode = filters.nutrient ? (filters.nutrientSupplied ? "both" : "tested") : filters.nutrientSupplied ? "supplied" : "none";
  const text =
    mode === "tested"
      ? `nutrient=${filters.nutrient!.join(",")}: ${testedNutrientRule}`
      : mode === "supplied"
        ? `nutrientSupplied=${filters.nutrientSupplied!.join(",")}: ${suppliedNutrientRule}`
        : mode === "both"
          ? `nutrient=${filters.nutrient!.join(",")} and nutrientSupplied=${filters.nutrientSupplied!.join(",")} both apply. ${testedNutrientRule} ${suppliedNutrientRule}`
          : `No nutrient filter. Soil-test classes and nutrient groups follow the tested nutrients: ${testedNutrientRule}`;
  return { mode, text } as const;
}

export interface SoilTestsByAnalyte {
  soilPClass?: string | null;
  soilPValue?: number | null;
  soilPReportedClass?: string | null;
  soilPScheme?: string | null;
  soilKClass?: string | null;
  soilKValue?: number | null;
  soilKReportedClass?: string | null;
  soilKScheme?: string | null;
  soilSClass?: string | null;
  soilSValue?: number | null;
  soilSReportedClass?: string | null;
  soilSScheme?: string | null;
}

/** The nutrients that say which soil test is meant: those asked for by nutrient= and nutrientSupplied=. */
export function filterNutrientsOf(filters: Partial<Pick<TrialFilters, "nutrient" | "nutrientSupplied">>): readonly string[] {
  return [...(filters.nutrient ?? []), ...(filters.nutrientSupplied ?? [])];
}

/**
 * The soil test a response is judged, shown, grouped and filtered by. Candidates are the soil-tested nutrients (P, K, S)
 * the response tests, narrowed to the filtered ones when that leaves any; the first candidate in P, K, S order that has
 * a class counts, else the first candidate (with no class), else none.
 */
export function countedSoilTest(tested: readonly string[], soil: SoilTestsByAnalyte, filterNutrients: readonly string[] = []) {
  const testedAnalytes = analytes.filter((a) => tested.includes(a));
  const narrowed = testedAnalytes.filter((a) => filterNutrients.includes(a));
  const candidates = narrowed.length ? narrowed : testedAnalytes;
  const pick = (a: Analyte) =>
    a === "P"
      ? {
          analyte: a,
          class: soil.soilPClass ?? null,
          value: soil.soilPValue ?? null,
          reportedClass: soil.soilPReportedClass ?? null,
          scheme: soil.soilPScheme ?? null,
        }
      : a === "K"
        ? {
            analyte: a,
            class: soil.soilKClass ?? null,
            value: soil.soilKValue ?? null,
            reportedClass: soil.soilKReportedClass ?? null,
            scheme: soil.soilKScheme ?? null,
          }
        : {
            analyte: a,
            class: soil.soilSClass ?? null,
            value: soil.soilSValue ?? null,
            reportedClass: soil.soilSReportedClass ?? null,
            scheme: soil.soilSScheme ?? null,
          };
  const withClass = candidates.map(pick).find((t) => t.class !== null);
  return (
    withClass ?? (candidates[0] ? pick(candidates[0]) : { analyte: null, class: null, value: null, reportedClass: null, scheme: null })
  );
}

/** Anything that stands in SQL as a column: a real column or a correlated sub-select. */
type ColumnLike = AnyPgColumn | SQL;

export interface TestedNutrientColumns {
  stated: ColumnLike;
  nLbAc: ColumnLike;
  p2o5LbAc: ColumnLike;
  k2oLbAc: ColumnLike;
  sLbAc: ColumnLike;
}

const textLiteral = (s: string) => sql.raw(`'${s.replaceAll("'", "''")}'`);
const textArray = (values: readonly string[]) => sql`ARRAY[${sql.join(values.map(textLiteral), sql`, `)}]::text[]`;

/** SQL of `derivedTestedNutrients`: the nutrients at or above the carrier share of the largest rate, in N, P, K, S order. */
function derivedTestedNutrientsSql(c: TestedNutrientColumns): SQL {
  const largest = sql`GREATEST(${c.nLbAc}, ${c.p2o5LbAc}, ${c.k2oLbAc}, ${c.sLbAc})`;
  const share = sql.raw(`${carrierShare}::float8`);
  const one = (n: Nutrient) => {
    const rate = c[rateOf[n]];
    return sql`CASE WHEN ${rate} > 0 AND ${rate} >= ${share} * ${largest} THEN ${textLiteral(n)} END`;
  };
  return sql`array_remove(ARRAY[${sql.join(nutrients.map(one), sql`, `)}]::text[], NULL)`;
}

/** SQL of `testedNutrients`: the stated array, else the nutrients at or above the carrier share of the largest rate. */
export function testedNutrientsSql(c: TestedNutrientColumns): SQL {
  return sql`COALESCE(${c.stated}, ${derivedTestedNutrientsSql(c)})`;
}

/** SQL: the response tests at least one of these nutrients. */
export function testsAnyOf(c: TestedNutrientColumns, wanted: readonly string[]): SQL {
  return sql`(${testedNutrientsSql(c)} && ${textArray(wanted)})`;
}

/** SQL: whether an analyte is a candidate for the soil test that counts (see countedSoilTest). */
function soilCandidateSql(c: TestedNutrientColumns, filterNutrients: readonly string[]): (a: Analyte) => SQL {
  const tested = testedNutrientsSql(c);
  const narrowedTo = analytes.filter((a) => filterNutrients.includes(a));
  return (a) => {
    const testsIt = sql`${textLiteral(a)} = ANY(${tested})`;
    if (narrowedTo.length === 0 || narrowedTo.includes(a)) return testsIt;
    // Not a filtered analyte: a candidate only when the response tests none of the filtered ones.
    return sql`${testsIt} AND NOT (${tested} && ${textArray(narrowedTo)})`;
  };
}

/** SQL of `countedSoilTest(...).class`, for the soil-test-class filter. */
export function countedSoilClassSql(
  c: TestedNutrientColumns,
  soil: Record<Analyte, ColumnLike>,
  filterNutrients: readonly string[] = [],
): SQL {
  const candidate = soilCandidateSql(c, filterNutrients);
  const whens = analytes.map((a) => sql`WHEN ${candidate(a)} AND ${soil[a]} IS NOT NULL THEN ${soil[a]}`);
  return sql`(CASE ${sql.join(whens, sql` `)} END)`;
}

/**
 * SQL of `testedNutrients` exactly as the TypeScript returns it, for answers built in SQL: a stated list is put in
 * N, P, K, S order without repeats (testedNutrientsSql keeps it as stored, which is all a filter needs).
 */
export function testedNutrientListSql(c: TestedNutrientColumns): SQL {
  const inOrder = (n: Nutrient) => sql`CASE WHEN ${textLiteral(n)} = ANY(${c.stated}) THEN ${textLiteral(n)} END`;
  const stated = sql`array_remove(ARRAY[${sql.join(nutrients.map(inOrder), sql`, `)}]::text[], NULL)`;
  return sql`(CASE WHEN ${c.stated} IS NULL THEN ${derivedTestedNutrientsSql(c)} ELSE ${stated} END)`;
}

/** SQL of `countedSoilTest(...).analyte`: the first candidate with a class, else the first candidate, else null. */
export function countedSoilAnalyteSql(
  c: TestedNutrientColumns,
  soilClass: Record<Analyte, ColumnLike>,
  filterNutrients: readonly string[] = [],
): SQL {
  const candidate = soilCandidateSql(c, filterNutrients);
  const withClass = analytes.map((a) => sql`WHEN ${candidate(a)} AND ${soilClass[a]} IS NOT NULL THEN ${textLiteral(a)}`);
  const first = analytes.map((a) => sql`WHEN ${candidate(a)} THEN ${textLiteral(a)}`);
  return sql`(CASE ${sql.join([...withClass, ...first], sql` `)} END)`;
}
