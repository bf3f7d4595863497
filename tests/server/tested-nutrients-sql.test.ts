import { sql } from "drizzle-orm";
import { doublePrecision, integer, pgTable, text, uuid } from "drizzle-orm/pg-core";
import fc from "fast-check";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { migrateDatabase, openDatabase, type Database } from "@/db/client";
import { nutrients, soilTestClasses, type TrialFilters } from "@/schemas/filters";
import {
  countedSoilClassSql,
  countedSoilTest,
  derivedTestedNutrients,
  filterNutrientsOf,
  testedNutrients,
  testedNutrientsSql,
} from "@/server/services/tested-nutrients";
import { filterConditions, type FilterColumns } from "@/server/services/trial-filter";

/**
 * The tested-nutrient rule and the soil test that counts are written once in TypeScript and once in SQL (for the
 * filters). On real PGlite, random treatments, soil tests and filters must get the same answer from both: the SQL of
 * the real filter (filterConditions) keeps exactly the rows the TypeScript rule keeps.
 */
const probe = pgTable("tested_nutrient_probe", {
  id: integer("id").primaryKey(),
  versionId: uuid("version_id").notNull(),
  nutrients: text("nutrients").array().notNull(),
  placements: text("placements").array().notNull(),
  testedNutrientsStated: text("tested_nutrients_stated").array(),
  nLbAc: doublePrecision("n_lb_ac").notNull(),
  p2o5LbAc: doublePrecision("p2o5_lb_ac").notNull(),
  k2oLbAc: doublePrecision("k2o_lb_ac").notNull(),
  sLbAc: doublePrecision("s_lb_ac").notNull(),
  soilPClass: text("soil_p_class"),
  soilKClass: text("soil_k_class"),
  soilSClass: text("soil_s_class"),
});
const versionId = "00000000-0000-4000-8000-000000000001";
const columns: FilterColumns = {
  versionId: probe.versionId,
  treatment: {
    nutrients: probe.nutrients,
    placements: probe.placements,
    testedNutrientsStated: probe.testedNutrientsStated,
    nLbAc: probe.nLbAc,
    p2o5LbAc: probe.p2o5LbAc,
    k2oLbAc: probe.k2oLbAc,
    sLbAc: probe.sLbAc,
  },
  soilClass: { P: probe.soilPClass, K: probe.soilKClass, S: probe.soilSClass },
};
const testedColumns = {
  stated: probe.testedNutrientsStated,
  nLbAc: probe.nLbAc,
  p2o5LbAc: probe.p2o5LbAc,
  k2oLbAc: probe.k2oLbAc,
  sLbAc: probe.sLbAc,
};

let database: Database;
beforeAll(async () => {
  database = await openDatabase();
  await migrateDatabase(database);
  await database.db.execute(sql`CREATE TABLE tested_nutrient_probe (
    id integer PRIMARY KEY, version_id uuid NOT NULL, nutrients text[] NOT NULL, placements text[] NOT NULL, tested_nutrients_stated text[],
    n_lb_ac double precision NOT NULL, p2o5_lb_ac double precision NOT NULL, k2o_lb_ac double precision NOT NULL, s_lb_ac double precision NOT NULL,
    soil_p_class text, soil_k_class text, soil_s_class text)`);
}, 60_000);
afterAll(() => database?.close());

/** Rates as the upload stores them (three decimals), with zeros, carriers and exact one-half ties common. */
const rate = fc.oneof(
  { weight: 3, arbitrary: fc.constant(0) },
  { weight: 4, arbitrary: fc.integer({ min: 1, max: 200_000 }).map((x) => x / 1000) },
  { weight: 2, arbitrary: fc.constantFrom(5, 10, 11, 20, 26, 40, 52) },
);
const nutrientSubset = fc.subarray([...nutrients], { minLength: 1 });
const soilClass = fc.option(fc.constantFrom(...soilTestClasses), { nil: null });

// 26 and 52 (and 5, 10 and 20) make exact one-half ties common: a tie counts as tested in both.
const treatmentRow = fc.record({
  nLbAc: rate,
  p2o5LbAc: rate,
  k2oLbAc: rate,
  sLbAc: rate,
  stated: fc.option(nutrientSubset, { nil: null, freq: 4 }),
  soilPClass: soilClass,
  soilKClass: soilClass,
  soilSClass: soilClass,
});
type Row = (typeof treatmentRow extends fc.Arbitrary<infer T> ? T : never) & { id: number };

const filterArb = fc.record(
  {
    nutrient: nutrientSubset,
    nutrientSupplied: nutrientSubset,
    soilTestClass: fc.subarray([...soilTestClasses], { minLength: 1 }),
  },
  { requiredKeys: [] },
);

const rateOf = { N: "nLbAc", P: "p2o5LbAc", K: "k2oLbAc", S: "sLbAc" } as const;
/** Supplied in any amount, as the upload stores `nutrients`. */
const supplied = (r: Row) => nutrients.filter((n) => r[rateOf[n]] > 0);
const testedOf = (r: Row) => testedNutrients({ ...r, testedNutrientsStated: r.stated });

/** The TypeScript side: does a row pass these filters? */
function keeps(r: Row, f: Partial<TrialFilters>): boolean {
  const tested = testedOf(r);
  if (f.nutrient && !f.nutrient.some((n) => tested.includes(n))) return false;
  if (f.nutrientSupplied && !f.nutrientSupplied.some((n) => supplied(r).includes(n))) return false;
  if (f.soilTestClass) {
    const counted = countedSoilTest(tested, r, filterNutrientsOf(f));
    if (counted.class === null || !(f.soilTestClass as readonly string[]).includes(counted.class)) return false;
  }
  return true;
}

async function load(rows: Row[]) {
  await database.db.execute(sql`TRUNCATE tested_nutrient_probe`);
  await database.db.insert(probe).values(
    rows.map((r) => ({
      id: r.id,
      versionId,
      nutrients: supplied(r),
      placements: ["2x2-band"],
      testedNutrientsStated: r.stated,
      nLbAc: r.nLbAc,
      p2o5LbAc: r.p2o5LbAc,
      k2oLbAc: r.k2oLbAc,
      sLbAc: r.sLbAc,
      soilPClass: r.soilPClass,
      soilKClass: r.soilKClass,
      soilSClass: r.soilSClass,
    })),
  );
}

const withIds = (rows: Omit<Row, "id">[]): Row[] => rows.map((r, i) => ({ ...r, id: i + 1 }));

describe("the tested-nutrient rule: SQL and TypeScript agree on PGlite", () => {
  it("the tested nutrients and the counted soil class of every row", async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.array(treatmentRow, { minLength: 1, maxLength: 25 }),
        fc.option(nutrientSubset, { nil: undefined }),
        async (generated, filterNutrients) => {
          const rows = withIds(generated);
          await load(rows);
          const filters = { nutrient: filterNutrients };
          const result = await database.db
            .select({
              id: probe.id,
              tested: sql<string[]>`${testedNutrientsSql(testedColumns)}`,
              counted: sql<string | null>`${countedSoilClassSql(testedColumns, columns.soilClass!, filterNutrientsOf(filters))}`,
            })
            .from(probe)
            .orderBy(probe.id);
          for (const r of rows) {
            const got = result.find((x) => x.id === r.id)!;
            expect(got.tested, JSON.stringify(r)).toEqual(testedOf(r));
            expect(got.counted, JSON.stringify({ r, filterNutrients })).toBe(
              countedSoilTest(testedOf(r), r, filterNutrientsOf(filters)).class,
            );
          }
        },
      ),
      { numRuns: 150 },
    );
  }, 120_000);

  it("the rows the real filter (filterConditions) keeps", async () => {
    await fc.assert(
      fc.asyncProperty(fc.array(treatmentRow, { minLength: 1, maxLength: 25 }), filterArb, async (generated, filters) => {
        const rows = withIds(generated);
        await load(rows);
        const kept = await database.db
          .select({ id: probe.id })
          .from(probe)
          .where(filterConditions(filters, [versionId], columns))
          .orderBy(probe.id);
        expect(
          kept.map((k) => k.id),
          JSON.stringify(filters),
        ).toEqual(rows.filter((r) => keeps(r, filters)).map((r) => r.id));
      }),
      { numRuns: 200 },
    );
  }, 120_000);

  it("a P+K treatment is filtered and shown by the same soil test", () => {
    // P and K both tested; P has no class recorded, K is low: the K test counts for the filter and for the label alike.
    const soil = { soilPClass: null, soilKClass: "low" };
    expect(countedSoilTest(["P", "K"], soil)).toMatchObject({ analyte: "K", class: "low" });
    // Both recorded: P comes first unless the filter names K.
    expect(countedSoilTest(["P", "K"], { soilPClass: "high", soilKClass: "low" })).toMatchObject({ analyte: "P", class: "high" });
    expect(countedSoilTest(["P", "K"], { soilPClass: "high", soilKClass: "low" }, ["K"])).toMatchObject({ analyte: "K", class: "low" });
  });

  it("carriers: the N in MAP and 10-34-0 is carried, ammonium sulfate tests N and S", () => {
    expect(derivedTestedNutrients({ nLbAc: 11, p2o5LbAc: 52, k2oLbAc: 0, sLbAc: 0 })).toEqual(["P"]);
    expect(derivedTestedNutrients({ nLbAc: 3.42, p2o5LbAc: 11.628, k2oLbAc: 0, sLbAc: 0 })).toEqual(["P"]);
    expect(derivedTestedNutrients({ nLbAc: 21, p2o5LbAc: 0, k2oLbAc: 0, sLbAc: 24 })).toEqual(["N", "S"]);
    expect(derivedTestedNutrients({ nLbAc: 15, p2o5LbAc: 0, k2oLbAc: 15, sLbAc: 0 })).toEqual(["N", "K"]);
    expect(testedNutrients({ nLbAc: 11, p2o5LbAc: 52, k2oLbAc: 0, sLbAc: 0, testedNutrientsStated: ["N", "P"] })).toEqual(["N", "P"]);
  });
});
