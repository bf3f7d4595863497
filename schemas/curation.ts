import { z } from "zod";
import { doiStatuses } from "@/constants/vocabulary";
import { contributor } from "./dataset-metadata";
import { line, paragraph } from "./safe-text";
import { datasetSummary, versionState } from "./dataset";
import { crops } from "./filters";
import { problemLocation } from "./problem";
import { resourceName, tableSchemaDescriptor, tableSchemaField } from "./table-schema";

/** Contracts of the curation side: datasets, draft versions, uploads and their reports, review, diffs. */

export const semver = line().regex(/^\d+\.\d+\.\d+$/, "a semantic version such as 1.2.0");

/** The dataset's fields as the curator writes them, without defaults: a default inside `.partial()` would fill in (and so overwrite) every field a patch leaves out. */
const datasetFields = z.object({
  slug: line()
    .min(3)
    .max(80)
    .regex(/^[a-z0-9]+(-[a-z0-9]+)*$/, "lower-case words joined by hyphens"),
  title: line().min(3).max(200),
  crops: z.array(z.enum(crops)).min(1),
  region: line().min(2).max(200),
  description: paragraph().min(1).max(10_000),
  licence: line().min(2).max(40).describe("SPDX identifier; default CC-BY-4.0"),
  keywords: z.array(line().min(1).max(60)).max(40),
  contributors: z.array(contributor).max(100),
  funding: paragraph().max(2000).nullable().optional(),
  methods: paragraph().max(20_000).nullable().optional().describe("Methods and protocol"),
});

export const datasetCreate = datasetFields
  .extend({
    licence: datasetFields.shape.licence.default("CC-BY-4.0"),
    keywords: datasetFields.shape.keywords.default([]),
    contributors: datasetFields.shape.contributors.default([]),
  })
  .strict()
  .meta({ id: "DatasetCreate" });
export type DatasetCreate = z.input<typeof datasetCreate>;

/** Only the fields sent are changed; the others keep their values. */
export const datasetPatch = datasetFields.omit({ slug: true }).partial().strict().meta({ id: "DatasetPatch" });
export type DatasetPatch = z.input<typeof datasetPatch>;

const versionBrief = z
  .object({
    id: z.string(),
    semver,
    state: versionState,
    changelog: z.string(),
    createdAt: z.string(),
    submittedAt: z.string().nullable(),
    publishedAt: z.string().nullable(),
    withdrawnAt: z.string().nullable(),
  })
  .meta({ id: "VersionBrief" });
export type VersionBrief = z.infer<typeof versionBrief>;

export const curationDataset = datasetSummary
  .pick({
    id: true,
    slug: true,
    title: true,
    crops: true,
    region: true,
    description: true,
    licence: true,
    keywords: true,
    contributors: true,
  })
  .extend({
    funding: z.string().nullable(),
    methods: z.string().nullable(),
    ownerId: z.string(),
    editorIds: z.array(z.string()),
    editors: z
      .array(z.object({ id: z.string(), displayName: z.string(), email: z.string() }))
      .describe("Curators the owner has shared the dataset with; e-mail addresses only for its owner, editors and admins"),
    canShare: z.boolean().describe("The signed-in user may add and remove editors (the owner or an admin)"),
    canEdit: z.boolean().describe("The signed-in user may edit this dataset's drafts"),
    canStartVersion: z
      .boolean()
      .describe("The signed-in user may start a new version now (an editor, with no draft or version in review open)"),
    versions: z.array(versionBrief).describe("Newest first"),
    createdAt: z.string(),
    updatedAt: z.string(),
  })
  .meta({ id: "CurationDataset" });
export type CurationDataset = z.infer<typeof curationDataset>;

export const curationDatasetList = z.object({ items: z.array(curationDataset) }).meta({ id: "CurationDatasetList" });

export const versionCreate = z
  .object({
    semver: semver.optional().describe("Default: the next minor version after the latest published one (1.0.0 for a first version)"),
  })
  .strict()
  .meta({ id: "VersionCreate" });

const resourceCounts = z.record(resourceName, z.number().int()).meta({ id: "ResourceCounts" });

const uncomputedSiteYear = z.object({ siteYear: z.string(), reason: z.string() }).meta({ id: "UncomputedSiteYear" });

const uploadBrief = z
  .object({
    id: z.string(),
    resource: resourceName,
    filename: z.string(),
    byteSize: z.number().int(),
    sha256: z.string(),
    rowCount: z.number().int(),
    options: z.record(z.string(), z.unknown()),
    createdAt: z.string(),
  })
  .meta({ id: "UploadBrief" });

const reportBrief = z
  .object({
    id: z.string(),
    resource: resourceName,
    filename: z.string(),
    accepted: z.boolean(),
    errors: z.number().int(),
    warnings: z.number().int(),
    createdAt: z.string(),
  })
  .meta({ id: "ValidationReportBrief" });

const doiRegistration = z
  .object({
    status: z
      .enum(doiStatuses)
      .describe(
        "none: nothing to register (no DOI service); pending: waiting for the service (first registration or a metadata update); " +
          "registered; failed: the service refused the metadata",
      ),
    doi: z.string().nullable().describe("The DOI, once the service has registered it"),
    intendedDoi: z.string().describe("The DOI this version is registered under"),
    attempts: z.number().int(),
    lastError: z.string().nullable().describe("What the DOI service answered to the last attempt that did not succeed"),
    canRequeue: z.boolean().describe("A pending or failed registration may be sent again now"),
  })
  .meta({ id: "DoiRegistration" });
export type DoiRegistration = z.infer<typeof doiRegistration>;

/** A version as the curation desk sees it (any state, with uploads, reports and rights); public readers get VersionDetail. */
export const versionDetail = z
  .object({
    id: z.string(),
    datasetId: z.string(),
    datasetSlug: z.string(),
    datasetTitle: z.string(),
    semver,
    state: versionState,
    changelog: z.string(),
    tableSchema: tableSchemaDescriptor,
    metadataSnapshot: z.record(z.string(), z.unknown()).nullable(),
    checksum: z.string().nullable().describe("sha256:… over the canonical CSV of every resource; set on publish"),
    basedOnVersionId: z.string().nullable(),
    basedOnSemver: z.string().nullable(),
    createdBy: z.string(),
    submittedBy: z.string().nullable(),
    reviewedBy: z.string().nullable(),
    reviewComment: z.string().nullable(),
    withdrawnReason: z.string().nullable(),
    createdAt: z.string(),
    updatedAt: z.string(),
    submittedAt: z.string().nullable(),
    publishedAt: z.string().nullable(),
    withdrawnAt: z.string().nullable(),
    counts: resourceCounts.nullable().describe("Rows per resource; null for a withdrawn version (tombstone)"),
    responses: z.number().int().nullable(),
    uncomputedSiteYears: z.array(uncomputedSiteYear).describe("Site-years without responses, each with the reason"),
    uploads: z.array(uploadBrief),
    reports: z.array(reportBrief),
    canEdit: z.boolean(),
    canReview: z.boolean().describe("You may approve (publish) this version: it is in review and you neither created nor submitted it"),
    canReturn: z.boolean().describe("You may return this version to its curators"),
    canWithdraw: z.boolean().describe("You may withdraw this published version"),
    latestPublishedSemver: z.string().nullable(),
    suggestedBump: z.enum(["major", "minor", "patch"]).nullable().describe("From the diff against the version it is based on"),
    suggestedSemver: semver.nullable(),
    doiRegistration: doiRegistration
      .nullable()
      .describe("For the dataset's editors and reviewers once the version is released; null otherwise"),
  })
  .meta({ id: "CurationVersionDetail" });
export type VersionDetail = z.infer<typeof versionDetail>;

/** A renamed field of the curator's own: its values in the draft follow it to the new name. */
const fieldRename = z
  .object({ resource: resourceName, from: line().min(1).max(64), to: line().min(1).max(64) })
  .strict()
  .meta({ id: "FieldRename" });
export type FieldRename = z.infer<typeof fieldRename>;

export const tableSchemaUpdate = tableSchemaDescriptor
  .extend({
    renames: z
      .array(fieldRename)
      .max(200)
      .optional()
      .describe("Fields of the curator's own renamed in this edit: the values stored under `from` move to `to`"),
  })
  .meta({ id: "VersionTableSchemasUpdate" });
export type TableSchemaUpdate = z.infer<typeof tableSchemaUpdate>;

/** A field of the curator's own added to one resource's dictionary. */
export const fieldAddBody = z.object({ resource: resourceName, field: tableSchemaField }).strict().meta({ id: "FieldAdd" });
/** A field's new name and/or new definition. */
export const fieldChangeBody = z
  .object({ name: line().min(1).max(64).optional(), field: tableSchemaField.partial().optional() })
  .strict()
  .meta({ id: "FieldChange" });

export const versionPatch = z
  .object({
    semver: semver.optional(),
    changelog: paragraph().max(20_000).optional(),
  })
  .strict()
  .meta({ id: "VersionPatch" });

const severity = z.enum(["error", "warning"]);
const validationProblem = z
  .object({
    severity,
    file: z.string(),
    row: z.number().int().nullable().describe("1-based data row; the header row is not counted (spreadsheet line = row + 1)"),
    column: z.string().nullable(),
    value: z.string().nullable(),
    message: z.string(),
    kind: z
      .string()
      .optional()
      .describe('What sort of problem this is, for problems that repeat ("no-responses:no plots or summary means yet", "unbalanced")'),
    place: z.string().optional().describe("Where it is, as the group's list names it (a site-year, a plot, a treatment)"),
  })
  .meta({ id: "ValidationProblem" });
export type ValidationProblem = z.infer<typeof validationProblem>;

const problemGroup = z
  .object({
    severity,
    kind: z.string().nullable().describe("The problems' kind; null for a problem of its own"),
    count: z.number().int(),
    places: z.array(z.string()).describe("The first few places, in report order"),
    message: z.string().describe('One sentence for them all, e.g. "No responses yet at 72 site-years (…): TB-01-2021, … and 69 more"'),
  })
  .meta({ id: "ProblemGroup" });
export type ProblemGroup = z.infer<typeof problemGroup>;

export const validationReport = z
  .object({
    id: z.string(),
    versionId: z.string(),
    resource: resourceName,
    filename: z.string(),
    accepted: z.boolean(),
    errors: z.number().int(),
    warnings: z.number().int(),
    total: z.number().int().describe("Problems matching the filter, before limit"),
    groups: z.array(problemGroup).describe("Every problem of the report, one entry per kind with its count (not filtered)"),
    problems: z.array(validationProblem),
    createdAt: z.string(),
  })
  .meta({ id: "ValidationReport" });
export type ValidationReport = z.infer<typeof validationReport>;

export const reportQuery = z
  .object({
    severity: severity.optional(),
    column: line().max(64).optional(),
    row: z.coerce.number().int().min(1).optional(),
    q: line().max(200).optional().describe("Text the message must contain"),
    limit: z.coerce.number().int().min(1).max(10_000).default(500),
    offset: z.coerce.number().int().min(0).default(0),
  })
  .strict();

const uploadUnits = z
  .object({
    yield: z.enum(["kg/ha", "bu/ac", "lb/ac"]).default("kg/ha").describe("Unit of yields in plots and summaries (MSE in its square)"),
    yieldMoisture: z
      .enum(["standard", "harvest"])
      .default("standard")
      .describe(
        "standard: yields already at the crop's standard moisture; harvest: at the harvest moisture of each plot (needs harvest_moisture_pct)",
      ),
    soilTest: z.enum(["ppm", "lb/ac"]).default("ppm").describe("Soil-test P/K/S values; lb/ac is converted as ppm × 2 for a 6-inch sample"),
    gradeBasis: z.enum(["oxide", "element"]).default("oxide").describe("element: the grade gives P and K, converted to P2O5 and K2O"),
  })
  .strict()
  .meta({ id: "UploadUnits" });
export type UploadUnits = z.infer<typeof uploadUnits>;

export const uploadOptions = z
  .object({
    mapping: z.record(line(), line()).default({}).describe("CSV header → data-dictionary field; unmapped headers match fields by name"),
    units: uploadUnits.default({ yield: "kg/ha", yieldMoisture: "standard", soilTest: "ppm", gradeBasis: "oxide" }),
    mode: z
      .enum(["merge", "replace"])
      .default("merge")
      .describe(
        "merge: each row replaces the draft's row with the same key (sites by site, site-years by site_year, treatments by treatment with all its applications, soil tests by site_year + analyte, plots by site_year + plot, summaries by site_year + treatment) and other rows are added; the draft's other rows stay, and the checks judge the merged version. replace: the file becomes the whole resource",
      ),
  })
  .strict()
  .meta({ id: "UploadOptions" });
export type UploadOptions = z.infer<typeof uploadOptions>;

export const uploadResult = z
  .object({
    accepted: z.boolean(),
    reportId: z.string(),
    uploadId: z.string().nullable(),
    resource: resourceName,
    filename: z.string(),
    rows: z.number().int(),
    sha256: z.string(),
    byteSize: z.number().int(),
    delimiter: z.string(),
    errors: z.number().int(),
    warnings: z.number().int(),
    groups: z.array(problemGroup).describe("All problems of the file, one entry per kind with its count and first places"),
    problems: z.array(validationProblem).describe("The first 200 problems; the report has them all"),
    responses: z.object({ siteYears: z.number().int(), rows: z.number().int(), uncomputed: z.array(uncomputedSiteYear) }).nullable(),
  })
  .meta({ id: "UploadResult" });
export type UploadResult = z.infer<typeof uploadResult>;

/** The RFC 9457 members of every refused upload (422). */
const rejectionHead = {
  type: z.string(),
  title: z.string(),
  status: z.literal(422),
  detail: z.string(),
  instance: z.string(),
};

/** One cell changed by hand, with the reason the changelog keeps. */
export const cellEditBody = z
  .object({
    resource: resourceName,
    key: z
      .record(line().max(64), line().max(200))
      .describe('The row\'s key fields as its CSV prints them, e.g. {"site_year":"TB-01-2021","plot":"203"}'),
    field: line().min(1).max(64).describe("The data-dictionary field to change (not a key field)"),
    value: line().max(2000).describe("The new value as a CSV cell would hold it, in the stored unit; empty for a missing value"),
    reason: paragraph().trim().min(3).max(2000).describe("Why: recorded in the version's changelog"),
  })
  .strict()
  .meta({ id: "CellEdit" });
export type CellEdit = z.infer<typeof cellEditBody>;

export const cellEditResult = z
  .object({
    resource: resourceName,
    key: z.record(z.string(), z.string()),
    field: z.string(),
    from: z.string().nullable(),
    to: z.string().nullable(),
    reason: z.string(),
    changelog: z.string().describe("The version's changelog with the edit's line"),
    upload: uploadResult.describe("The check and write the edit went through, as an upload of the edited row"),
  })
  .meta({ id: "CellEditResult" });
export type CellEditResult = z.infer<typeof cellEditResult>;

/**
 * A rejected upload (422, application/problem+json): `errors` lists the located problems (file, row, column, value),
 * the counts are `errorCount` and `warningCount`, and the rest is the upload result. Nothing was stored.
 */
export const uploadRejection = z
  .object({
    ...rejectionHead,
    errors: z.array(problemLocation).describe("The errors among the first 200 problems, located by file, row, column and value"),
    errorCount: z.number().int(),
    warningCount: z.number().int(),
    ...uploadResult.omit({ errors: true, warnings: true }).shape,
  })
  .meta({ id: "UploadRejection" });

/** One sheet of a workbook upload: its upload result, and whether it was stored. */
const workbookSheetResult = uploadResult
  .extend({
    sheet: z.string().describe("The sheet's name as the workbook spells it"),
    status: z
      .enum(["stored", "not stored", "rejected"])
      .describe(
        "stored; not stored: valid, but another sheet has errors and a workbook is stored whole or not at all; rejected: has errors",
      ),
  })
  .meta({ id: "WorkbookSheetResult" });
export type WorkbookSheetResult = z.infer<typeof workbookSheetResult>;

export const workbookUploadResult = z
  .object({
    accepted: z.boolean(),
    filename: z.string(),
    sha256: z.string(),
    byteSize: z.number().int(),
    errors: z.number().int(),
    warnings: z.number().int(),
    sheets: z
      .array(workbookSheetResult)
      .describe("The sheets checked, in the order they were checked (resources before those that refer to them)"),
    notChecked: z
      .array(z.object({ sheet: z.string(), resource: resourceName }))
      .describe("Sheets after a rejected one: not checked, since their references would point at rows not stored"),
  })
  .meta({ id: "WorkbookUploadResult" });
export type WorkbookUploadResult = z.infer<typeof workbookUploadResult>;

/** A rejected workbook (422): the located errors of the rejected sheet, the counts, and the workbook result. */
export const workbookRejection = z
  .object({
    ...rejectionHead,
    errors: z
      .array(problemLocation)
      .describe("The errors of the rejected sheet, located by file (workbook and sheet), row, column and value"),
    errorCount: z.number().int(),
    warningCount: z.number().int(),
    ...workbookUploadResult.omit({ errors: true, warnings: true }).shape,
  })
  .meta({ id: "WorkbookRejection" });

/** A workbook whose sheets are named after no resource (422): the sheets found and the names expected. */
export const sheetNamesRejection = z
  .object({
    ...rejectionHead,
    errors: z.array(problemLocation),
    sheetsFound: z.array(z.string()),
    sheetsExpected: z.array(resourceName),
  })
  .meta({ id: "SheetNamesRejection" });

export const submitBody = z
  .object({ changelog: paragraph().trim().min(3).max(20_000) })
  .strict()
  .meta({ id: "SubmitVersion" });
export const returnBody = z
  .object({ comment: paragraph().trim().min(3).max(5000) })
  .strict()
  .meta({ id: "ReturnVersion" });
export const approveBody = z
  .object({ comment: paragraph().max(5000).optional() })
  .strict()
  .meta({ id: "ApproveVersion" });
export const withdrawBody = z
  .object({ reason: paragraph().trim().min(3).max(5000) })
  .strict()
  .meta({ id: "WithdrawVersion" });
export const editorsBody = z
  .object({ email: z.email("an e-mail address") })
  .strict()
  .meta({ id: "DatasetEditor" });
export const editorParams = z.object({ slug: line(), userId: z.uuid() });

const bump = z.enum(["major", "minor", "patch"]);
const siteYearChange = z.object({ siteYear: z.string(), fields: z.array(z.string()) });
const rowChange = z.object({ key: z.string(), change: z.enum(["added", "removed", "changed"]), fields: z.array(z.string()) });
const rowDiff = z.object({
  added: z.number().int(),
  removed: z.number().int(),
  changed: z.number().int(),
  fields: z.array(z.object({ field: z.string(), rows: z.number().int() })).describe("The fields whose values changed, with how many rows"),
  sample: z.array(rowChange),
});
export const versionDiff = z
  .object({
    from: z.object({ id: z.string(), semver, state: versionState }),
    to: z.object({ id: z.string(), semver, state: versionState }),
    siteYears: z.object({ added: z.array(z.string()), removed: z.array(z.string()), changed: z.array(siteYearChange) }),
    rows: z.record(resourceName, rowDiff),
    schema: z.object({
      added: z.array(z.string()).describe("resource.field"),
      removed: z.array(z.string()),
      changed: z.array(z.object({ field: z.string(), what: z.array(z.string()) })),
    }),
    suggestedBump: bump,
    reasons: z.array(z.string()),
    explanation: z.string().describe('The suggested bump in words: "minor: 4 site-years added (…), no published value changed"'),
    suggestedSemver: semver,
  })
  .meta({ id: "VersionDiff" });
export type VersionDiff = z.infer<typeof versionDiff>;

export const diffQuery = z.object({ from: z.uuid(), to: z.uuid() }).strict();

const reviewQueueItem = z
  .object({
    versionId: z.string(),
    datasetSlug: z.string(),
    datasetTitle: z.string(),
    semver,
    changelog: z.string(),
    submittedAt: z.string().nullable(),
    submittedBy: z.string().nullable(),
    submittedByName: z.string().nullable(),
    canApprove: z.boolean().describe("False when you created or submitted it"),
  })
  .meta({ id: "ReviewQueueItem" });
export const reviewQueue = z.object({ items: z.array(reviewQueueItem) }).meta({ id: "ReviewQueue" });
