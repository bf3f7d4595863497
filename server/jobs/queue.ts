import { unrefTimer } from "@/db/client";
/**
 * Background work (DOI registration and metadata refreshes, mail delivery) goes through one job queue. With
 * DATABASE_URL it is graphile-worker on PostgreSQL, shared by every Plotbank process on that server; on PGlite, one
 * process owns the database and the same handlers run in that process with the same rules: a key per job, retries
 * with exponential back-off, jobs of one lane one at a time, and a failed state after the last attempt that an admin
 * can see and send round again.
 */
export type JobTask = "doi-register" | "mail-deliver";

interface AddJobOptions {
  /** At most one waiting, running-and-waiting or failed job per key. */
  key: string;
  /**
   * "replace": a waiting or failed job of this key starts over (attempts from zero) with this payload; a running one
   * finishes and a new job follows it. "keep": any existing job of this key stands and nothing is added.
   */
  mode?: "replace" | "keep";
  /** Jobs of one lane run one at a time, oldest first, across all processes. */
  lane?: string;
  maxAttempts?: number;
}

export interface FailedJob {
  id: string;
  task: string;
  key: string | null;
  attempts: number;
  maxAttempts: number;
  lastError: string | null;
  failedAt: string;
}

export interface JobQueue {
  kind: "postgres" | "in-process";
  add(task: JobTask, payload: Record<string, unknown>, options: AddJobOptions): Promise<void>;
  /** Begin taking jobs (the in-process queue takes them from the start). */
  start(): Promise<void>;
  /** Stop taking jobs and wait for the running ones to end. */
  stop(): Promise<void>;
  /** Wait until no job is due now or running (tests, and before closing a test database). */
  drain(): Promise<void>;
  /** Taking jobs now. */
  running(): boolean;
  /** Jobs that used up their attempts, newest first. */
  failed(): Promise<FailedJob[]>;
  /** Send a failed job round again from its first attempt; false when no failed job has this id. */
  retry(id: string): Promise<boolean>;
}

type JobHandler = (payload: Record<string, unknown>) => Promise<void>;
export type JobHandlers = Record<JobTask, JobHandler>;

export const defaultMaxAttempts: Record<JobTask, number> = { "doi-register": 10, "mail-deliver": 8 };

/** The in-process queue waits 30 s, 1, 2, 4 … minutes between attempts, never more than an hour. */
function backOffMs(attempts: number): number {
  if (attempts <= 0) return 0;
  return Math.min(30_000 * 2 ** (attempts - 1), 60 * 60_000);
}

interface LocalJob {
  id: string;
  task: JobTask;
  payload: Record<string, unknown>;
  key: string;
  lane: string;
  attempts: number;
  maxAttempts: number;
  runAt: number;
  lastError: string | null;
  running: boolean;
  failedAt?: number;
  /** Replaced while it ran: run once more when it ends. */
  again?: { payload: Record<string, unknown> };
}

/** The queue for a database only this process uses (PGlite): jobs live in memory, handlers run here. */
export function inProcessQueue(
  handlers: JobHandlers,
  options: { log?: (message: string) => void; backOff?: (attempts: number) => number; maxAttempts?: number } = {},
): JobQueue {
  const log = options.log ?? ((m) => console.error(m));
  const backOff = options.backOff ?? backOffMs;
  const jobs = new Map<string, LocalJob>();
  const busyLanes = new Set<string>();
  const inFlight = new Set<Promise<void>>();
  let timer: ReturnType<typeof setTimeout> | undefined;
  let counter = 0;
  let stopped = false;

  const due = () =>
    [...jobs.values()]
      .filter((j) => !j.running && j.failedAt === undefined && j.runAt <= Date.now())
      .sort((a, b) => a.runAt - b.runAt || Number(a.id) - Number(b.id));

  function schedule() {
    if (stopped) return;
    for (const job of due()) {
      if (busyLanes.has(job.lane)) continue;
      busyLanes.add(job.lane);
      job.running = true;
      const run = runJob(job).finally(() => {
        busyLanes.delete(job.lane);
        inFlight.delete(run);
        schedule();
      });
      inFlight.add(run);
    }
    // Wake up for the next retry that is not due yet.
    if (timer) clearTimeout(timer);
    timer = undefined;
    const next = [...jobs.values()].filter((j) => !j.running && j.failedAt === undefined).sort((a, b) => a.runAt - b.runAt)[0];
    if (next && next.runAt > Date.now()) {
      timer = unrefTimer(setTimeout(schedule, next.runAt - Date.now()));
    }
  }

  async function runJob(job: LocalJob) {
    job.attempts += 1;
    try {
      await handlers[job.task](job.payload);
      job.lastError = null;
      if (job.again) {
        Object.assign(job, { payload: job.again.payload, attempts: 0, runAt: Date.now(), again: undefined });
      } else jobs.delete(job.id);
    } catch (error) {
      job.lastError = (error instanceof Error ? error.message : String(error)).slice(0, 2000);
      if (job.again) {
        Object.assign(job, { payload: job.again.payload, attempts: 0, runAt: Date.now(), again: undefined });
      } else if (job.attempts >= job.maxAttempts) {
        job.failedAt = Date.now();
        log(`Job ${job.task} (${job.key}) failed for good after ${job.attempts} attempts: ${job.lastError}`);
      } else job.runAt = Date.now() + backOff(job.attempts);
    } finally {
      job.running = false;
    }
  }

  const byKey = (key: string) => [...jobs.values()].find((j) => j.key === key);

  return {
    kind: "in-process",
    async add(task, payload, { key, mode = "replace", lane = task, maxAttempts = options.maxAttempts ?? defaultMaxAttempts[task] }) {
      const existing = byKey(key);
      if (existing && mode === "keep") return;
      if (existing?.running) existing.again = { payload };
      else if (existing)
        Object.assign(existing, { payload, attempts: 0, runAt: Date.now(), failedAt: undefined, maxAttempts, lastError: null });
      else {
        const id = String(++counter);
        jobs.set(id, { id, task, payload, key, lane, attempts: 0, maxAttempts, runAt: Date.now(), lastError: null, running: false });
      }
      // After the caller's own awaits: the request that queued the job answers first.
      setImmediate(schedule);
    },
    async start() {
      stopped = false;
      schedule();
    },
    async stop() {
      stopped = true;
      if (timer) clearTimeout(timer);
      while (inFlight.size > 0) await Promise.all([...inFlight]);
    },
    async drain() {
      for (;;) {
        await new Promise((resolve) => setImmediate(resolve));
        if (inFlight.size > 0) await Promise.all([...inFlight]);
        else if (!stopped && due().length > 0) schedule();
        else return;
      }
    },
    running: () => !stopped,
    async failed() {
      return [...jobs.values()]
        .filter((j) => j.failedAt !== undefined)
        .sort((a, b) => b.failedAt! - a.failedAt!)
        .map((j) => ({
          id: j.id,
          task: j.task,
          key: j.key,
          attempts: j.attempts,
          maxAttempts: j.maxAttempts,
          lastError: j.lastError,
          failedAt: new Date(j.failedAt!).toISOString(),
        }));
    },
    async retry(id) {
      const job = jobs.get(id);
      if (!job || job.failedAt === undefined) return false;
      Object.assign(job, { attempts: 0, runAt: Date.now(), failedAt: undefined });
      setImmediate(schedule);
      return true;
    },
  };
}
