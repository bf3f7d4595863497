import { placements, soilTestClasses, tillages, crops, nutrients, type TrialFilters } from "@/schemas/filters";
import type { Grouping } from "@/schemas/analysis";
import { countedSoilTest, filterNutrientsOf, testedNutrients, type SoilTestsByAnalyte } from "@/server/services/tested-nutrients";
import type { Contrast, EstimationContrast } from "./load-contrasts";

type SoilTestFields = Partial<Pick<Contrast, "testedNutrientsStated" | "nLbAc" | "p2o5LbAc" | "k2oLbAc" | "sLbAc">> & SoilTestsByAnalyte;

/** The nutrients a contrast tests (the one rule in tested-nutrients.ts); rates missing from a partial row count as 0. */
export function contrastTestedNutrients(row: SoilTestFields) {
  return testedNutrients({
    testedNutrientsStated: row.testedNutrientsStated ?? null,
    nLbAc: row.nLbAc ?? 0,
    p2o5LbAc: row.p2o5LbAc ?? 0,
    k2oLbAc: row.k2oLbAc ?? 0,
    sLbAc: row.sLbAc ?? 0,
  });
}

/**
 * The soil test a contrast is judged by, under the same rule (tested-nutrients.ts) the soil-test-class filter applies
 * in SQL, so a class shown is the class filtered on.
 */
export function relevantSoilTest(row: SoilTestFields, filters: Partial<Pick<TrialFilters, "nutrient" | "nutrientSupplied">>) {
  return countedSoilTest(contrastTestedNutrients(row), row, filterNutrientsOf(filters));
}

/**
 * Planting windows by calendar day: early before 10 May, normal 10–31 May, late from 1 June. A temperate-region
 * convention (common practice, no source); local windows differ.
 */
function plantingWindow(plantingDate: string | null): string {
  if (!plantingDate) return "not recorded";
  const monthDay = plantingDate.slice(5, 10);
  if (monthDay < "05-10") return "early";
  if (monthDay <= "05-31") return "normal";
  return "late";
}

const notRecorded = "not recorded";

/** The level of a contrast under a grouping; treatments with several placements or nutrients form their own level. */
export function groupLevel(row: EstimationContrast, by: Grouping, filters: TrialFilters, datasetSlug: string): string {
  switch (by) {
    case "soilTestClass":
      return relevantSoilTest(row, filters).class ?? notRecorded;
    case "placement":
      return row.placements?.length ? [...row.placements].sort(byOrder(placements)).join(" + ") : notRecorded;
    case "nutrient":
      return contrastTestedNutrients(row).join(" + ") || notRecorded;
    case "crop":
      return row.crop;
    case "tillage":
      return row.tillage ?? notRecorded;
    case "plantingWindow":
      return plantingWindow(row.plantingDate ?? null);
    case "dataset":
      return datasetSlug;
  }
}

const byOrder = (order: readonly string[]) => (a: string, b: string) => rank(order, a) - rank(order, b) || a.localeCompare(b);
const rank = (order: readonly string[], value: string) => {
  const i = order.indexOf(value);
  return i < 0 ? order.length : i;
};

const levelOrders: Record<Grouping, readonly string[]> = {
  soilTestClass: soilTestClasses,
  placement: placements,
  nutrient: nutrients,
  crop: crops,
  tillage: tillages,
  plantingWindow: ["early", "normal", "late"],
  dataset: [],
};

/** Levels in their agronomic order (very low → very high, in-furrow → deep band…), unrecorded last. */
export function orderLevels(by: Grouping, levels: Iterable<string>): string[] {
  const order = levelOrders[by];
  return [...new Set(levels)].sort((a, b) => {
    if (a === notRecorded || b === notRecorded) return a === notRecorded ? (b === notRecorded ? 0 : 1) : -1;
    return rank(order, a.split(" + ")[0] ?? a) - rank(order, b.split(" + ")[0] ?? b) || a.length - b.length || a.localeCompare(b);
  });
}
