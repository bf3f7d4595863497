import { placements, soilTestClasses, tillages, crops, nutrients, type TrialFilters } from "@/schemas/filters";
import type { Grouping } from "@/schemas/analysis";
import type { Contrast, EstimationContrast } from "./load-contrasts";

type SoilTestFields = Partial<Pick<Contrast, "nutrients" | "soilPClass" | "soilPValue" | "soilKClass" | "soilKValue" | "soilSClass" | "soilSValue">>;

type Analyte = "P" | "K" | "S";

/**
 * The soil test a contrast is judged by: the filtered nutrient's own test (P before K before S), else the treatment's
 * primary nutrient — the same rule the soil-test-class filter applies, so a class shown is the class filtered on.
 */
export function relevantSoilTest(row: SoilTestFields, filterNutrients: TrialFilters["nutrient"]) {
  const tested = (["P", "K", "S"] as const).filter((n) => filterNutrients?.includes(n));
  const candidates: readonly Analyte[] = tested.length ? tested : (["P", "K", "S"] as const).filter((n) => row.nutrients?.includes(n));
  const pick = (n: Analyte) =>
    n === "P"
      ? { analyte: n, class: row.soilPClass ?? null, value: row.soilPValue ?? null }
      : n === "K"
        ? { analyte: n, class: row.soilKClass ?? null, value: row.soilKValue ?? null }
        : { analyte: n, class: row.soilSClass ?? null, value: row.soilSValue ?? null };
  const withClass = candidates.map(pick).find((t) => t.class !== null);
  return withClass ?? (candidates[0] ? pick(candidates[0]) : { analyte: null, class: null, value: null });
}

/**
 * Planting windows by calendar day: early before 10 May, normal 10–31 May, late from 1 June. A temperate-region
 * convention (common practice, no source); local windows differ.
 */
export function plantingWindow(plantingDate: string | null): string {
  if (!plantingDate) return "not recorded";
  const monthDay = plantingDate.slice(5, 10);
  if (monthDay < "05-10") return "early";
  if (monthDay <= "05-31") return "normal";
  return "late";
}

export const notRecorded = "not recorded";

/** The level of a contrast under a grouping; treatments with several placements or nutrients form their own level. */
export function groupLevel(row: EstimationContrast, by: Grouping, filters: TrialFilters, datasetSlug: string): string {
  switch (by) {
    case "soilTestClass":
      return relevantSoilTest(row, filters.nutrient).class ?? notRecorded;
    case "placement":
      return row.placements?.length ? [...row.placements].sort(byOrder(placements)).join(" + ") : notRecorded;
    case "nutrient":
      return row.nutrients?.length ? [...row.nutrients].sort(byOrder(nutrients)).join(" + ") : notRecorded;
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
