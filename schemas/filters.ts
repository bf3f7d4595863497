import { z } from "zod";
import { line } from "./safe-text";

import { crops, nutrients, placements, soilTestClasses, tillages } from "@/constants/vocabulary";

// The filter values are the vocabulary's; their labels live there too.
export { crops, nutrients, placements, soilTestClasses, tillages };

/**
 * A comma-separated or repeated query parameter, parsed into a list of allowed values. OpenAPI cannot see through the
 * transform, so the list and its allowed values are declared beside it.
 */
export const listOf = <T extends readonly [string, ...string[]]>(values: T) =>
  z
    .union([line(), z.array(line())])
    .transform((v) => (Array.isArray(v) ? v : v.split(",")).map((s) => s.trim()).filter(Boolean))
    .pipe(z.array(z.enum(values)).min(1))
    .meta({ type: "array", items: { type: "string", enum: [...values] }, param: { style: "form", explode: false } });

const numberParam = z.coerce.number().finite();
const yearParam = z.coerce.number().int().min(1900).max(2100);
const monthDay = line().regex(/^\d{2}-\d{2}$/, "use MM-DD, e.g. 05-10");

/**
 * The one set of filters shared by observations, responses and analyses, so a screen's numbers can be fetched with
 * the same URL. Unknown parameters are refused (strict), and every value is typed.
 */
export const trialFilterShape = {
  crop: listOf(crops).optional().describe("Crop(s): soybean, corn, wheat"),
  nutrient: listOf(nutrients)
    .optional()
    .describe(
      "Responses that test any of these nutrients (N, P, K, S): the nutrients a treatment adds over its check beyond a carrier amount " +
        "(less than half its largest nutrient rate, e.g. the N in MAP), or as the curator stated them",
    ),
  nutrientSupplied: listOf(nutrients)
    .optional()
    .describe("Treatments that supply any amount of these nutrients, carriers included (the N in MAP or 10-34-0 counts)"),
  placement: listOf(placements).optional().describe("Treatments with an application placed so"),
  soilTestClass: listOf(soilTestClasses)
    .optional()
    .describe(
      "Soil-test class (on the ordinal scale) of the soil test that counts: of the tested nutrients (P before K before S), narrowed " +
        "to the filtered nutrients when the response tests one of them, the first with a class recorded",
    ),
  yearFrom: yearParam.optional(),
  yearTo: yearParam.optional(),
  dataset: line().max(120).optional().describe("Dataset slug; default all datasets"),
  version: line()
    .regex(/^(latest|\d+\.\d+\.\d+)$/, "a semantic version such as 1.2.0, or latest")
    .optional()
    .describe("Version of `dataset` (needs dataset); default the latest published version of each dataset"),
  tillage: listOf(tillages).optional(),
  rowSpacingMin: numberParam.min(0).max(80).optional().describe("Row spacing, inches, at least"),
  rowSpacingMax: numberParam.min(0).max(80).optional().describe("Row spacing, inches, at most"),
  plantedFrom: monthDay.optional().describe("Planting date on or after this day of the year (MM-DD)"),
  plantedTo: monthDay.optional().describe("Planting date on or before this day of the year (MM-DD)"),
  nRateMin: numberParam.min(0).optional().describe("Total N, lb/ac, at least"),
  nRateMax: numberParam.min(0).optional(),
  p2o5RateMin: numberParam.min(0).optional().describe("Total P2O5, lb/ac, at least"),
  p2o5RateMax: numberParam.min(0).optional(),
  k2oRateMin: numberParam.min(0).optional().describe("Total K2O, lb/ac, at least"),
  k2oRateMax: numberParam.min(0).optional(),
  sRateMin: numberParam.min(0).optional().describe("Total S, lb/ac, at least"),
  sRateMax: numberParam.min(0).optional(),
};

export const trialFilters = z
  .object(trialFilterShape)
  .strict()
  .superRefine((f, ctx) => {
    if (f.version && !f.dataset) ctx.addIssue({ code: "custom", path: ["version"], message: "version needs dataset" });
    if (f.yearFrom && f.yearTo && f.yearFrom > f.yearTo)
      ctx.addIssue({ code: "custom", path: ["yearTo"], message: "yearTo is before yearFrom" });
  })
  .meta({ id: "TrialFilters" });

export type TrialFilters = z.infer<typeof trialFilters>;

/** Back to query-string form: the canonical (normalised) filters shown in provenance and used in share links. */
export function filtersToQuery(f: Partial<TrialFilters>): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [key, value] of Object.entries(f)) {
    if (value === undefined || value === null) continue;
    out[key] = Array.isArray(value) ? [...value].sort().join(",") : String(value);
  }
  return Object.fromEntries(Object.entries(out).sort(([a], [b]) => a.localeCompare(b)));
}
