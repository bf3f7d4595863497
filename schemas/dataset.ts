import { z } from "zod";
import { versionStates } from "@/constants/vocabulary";
import { contributor } from "./dataset-metadata";

export const versionState = z.enum(versionStates).meta({ id: "VersionState" });
export type VersionState = z.infer<typeof versionState>;

/** A dataset as the catalogue lists it. */
export const datasetSummary = z
  .object({
    id: z.string(),
    slug: z.string(),
    title: z.string(),
    crops: z.array(z.string()),
    region: z.string(),
    description: z.string(),
    licence: z.string(),
    keywords: z.array(z.string()),
    contributors: z.array(contributor),
    latestVersion: z.string().nullable().describe("Semantic version of the latest published version"),
    publishedAt: z.string().nullable().describe("ISO time the latest version was published"),
    siteYears: z.number().int().describe("Site-years in the latest published version"),
    yearFrom: z.number().int().nullable(),
    yearTo: z.number().int().nullable(),
  })
  .meta({ id: "DatasetSummary" });
export type DatasetSummary = z.infer<typeof datasetSummary>;

export const datasetList = z.object({ items: z.array(datasetSummary) }).meta({ id: "DatasetList" });

export const health = z
  .object({
    status: z.enum(["ok", "degraded"]),
    version: z.string(),
    database: z.object({ kind: z.enum(["pglite", "postgres"]), connected: z.boolean(), latencyMs: z.number() }),
  })
  .meta({ id: "Health" });
export type Health = z.infer<typeof health>;

export const readiness = z
  .object({
    ready: z.boolean(),
    checks: z.object({
      database: z.boolean(),
      /** Every migration this code expects is applied. */
      migrations: z.boolean(),
      /** The background-job queue is taking jobs (false while the process stops). */
      jobQueue: z.boolean(),
    }),
    jobQueue: z.enum(["postgres", "in-process"]),
  })
  .meta({ id: "Readiness" });
export type Readiness = z.infer<typeof readiness>;
