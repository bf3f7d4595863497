import { EventEmitter } from "node:events";
import pg from "pg";
import os from "node:os";
import { sql } from "drizzle-orm";
import { Logger, run, runMigrations, type Runner, type Task, type WorkerEvents } from "graphile-worker";
import { queryRows, unrefTimer, type Db } from "@/db/client";
import { defaultMaxAttempts, type FailedJob, type JobHandlers, type JobQueue, type JobTask } from "./queue";

/** How often a process says its workers are alive, and how long a silent worker keeps its jobs locked. */
const heartbeatMs = 5_000;
const silentAfterMs = 20_000;

export interface GraphileQueueOptions {
  connectionString: string;
  db: Db;
  handlers: JobHandlers;
  /** Jobs one process runs at once (each lane still runs one at a time). */
  concurrency?: number;
  pollIntervalMs?: number;
  /** Attempts of every job, instead of each task's default. */
  maxAttempts?: number;
}

/** graphile-worker's messages at warning and above go to the log; its chatter about each job does not. */
const quietLogger = new Logger(() => (level, message) => {
  if (level === "error" || level === "warning") console.error(`job queue: ${message}`);
});

/**
 * The job queue on PostgreSQL (graphile-worker). Jobs are rows in the graphile_worker schema, so any process may
 * add one and exactly one process runs it; a job key keeps one job per thing to do. graphile-worker retries a failed
 * job after exp(attempts) seconds (2.7 s, 7.4 s, 20 s … about 6 h at most) and leaves it failed, with its error,
 * once max attempts are used up.
 *
 * A process that dies without stopping (SIGKILL, a lost machine) leaves its running jobs locked, and graphile-worker
 * would wait four hours before anyone took them again. Each process therefore writes its worker ids to job_workers
 * every few seconds, and releases the locks of workers that have been silent for longer than `silentAfterMs`.
 */
export function graphileQueue(options: GraphileQueueOptions): JobQueue {
  const { connectionString, db, handlers } = options;
  let runner: Runner | undefined;
  let heartbeat: ReturnType<typeof setInterval> | undefined;
  const workerIds = new Set<string>();
  // Our own pool, ended by us: graphile-worker writes a job's completion after its handler returns, and a pool that
  // the runner ended on stop would lose that write, leaving a finished job locked.
  let pgPool: pg.Pool | undefined;

  const taskList = Object.fromEntries(
    Object.entries(handlers).map(([name, handler]): [string, Task] => [name, (payload) => handler(payload as Record<string, unknown>)]),
  );

  async function beat() {
    const ids = [...workerIds];
    for (const id of ids)
      await db.execute(sql`insert into job_workers (worker_id, host, pid, seen_at) values (${id}, ${os.hostname()}, ${process.pid}, now())
        on conflict (worker_id) do update set seen_at = now()`);
    const silent = await queryRows<{ worker_id: string }>(
      db,
      sql`delete from job_workers where seen_at < now() - make_interval(secs => ${silentAfterMs / 1000}) returning worker_id`,
    );
    const gone = silent.map((r) => r.worker_id).filter((id) => !workerIds.has(id));
    if (gone.length > 0) {
      // Pool ids are `pool-` and hex digits, so a comma-joined list splits back exactly.
      await db.execute(sql`select graphile_worker.force_unlock_workers(string_to_array(${gone.join(",")}, ','))`);
      console.error(`job queue: released the jobs of workers that went silent: ${gone.join(", ")}`);
    }
  }

  return {
    kind: "postgres",
    async add(task: JobTask, payload, { key, mode = "replace", lane, maxAttempts = options.maxAttempts ?? defaultMaxAttempts[task] }) {
      await db.execute(sql`select graphile_worker.add_job(
        identifier => ${task}, payload => ${JSON.stringify(payload)}::json, queue_name => ${lane ?? null},
        max_attempts => ${maxAttempts}, job_key => ${key}, job_key_mode => ${mode === "keep" ? "unsafe_dedupe" : "replace"})`);
    },
    async start() {
      if (runner) return;
      await runMigrations({ connectionString, logger: quietLogger });
      const events: WorkerEvents = new EventEmitter();
      // Jobs are locked in the name of the pool that took them, so that is the id the heartbeat reports.
      events.on("pool:create", ({ workerPool }) => workerIds.add(workerPool.id));
      pgPool = new pg.Pool({ connectionString, max: (options.concurrency ?? 2) + 2 });
      pgPool.on("error", (error) => console.error(`job queue: an idle connection failed: ${error.message}`));
      pgPool.on("connect", (client) => client.on("error", (error) => console.error(`job queue: a connection failed: ${error.message}`)));
      runner = await run({
        pgPool,
        concurrency: options.concurrency ?? 2,
        pollInterval: options.pollIntervalMs ?? 1000,
        noHandleSignals: true,
        logger: quietLogger,
        events,
        taskList,
        crontab: "",
      });
      await beat();
      heartbeat = unrefTimer(setInterval(() => beat().catch((error) => console.error("job queue heartbeat failed:", error)), heartbeatMs));
    },
    async stop() {
      if (heartbeat) clearInterval(heartbeat);
      heartbeat = undefined;
      const r = runner;
      runner = undefined;
      // graphile-worker's stop takes no new job and waits for the running ones.
      await r?.stop();
      const ids = [...workerIds];
      workerIds.clear();
      // Then the completions of those jobs are written (a moment after their handlers return).
      const until = Date.now() + 5_000;
      for (const id of ids) {
        while (Date.now() < until) {
          const [row] = await queryRows<{ n: string }>(db, sql`select count(*) as n from graphile_worker.jobs where locked_by = ${id}`);
          if (Number(row?.n ?? 0) === 0) break;
          await new Promise((resolve) => setTimeout(resolve, 50));
        }
        await db.execute(sql`delete from job_workers where worker_id = ${id}`);
      }
      await pgPool?.end();
      pgPool = undefined;
    },
    async drain() {
      for (;;) {
        const [row] = await queryRows<{ n: string }>(
          db,
          sql`select count(*) as n from graphile_worker.jobs where attempts < max_attempts and (run_at <= now() or locked_at is not null)`,
        );
        if (Number(row?.n ?? 0) === 0) return;
        await new Promise((resolve) => setTimeout(resolve, 100));
      }
    },
    running: () => !!runner,
    async failed(): Promise<FailedJob[]> {
      const rows = await queryRows<{
        id: string;
        task_identifier: string;
        key: string | null;
        attempts: number;
        max_attempts: number;
        last_error: string | null;
        updated_at: Date | string;
      }>(
        db,
        sql`select id, task_identifier, key, attempts, max_attempts, last_error, updated_at from graphile_worker.jobs
          where attempts >= max_attempts and locked_at is null order by updated_at desc limit 200`,
      );
      return rows.map((r) => ({
        id: String(r.id),
        task: r.task_identifier,
        key: r.key,
        attempts: Number(r.attempts),
        maxAttempts: Number(r.max_attempts),
        lastError: r.last_error,
        failedAt: new Date(r.updated_at).toISOString(),
      }));
    },
    async retry(id) {
      if (!/^\d+$/.test(id)) return false;
      const rows = await queryRows<{ id: string }>(
        db,
        sql`select id from graphile_worker.reschedule_jobs(
          (select array_agg(id) from graphile_worker.jobs where id = ${id}::bigint and attempts >= max_attempts and locked_at is null),
          run_at := now(), attempts := 0)`,
      );
      return rows.length > 0;
    },
  };
}
