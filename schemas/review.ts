import { z } from "zod";
import { metaOptionShape } from "./analysis";
import { metaDetailOptionShape } from "./meta-regression";
import { semver } from "./curation";
import { versionState } from "./dataset";
import { trialFilterShape } from "./filters";
import { line, paragraph } from "./safe-text";
import { resourceName } from "./table-schema";

/** Contracts of the review screen: a version's rows, its per-site-year results and flags, diffs with values, comments. */

const pageParam = z.coerce.number().int().min(1).max(1_000_000).default(1).describe("1 for the first page");
const limitParam = (max: number, byDefault: number) => z.coerce.number().int().min(1).max(max).default(byDefault);
const versionRef = z.object({ id: z.string(), semver, state: versionState });
const cellText = z.union([z.string(), z.null()]);

export const diffRowsQuery = z
  .object({
    from: z.uuid(),
    to: z.uuid(),
    resource: resourceName,
    change: z.enum(["added", "removed", "changed"]).optional().describe("Only rows added, removed or changed"),
    page: pageParam,
    limit: limitParam(500, 50),
  })
  .strict();

export const versionDiffRows = z
  .object({
    from: versionRef,
    to: versionRef,
    resource: resourceName,
    fields: z.array(z.string()).describe("The fields both versions' dictionaries have, in order"),
    page: z.number().int(),
    limit: z.number().int(),
    total: z.number().int().describe("Rows that differ (after the change filter)"),
    rows: z.array(
      z.object({
        key: z.string().describe("The row's key: site-year code, site-year/plot, treatment/application …"),
        siteYear: cellText.describe("The site-year the row belongs to, when it belongs to one"),
        change: z.enum(["added", "removed", "changed"]),
        cells: z.array(
          z.object({
            field: z.string(),
            old: cellText.describe("The value in `from`; null when the row was added or the cell is empty"),
            new: cellText.describe("The value in `to`; null when the row was removed or the cell is empty"),
            changed: z.boolean().describe("Both sides have the row and the values differ"),
          }),
        ),
      }),
    ),
  })
  .meta({ id: "VersionDiffRows" });
export type VersionDiffRows = z.infer<typeof versionDiffRows>;

export const versionRowsQuery = z.object({ page: pageParam, limit: limitParam(500, 50) }).strict();
export const versionRowsParams = z.object({ id: z.uuid(), resource: resourceName });
export const versionRowsPage = z
  .object({
    versionId: z.string(),
    resource: resourceName,
    fields: z.array(z.string()),
    keyFields: z.array(z.string()).describe("The fields that name a row (a cell edit's `key`); they are not edited in place"),
    page: z.number().int(),
    limit: z.number().int(),
    total: z.number().int(),
    rows: z.array(z.array(cellText)).describe("Values as text in `fields` order; null for a missing value"),
  })
  .meta({ id: "VersionRowsPage" });
export type VersionRowsPage = z.infer<typeof versionRowsPage>;

const reviewFlagCodes = ["outlier-plot", "unbalanced", "check-off", "response-implausible", "high-cv", "no-responses"] as const;
export type ReviewFlagCode = (typeof reviewFlagCodes)[number];
const reviewFlag = z.object({ code: z.enum(reviewFlagCodes), message: z.string() });

const siteYearResponse = z.object({
  treatment: z.string(),
  checkMeanKgHa: z.number(),
  treatedMeanKgHa: z.number(),
  mdKgHa: z.number().describe("Treated − check, kg/ha"),
  seKgHa: z.number(),
});

const nullableNumber = z.union([z.number(), z.null()]);
const siteYearResult = z
  .object({
    siteYear: z.string(),
    site: z.string(),
    crop: z.string(),
    year: z.number().int(),
    plots: z.number().int().describe("Plots with a yield"),
    fromSummary: z.boolean().describe("Responses from published means (no plots)"),
    balanced: z.union([z.boolean(), z.null()]),
    replicates: nullableNumber,
    anova: z
      .union([
        z.object({
          f: nullableNumber.describe("Treatment F (null for site-years published as means)"),
          dfTreatment: nullableNumber,
          dfError: nullableNumber,
          pValue: nullableNumber,
          lsd05KgHa: nullableNumber.describe("Fisher's LSD at α = 0.05, kg/ha"),
          cvPct: nullableNumber,
        }),
        z.null(),
      ])
      .describe("The site-year's own ANOVA; null when no response could be computed"),
    responses: z.array(siteYearResponse),
    uncomputedReason: z.union([z.string(), z.null()]),
    flags: z.array(reviewFlag),
    comments: z.number().int().describe("Reviewer comments on this site-year (open and resolved)"),
  })
  .meta({ id: "SiteYearResult" });
export type SiteYearResult = z.infer<typeof siteYearResult>;

export const reviewSummaryQuery = z
  .object({
    page: pageParam,
    limit: limitParam(200, 25),
    flagged: z.enum(["true", "false"]).optional().describe("true: only the site-years with a flag"),
  })
  .strict();

const reviewRule = z.object({
  code: z.enum(reviewFlagCodes),
  title: z.string(),
  rule: z.string(),
  source: z.string().describe('A publication, or "common practice, no source"'),
});

export const reviewSummary = z
  .object({
    version: versionRef,
    comparedTo: z.union([versionRef, z.null()]).describe("The dataset's latest published version, which the diff compares against"),
    page: z.number().int(),
    limit: z.number().int(),
    total: z.number().int().describe("Site-years (after the flagged filter)"),
    flaggedSiteYears: z.number().int().describe("Site-years with at least one flag, in the whole version"),
    siteYears: z.array(siteYearResult),
    rules: z.array(reviewRule),
    placements: z.array(z.string()).describe("Placements among the version's responses, for the draft preview"),
    nutrients: z.array(z.string()).describe("Tested nutrients among the version's responses"),
    canComment: z.boolean(),
  })
  .meta({ id: "ReviewSummary" });
export type ReviewSummary = z.infer<typeof reviewSummary>;

const { dataset: _dataset, version: _version, ...draftFilterShape } = trialFilterShape;
const { format: _format, ...draftOptionShape } = metaOptionShape;
/** The Evidence screen's filters and options, without dataset and version (the draft is the one version read). */
export const draftPreviewQuery = z
  .object({ ...draftFilterShape, ...draftOptionShape, ...metaDetailOptionShape })
  .strict()
  .meta({ id: "DraftPreviewQuery" });
export type DraftPreviewQuery = z.infer<typeof draftPreviewQuery>;

export const reviewCommentBody = z
  .object({ siteYear: line().trim().min(1).max(120), body: paragraph().trim().min(3).max(5000) })
  .strict()
  .meta({ id: "ReviewCommentCreate" });

const reviewComment = z
  .object({
    id: z.string(),
    versionId: z.string(),
    siteYear: z.string(),
    body: z.string(),
    authorId: z.string(),
    authorName: z.string(),
    createdAt: z.string(),
    /** The version's state when the comment was made; comments stay through returns and re-submissions. */
    stateWhenMade: versionState,
    resolvedAt: z.union([z.string(), z.null()]),
    resolvedByName: z.union([z.string(), z.null()]),
  })
  .meta({ id: "ReviewComment" });
export type ReviewComment = z.infer<typeof reviewComment>;
export const reviewComments = z.object({ items: z.array(reviewComment) }).meta({ id: "ReviewComments" });
export const commentParams = z.object({ id: z.uuid(), commentId: z.uuid() });
