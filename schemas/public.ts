import { z } from "zod";
import { datasetSummary } from "./dataset";
import { contributor } from "./dataset-metadata";
import { line } from "./safe-text";
import { crops, nutrients, placements, soilTestClasses, tillages, trialFilters, trialFilterShape } from "./filters";
import { tableSchemaField } from "./table-schema";
import { measureParam } from "./measures";

/**
 * Contracts of the public read API: dataset and version metadata, the row shapes of every resource, and the query
 * parameters each resource accepts. Rows are JSON types; the CSV form of a resource has the same columns, with
 * lists joined by ";".
 */

export const yieldUnits = ["bu/ac", "kg/ha"] as const;
export type YieldUnit = (typeof yieldUnits)[number];

// ---------------------------------------------------------------- query parameters

/** Bushels per acre by default: the unit the trials' users plan in. Canonical storage is kg/ha at standard moisture. */
export const unitsParam = z
  .enum(yieldUnits)
  .default("bu/ac")
  .describe("Unit of yields, responses, SEs and LSDs: bu/ac (default; crop test weight) or kg/ha. Both at the crop's standard moisture.");
const formatParam = z
  .enum(["json", "csv"])
  .optional()
  .describe("csv streams every matching row (no paging); the same as `Accept: text/csv`");
const maxPageSize = 1000;
const limitParam = z.coerce
  .number()
  .int()
  .min(1)
  .max(maxPageSize)
  .default(100)
  .describe(`Rows per JSON page, 1–${maxPageSize} (default 100)`);
const pageTokenParam = line()
  .min(1)
  .max(400)
  .optional()
  .describe("Opaque token from the previous page's `nextPageToken` (or its Link rel=next)");

const pagingShape = { format: formatParam, limit: limitParam, pageToken: pageTokenParam };

/**
 * The list filters parse "a,b" or repeated parameters through a transform, which OpenAPI cannot see into; their
 * documentation names the allowed values explicitly. Same validating schemas, documentation attached.
 */
function documentedList<T extends z.ZodType>(schema: T, values: readonly string[]): T {
  return schema.meta({
    type: "array",
    items: { type: "string", enum: [...values] },
    param: {
      style: "form",
      explode: false,
      description: `${schema.description ?? ""} Comma-separated or repeated; one of: ${values.join(", ")}.`.trim(),
    },
  }) as T;
}

const documentedLists = {
  crop: documentedList(trialFilterShape.crop, crops),
  nutrient: documentedList(trialFilterShape.nutrient, nutrients),
  placement: documentedList(trialFilterShape.placement, placements),
  soilTestClass: documentedList(trialFilterShape.soilTestClass, soilTestClasses),
  tillage: documentedList(trialFilterShape.tillage, tillages),
};

const { dataset: _dataset, version: _version, ...baseVersionFilterShape } = trialFilterShape;
const versionFilterShape = { ...baseVersionFilterShape, ...documentedLists };

function yearsInOrder(f: { yearFrom?: number; yearTo?: number }, ctx: z.RefinementCtx) {
  if (f.yearFrom && f.yearTo && f.yearFrom > f.yearTo)
    ctx.addIssue({ code: "custom", path: ["yearTo"], message: "yearTo is before yearFrom" });
}

/** Cross-dataset rows with yields (observations, responses): every shared filter, units and paging. */
export const crossDatasetYieldQuery = trialFilters
  .safeExtend({ ...documentedLists, units: unitsParam, ...pagingShape })
  .meta({ id: "CrossDatasetYieldQuery" });
/** Cross-dataset responses: the rows-with-yields query plus the measure they are about. */
export const crossDatasetResponseQuery = crossDatasetYieldQuery
  .safeExtend({ measure: measureParam })
  .meta({ id: "CrossDatasetResponseQuery" });
/** Cross-dataset site-years: every shared filter and paging. */
export const crossDatasetSiteYearQuery = trialFilters
  .safeExtend({ ...documentedLists, ...pagingShape })
  .meta({ id: "CrossDatasetSiteYearQuery" });
/** Rows of one version with yields: the shared filters except dataset and version (the path names those). */
export const versionYieldQuery = z
  .object({ ...versionFilterShape, units: unitsParam, ...pagingShape })
  .strict()
  .superRefine(yearsInOrder)
  .meta({ id: "VersionYieldQuery" });
/** Responses of one version: its rows-with-yields query plus the measure they are about. */
export const versionResponseQuery = z
  .object({ ...versionFilterShape, units: unitsParam, measure: measureParam, ...pagingShape })
  .strict()
  .superRefine(yearsInOrder)
  .meta({ id: "VersionResponseQuery" });
export const versionSiteYearQuery = z
  .object({ ...versionFilterShape, ...pagingShape })
  .strict()
  .superRefine(yearsInOrder)
  .meta({ id: "VersionSiteYearQuery" });
/** Treatments are filtered by what they supply, how it is placed and how much. */
export const versionTreatmentQuery = z
  .object({
    nutrient: documentedLists.nutrient,
    placement: documentedLists.placement,
    nRateMin: trialFilterShape.nRateMin,
    nRateMax: trialFilterShape.nRateMax,
    p2o5RateMin: trialFilterShape.p2o5RateMin,
    p2o5RateMax: trialFilterShape.p2o5RateMax,
    k2oRateMin: trialFilterShape.k2oRateMin,
    k2oRateMax: trialFilterShape.k2oRateMax,
    sRateMin: trialFilterShape.sRateMin,
    sRateMax: trialFilterShape.sRateMax,
    ...pagingShape,
  })
  .strict()
  .meta({ id: "VersionTreatmentQuery" });
export const versionSiteQuery = z.object(pagingShape).strict().meta({ id: "VersionSiteQuery" });
/** Metadata endpoints take no parameters; anything sent is a mistake worth naming. */
export const noQuery = z.object({}).strict();

// ---------------------------------------------------------------- dataset and version metadata

const publicVersionState = z.enum(["published", "withdrawn"]).meta({ id: "PublicVersionState" });

const versionSummary = z
  .object({
    semver: z.string(),
    state: publicVersionState,
    publishedAt: z.string().nullable(),
    withdrawnAt: z.string().nullable(),
    withdrawnReason: z.string().nullable().describe("Why a withdrawn version was withdrawn; its rows are no longer served (410)"),
    changelog: z.string(),
    checksum: z.string().nullable().describe("SHA-256 over the canonical CSV of every resource"),
    doi: z.string().nullable(),
    licence: z.string(),
    url: z.string().describe("Stable URL of this version's metadata"),
  })
  .meta({ id: "VersionSummary" });
export type VersionSummary = z.infer<typeof versionSummary>;

const versionCounts = z
  .object({
    sites: z.number().int(),
    siteYears: z.number().int(),
    treatments: z.number().int(),
    plots: z.number().int(),
    responses: z.number().int(),
  })
  .meta({ id: "VersionCounts" });

export const versionDetail = versionSummary
  .extend({
    dataset: z.object({ slug: z.string(), title: z.string() }),
    counts: versionCounts.nullable().describe("Row counts; null for a withdrawn version"),
    yearFrom: z.number().int().nullable(),
    yearTo: z.number().int().nullable(),
    links: z.record(z.string(), z.string()).describe("URLs of the version's schema and rows (published versions), keyed by name"),
  })
  .meta({ id: "VersionDetail" });
export type VersionDetail = z.infer<typeof versionDetail>;

export const versionList = z.object({ items: z.array(versionSummary) }).meta({ id: "VersionList" });

export const datasetDetail = datasetSummary
  .extend({
    funding: z.string().nullable(),
    methods: z.string().nullable(),
    conceptDoi: z.string().nullable(),
    contributors: z.array(contributor),
    versions: z
      .array(versionSummary)
      .describe("Published and withdrawn versions, newest first; withdrawn ones are tombstones with their reason"),
  })
  .meta({ id: "DatasetDetail" });
export type DatasetDetail = z.infer<typeof datasetDetail>;

// ---------------------------------------------------------------- rows

/** Which version a row comes from, so any row can be cited. */
const provenanceShape = { dataset: z.string().describe("Dataset slug"), version: z.string().describe("Semantic version") };
const yieldUnitShape = {
  yieldUnit: z.enum(yieldUnits),
  moistureBasisPct: z.number().nullable().describe("Standard moisture (% wet basis) the yields are expressed at"),
};

export const siteRow = z
  .object({
    id: z.number().int(),
    ...provenanceShape,
    code: z.string(),
    location: z.string().describe("Coarse location (county or grid cell)"),
    soilSeries: z.string().nullable(),
    soilTexture: z.string().nullable(),
  })
  .meta({ id: "SiteRow" });

const soilTestRow = z
  .object({
    analyte: z.string(),
    value: z.number(),
    unit: z.string(),
    extractant: z.string().nullable(),
    depthIn: z.number().nullable(),
    class: z.string().nullable().describe("On the ordinal scale very_low … very_high, mapped from the reported label by the scheme"),
    reportedClass: z.string().nullable().describe("The class label as the trial reported it, e.g. medium"),
    interpretation: z.string().nullable().describe("Name of the interpretation scheme the label was read with"),
  })
  .meta({ id: "SoilTest" });

export const siteYearRow = z
  .object({
    id: z.number().int(),
    ...provenanceShape,
    code: z.string(),
    siteCode: z.string(),
    location: z.string(),
    soilTexture: z.string().nullable(),
    crop: z.string(),
    year: z.number().int(),
    design: z.string(),
    blocks: z.number().int(),
    tillage: z.string().nullable(),
    previousCrop: z.string().nullable(),
    plantingDate: z.string().nullable(),
    rowSpacingIn: z.number().nullable(),
    variety: z.string().nullable(),
    maturityGroup: z.string().nullable(),
    soilTests: z.array(soilTestRow).describe("In CSV: soilP/K/S value, unit, extractant and class columns"),
  })
  .meta({ id: "SiteYearRow" });

const applicationRow = z
  .object({
    product: z.string(),
    grade: z.string(),
    productRate: z.number(),
    rateUnit: z.string(),
    placement: z.string(),
    timing: z.string(),
    nLbAc: z.number(),
    p2o5LbAc: z.number(),
    k2oLbAc: z.number(),
    sLbAc: z.number(),
  })
  .meta({ id: "Application" });

export const treatmentRow = z
  .object({
    id: z.number().int(),
    ...provenanceShape,
    code: z.string(),
    name: z.string(),
    isCheck: z.boolean(),
    nLbAc: z.number(),
    p2o5LbAc: z.number(),
    k2oLbAc: z.number(),
    sLbAc: z.number(),
    nutrients: z.array(z.string()).describe("Nutrients supplied in any amount"),
    testedNutrients: z
      .array(z.string())
      .describe(
        "Nutrients the treatment tests against its check: as the curator stated them, else those added at ≥ half its largest nutrient rate (carriers such as the N in MAP left out)",
      ),
    testedNutrientsStated: z.boolean().describe("true: the curator stated testedNutrients; false: derived from the products"),
    placements: z.array(z.string()),
    applications: z.array(applicationRow).describe("In CSV: one text cell, applications separated by ' | '"),
  })
  .meta({ id: "TreatmentRow" });

export const observationRow = z
  .object({
    id: z.number().int(),
    ...provenanceShape,
    siteCode: z.string(),
    siteYearCode: z.string(),
    crop: z.string(),
    year: z.number().int(),
    treatmentCode: z.string(),
    isCheck: z.boolean(),
    plot: z.string(),
    block: z.number().int(),
    yield: z.number().nullable().describe("Plot yield in `yieldUnit` at the standard moisture; null when not harvested"),
    ...yieldUnitShape,
    harvestMoisturePct: z.number().nullable().describe("As reported at harvest"),
    standCount: z.number().nullable(),
    vigour: z.number().nullable(),
    testWeight: z.number().nullable(),
  })
  .meta({ id: "ObservationRow" });

export const responseRow = z
  .object({
    id: z.number().int(),
    ...provenanceShape,
    siteCode: z.string(),
    siteYearCode: z.string(),
    treatmentCode: z.string(),
    checkTreatmentCode: z.string(),
    crop: z.string(),
    year: z.number().int(),
    tillage: z.string().nullable(),
    rowSpacingIn: z.number().nullable(),
    plantingDate: z.string().nullable(),
    nutrients: z.array(z.string()).describe("Nutrients supplied in any amount (nutrientSupplied= filters on these)"),
    testedNutrients: z
      .array(z.string())
      .describe(
        "Nutrients the treatment tests against its check: as the curator stated them, else those added at ≥ half its largest nutrient rate (carriers such as the N in MAP left out)",
      ),
    testedNutrientsStated: z.boolean().describe("true: the curator stated testedNutrients; false: derived from the products"),
    placements: z.array(z.string()),
    nLbAc: z.number(),
    p2o5LbAc: z.number(),
    k2oLbAc: z.number(),
    sLbAc: z.number(),
    soilTestAnalyte: z
      .string()
      .nullable()
      .describe(
        "The soil test that counts for this response (soilTestClass= filters on it): of its tested nutrients, P before K before S, the first with a class",
      ),
    soilTestClass: z.string().nullable(),
    soilPClass: z.string().nullable().describe("On the ordinal scale very_low … very_high"),
    soilPValue: z.number().nullable(),
    soilPReportedClass: z.string().nullable().describe("The P class label as the trial reported it"),
    soilPScheme: z.string().nullable().describe("The interpretation scheme the P label was read with"),
    soilKClass: z.string().nullable(),
    soilKValue: z.number().nullable(),
    soilKReportedClass: z.string().nullable(),
    soilKScheme: z.string().nullable(),
    soilSClass: z.string().nullable(),
    soilSValue: z.number().nullable(),
    soilSReportedClass: z.string().nullable(),
    soilSScheme: z.string().nullable(),
    ...yieldUnitShape,
    measure: z
      .string()
      .describe("What was measured (measure=): yield, stand, vigour, test-weight, moisture, or a measure the data dictionary adds"),
    unit: z.string().describe("Unit of checkMean, treatedMean, md, se and lsd05: yieldUnit for yield, else the measure's own unit"),
    relativeToCheck: z
      .number()
      .nullable()
      .describe(
        "treatedMean ÷ checkMean (e.g. relative stand: 0.93 is 93 % of the check's stand); null when the check mean is not positive",
      ),
    checkMean: z.number().describe("Mean of the check (yield, or the measure asked for)"),
    treatedMean: z.number(),
    md: z.number().describe("Mean difference, treated − check"),
    se: z.number().describe("Standard error of the difference from the site-year's ANOVA"),
    df: z.number().int().describe("Error degrees of freedom of the site-year's ANOVA"),
    lnrr: z.number().nullable().describe("ln(treated / check); unitless"),
    lnrrVar: z.number().nullable(),
    pValue: z.number().nullable().describe("The site-year's own treatment F-test p value"),
    lsd05: z.number().nullable().describe("The site-year's Fisher LSD at α = 0.05"),
    cvPct: z.number().nullable(),
    replicates: z.number().int(),
    balanced: z.boolean(),
    fromSummary: z.boolean().describe("From published means and MSE rather than plots"),
  })
  .meta({ id: "ResponseRow" });

/** The Table Schema (v2) of one row view's CSV: its columns in order, with types and descriptions. */
export const viewTableSchema = z
  .object({
    $schema: z.string(),
    name: z.string(),
    title: z.string(),
    description: z.string(),
    fields: z.array(tableSchemaField),
    missingValues: z.array(z.string()),
  })
  .meta({ id: "ViewTableSchema" });

export type ViewTableSchema = z.infer<typeof viewTableSchema>;
export type SiteRow = z.infer<typeof siteRow>;
export type SiteYearRow = z.infer<typeof siteYearRow>;
export type TreatmentRow = z.infer<typeof treatmentRow>;
export type ObservationRow = z.infer<typeof observationRow>;
export type ResponseRow = z.infer<typeof responseRow>;

const versionRef = z.object({ dataset: z.string(), version: z.string(), licence: z.string() }).meta({ id: "VersionRef" });

/** One page of rows: the versions they come from (with their licences) and the token of the next page. */
function page<T extends z.ZodType>(row: T, id: string, withUnits: boolean) {
  return z
    .object({
      items: z.array(row),
      nextPageToken: z.string().nullable().describe("Pass as `pageToken` for the next page; null on the last page"),
      versions: z.array(versionRef).describe("The dataset versions these rows are read from"),
      ...(withUnits ? { units: z.enum(yieldUnits) } : {}),
    })
    .meta({ id });
}

export const sitePage = page(siteRow, "SitePage", false);
export const siteYearPage = page(siteYearRow, "SiteYearPage", false);
export const treatmentPage = page(treatmentRow, "TreatmentPage", false);
export const observationPage = page(observationRow, "ObservationPage", true);
export const responsePage = page(responseRow, "ResponsePage", true);
