import { bigint, boolean, index, integer, jsonb, pgTable, primaryKey, text, timestamp, uniqueIndex, uuid } from "drizzle-orm/pg-core";
import type { Contributor, TableSchemaDescriptor } from "@/schemas/dataset-metadata";
import { users } from "./accounts";
import { doiStatusEnum, versionStateEnum } from "./enums";

export const datasets = pgTable("datasets", {
  id: uuid("id").primaryKey().defaultRandom(),
  slug: text("slug").notNull().unique(),
  title: text("title").notNull(),
  crops: text("crops").array().notNull(),
  region: text("region").notNull(),
  description: text("description").notNull(),
  licence: text("licence").notNull().default("CC-BY-4.0"),
  keywords: text("keywords").array().notNull().default([]),
  contributors: jsonb("contributors").$type<Contributor[]>().notNull().default([]),
  funding: text("funding"),
  methods: text("methods"),
  ownerId: uuid("owner_id")
    .notNull()
    .references(() => users.id),
  /** DOI naming the dataset as a whole (DataCite HasVersion points from it to each version). */
  conceptDoi: text("concept_doi"),
  createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
});

/** Curators other than the owner who may work on a dataset's drafts. */
export const datasetEditors = pgTable(
  "dataset_editors",
  {
    datasetId: uuid("dataset_id")
      .notNull()
      .references(() => datasets.id, { onDelete: "cascade" }),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
  },
  (t) => [primaryKey({ columns: [t.datasetId, t.userId] })],
);

export const follows = pgTable(
  "follows",
  {
    datasetId: uuid("dataset_id")
      .notNull()
      .references(() => datasets.id, { onDelete: "cascade" }),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.datasetId, t.userId] })],
);

export const versions = pgTable(
  "versions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    datasetId: uuid("dataset_id")
      .notNull()
      .references(() => datasets.id, { onDelete: "cascade" }),
    semver: text("semver").notNull(),
    state: versionStateEnum("state").notNull().default("draft"),
    changelog: text("changelog").notNull().default(""),
    tableSchema: jsonb("table_schema").$type<TableSchemaDescriptor>().notNull(),
    /** Dataset metadata frozen when the version is published, so its citation never drifts. */
    metadataSnapshot: jsonb("metadata_snapshot").$type<Record<string, unknown>>(),
    /** SHA-256 over the canonical CSV of every resource; set on publish. */
    checksum: text("checksum"),
    basedOnVersionId: uuid("based_on_version_id"),
    createdBy: uuid("created_by")
      .notNull()
      .references(() => users.id),
    submittedBy: uuid("submitted_by").references(() => users.id),
    reviewedBy: uuid("reviewed_by").references(() => users.id),
    reviewComment: text("review_comment"),
    withdrawnReason: text("withdrawn_reason"),
    doi: text("doi"),
    doiStatus: doiStatusEnum("doi_status").notNull().default("none"),
    doiAttempts: integer("doi_attempts").notNull().default(0),
    doiLastError: text("doi_last_error"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
    submittedAt: timestamp("submitted_at", { withTimezone: true }),
    publishedAt: timestamp("published_at", { withTimezone: true }),
    withdrawnAt: timestamp("withdrawn_at", { withTimezone: true }),
  },
  (t) => [
    uniqueIndex("versions_dataset_semver_uq").on(t.datasetId, t.semver),
    index("versions_dataset_state_idx").on(t.datasetId, t.state),
  ],
);

/**
 * Who changed a draft's content other than by an upload (the data dictionary, its semver or changelog). With the
 * version's creator, its submitter and its uploaders, these people may not approve it (four eyes).
 */
export const versionEdits = pgTable(
  "version_edits",
  {
    versionId: uuid("version_id")
      .notNull()
      .references(() => versions.id, { onDelete: "cascade" }),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    lastAt: timestamp("last_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.versionId, t.userId] })],
);

/** Accepted upload files, kept byte for byte with their checksum. */
export const uploads = pgTable(
  "uploads",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    versionId: uuid("version_id")
      .notNull()
      .references(() => versions.id, { onDelete: "cascade" }),
    resource: text("resource").notNull(),
    filename: text("filename").notNull(),
    byteSize: bigint("byte_size", { mode: "number" }).notNull(),
    sha256: text("sha256").notNull(),
    rowCount: integer("row_count").notNull(),
    /** Column mapping and units the curator chose for this file. */
    options: jsonb("options").$type<Record<string, unknown>>().notNull().default({}),
    content: text("content").notNull(),
    uploadedBy: uuid("uploaded_by").references(() => users.id),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("uploads_version_idx").on(t.versionId)],
);

/** Validation reports, accepted or not; kept outside the version's own tables so a rejected file changes nothing there. */
export const validationReports = pgTable(
  "validation_reports",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    versionId: uuid("version_id")
      .notNull()
      .references(() => versions.id, { onDelete: "cascade" }),
    resource: text("resource").notNull(),
    filename: text("filename").notNull(),
    accepted: boolean("accepted").notNull(),
    problems: jsonb("problems").$type<Record<string, unknown>[]>().notNull(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("validation_reports_version_idx").on(t.versionId)],
);
