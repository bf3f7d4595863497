import { z } from "zod";
import { trialFilterShape, trialFilters } from "./filters";
import { yieldUnits, type YieldUnit } from "./public";
import { heterogeneityInterval, metaDetailOptionShape, moderatorRegression, separateSubgroups } from "./meta-regression";
import { measureParam } from "./measures";
import { betterDirections } from "@/constants/measures";

export { type YieldUnit };

const effectMeasures = ["md", "lnrr"] as const;
const tauMethods = ["REML", "DL", "PM", "FE"] as const;
const ciMethods = ["hksj", "wald"] as const;
export const groupings = ["soilTestClass", "placement", "nutrient", "crop", "tillage", "plantingWindow", "dataset"] as const;

export type EffectMeasure = (typeof effectMeasures)[number];
export type TauMethod = (typeof tauMethods)[number];
export type CiMethod = (typeof ciMethods)[number];
export type Grouping = (typeof groupings)[number];

const money = z.coerce.number().finite().min(0).max(100_000);

/** Forest rows in a JSON answer when forestLimit is not given; a phone's forest plot reads no more than this. */
export const defaultForestLimit = 200;

/** The analysis options beside the shared trial filters; each also appears in share links of the Evidence screen. */
export const metaOptionShape = {
  measure: measureParam,
  effect: z.enum(effectMeasures).default("md").describe("md: yield response (treated − check); lnrr: log response ratio ln(treated/check)"),
  method: z
    .enum(tauMethods)
    .default("REML")
    .describe("τ² estimator: REML (default), DL (DerSimonian–Laird), PM (Paule–Mandel); FE is the fixed-effect model"),
  ci: z.enum(ciMethods).default("hksj").describe("hksj: Hartung–Knapp–Sidik–Jonkman, t(k − 1) (default); wald: normal"),
  groupBy: z
    .enum(groupings)
    .optional()
    .describe("Subgroups: one estimate per level and the between-group test (do the level means differ?)"),
  price: z.coerce.number().finite().positive().max(1000).optional().describe("Grain price, $/bu"),
  cost: money.optional().describe("Total cost of the practice, $/ac (product + application)"),
  productCost: money.optional().describe("Product cost, $/ac (instead of cost)"),
  applicationCost: money.optional().describe("Application cost, $/ac (instead of cost)"),
  units: z.enum(yieldUnits).default("bu/ac").describe("Units of a yield response; each row is converted with its own crop's bushel weight"),
  format: z.enum(["json", "csv"]).default("json").describe("csv: the per-site-year rows, to reproduce the fit elsewhere"),
  forestLimit: z
    .union([z.literal("all"), z.coerce.number().int().min(0).max(1_000_000)])
    .optional()
    .describe(
      `Most per-site-year forest rows to return: a number (0 for none) or all. Default ${defaultForestLimit} for JSON and all for ` +
        "CSV. Beyond it the most precise site-years (largest 1/(vᵢ + τ²)) are kept, in the usual order; every number " +
        "(pooled, heterogeneity, subgroups, decision, provenance) still uses every site-year, and `forest` says how many rows were left out.",
    ),
};

const filterKeys = Object.keys(trialFilterShape) as (keyof typeof trialFilterShape)[];

/** GET /api/v1/analyses/meta query: the shared filters plus the options; unknown parameters are refused. */
export const metaQuery = z
  .object({ ...trialFilterShape, ...metaOptionShape, ...metaDetailOptionShape })
  .strict()
  .superRefine((q, ctx) => {
    // The filters' own cross-field rules (version needs dataset, year order) come from the one shared contract.
    const filters = Object.fromEntries(filterKeys.flatMap((k) => (q[k] === undefined ? [] : [[k, q[k]]])));
    const checked = trialFilters.safeParse(filters);
    if (!checked.success)
      for (const issue of checked.error.issues) ctx.addIssue({ code: "custom", path: issue.path, message: issue.message });
    if (q.cost !== undefined && (q.productCost !== undefined || q.applicationCost !== undefined)) {
      ctx.addIssue({ code: "custom", path: ["cost"], message: "give either cost or productCost/applicationCost, not both" });
    }
    if (q.subgroupTau2 === "separate" && q.groupBy === undefined)
      ctx.addIssue({ code: "custom", path: ["subgroupTau2"], message: "separate subgroup fits need groupBy" });
  })
  .meta({ id: "MetaAnalysisQuery" });
export type MetaQuery = z.infer<typeof metaQuery>;

const interval = z.object({ lower: z.number(), upper: z.number() });

const forestRow = z
  .object({
    id: z.string().describe("Site-year id, with the group level when grouped"),
    siteYearCode: z.string(),
    siteCode: z.string(),
    dataset: z.string().describe("Dataset slug"),
    version: z.string().describe("Semantic version read"),
    year: z.number().int(),
    crop: z.string(),
    treatments: z.array(z.string()).describe("Treatment codes; several are combined within the site-year (shared-check covariance)"),
    responseIds: z.array(z.number().int()),
    group: z.string().nullable().describe("Level of groupBy"),
    estimate: z.number().describe("md in `units`, or lnrr"),
    se: z.number(),
    ciLower: z.number().describe("estimate ± t(0.975, df)·se with the site-year's error df"),
    ciUpper: z.number(),
    df: z.number().int(),
    pValue: z.number().nullable().describe("Two-sided t test of the site-year's own contrast"),
    significant: z.boolean().nullable().describe("p < 0.05 in the site-year's own analysis"),
    weightPercent: z.number().describe("Weight in the pooled estimate (within its group when grouped)"),
    pooledWeightPercent: z
      .number()
      .nullable()
      .describe(
        "Weight of this row's site-year in the headline pooled estimate (every group row of one site-year has the same); null when it is not in it",
      ),
    treatmentLabels: z
      .array(z.string())
      .describe("Each treatment in words: product and grade, nutrient rates, placement (same order as `treatments`)"),
    soilTestAnalyte: z.string().nullable(),
    soilTestClass: z.string().nullable(),
    soilTestValue: z.number().nullable(),
    soilTestReportedClass: z
      .string()
      .nullable()
      .describe("The class label as the trial reported it (soilTestClass is its place on the ordinal scale)"),
    soilTestScheme: z.string().nullable().describe("The interpretation scheme the label was read with"),
    checkMean: z.number().describe("Check yield in `units` (kg/ha when effect=lnrr and units=kg/ha)"),
  })
  .meta({ id: "ForestRow" });
export type ForestRow = z.infer<typeof forestRow>;

const forestExtent = z
  .object({
    total: z.number().int().describe("Forest rows the analysis has (site-years, or site-year × level when grouped)"),
    returned: z.number().int().describe("Rows in `rows`"),
    limit: z.number().int().nullable().describe("The forestLimit applied; null for all"),
    truncated: z.boolean(),
    note: z.string().nullable().describe("Which rows were kept when truncated"),
  })
  .meta({ id: "ForestExtent" });
export type ForestExtent = z.infer<typeof forestExtent>;

const predictiveDistribution = z
  .object({
    estimate: z.number().describe("Centre: the estimated mean response"),
    se: z.number().describe("SE of the estimated mean"),
    tau2: z.number().describe("τ² between site-years"),
    df: z.number().int().nullable().describe("t degrees of freedom of the predictive distribution; null for the normal"),
    lower: z.number().describe("2.5 % point: estimate − t(0.975, df)·√(τ² + SE²)"),
    upper: z.number().describe("97.5 % point"),
  })
  .describe(
    "Random-effects predictive distribution of the response on a new site-year: estimate + √(τ² + SE²)·T with T ~ t(df). " +
      "P(response > B) = 1 − T_df((B − estimate)/√(τ² + SE²)) gives the chance of beating any break-even B, so a client can compute it without sending prices.",
  )
  .meta({ id: "PredictiveDistribution" });
export type PredictiveDistributionShape = z.infer<typeof predictiveDistribution>;

/** Above this many site-years an answer does not list every observed response (the shares then come from the API). */
export const observedResponsesLimit = 2000;

const observedResponses = z
  .array(z.number())
  .nullable()
  .describe(
    `Every site-year's observed response, ascending, for the share above any break-even; null above ${observedResponsesLimit} site-years`,
  );

const pooledEstimate = z
  .object({
    estimate: z.number(),
    se: z.number(),
    ciLower: z.number(),
    ciUpper: z.number(),
    pValue: z.number(),
    distribution: z.enum(["normal", "t"]),
    df: z.number().nullable(),
    ciMethod: z.enum(ciMethods).describe("What was used; HKSJ falls back to Wald with k = 1"),
    predictionInterval: interval
      .extend({ df: z.number().int() })
      .nullable()
      .describe("95 % interval for a new site-year, μ̂ ± t(k − 2)·√(τ̂² + SE²); null for k < 3 or FE"),
  })
  .meta({ id: "PooledEstimate" });

const heterogeneity = z
  .object({
    q: z.number(),
    df: z.number().int(),
    pValue: z.number().nullable(),
    i2Percent: z.number().nullable(),
    h2: z.number().nullable(),
    tau2: z.number(),
    tau: z.number(),
    plainWords: z.string(),
    interval: z.union([heterogeneityInterval, z.null()]).optional().describe("With include=heterogeneityIntervals; null for FE"),
  })
  .meta({ id: "Heterogeneity" });

const subgroupLevel = z
  .object({
    level: z.string(),
    k: z.number().int(),
    estimate: z.number(),
    se: z.number(),
    ciLower: z.number(),
    ciUpper: z.number(),
    pValue: z.number(),
    predictive: predictiveDistribution
      .nullable()
      .describe(
        "This level's predictive distribution with the common τ², as metafor's predict() on the ~ 0 + group model gives it: t(k − p) under HKSJ, normal under Wald; null for FE or too few site-years",
      ),
    probabilityAboveZero: z.number().nullable().describe("P(response > 0) on a new site-year of this level"),
    probabilityAboveBreakEven: z
      .number()
      .nullable()
      .describe("P(response > break-even) on a new site-year of this level, when price and cost are given"),
    shareAboveZero: z.number().nullable().describe("Share of this level's site-years with an observed response > 0"),
    shareAboveBreakEven: z.number().nullable(),
    observedResponses,
  })
  .meta({ id: "SubgroupLevel" });

const betweenGroupTest = z.object({
  statistic: z.number().describe("F under HKSJ, χ² under Wald"),
  df: z.number().int(),
  df2: z.number().int().nullable().describe("Denominator df of the F test under HKSJ"),
  distribution: z.enum(["chi-square", "F"]),
  pValue: z.number(),
  text: z.string().describe('In words, e.g. "Between-group test: F = 15.1 on 1 and 40 df, p < 0.001"'),
});

const subgroups = z
  .object({
    by: z.enum(groupings),
    model: z.string().describe("How the levels and the between-group test were estimated"),
    levels: z.array(subgroupLevel),
    betweenGroupTest: betweenGroupTest.nullable().describe("Test that all levels have the same mean; null with fewer than two levels"),
    qm: betweenGroupTest
      .omit({ text: true })
      .nullable()
      .describe("Deprecated: the same test as betweenGroupTest without its text, kept under its old name for existing scripts"),
    tau2: z.number().nullable().describe("Residual τ² shared by the levels"),
    notes: z.array(z.string()),
    separate: separateSubgroups.optional(),
  })
  .meta({ id: "Subgroups" });

const decisionNumbers = z
  .object({
    costPerAcre: z.number().nullable(),
    pricePerBushel: z.number().nullable(),
    breakEven: z.number().nullable().describe("B = cost ÷ price, in `units`"),
    probabilityAboveZero: z.number().nullable().describe("P(response > 0) on a new site-year, t(k − 2) predictive distribution"),
    probabilityAboveBreakEven: z.number().nullable(),
    shareAboveZero: z.number().nullable().describe("Share of these site-years with an observed response > 0"),
    shareAboveBreakEven: z.number().nullable(),
    shareSignificant: z.number().nullable().describe("Share of site-years whose own analysis found the response significant (p < 0.05)"),
    significantCount: z.number().int(),
    predictive: predictiveDistribution
      .nullable()
      .describe("The pooled predictive distribution, t(k − 2) (Higgins, Thompson & Spiegelhalter 2009); null for k < 3 or no spread"),
    breakEvenUnitsPerBushel: z
      .number()
      .nullable()
      .describe(
        "Response units per bu/ac, to turn cost ÷ price into a break-even: 1 in bu/ac, the crop's kg/ha per bu/ac in kg/ha; null when no break-even applies (lnrr, or several crops in kg/ha)",
      ),
    observedResponses,
    notes: z.array(z.string()),
  })
  .meta({ id: "DecisionNumbers" });

const excludedSiteYear = z
  .object({ siteYearCode: z.string(), dataset: z.string(), version: z.string(), treatments: z.array(z.string()), reason: z.string() })
  .meta({ id: "ExcludedSiteYear" });

const analysisProvenance = z
  .object({
    versions: z.array(
      z.object({ dataset: z.string(), title: z.string(), version: z.string(), licence: z.string(), siteYearsUsed: z.number().int() }),
    ),
    filters: z.record(z.string(), z.string()).describe("The normalised filters"),
    nutrientRule: z
      .object({
        mode: z
          .enum(["tested", "supplied", "both", "none"])
          .describe("tested: nutrient= (tested nutrients); supplied: nutrientSupplied= (any amount); both; none: no nutrient filter"),
        text: z.string().describe("The rule in force, in words"),
      })
      .describe("Which nutrient rule selected the treatments"),
    effect: z.enum(effectMeasures),
    method: z.enum(tauMethods),
    ci: z.enum(ciMethods),
    units: z.string(),
    groupBy: z.enum(groupings).nullable(),
    k: z.number().int().describe("Site-years in the pooled estimate"),
    datasets: z.number().int(),
    contrastsRead: z.number().int().describe("Treatment-vs-check rows that matched the filters"),
    combinedSiteYears: z.number().int().describe("Site-years where several matching treatments were combined into one effect"),
    excluded: z.array(excludedSiteYear),
    combination: z.string().describe("How several treatments of one site-year enter the analysis"),
  })
  .meta({ id: "AnalysisProvenance" });

/** The codes of the caution rules (their wording and tests live in server/services/cautions.ts). */
export const cautionCodes = [
  "soybean-k-in-furrow",
  "seed-placed-n-k2o",
  "band-n-k2o-rate",
  "salt-sensitive-crop",
  "trials-not-your-field",
  "seed-placement-injury",
  "local-advice",
] as const;
export type CautionCode = (typeof cautionCodes)[number];

export const cautionShape = z
  .object({
    code: z
      .enum(cautionCodes)
      .describe(
        "soybean-k-in-furrow: K2O in the furrow on soybean; seed-placed-n-k2o: N or N + K2O with the seed; band-n-k2o-rate: N + K2O in a 2x2 band above " +
          "about 90 lb/ac at 30-in rows (scaled to the row spacing; less on sandy or dry soils); salt-sensitive-crop: fertilizer in the furrow of a " +
          "salt-sensitive crop (soybean); trials-not-your-field, seed-placement-injury, local-advice: standing cautions",
      ),
    text: z.string(),
    source: z.string().describe('Where the rule comes from, or "common practice, no source"'),
    standing: z.boolean().describe("true: a caution every result carries; false: a rule tested against the included treatments"),
    matches: z.boolean().describe("An included treatment trips this rule (listed first)"),
    treatments: z
      .array(
        z.object({
          dataset: z.string(),
          treatment: z.string().describe("Treatment code"),
          detail: z.string().describe("How it trips the rule"),
        }),
      )
      .describe("The included treatments that trip the rule"),
  })
  .meta({ id: "Caution" });
export type Caution = z.infer<typeof cautionShape>;

/** The measure an analysis is about, with the unit its responses are in and which direction is better. */
export const analysedMeasure = z
  .object({
    name: z.string(),
    title: z.string(),
    unit: z.string().describe("Unit of the measure's responses (yield: the answer's `units`)"),
    better: z.enum(betterDirections),
    rating: z.boolean().describe("A score on a scale rather than a quantity"),
    scale: z.string().nullable().describe("A rating's scale in words"),
  })
  .meta({ id: "AnalysedMeasure" });

export const metaAnalysisResult = z
  .object({
    k: z.number().int(),
    measure: analysedMeasure,
    effect: z.enum(effectMeasures),
    units: z.string().describe("bu/ac or kg/ha for yield, the measure's unit for another measure, or ln(ratio)"),
    rows: z.array(forestRow).describe("Per-site-year rows, bounded by forestLimit (see `forest`)"),
    forest: forestExtent,
    pooled: pooledEstimate.nullable(),
    heterogeneity: heterogeneity.nullable(),
    subgroups: subgroups.nullable(),
    decision: decisionNumbers,
    provenance: analysisProvenance,
    notes: z.array(z.string()),
    cautions: z.array(cautionShape).describe("Every caution rule, those tripped by the included treatments first, naming them"),
    moderatorRegression: moderatorRegression.optional().describe("With moderator="),
  })
  .meta({ id: "MetaAnalysis" });
export type MetaAnalysisResponse = z.infer<typeof metaAnalysisResult>;
