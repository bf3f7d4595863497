import { z } from "zod";
import { listOf } from "./filters";

/**
 * Where the response comes from along a continuous moderator, and heterogeneity detail, on request: the options of
 * GET /api/v1/analyses/meta that ask for them and the blocks they add. Nothing here is in a default answer.
 */

const moderators = ["soilTestValue", "checkYield", "plantingDayOfYear", "rate"] as const;
export type Moderator = (typeof moderators)[number];
const includeDetails = ["heterogeneityIntervals"] as const;
const subgroupTau2Modes = ["common", "separate"] as const;

export const metaDetailOptionShape = {
  moderator: z
    .enum(moderators)
    .optional()
    .describe(
      "Meta-regression of the response on one continuous moderator (mixed-effects, τ² by `method`, HKSJ t(k − 2) tests by default, as " +
        'metafor rma(yi, vi, mods = ~ x, test = "knha")). soilTestValue: the value of the soil test that counts (see soilTestClass), in its ' +
        "unit and extractant; checkYield: the site-year's check mean in `units` (the yield environment); plantingDayOfYear: 1 = 1 January; " +
        "rate: the tested nutrient's rate, lb/ac in label units (P2O5, K2O, N, S). Site-years without a value are left out and counted in " +
        "`moderatorRegression.excluded`; site-years on different scales (soil tests of several nutrients, units or extractants, check " +
        "yields of several crops, rates of several nutrients) are refused with 422, naming what is mixed.",
    ),
  include: listOf(includeDetails)
    .optional()
    .describe(
      "Extra detail: heterogeneityIntervals adds Q-profile 95 % intervals of τ², τ, I² and H² (metafor confint()) to `heterogeneity`, " +
        "to `moderatorRegression.fit` (residual τ²) and to each separate subgroup level",
    ),
  subgroupTau2: z
    .enum(subgroupTau2Modes)
    .default("common")
    .describe(
      "common (default): the subgroup levels share one τ². separate (needs groupBy): also fit each level on its own, with its own τ², " +
        "and compare the level means with Q_between, in `subgroups.separate`",
    ),
};

const coefficient = z.object({
  estimate: z.number(),
  se: z.number(),
  statistic: z.number().describe("t under HKSJ, z under Wald"),
  df: z.number().int().nullable().describe("k − 2 under HKSJ; null under Wald"),
  pValue: z.number(),
  ciLower: z.number(),
  ciUpper: z.number(),
});

export const heterogeneityInterval = z
  .object({
    method: z.literal("Q-profile"),
    level: z.number(),
    tau2: z.object({ estimate: z.number(), lower: z.number(), upper: z.number() }),
    tau: z.object({ estimate: z.number(), lower: z.number(), upper: z.number() }),
    i2Percent: z.object({ estimate: z.number(), lower: z.number(), upper: z.number() }),
    h2: z.object({ estimate: z.number(), lower: z.number(), upper: z.number() }),
    converged: z.boolean(),
  })
  .describe("Q-profile interval (Viechtbauer 2007), as metafor confint() gives it")
  .meta({ id: "HeterogeneityInterval" });

const linePoint = z.object({
  x: z.number(),
  fitted: z.number().describe("b₀ + b₁x"),
  se: z.number(),
  ciLower: z.number().describe("Confidence band of the line: fitted ± c·se"),
  ciUpper: z.number(),
  piLower: z.number().nullable().describe("Where a new site-year's response may fall: fitted ± c·√(se² + τ²); null for FE"),
  piUpper: z.number().nullable(),
});

const crossing = z
  .object({
    target: z.number().describe("The response the line is set against (0, or the break-even), in `units`"),
    value: z
      .number()
      .nullable()
      .describe("The moderator value where the fitted line reaches the target; null when it does not fall with the moderator"),
    withinObservedRange: z.boolean().nullable().describe("false: the value is an extrapolation beyond the tested range"),
    interval: z
      .object({ lower: z.number(), upper: z.number() })
      .nullable()
      .describe(
        "95 % interval: the moderator values at which the line's confidence band contains the target (Fieller); null when it is not " +
          "bounded (the slope is not clearly different from zero): not estimable",
      ),
    text: z.string(),
  })
  .meta({ id: "LineCrossing" });

const criticalLevel = z
  .object({
    zero: crossing,
    breakEven: z
      .union([crossing, z.null()])
      .describe("Where the fitted response falls to the break-even at the given price and cost; null without them"),
    caution: z.object({ code: z.literal("critical-level-estimate"), text: z.string(), source: z.string() }),
  })
  .describe(
    "Critical soil-test level: `zero` is where the fitted response falls to zero, `breakEven` where it falls to the break-even at the " +
      "given price and cost (null without them); each with the interval where the line's band crosses, or not estimable",
  )
  .meta({ id: "CriticalSoilTestLevel" });

const moderatorFit = z.object({
  model: z.string().describe("The model in R's words"),
  intercept: coefficient.describe("Fitted response at moderator 0"),
  slope: coefficient.describe("Change in the response per unit of the moderator"),
  covariance: z.array(z.array(z.number())).describe("Covariance of (intercept, slope), HKSJ-scaled under HKSJ"),
  critical: z.number().describe("Critical value of the band: t(0.975, k − 2) under HKSJ, z(0.975) under Wald"),
  r2Percent: z.number().nullable().describe("Share of τ² the moderator accounts for, max(0, 100(τ²₀ − τ²)/τ²₀); null for FE or τ²₀ = 0"),
  tau2: z.number().describe("Residual τ²"),
  tau: z.number(),
  i2Percent: z.number().nullable().describe("Residual I²"),
  residualHeterogeneity: z.object({
    qe: z.number(),
    df: z.number().int(),
    pValue: z.number().nullable(),
  }),
  line: z.array(linePoint).describe("The fitted line and its band at 25 evenly spaced values across the observed range"),
  heterogeneityInterval: heterogeneityInterval.optional().describe("With include=heterogeneityIntervals"),
});

export const moderatorRegression = z
  .object({
    moderator: z.enum(moderators),
    label: z.string().describe('The moderator in words with its scale, e.g. "Soil-test P (Bray-P1, ppm)"'),
    unit: z.string().describe("ppm, bu/ac, day of year, lb/ac P2O5 …"),
    analyte: z.string().nullable().describe("soilTestValue: the soil-tested nutrient"),
    extractant: z.string().nullable().describe("soilTestValue: the extractant; null when none was recorded"),
    nutrient: z.string().nullable().describe("rate: the tested nutrient whose rate this is"),
    k: z.number().int().describe("Site-years with a moderator value, in the fit"),
    range: z.object({ min: z.number(), max: z.number() }).nullable(),
    excluded: z.object({
      count: z.number().int().describe("Site-years of the analysis left out of the fit: no moderator value"),
      siteYears: z
        .array(z.object({ siteYearCode: z.string(), dataset: z.string(), version: z.string(), reason: z.string() }))
        .describe("The first 50 of them"),
    }),
    fit: moderatorFit.nullable().describe("null with fewer than 3 site-years or fewer than 2 distinct values"),
    criticalLevel: z.union([criticalLevel, z.null()]).describe("moderator=soilTestValue with a fit"),
    plainWords: z.string(),
    notes: z.array(z.string()),
  })
  .meta({ id: "ModeratorRegression" });
export type ModeratorRegressionShape = z.infer<typeof moderatorRegression>;
export type HeterogeneityIntervalShape = z.infer<typeof heterogeneityInterval>;

export const separateSubgroups = z
  .object({
    model: z.string(),
    levels: z.array(
      z.object({
        level: z.string(),
        k: z.number().int(),
        estimate: z.number(),
        se: z.number(),
        ciLower: z.number(),
        ciUpper: z.number(),
        pValue: z.number(),
        df: z.number().int().nullable(),
        tau2: z.number().describe("This level's own τ²"),
        tau: z.number(),
        i2Percent: z.number().nullable(),
        q: z.object({ statistic: z.number(), df: z.number().int(), pValue: z.number().nullable() }),
        heterogeneityInterval: z
          .union([heterogeneityInterval, z.null()])
          .optional()
          .describe("With include=heterogeneityIntervals; null for k < 2 or FE"),
      }),
    ),
    betweenGroupTest: z
      .object({ statistic: z.number(), df: z.number().int(), distribution: z.literal("chi-square"), pValue: z.number(), text: z.string() })
      .nullable()
      .describe("Q_between = Σ (est_j − est_w)²/se_j² over the separate level estimates, χ²(levels − 1); null with one level"),
  })
  .describe("subgroupTau2=separate: each level fitted on its own")
  .meta({ id: "SeparateSubgroups" });
export type SeparateSubgroupsShape = z.infer<typeof separateSubgroups>;
