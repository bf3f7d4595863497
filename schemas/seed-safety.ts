import { z } from "zod";
import { analysedMeasure, cautionShape } from "./analysis";
import { trialFilterShape, trialFilters } from "./filters";

const { placement: _placement, ...filterShapeWithoutPlacement } = trialFilterShape;
const filterKeys = Object.keys(filterShapeWithoutPlacement);

/** The seed-safety question: the shared filters but placement (it compares placements), and stand or early growth. */
export const seedSafetyQuery = z
  .object({
    ...filterShapeWithoutPlacement,
    measure: z.enum(["stand", "vigour"]).default("stand").describe("stand: plants/ac (default); vigour: the early-growth score"),
  })
  .strict()
  .superRefine((q, ctx) => {
    const filters = Object.fromEntries(
      filterKeys.flatMap((k) => (q[k as keyof typeof q] === undefined ? [] : [[k, q[k as keyof typeof q]]])),
    );
    const checked = trialFilters.safeParse(filters);
    if (!checked.success)
      for (const issue of checked.error.issues) ctx.addIssue({ code: "custom", path: issue.path, message: issue.message });
  })
  .meta({ id: "SeedSafetyQuery" });
export type SeedSafetyQuery = z.infer<typeof seedSafetyQuery>;

const placementGroup = z
  .object({
    k: z.number().int().describe("Site-years pooled (several treatments of one site-year are combined first)"),
    tests: z.number().int().describe("Treatment-vs-check contrasts (site-year × treatment)"),
    estimate: z.number().describe("Pooled mean difference, treated − check, in the measure's unit (REML, HKSJ)"),
    ciLower: z.number(),
    ciUpper: z.number(),
    relativePercent: z.number().nullable().describe("Pooled 100·(treated ÷ check − 1) from the log response ratio (REML, HKSJ)"),
    relativeCiLower: z.number().nullable(),
    relativeCiUpper: z.number().nullable(),
    lossesFound: z.number().int().describe("Contrasts whose site-year's own test found a loss (see lossRule)"),
  })
  .meta({ id: "SeedSafetyGroup" });

const ratePoint = z
  .object({
    dataset: z.string(),
    siteYearCode: z.string(),
    treatmentCode: z.string(),
    treatmentLabel: z.string(),
    seedPlaced: z.boolean().describe("The treatment has an in-furrow (seed-placed) application"),
    seedPlacedNK2oLbAc: z.number().describe("N + K2O placed with the seed, lb/ac (0 for band and broadcast)"),
    relativePercent: z.number().nullable().describe("100·(treated ÷ check − 1) in this site-year"),
    md: z.number().describe("Treated − check in the measure's unit"),
    lossFound: z.boolean().describe("The site-year's own test found a loss (see lossRule)"),
  })
  .meta({ id: "SeedSafetyPoint" });

export const seedSafetyResult = z
  .object({
    measure: analysedMeasure,
    seedPlaced: placementGroup.nullable().describe("Treatments with an in-furrow application; null when none match"),
    notSeedPlaced: placementGroup.nullable().describe("Treatments placed away from the seed (2x2 band, broadcast …); null when none match"),
    statement: z.string().describe("The answer in plain words"),
    lossRule: z.string().describe("When a site-year's own test counts as finding a loss"),
    points: z.array(ratePoint).describe("Every contrast, for a plot of the response against the seed-placed N + K2O rate"),
    byRate: z
      .array(z.object({ seedPlacedNK2oLbAc: z.number(), tests: z.number().int(), meanRelativePercent: z.number().nullable() }))
      .describe("Seed-placed contrasts by their N + K2O rate with the seed, lowest first: does the loss grow with rate?"),
    cautions: z
      .array(cautionShape)
      .describe("The caution rules tested against the seed-placed treatments (rules and sources: the same as the meta-analysis)"),
    notes: z.array(z.string()),
  })
  .meta({ id: "SeedSafety" });
export type SeedSafetyResult = z.infer<typeof seedSafetyResult>;
