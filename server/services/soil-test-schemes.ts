import type { soilTestClasses } from "@/schemas/filters";
import type { SoilTestScheme } from "@/schemas/soil-test-schemes";

type SoilTestClass = (typeof soilTestClasses)[number];

const ordinal = (labels: readonly [string, string, string, string, string]) =>
  (["very_low", "low", "optimum", "high", "very_high"] as const).map((scale, i) => ({ label: labels[i]!, scale }));

const tallgrass = {
  title: "Tallgrass Basin illustrative soil-test interpretation",
  source:
    "Invented round numbers in the usual shape of such tables, for the fictional demo region only; not a recommendation for any real field.",
  sourceStatus: "invented for the demo" as const,
  unit: "ppm",
  classes: ordinal(["very_low", "low", "optimum", "high", "very_high"]),
};

const isu = {
  title: "Iowa State University Extension PM 1688 (2013 revision), corn and soybean, 6-inch samples",
  source:
    "Mallarino et al., A General Guide for Crop Nutrient and Limestone Recommendations in Iowa, Iowa State University Extension PM 1688 (2013).",
  sourceStatus: "from memory" as const,
  unit: "ppm",
  classes: ordinal(["Very Low", "Low", "Optimum", "High", "Very High"]),
};

/**
 * The schemes every version can name without registering them. A version's data dictionary may add its own
 * (`soilTestSchemes`), under names of its own. Thresholds are exclusive upper limits of each class but the last.
 */
export const builtInSchemes: SoilTestScheme[] = [
  { name: "tallgrass-illustrative", analyte: "P", extractant: "Bray-P1", thresholds: [6, 11, 16, 21], ...tallgrass },
  { name: "tallgrass-illustrative", analyte: "P", extractant: "Mehlich-3", thresholds: [9, 16, 21, 26], ...tallgrass },
  { name: "tallgrass-illustrative", analyte: "K", extractant: "ammonium-acetate", thresholds: [91, 131, 171, 211], ...tallgrass },
  // PM 1688's tables: Bray-P1 and Mehlich-3 P 0–8, 9–15, 16–20, 21–30, 31+ ppm; ammonium-acetate K (dried samples) 0–120, 121–160, 161–200, 201–250, 251+ ppm.
  { name: "isu-pm1688-2013", analyte: "P", extractant: "Bray-P1", thresholds: [9, 16, 21, 31], ...isu },
  { name: "isu-pm1688-2013", analyte: "P", extractant: "Mehlich-3", thresholds: [9, 16, 21, 31], ...isu },
  { name: "isu-pm1688-2013", analyte: "K", extractant: "ammonium-acetate", thresholds: [121, 161, 201, 251], ...isu },
];

export const builtInSchemeNames = new Set(builtInSchemes.map((s) => s.name));

export type SchemeLookup =
  { ok: true; scheme: SoilTestScheme; extractantDiffers: boolean } | { ok: false; reason: "unknown" | "analyte"; message: string };

/**
 * The scheme a soil-test row names: the version's own first, then the built-in ones; among several of one name, the
 * one for the row's analyte and extractant. A scheme for the analyte under another extractant still maps its labels,
 * but its thresholds say nothing about this row (`extractantDiffers`).
 */
export function findScheme(
  name: string,
  analyte: string,
  extractant: string | null,
  versionSchemes: readonly SoilTestScheme[] = [],
): SchemeLookup {
  const own = versionSchemes.filter((s) => s.name === name);
  const named = own.length ? own : builtInSchemes.filter((s) => s.name === name);
  if (named.length === 0) {
    const known = [...new Set([...versionSchemes.map((s) => s.name), ...builtInSchemeNames])].join(", ");
    return {
      ok: false,
      reason: "unknown",
      message: `interpretation scheme "${name}" is neither in this version's data dictionary (soilTestSchemes) nor built in (${known})`,
    };
  }
  const forAnalyte = named.filter((s) => s.analyte === analyte);
  if (forAnalyte.length === 0)
    return {
      ok: false,
      reason: "analyte",
      message: `scheme "${name}" interprets ${[...new Set(named.map((s) => s.analyte))].join(", ")}, not ${analyte}`,
    };
  const exact = forAnalyte.find((s) => s.extractant === null || s.extractant === extractant);
  return exact ? { ok: true, scheme: exact, extractantDiffers: false } : { ok: true, scheme: forAnalyte[0]!, extractantDiffers: true };
}

/** The scheme's class for a value by its thresholds, or null for an "as reported" scheme. */
export function classifyByThresholds(scheme: SoilTestScheme, value: number): SoilTestScheme["classes"][number] | null {
  if (scheme.thresholds === "as reported") return null;
  const i = scheme.thresholds.findIndex((upper) => value < upper);
  return scheme.classes[i === -1 ? scheme.classes.length - 1 : i] ?? null;
}

/** A reported label as one of the scheme's classes (case and spacing aside), or null when the scheme has no such label. */
export function classOfLabel(scheme: SoilTestScheme, label: string): SoilTestScheme["classes"][number] | null {
  const wanted = label.trim().toLowerCase();
  return scheme.classes.find((c) => c.label.toLowerCase() === wanted) ?? null;
}

/** Our ordinal class of a value under a named built-in scheme, or null when no built-in scheme covers it. */
export function interpretSoilTest(schemeName: string, analyte: string, extractant: string | null, value: number): SoilTestClass | null {
  const found = findScheme(schemeName, analyte, extractant);
  if (!found.ok || found.extractantDiffers) return null;
  return classifyByThresholds(found.scheme, value)?.scale ?? null;
}
