import { and, eq, inArray } from "drizzle-orm";
import { versions } from "@/db/schema";
import type { AppContext } from "@/server/context";
import { retryPendingDois } from "./doi-registration";

/**
 * DOI work runs in the background, one pass at a time per app: nobody's request waits on the DOI service, and two
 * passes never register the same version at once. A pass picks up every version whose DOI is due (see
 * retryPendingDois), so queueing is only "mark it pending, then make sure a pass runs".
 */
interface Worker {
  pass: Promise<void> | undefined;
  /** Work was queued while a pass ran: run one more when it ends. */
  again: boolean;
}

const workers = new WeakMap<AppContext, Worker>();

function workerOf(ctx: AppContext): Worker {
  let w = workers.get(ctx);
  if (!w) workers.set(ctx, (w = { pass: undefined, again: false }));
  return w;
}

/** Start a background pass now, or one more after the pass that is running. */
function kickDoiQueue(ctx: AppContext): void {
  if (!ctx.config.datacite.url) return;
  const w = workerOf(ctx);
  if (w.pass) {
    w.again = true;
    return;
  }
  w.pass = (async () => {
    do {
      w.again = false;
      const s = await retryPendingDois(ctx);
      if (s.pending || s.failed) console.log(`DOI pass: ${s.registered} registered, ${s.pending} still pending, ${s.failed} refused`);
    } while (w.again);
  })()
    .catch((error) => console.error("DOI pass failed:", error))
    .finally(() => {
      w.pass = undefined;
    });
}

/** Wait until no DOI pass is running (shutdown, and tests that read the outcome). */
export async function drainDoiQueue(ctx: AppContext): Promise<void> {
  const w = workers.get(ctx);
  while (w?.pass) await w.pass;
}

/**
 * Queue a version's DOI work for the next pass, due at once: its first registration after publication, a metadata
 * update after a withdrawal, or another try that a person asked for. The version keeps its registered DOI (if it
 * has one) while the update waits.
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
    .returning({ id: versions.id });
  kickDoiQueue(ctx);
  return queued.length > 0;
}

/** The background retry: a pass every `intervalMs` picks up versions whose back-off has run out. Returns its stop. */
export function startDoiRetryLoop(ctx: AppContext, intervalMs = 15_000): () => void {
  const timer = setInterval(() => kickDoiQueue(ctx), intervalMs);
  // The retry loop alone must not keep the process alive (tests, shutdown).
  (timer as unknown as { unref?: () => void }).unref?.();
  return () => clearInterval(timer);
}
