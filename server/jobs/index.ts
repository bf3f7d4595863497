import type { AppContext } from "@/server/context";
import { deliverMail } from "@/server/mail/mailer";
import { runDoiJob } from "@/server/services/citation/doi-registration";
import { graphileQueue } from "./graphile-queue";
import { inProcessQueue, type JobHandlers, type JobQueue } from "./queue";

/**
 * The app's job queue: graphile-worker on the PostgreSQL server named by DATABASE_URL (shared by every process on
 * it), otherwise the in-process queue over the same handlers.
 */
export function createJobQueue(ctx: Omit<AppContext, "jobs">): JobQueue {
  const app = ctx as AppContext;
  const handlers: JobHandlers = {
    "doi-register": (payload) => runDoiJob(app, String(payload.versionId)),
    "mail-deliver": (payload) => deliverMail(app, payload),
  };
  if (ctx.database.kind === "postgres" && ctx.config.databaseUrl)
    return graphileQueue({ connectionString: ctx.config.databaseUrl, db: ctx.db, handlers, maxAttempts: ctx.config.jobMaxAttempts });
  return inProcessQueue(handlers, { maxAttempts: ctx.config.jobMaxAttempts });
}
