import { and, eq, inArray } from "drizzle-orm";
import { unrefTimer } from "@/db/client";
import { versions } from "@/db/schema";
import type { AppContext } from "@/server/context";

/**
 * DOI work is a job on the app's job queue (server/jobs): nobody's request waits on the DOI service, one job per
 * version (its key), and the versions of one dataset go through one lane, so two of them never update the dataset's
 * concept DOI at once, whichever processes run them.
 */
const doiJob = (versionId: string) => `doi:${versionId}`;
const doiLane = (datasetId: string) => `doi:${datasetId}`;

/** Wait until no job is due or running (shutdown, and tests that read the outcome). */
export async function drainDoiQueue(ctx: AppContext): Promise<void> {
  await ctx.jobs.drain();
}

/**
 * Queue a version's DOI work, due at once: its first registration after publication, a metadata update after a
 * withdrawal, or another try that a person asked for (which starts a failed job over). The version keeps its
 * registered DOI (if it has one) while the update waits.
 */
export async function queueDoiWork(
  ctx: AppContext,
  versionId: string,
  from: ("none" | "pending" | "registered" | "failed")[],
): Promise<boolean> {
  if (!ctx.config.datacite.url) return false;
  const queued = await ctx.db
    .update(versions)
    .set({ doiStatus: "pending", doiAttempts: 0 })
    .where(and(eq(versions.id, versionId), inArray(versions.state, ["published", "withdrawn"]), inArray(versions.doiStatus, from)))
    .returning({ id: versions.id, datasetId: versions.datasetId });
  for (const q of queued) await ctx.jobs.add("doi-register", { versionId: q.id }, { key: doiJob(q.id), lane: doiLane(q.datasetId) });
  return queued.length > 0;
}

/**
 * Every released version still without its DOI gets a job unless it has one already (waiting, running or failed):
 * the catch-up for work queued by a process that stopped between marking a version pending and adding its job.
 */
async function queueWaitingDois(ctx: AppContext): Promise<number> {
  if (!ctx.config.datacite.url) return 0;
  const waiting = await ctx.db
    .select({ id: versions.id, datasetId: versions.datasetId })
    .from(versions)
    .where(and(inArray(versions.state, ["published", "withdrawn"]), inArray(versions.doiStatus, ["none", "pending"])))
    .orderBy(versions.publishedAt);
  for (const v of waiting)
    await ctx.jobs.add("doi-register", { versionId: v.id }, { key: doiJob(v.id), lane: doiLane(v.datasetId), mode: "keep" });
  return waiting.length;
}

/** The catch-up at start and then every `intervalMs`. Returns its stop. */
export function startDoiCatchUp(ctx: AppContext, intervalMs = 5 * 60_000): () => void {
  const run = () => queueWaitingDois(ctx).catch((error) => console.error("Queueing waiting DOIs failed:", error));
  void run();
  const timer = unrefTimer(setInterval(run, intervalMs));
  return () => clearInterval(timer);
}
