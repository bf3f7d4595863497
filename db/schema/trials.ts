import { sql } from "drizzle-orm";
import {
  bigint,
  boolean,
  date,
  doublePrecision,
  index,
  integer,
  jsonb,
  pgTable,
  real,
  smallint,
  text,
  uniqueIndex,
  uuid,
} from "drizzle-orm/pg-core";
import { versions } from "./datasets";

/**
 * Trial rows belong to one version. A new version starts as a copy of the latest published one, so a published
 * version's rows never change (the database refuses it; see the immutability migration).
 */
export const sites = pgTable(
  "sites",
  {
    id: bigint("id", { mode: "number" }).primaryKey().generatedAlwaysAsIdentity(),
    versionId: uuid("version_id")
      .notNull()
      .references(() => versions.id, { onDelete: "cascade" }),
    code: text("code").notNull(),
    /** Coarse location only (county or grid cell), never a farm's exact position. */
    location: text("location").notNull(),
    soilSeries: text("soil_series"),
    soilTexture: text("soil_texture"),
  },
  (t) => [uniqueIndex("sites_version_code_uq").on(t.versionId, t.code)],
);

export const siteYears = pgTable(
  "site_years",
  {
    id: bigint("id", { mode: "number" }).primaryKey().generatedAlwaysAsIdentity(),
    versionId: uuid("version_id")
      .notNull()
      .references(() => versions.id, { onDelete: "cascade" }),
    siteId: bigint("site_id", { mode: "number" })
      .notNull()
      .references(() => sites.id, { onDelete: "cascade" }),
    /** Curator's key, e.g. "TB-03-2022"; stable across versions, so diffs match site-years by it. */
    code: text("code").notNull(),
    crop: text("crop").notNull(),
    year: smallint("year").notNull(),
    design: text("design").notNull().default("RCBD"),
    blocks: smallint("blocks").notNull(),
    tillage: text("tillage"),
    previousCrop: text("previous_crop"),
    plantingDate: date("planting_date", { mode: "string" }),
    rowSpacingIn: real("row_spacing_in"),
    variety: text("variety"),
    maturityGroup: text("maturity_group"),
  },
  (t) => [uniqueIndex("site_years_version_code_uq").on(t.versionId, t.code), index("site_years_site_idx").on(t.siteId)],
);

/** One soil test of a site-year: the value and extractant always stay beside the class. */
export const soilTests = pgTable(
  "soil_tests",
  {
    id: bigint("id", { mode: "number" }).primaryKey().generatedAlwaysAsIdentity(),
    versionId: uuid("version_id")
      .notNull()
      .references(() => versions.id, { onDelete: "cascade" }),
    siteYearId: bigint("site_year_id", { mode: "number" })
      .notNull()
      .references(() => siteYears.id, { onDelete: "cascade" }),
    /** Element tested: P, K, S, OM, pH … */
    analyte: text("analyte").notNull(),
    value: doublePrecision("value").notNull(),
    unit: text("unit").notNull(),
    extractant: text("extractant"),
    depthIn: real("depth_in"),
    /** On our ordinal scale: very_low | low | optimum | high | very_high (mapped from the reported label by the scheme). */
    class: text("class"),
    /** The interpretation scheme's name (built-in or from the version's data dictionary). */
    interpretation: text("interpretation"),
    /** The class label as the trial reported it (e.g. "medium"), before mapping onto the ordinal scale. */
    reportedClass: text("reported_class"),
  },
  (t) => [uniqueIndex("soil_tests_site_year_analyte_uq").on(t.siteYearId, t.analyte)],
);

export const treatments = pgTable(
  "treatments",
  {
    id: bigint("id", { mode: "number" }).primaryKey().generatedAlwaysAsIdentity(),
    versionId: uuid("version_id")
      .notNull()
      .references(() => versions.id, { onDelete: "cascade" }),
    code: text("code").notNull(),
    name: text("name").notNull(),
    isCheck: boolean("is_check").notNull().default(false),
    /** Totals over the applications, lb/ac of N, P2O5, K2O and S (labels use oxides). */
    nLbAc: doublePrecision("n_lb_ac").notNull().default(0),
    p2o5LbAc: doublePrecision("p2o5_lb_ac").notNull().default(0),
    k2oLbAc: doublePrecision("k2o_lb_ac").notNull().default(0),
    sLbAc: doublePrecision("s_lb_ac").notNull().default(0),
    /** Nutrients supplied (N, P, K, S) and placements used, for filtering. */
    nutrients: text("nutrients")
      .array()
      .notNull()
      .default(sql`'{}'::text[]`),
    placements: text("placements")
      .array()
      .notNull()
      .default(sql`'{}'::text[]`),
    /** The nutrients the curator states the treatment tests; null: derived from the rates (server/services/tested-nutrients.ts). */
    testedNutrientsStated: text("tested_nutrients_stated").array(),
  },
  (t) => [uniqueIndex("treatments_version_code_uq").on(t.versionId, t.code)],
);

export const applications = pgTable(
  "applications",
  {
    id: bigint("id", { mode: "number" }).primaryKey().generatedAlwaysAsIdentity(),
    versionId: uuid("version_id")
      .notNull()
      .references(() => versions.id, { onDelete: "cascade" }),
    treatmentId: bigint("treatment_id", { mode: "number" })
      .notNull()
      .references(() => treatments.id, { onDelete: "cascade" }),
    product: text("product").notNull(),
    /** N-P2O5-K2O[-S] grade, e.g. "11-52-0" or "21-0-0-24S". */
    grade: text("grade").notNull(),
    productRate: doublePrecision("product_rate").notNull(),
    /** lb/ac, kg/ha, gal/ac or L/ha. */
    rateUnit: text("rate_unit").notNull(),
    /** Fluids only: the density (lb/gal) the rate was converted with, as given or the grade's typical value. */
    densityLbGal: doublePrecision("density_lb_gal"),
    placement: text("placement").notNull(),
    timing: text("timing").notNull(),
    nLbAc: doublePrecision("n_lb_ac").notNull(),
    p2o5LbAc: doublePrecision("p2o5_lb_ac").notNull(),
    k2oLbAc: doublePrecision("k2o_lb_ac").notNull(),
    sLbAc: doublePrecision("s_lb_ac").notNull(),
  },
  (t) => [index("applications_treatment_idx").on(t.treatmentId)],
);

/** Plot-level observations. Yield is stored canonically as kg/ha at the crop's standard moisture. */
export const plots = pgTable(
  "plots",
  {
    id: bigint("id", { mode: "number" }).primaryKey().generatedAlwaysAsIdentity(),
    versionId: uuid("version_id")
      .notNull()
      .references(() => versions.id, { onDelete: "cascade" }),
    siteYearId: bigint("site_year_id", { mode: "number" })
      .notNull()
      .references(() => siteYears.id, { onDelete: "cascade" }),
    treatmentId: bigint("treatment_id", { mode: "number" })
      .notNull()
      .references(() => treatments.id, { onDelete: "cascade" }),
    plot: text("plot").notNull(),
    block: smallint("block").notNull(),
    yieldKgHa: doublePrecision("yield_kg_ha"),
    /** As reported, before normalising to the standard moisture. */
    harvestMoisturePct: doublePrecision("harvest_moisture_pct"),
    standCount: doublePrecision("stand_count"),
    vigour: doublePrecision("vigour"),
    testWeight: doublePrecision("test_weight"),
    /** Values of the measures a version's data dictionary adds (`measures`), by measure name; null: none recorded. */
    otherMeasures: jsonb("other_measures").$type<Record<string, number>>(),
  },
  (t) => [uniqueIndex("plots_site_year_plot_uq").on(t.siteYearId, t.plot), index("plots_version_idx").on(t.versionId, t.siteYearId)],
);

/** Site-years published without plots: treatment means, replicates and the ANOVA's error term. */
export const summaryMeans = pgTable(
  "summary_means",
  {
    id: bigint("id", { mode: "number" }).primaryKey().generatedAlwaysAsIdentity(),
    versionId: uuid("version_id")
      .notNull()
      .references(() => versions.id, { onDelete: "cascade" }),
    siteYearId: bigint("site_year_id", { mode: "number" })
      .notNull()
      .references(() => siteYears.id, { onDelete: "cascade" }),
    treatmentId: bigint("treatment_id", { mode: "number" })
      .notNull()
      .references(() => treatments.id, { onDelete: "cascade" }),
    meanKgHa: doublePrecision("mean_kg_ha").notNull(),
    replicates: smallint("replicates").notNull(),
    /** Error mean square in (kg/ha)^2 and its degrees of freedom. */
    mse: doublePrecision("mse").notNull(),
    dfError: integer("df_error").notNull(),
  },
  (t) => [uniqueIndex("summary_means_site_year_treatment_uq").on(t.siteYearId, t.treatmentId)],
);

/**
 * One row per site-year × treatment × measure against that site-year's check, computed from the site-year's ANOVA of
 * that measure when a version's data change. Site-year covariates are copied in so the filtered reads need no joins.
 * The *KgHa columns hold yield in kg/ha; for another measure they hold its values in that measure's unit
 * (constants/measures.ts, or the version's data dictionary).
 */
export const responses = pgTable(
  "responses",
  {
    id: bigint("id", { mode: "number" }).primaryKey().generatedAlwaysAsIdentity(),
    versionId: uuid("version_id")
      .notNull()
      .references(() => versions.id, { onDelete: "cascade" }),
    siteYearId: bigint("site_year_id", { mode: "number" })
      .notNull()
      .references(() => siteYears.id, { onDelete: "cascade" }),
    treatmentId: bigint("treatment_id", { mode: "number" })
      .notNull()
      .references(() => treatments.id, { onDelete: "cascade" }),
    checkTreatmentId: bigint("check_treatment_id", { mode: "number" })
      .notNull()
      .references(() => treatments.id, { onDelete: "cascade" }),
    /** What was measured: yield, stand, vigour, test-weight, moisture, or a measure the data dictionary adds. */
    measure: text("measure").notNull().default("yield"),
    siteCode: text("site_code").notNull(),
    siteYearCode: text("site_year_code").notNull(),
    treatmentCode: text("treatment_code").notNull(),
    crop: text("crop").notNull(),
    year: smallint("year").notNull(),
    tillage: text("tillage"),
    rowSpacingIn: real("row_spacing_in"),
    plantingDate: date("planting_date", { mode: "string" }),
    nutrients: text("nutrients").array().notNull(),
    placements: text("placements").array().notNull(),
    /** The treatment's stated tested nutrients, copied in; null: derived from the rates below. */
    testedNutrientsStated: text("tested_nutrients_stated").array(),
    nLbAc: doublePrecision("n_lb_ac").notNull(),
    p2o5LbAc: doublePrecision("p2o5_lb_ac").notNull(),
    k2oLbAc: doublePrecision("k2o_lb_ac").notNull(),
    sLbAc: doublePrecision("s_lb_ac").notNull(),
    /** Soil-test classes by analyte, kept beside their values. */
    soilPClass: text("soil_p_class"),
    soilPValue: doublePrecision("soil_p_value"),
    soilKClass: text("soil_k_class"),
    soilKValue: doublePrecision("soil_k_value"),
    soilSClass: text("soil_s_class"),
    soilSValue: doublePrecision("soil_s_value"),
    /** The class labels as reported and the interpretation schemes they were read with, by analyte. */
    soilPReportedClass: text("soil_p_reported_class"),
    soilPScheme: text("soil_p_scheme"),
    soilKReportedClass: text("soil_k_reported_class"),
    soilKScheme: text("soil_k_scheme"),
    soilSReportedClass: text("soil_s_reported_class"),
    soilSScheme: text("soil_s_scheme"),
    checkMeanKgHa: doublePrecision("check_mean_kg_ha").notNull(),
    treatedMeanKgHa: doublePrecision("treated_mean_kg_ha").notNull(),
    /** Mean difference (treated − check), kg/ha, its SE and the site-year's error df. */
    mdKgHa: doublePrecision("md_kg_ha").notNull(),
    seKgHa: doublePrecision("se_kg_ha").notNull(),
    dfError: integer("df_error").notNull(),
    lnrr: doublePrecision("lnrr"),
    lnrrVar: doublePrecision("lnrr_var"),
    /** The site-year's own treatment F-test p value and its LSD (α = 0.05), kg/ha. */
    pValue: doublePrecision("p_value"),
    lsd05KgHa: doublePrecision("lsd05_kg_ha"),
    cvPct: doublePrecision("cv_pct"),
    replicates: smallint("replicates").notNull(),
    balanced: boolean("balanced").notNull(),
    fromSummary: boolean("from_summary").notNull().default(false),
  },
  (t) => [
    uniqueIndex("responses_site_year_treatment_measure_uq").on(t.siteYearId, t.treatmentId, t.measure),
    index("responses_version_idx").on(t.versionId),
    index("responses_filter_idx").on(t.versionId, t.crop, t.year),
    index("responses_nutrients_gin").using("gin", t.nutrients),
    index("responses_placements_gin").using("gin", t.placements),
  ],
);

/**
 * Values of the fields a curator added to a version's data dictionary (fields Plotbank has no column for): one row
 * per resource row, keyed by that resource's primary-key values joined with U+001F, field name → typed value.
 */
export const customValues = pgTable(
  "custom_values",
  {
    id: bigint("id", { mode: "number" }).primaryKey().generatedAlwaysAsIdentity(),
    versionId: uuid("version_id")
      .notNull()
      .references(() => versions.id, { onDelete: "cascade" }),
    resource: text("resource").notNull(),
    rowKey: text("row_key").notNull(),
    values: jsonb("values").$type<Record<string, string | number | boolean | null>>().notNull(),
  },
  (t) => [uniqueIndex("custom_values_row_uq").on(t.versionId, t.resource, t.rowKey)],
);
