import type { TableSchemaDescriptor, TableSchemaResource } from "@/schemas/table-schema";
import { crops, placementLabels, placements, tillages } from "@/constants/vocabulary";

/**
 * The data dictionary a new dataset starts with: one Frictionless Table Schema (v2) per resource, describing the
 * canonical stored form (yields in kg/ha at the crop's standard moisture, nutrient rates in lb/ac of N, P2O5, K2O and S).
 * Uploads may use other headers and units; the column mapping and unit options convert them at the edge.
 */
const missingValues = [
  { value: "NA", label: "not available (not measured, or the plot was lost)" },
  { value: "", label: "left blank" },
];

const code = (name: string, title: string, description: string) => ({
  name,
  title,
  description,
  type: "string" as const,
  constraints: { required: true, minLength: 1, maxLength: 64, pattern: "^[A-Za-z0-9][A-Za-z0-9._-]*$" },
});

const textures = [
  "sand",
  "loamy sand",
  "sandy loam",
  "loam",
  "silt loam",
  "silt",
  "sandy clay loam",
  "clay loam",
  "silty clay loam",
  "sandy clay",
  "silty clay",
  "clay",
];

const sitesSchema: TableSchemaResource = {
  fields: [
    code("site", "Site", "Site code, stable across versions (e.g. TB-03)."),
    {
      name: "location",
      title: "Location",
      description: "Coarse location only: county or grid cell, never a farm's position.",
      type: "string",
      constraints: { required: true, maxLength: 120 },
    },
    { name: "soil_series", title: "Soil series", type: "string", constraints: { maxLength: 80 } },
    {
      name: "soil_texture",
      title: "Soil texture",
      description: "USDA texture class of the surface horizon.",
      type: "string",
      constraints: { enum: textures },
    },
  ],
  primaryKey: ["site"],
  missingValues,
};

const siteYearsSchema: TableSchemaResource = {
  fields: [
    code("site_year", "Site-year", "Site-year code, stable across versions (e.g. TB-03-2022); diffs match site-years by it."),
    { ...code("site", "Site", "Site the site-year belongs to."), constraints: { required: true } },
    { name: "crop", title: "Crop", type: "string", constraints: { required: true, enum: [...crops] } },
    { name: "year", title: "Harvest year", type: "year", constraints: { required: true, minimum: 1950, maximum: 2100 } },
    {
      name: "design",
      title: "Design",
      description: "Field design; RCBD unless stated.",
      type: "string",
      constraints: { enum: ["RCBD", "strip", "split-plot", "CRD"] },
      categories: [
        { value: "RCBD", label: "Randomized complete block" },
        { value: "strip", label: "Strip trial" },
        { value: "split-plot", label: "Split-plot" },
        { value: "CRD", label: "Completely randomized" },
      ],
    },
    { name: "blocks", title: "Blocks (replicates)", type: "integer", constraints: { required: true, minimum: 1, maximum: 24 } },
    { name: "tillage", title: "Tillage", type: "string", constraints: { enum: [...tillages] } },
    { name: "previous_crop", title: "Previous crop", type: "string", constraints: { maxLength: 40 } },
    { name: "planting_date", title: "Planting date", type: "date" },
    { name: "row_spacing_in", title: "Row spacing", type: "number", unit: "in", constraints: { minimum: 5, maximum: 60 } },
    { name: "variety", title: "Variety or hybrid", type: "string", constraints: { maxLength: 80 } },
    { name: "maturity_group", title: "Maturity group or relative maturity", type: "string", constraints: { maxLength: 20 } },
  ],
  primaryKey: ["site_year"],
  foreignKeys: [{ fields: ["site"], reference: { resource: "sites", fields: ["site"] } }],
  missingValues,
};

const soilTestsSchema: TableSchemaResource = {
  fields: [
    { ...code("site_year", "Site-year", "Site-year the sample belongs to."), constraints: { required: true } },
    {
      name: "analyte",
      title: "Analyte",
      description: "Element or property tested (soil tests use elements: P, K, S).",
      type: "string",
      constraints: { required: true, enum: ["P", "K", "S", "OM", "pH", "Zn"] },
    },
    { name: "value", title: "Value", type: "number", constraints: { required: true, minimum: 0, maximum: 10000 } },
    {
      name: "unit",
      title: "Unit",
      description: "ppm (mg/kg) for P, K, S and Zn; % for OM; pH units for pH. Blank means the analyte's usual unit.",
      type: "string",
      constraints: { enum: ["ppm", "%", "pH"] },
    },
    {
      name: "extractant",
      title: "Extractant",
      type: "string",
      constraints: {
        enum: ["Bray-P1", "Olsen", "Mehlich-3", "ammonium-acetate", "calcium-phosphate", "water", "loss-on-ignition", "DTPA"],
      },
    },
    { name: "depth_in", title: "Sample depth", type: "number", unit: "in", constraints: { minimum: 1, maximum: 48 } },
    {
      name: "class",
      title: "Soil-test class",
      description:
        "As the trial reported it: one of very_low, low, optimum, high, very_high, or a label of the scheme named in interpretation (e.g. low, medium, high). " +
        "Blank: derived from the value with the scheme's thresholds. Stored beside the class of the ordinal scale the scheme maps it to.",
      type: "string",
      constraints: { maxLength: 40 },
    },
    {
      name: "interpretation",
      title: "Interpretation scheme",
      description:
        "Name of the soil-test interpretation scheme the class comes from: one registered in this version's soilTestSchemes, or a built-in one (tallgrass-illustrative, isu-pm1688-2013).",
      type: "string",
      constraints: { maxLength: 80 },
    },
  ],
  primaryKey: ["site_year", "analyte"],
  foreignKeys: [{ fields: ["site_year"], reference: { resource: "site_years", fields: ["site_year"] } }],
  missingValues,
};

const treatmentsSchema: TableSchemaResource = {
  fields: [
    code("treatment", "Treatment", "Treatment code, shared by every site-year of the version."),
    { name: "name", title: "Name", type: "string", constraints: { required: true, maxLength: 120 } },
    {
      name: "is_check",
      title: "Untreated check",
      description: "The control every response is measured against; one per site-year.",
      type: "boolean",
      constraints: { required: true },
    },
    {
      name: "tested_nutrients",
      title: "Tested nutrients",
      description:
        "The nutrients this treatment tests against the check, e.g. P or N;S (N, P, K, S separated by ;). Blank: derived from the products, " +
        "leaving out a carrier amount (a nutrient at less than half the treatment's largest nutrient rate, such as the N in MAP). Give it on one application row or on all of them alike.",
      type: "string",
      constraints: { maxLength: 20, pattern: "^\\s*[NPKS](\\s*[;,]\\s*[NPKS])*\\s*$" },
    },
    {
      name: "application",
      title: "Application number",
      description: "1, 2 … for each application of the treatment; a check has one row with no product.",
      type: "integer",
      constraints: { required: true, minimum: 1, maximum: 9 },
    },
    { name: "product", title: "Product", type: "string", constraints: { maxLength: 80 } },
    {
      name: "grade",
      title: "Grade",
      description: "N-P2O5-K2O or N-P2O5-K2O-S, e.g. 11-52-0 or 21-0-0-24S.",
      type: "string",
      constraints: { pattern: "^\\d+(\\.\\d+)?-\\d+(\\.\\d+)?-\\d+(\\.\\d+)?(-\\d+(\\.\\d+)?S?)?$" },
    },
    {
      name: "product_rate",
      title: "Product rate",
      description: "Amount of product, in rate_unit.",
      type: "number",
      constraints: { minimum: 0, maximum: 5000 },
    },
    { name: "rate_unit", title: "Rate unit", type: "string", constraints: { enum: ["lb/ac", "kg/ha", "gal/ac", "L/ha"] } },
    {
      name: "density_lb_gal",
      title: "Fluid density",
      description: "Needed for fluids (gal/ac, L/ha) whose grade has no typical density on file.",
      type: "number",
      unit: "lb/gal",
      constraints: { minimum: 5, maximum: 20 },
    },
    {
      name: "placement",
      title: "Placement",
      type: "string",
      constraints: { enum: [...placements] },
      categories: placements.map((value) => ({ value, label: placementLabels[value] })),
    },
    { name: "timing", title: "Timing", type: "string", constraints: { enum: ["pre-plant", "at-planting", "early-season", "in-season"] } },
    {
      name: "n_lb_ac",
      title: "N",
      description: "Computed from grade and rate.",
      type: "number",
      unit: "lb/ac",
      constraints: { minimum: 0 },
    },
    {
      name: "p2o5_lb_ac",
      title: "P2O5",
      description: "Computed from grade and rate.",
      type: "number",
      unit: "lb/ac",
      constraints: { minimum: 0 },
    },
    {
      name: "k2o_lb_ac",
      title: "K2O",
      description: "Computed from grade and rate.",
      type: "number",
      unit: "lb/ac",
      constraints: { minimum: 0 },
    },
    {
      name: "s_lb_ac",
      title: "S",
      description: "Computed from grade and rate.",
      type: "number",
      unit: "lb/ac",
      constraints: { minimum: 0 },
    },
  ],
  primaryKey: ["treatment", "application"],
  missingValues,
};

const plotsSchema: TableSchemaResource = {
  fields: [
    { ...code("site_year", "Site-year", "Site-year the plot belongs to."), constraints: { required: true } },
    { ...code("plot", "Plot", "Plot number or label, unique within the site-year.") },
    {
      name: "block",
      title: "Block",
      description: "Block (replicate) number, 1 … blocks of the site-year.",
      type: "integer",
      constraints: { required: true, minimum: 1, maximum: 24 },
    },
    { ...code("treatment", "Treatment", "Treatment applied to the plot."), constraints: { required: true } },
    {
      name: "yield_kg_ha",
      title: "Yield",
      description: "Grain yield at the crop's standard moisture (soybean 13 %, corn 15.5 %, wheat 13.5 %). NA for a lost plot.",
      type: "number",
      unit: "kg/ha",
      constraints: { minimum: 0, maximum: 25000 },
    },
    {
      name: "harvest_moisture_pct",
      title: "Harvest moisture",
      description: "Grain moisture at harvest, wet basis, as reported.",
      type: "number",
      unit: "%",
      constraints: { minimum: 0, maximum: 60 },
    },
    { name: "stand_count", title: "Stand count", type: "number", unit: "plants/ac", constraints: { minimum: 0, maximum: 300000 } },
    {
      name: "vigour",
      title: "Early vigour",
      description: "Visual score, 1 (poor) to 9 (excellent).",
      type: "number",
      constraints: { minimum: 1, maximum: 9 },
    },
    { name: "test_weight", title: "Test weight", type: "number", unit: "lb/bu", constraints: { minimum: 30, maximum: 70 } },
  ],
  primaryKey: ["site_year", "plot"],
  foreignKeys: [
    { fields: ["site_year"], reference: { resource: "site_years", fields: ["site_year"] } },
    { fields: ["treatment"], reference: { resource: "treatments", fields: ["treatment"] } },
  ],
  missingValues,
};

const summariesSchema: TableSchemaResource = {
  fields: [
    { ...code("site_year", "Site-year", "Site-year published as means only."), constraints: { required: true } },
    { ...code("treatment", "Treatment", "Treatment of the mean."), constraints: { required: true } },
    {
      name: "mean_kg_ha",
      title: "Mean yield",
      description: "At the crop's standard moisture.",
      type: "number",
      unit: "kg/ha",
      constraints: { required: true, minimum: 0, maximum: 25000 },
    },
    { name: "replicates", title: "Replicates", type: "integer", constraints: { required: true, minimum: 1, maximum: 24 } },
    {
      name: "mse",
      title: "Error mean square",
      description: "From the site-year's ANOVA (a pooled SD squared also does).",
      type: "number",
      unit: "(kg/ha)^2",
      constraints: { required: true, minimum: 0 },
    },
    { name: "df_error", title: "Error degrees of freedom", type: "integer", constraints: { required: true, minimum: 1, maximum: 1000 } },
  ],
  primaryKey: ["site_year", "treatment"],
  foreignKeys: [
    { fields: ["site_year"], reference: { resource: "site_years", fields: ["site_year"] } },
    { fields: ["treatment"], reference: { resource: "treatments", fields: ["treatment"] } },
  ],
  missingValues,
};

export function defaultTableSchema(): TableSchemaDescriptor {
  // A fresh copy each time: versions store and edit their own.
  return structuredClone({
    resources: {
      sites: sitesSchema,
      site_years: siteYearsSchema,
      soil_tests: soilTestsSchema,
      treatments: treatmentsSchema,
      plots: plotsSchema,
      summaries: summariesSchema,
    },
  });
}
