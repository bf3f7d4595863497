import { index, integer, pgTable, text, timestamp } from "drizzle-orm/pg-core";

/**
 * Request counters shared by every Plotbank process on one PostgreSQL server (the rate-limit store used with
 * DATABASE_URL). One row per limiter and client key; a row whose window has ended counts from one again.
 */
export const rateLimitHits = pgTable(
  "rate_limit_hits",
  {
    key: text("key").primaryKey(),
    hits: integer("hits").notNull(),
    resetAt: timestamp("reset_at", { withTimezone: true }).notNull(),
  },
  (t) => [index("rate_limit_hits_reset_at_idx").on(t.resetAt)],
);

/**
 * The job-queue workers of the running processes and when each last said it was alive. A process killed without a
 * chance to stop leaves its jobs locked; the others release the locks of workers that have gone quiet.
 */
export const jobWorkers = pgTable("job_workers", {
  workerId: text("worker_id").primaryKey(),
  host: text("host").notNull(),
  pid: integer("pid").notNull(),
  seenAt: timestamp("seen_at", { withTimezone: true }).notNull().defaultNow(),
});
