import { and, eq, inArray, sql } from "drizzle-orm";
import { datasets, versions } from "@/db/schema";
import type { AppContext } from "@/server/context";
import { createDataCiteClient, DataCiteRequestError, type DataCiteClient } from "@/server/doi/datacite-client";
import type { DataCiteAttributes } from "@/server/doi/datacite-metadata";
import { loadCitableDatasetOfVersion, neighbours } from "./citable-version";
import { conceptDoiAttributes, versionDoiAttributes, withRegisteredDoi } from "./datacite-payload";

type DoiOutcome = "registered" | "pending" | "failed" | "skipped";

/** Waits between attempts: 30 s, 1, 2, 4 … minutes, never more than an hour. */
export function retryDelayMs(attempts: number): number {
  if (attempts <= 0) return 0;
  return Math.min(30_000 * 2 ** (attempts - 1), 60 * 60_000);
}

function clientOf(ctx: AppContext): DataCiteClient | undefined {
  const { url, user, password } = ctx.config.datacite;
  return url ? createDataCiteClient({ url, user, password }) : undefined;
}

/**
 * Mint a DOI, or bring its metadata up to date when it exists already. The DOI is the idempotency key: it is looked up
 * first (an earlier attempt, or a process that died after its request reached the service, may have minted it), and a
 * 422 "already been taken" from a create that raced another is taken as the update path.
 */
async function upsertDoi(client: DataCiteClient, attributes: DataCiteAttributes): Promise<DataCiteAttributes> {
  if (attributes.doi && (await doiExists(client, attributes.doi))) return client.updateDoi(attributes.doi, attributes);
  try {
    return await client.createDoi(attributes);
  } catch (error) {
    if (error instanceof DataCiteRequestError && error.alreadyTaken) return client.updateDoi(attributes.doi!, attributes);
    throw error;
  }
}

async function doiExists(client: DataCiteClient, doi: string): Promise<boolean> {
  try {
    await client.getDoi(doi);
    return true;
  } catch (error) {
    if (error instanceof DataCiteRequestError && error.status === 404) return false;
    throw error;
  }
}

/**
 * Register a released version's DOI, then refresh its neighbours' version links and the dataset's concept DOI.
 * Every step is idempotent, so a retry simply runs them all again. A failure never touches the publication: the
 * version stays published with doi_status pending (the service was unreachable or refused for now) or failed
 * (it rejected the metadata itself), and the error is kept for curators to read.
 */
async function registerVersionDoi(ctx: AppContext, versionId: string): Promise<{ outcome: DoiOutcome; error?: string }> {
  const client = clientOf(ctx);
  if (!client) return { outcome: "skipped" };
  const dataset = await loadCitableDatasetOfVersion(ctx.db, ctx.config, versionId);
  const version = dataset?.versions.find((v) => v.versionId === versionId);
  if (!dataset || !version) return { outcome: "skipped" };
  try {
    const attributes = versionDoiAttributes(dataset, version);
    const minted = version.doi ? await client.updateDoi(version.doi, attributes) : await upsertDoi(client, attributes);
    // From here on the service has this DOI, so its neighbours and the concept DOI may link to it.
    const linked = withRegisteredDoi(dataset, versionId, minted.doi ?? version.intendedDoi);
    const { previous, next } = neighbours(linked, versionId);
    for (const n of [previous, next]) {
      // A neighbour still waiting for its own DOI gets these links when its registration runs.
      if (n?.doi) await client.updateDoi(n.doi, versionDoiAttributes(linked, n));
    }
    const concept = await upsertDoi(client, conceptDoiAttributes(linked));
    await ctx.db
      .update(datasets)
      .set({ conceptDoi: concept.doi ?? dataset.intendedConceptDoi })
      .where(eq(datasets.id, dataset.datasetId));
    await ctx.db
      .update(versions)
      .set({
        doi: minted.doi ?? version.intendedDoi,
        doiStatus: "registered",
        doiAttempts: sql`${versions.doiAttempts} + 1`,
        doiLastError: null,
        updatedAt: new Date(),
      })
      .where(eq(versions.id, versionId));
    return { outcome: "registered" };
  } catch (error) {
    const outcome = error instanceof DataCiteRequestError && error.permanent ? "failed" : "pending";
    const message = error instanceof Error ? error.message : String(error);
    await ctx.db
      .update(versions)
      .set({
        doiStatus: outcome,
        doiAttempts: sql`${versions.doiAttempts} + 1`,
        doiLastError: message.slice(0, 2000),
        updatedAt: new Date(),
      })
      .where(eq(versions.id, versionId));
    return { outcome, error: message };
  }
}

/**
 * The job-queue task for one version: register it (or refresh its metadata). A failure worth retrying is thrown, so
 * the queue tries again after its back-off and, after the last attempt, keeps the job as failed for an admin; a
 * refusal of the metadata itself is recorded on the version (doi_status failed) for its curators and not retried.
 */
export async function runDoiJob(ctx: AppContext, versionId: string): Promise<void> {
  const { outcome, error } = await registerVersionDoi(ctx, versionId);
  if (outcome === "pending") throw new Error(error ?? "The DOI service did not register the DOI.");
}

export interface RetrySummary {
  attempted: number;
  registered: number;
  pending: number;
  failed: number;
}

/**
 * Register every released version that has no DOI yet and whose back-off has run out. `failed` versions (the
 * service refused their metadata) are left for a person to look at rather than sent again unchanged.
 */
export async function retryPendingDois(ctx: AppContext, options: { now?: Date } = {}): Promise<RetrySummary> {
  const summary: RetrySummary = { attempted: 0, registered: 0, pending: 0, failed: 0 };
  if (!ctx.config.datacite.url) return summary;
  const now = (options.now ?? new Date()).getTime();
  const waiting = await ctx.db
    .select({ id: versions.id, attempts: versions.doiAttempts, updatedAt: versions.updatedAt, semver: versions.semver })
    .from(versions)
    .where(and(inArray(versions.state, ["published", "withdrawn"]), inArray(versions.doiStatus, ["none", "pending"])))
    .orderBy(versions.publishedAt);
  for (const v of waiting) {
    if (v.attempts > 0 && v.updatedAt.getTime() + retryDelayMs(v.attempts) > now) continue;
    summary.attempted++;
    const { outcome } = await registerVersionDoi(ctx, v.id);
    if (outcome === "registered") summary.registered++;
    else if (outcome === "failed") summary.failed++;
    else if (outcome === "pending") summary.pending++;
  }
  return summary;
}
