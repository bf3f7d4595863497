import { z } from "zod";
import { unitsParam } from "./public";
import { line } from "./safe-text";

/**
 * The analysis of variance of one site-year, as its own RCBD: the F table (block, treatment, residual), the error
 * mean square, CV, LSD(0.05) (one for a balanced layout, one per pair when plots are missing) and the least-squares
 * means with their SEs. The same answer for a published version, across datasets and for a draft.
 */

/** Plot measures a site-year's ANOVA can be read on: each is a column of the plots file. */
export const anovaMeasures = ["yield", "stand_count", "vigour", "test_weight", "harvest_moisture"] as const;
export type AnovaMeasure = (typeof anovaMeasures)[number];

const measureParam = z
  .enum(anovaMeasures)
  .default("yield")
  .describe(
    "The plot measure analysed: yield (default, at the crop's standard moisture), stand_count (plants/ac), vigour (score 1–9), " +
      "test_weight (lb/bu) or harvest_moisture (%)",
  );
export const siteYearAnovaQuery = z
  .object({ measure: measureParam, units: unitsParam.describe(`${unitsParam.description} Measures other than yield keep their own unit.`) })
  .strict()
  .meta({ id: "SiteYearAnovaQuery" });
export type SiteYearAnovaQuery = z.infer<typeof siteYearAnovaQuery>;

/** Across datasets a site-year code is found in the latest published version of each dataset, or in `dataset`. */
export const crossDatasetAnovaQuery = siteYearAnovaQuery
  .extend({
    dataset: line().min(1).max(120).optional().describe("Dataset slug; needed when the code is in more than one dataset"),
    version: line()
      .regex(/^(latest|\d+\.\d+\.\d+)$/, "a semantic version such as 1.2.0, or latest")
      .optional()
      .describe("Version of `dataset` (needs dataset); default the latest published version"),
  })
  .strict()
  .meta({ id: "CrossDatasetAnovaQuery" });

export const siteYearCodeParam = line().min(1).max(120).describe("The site-year's code, e.g. TB-03-2022");

const termRow = z.object({
  df: z.number().int(),
  sumOfSquares: z.number().describe("In the measure's unit squared"),
  meanSquare: z.number(),
  fStatistic: z.number().nullable(),
  pValue: z.number().nullable(),
});

const anovaTable = z
  .object({
    block: termRow,
    treatment: termRow.describe("Adjusted for blocks (sequential, block first) when plots are missing"),
    residual: z.object({ df: z.number().int(), sumOfSquares: z.number(), meanSquare: z.number().nullable() }),
    total: z.object({ df: z.number().int(), sumOfSquares: z.number() }),
  })
  .describe("anova(lm(y ~ block + treatment)) of the site-year's plots");

const treatmentMean = z.object({
  code: z.string(),
  name: z.string(),
  isCheck: z.boolean(),
  observations: z.number().int().describe("Plots with a value (from plots), or the replicates a summary gives"),
  mean: z.number().describe("Arithmetic mean of its plots, or the published mean"),
  lsMean: z.number().nullable().describe("Least-squares mean, averaged over blocks; equals `mean` when balanced"),
  standardError: z.number().nullable().describe("SE of the LS-mean (√(MSE/r) when balanced)"),
});

const pairLsd = z.object({
  a: z.string().describe("Treatment code"),
  b: z.string().describe("Treatment code"),
  difference: z.number().describe("LS-mean of b minus LS-mean of a"),
  standardError: z.number().describe("SE of the difference, √(v_a + v_b − 2·c_ab) from the LS-means' covariance"),
  lsd: z.number().describe("LSD(0.05) of this pair: t(0.975, df_error) · SE"),
  differs: z.boolean().describe("|difference| > LSD"),
});

const missingPlot = z.object({
  block: z.number().int(),
  treatment: z.string().describe("Treatment code"),
  plot: z.string().nullable().describe("The plot's label when the plots file has the row with no value; null when the row is absent"),
});

export const siteYearAnova = z
  .object({
    dataset: z.string().describe("Dataset slug"),
    version: z.string().describe("Semantic version of the version read"),
    versionState: z.string().describe("published, or draft / in_review on the curation route"),
    siteYear: z.object({
      code: z.string(),
      siteCode: z.string(),
      crop: z.string(),
      year: z.number().int(),
      design: z.string(),
      blocks: z.number().int().describe("Blocks the site-year declares"),
    }),
    measure: z.object({ name: z.enum(anovaMeasures), title: z.string(), unit: z.string() }),
    source: z.enum(["plots", "summary", "none"]).describe("What the numbers come from: plot rows, published means (no plots), or neither"),
    computed: z.boolean().describe("Whether the ANOVA table could be computed"),
    reason: z.string().nullable().describe("Why the table could not be computed"),
    balanced: z.boolean().nullable().describe("Every treatment once in every block (null for summaries)"),
    plots: z.number().int().describe("Plots with a value of the measure"),
    missingPlots: z.array(missingPlot).describe("Treatment × block cells without a value"),
    table: anovaTable.nullable(),
    mse: z.number().nullable().describe("Error mean square, in the unit squared"),
    dfError: z.number().int().nullable(),
    grandMean: z.number().nullable(),
    cvPercent: z.number().nullable().describe("100·√MSE / grand mean"),
    lsd: z.object({
      alpha: z.literal(0.05),
      single: z.number().nullable().describe("The one LSD of a balanced site-year, t(0.975, df)·√(2·MSE/r); null when it differs by pair"),
      pairs: z.array(pairLsd).describe("Every pair of treatments; present in the balanced case too (each equal to `single`)"),
    }),
    means: z.array(treatmentMean),
    notes: z.array(z.string()),
  })
  .meta({ id: "SiteYearAnova" });
export type SiteYearAnova = z.infer<typeof siteYearAnova>;
