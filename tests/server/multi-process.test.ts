/**
 * Two real Plotbank processes (`node --import tsx server/main.ts`) on one PostgreSQL server, as behind a reverse proxy:
 * the publish storm, shared quotas, sessions, a process killed in the middle of a job and a graceful stop. Runs in
 * the PostgreSQL run (`npm run test:pg`, which sets PLOTBANK_TEST_DATABASE_URL); skipped on PGlite, where one
 * process owns the database.
 */
import { spawn, type ChildProcess } from "node:child_process";
import path from "node:path";
import { and, eq, inArray, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { migrateDatabase, openDatabase, queryRows, type Database } from "@/db/client";
import { datasets, follows, outbox, sites, siteYears, users, versions } from "@/db/schema";
import { defaultTableSchema } from "@/datasets/default-table-schema";
import { createUser } from "@/server/services/users";
import { startObservedFakeDoiService } from "@/tests/support/fake-doi-service";
import { createPostgresDatabase, testPassword } from "@/tests/support/test-app";

const adminUrl = process.env.PLOTBANK_TEST_DATABASE_URL;
const root = path.resolve(__dirname, "../..");
const anonPerMinute = 30;

interface Child {
  name: string;
  process: ChildProcess;
  url: string;
  log: string[];
  exited: Promise<number | null>;
}

/** Start one process and wait for its "is serving" line; its output is kept for the failure message. */
async function startPlotbank(name: string, env: NodeJS.ProcessEnv): Promise<Child> {
  const child = spawn(process.execPath, ["--import", "tsx", "server/main.ts"], { cwd: root, env, stdio: ["ignore", "pipe", "pipe"] });
  const log: string[] = [];
  const exited = new Promise<number | null>((resolve) => child.once("exit", (code) => resolve(code)));
  const url = await new Promise<string>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`${name} did not start in 150 s:\n${log.join("")}`)), 150_000);
    const read = (chunk: Buffer) => {
      log.push(chunk.toString());
      const m = / is serving (http:\/\/[^ ]+) /.exec(log.join(""));
      if (m) {
        clearTimeout(timer);
        resolve(m[1]!);
      }
    };
    child.stdout!.on("data", read);
    child.stderr!.on("data", (chunk: Buffer) => log.push(chunk.toString()));
    void exited.then((code) => reject(new Error(`${name} exited with ${code}:\n${log.join("")}`)));
  });
  return { name, process: child, url, log, exited };
}

async function api(child: Child, pathname: string, init: RequestInit & { cookie?: string } = {}) {
  const headers = new Headers(init.headers);
  if (init.cookie) headers.set("Cookie", init.cookie);
  if (init.body) headers.set("Content-Type", "application/json");
  return fetch(`${child.url}${pathname}`, { ...init, headers, signal: AbortSignal.timeout(30_000) });
}

async function until<T>(what: string, probe: () => Promise<T | undefined | false>, timeoutMs: number): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe();
    if (value) return value;
    if (Date.now() > end) throw new Error(`Timed out after ${timeoutMs / 1000} s waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

describe.skipIf(!adminUrl)("two Plotbank processes on one PostgreSQL server", () => {
  let fresh: Awaited<ReturnType<typeof createPostgresDatabase>>;
  let database: Database;
  let doi: Awaited<ReturnType<typeof startObservedFakeDoiService>>;
  let slowCreates = false;
  const children: Child[] = [];
  let curatorId: string;
  let reviewer: { email: string };
  let followerEmails: string[] = [];
  let datasetCounter = 0;

  /** A dataset with one version in review (a site and two site-years), made by the curator, followed by both members. */
  async function versionInReview(): Promise<{ versionId: string; slug: string }> {
    const slug = `tb-multi-${++datasetCounter}`;
    const [d] = await database.db
      .insert(datasets)
      .values({
        slug,
        title: `Corn nitrogen timing in the Tallgrass Basin, block ${datasetCounter}`,
        crops: ["corn"],
        region: "Tallgrass Basin (invented)",
        description: "Invented demonstration trials.",
        licence: "CC-BY-4.0",
        keywords: ["corn", "nitrogen"],
        contributors: [{ name: "Tallgrass Basin Agronomy Network", role: "creator" }],
        ownerId: curatorId,
      })
      .returning();
    const [v] = await database.db
      .insert(versions)
      .values({
        datasetId: d!.id,
        semver: "1.0.0",
        createdBy: curatorId,
        tableSchema: defaultTableSchema(),
        changelog: "First release",
      })
      .returning();
    const [site] = await database.db
      .insert(sites)
      .values({ versionId: v!.id, code: "TB-01", location: "Tallgrass County (invented)" })
      .returning();
    for (const year of [2023, 2024])
      await database.db
        .insert(siteYears)
        .values({ versionId: v!.id, siteId: site!.id, code: `TB-01-${year}`, crop: "corn", year, blocks: 4 });
    // Submitted, as the curator's submit does: rows are written while the version is a draft.
    await database.db
      .update(versions)
      .set({ state: "in_review", submittedBy: curatorId, submittedAt: new Date() })
      .where(eq(versions.id, v!.id));
    const memberIds = await database.db.select({ id: users.id }).from(users).where(eq(users.role, "member"));
    await database.db.insert(follows).values(memberIds.map((m) => ({ userId: m.id, datasetId: d!.id })));
    return { versionId: v!.id, slug };
  }

  const intendedDoi = (slug: string) => `${doi.datacite.prefix}/plotbank.${slug}.v1.0.0`.toLowerCase();

  async function signIn(child: Child, email: string): Promise<string> {
    const res = await api(child, "/api/v1/session", { method: "POST", body: JSON.stringify({ email, password: testPassword }) });
    expect(res.status, await res.clone().text()).toBe(200);
    return res.headers
      .getSetCookie()
      .map((c) => c.split(";")[0])
      .join("; ");
  }

  beforeAll(async () => {
    fresh = await createPostgresDatabase(adminUrl!);
    database = await openDatabase({ url: fresh.url });
    // One migration runner before the processes start (they run with PLOTBANK_MIGRATE=off).
    await migrateDatabase(database);
    const curator = await createUser(database.db, {
      email: "curator@multi.test",
      displayName: "Curator",
      password: testPassword,
      role: "curator",
      verified: true,
    });
    curatorId = curator.id;
    reviewer = await createUser(database.db, {
      email: "reviewer@multi.test",
      displayName: "Reviewer",
      password: testPassword,
      role: "reviewer",
      verified: true,
    });
    followerEmails = [];
    for (const n of [1, 2]) {
      const m = await createUser(database.db, {
        email: `follower${n}@multi.test`,
        displayName: `Follower ${n}`,
        password: testPassword,
        verified: true,
      });
      followerEmails.push(m.email);
    }
    // A slow DOI service on request: creating a DOI takes 4 s, long enough to stop a process in the middle of it.
    doi = await startObservedFakeDoiService({ delayMs: (method) => (slowCreates && method === "POST" ? 4000 : 0) });
    const env: NodeJS.ProcessEnv = {
      PATH: process.env.PATH,
      HOME: process.env.HOME,
      NODE_ENV: "production",
      DATABASE_URL: fresh.url,
      PORT: "0",
      HOST: "127.0.0.1",
      PLOTBANK_PUBLIC_URL: "http://plotbank.test",
      PLOTBANK_DEMO: "off",
      PLOTBANK_SERVE_WEB: "off",
      PLOTBANK_MIGRATE: "off",
      PLOTBANK_MAIL_OUTBOX_ONLY: "1",
      PLOTBANK_ANON_RATE_PER_MIN: String(anonPerMinute),
      DATACITE_URL: doi.datacite.url,
      DATACITE_USER: doi.datacite.user,
      DATACITE_PASSWORD: doi.datacite.password,
      DATACITE_PREFIX: doi.datacite.prefix,
    };
    // One after the other: the first also brings the job queue's own schema up to date.
    children.push(await startPlotbank("process A", env));
    children.push(await startPlotbank("process B", env));
  }, 400_000);

  afterAll(async () => {
    for (const c of children) if (c.process.exitCode === null && c.process.signalCode === null) c.process.kill("SIGKILL");
    await Promise.all(children.map((c) => c.exited));
    await doi?.stop();
    await database?.close();
    await fresh?.drop();
  }, 60_000);

  it("reports ready on both, with the job queue on PostgreSQL", async () => {
    for (const c of children) {
      const res = await api(c, "/api/v1/health/ready");
      expect(res.status).toBe(200);
      expect(await res.json()).toEqual({ ready: true, checks: { database: true, migrations: true, jobQueue: true }, jobQueue: "postgres" });
    }
  });

  it("accepts a session made on one process on the other", async () => {
    const cookie = await signIn(children[0]!, reviewer.email);
    const me = await api(children[1]!, "/api/v1/account", { cookie });
    expect(me.status).toBe(200);
    expect((await me.json()).email).toBe(reviewer.email);
  });

  it("limits anonymous requests spread over both processes as one client", async () => {
    const statuses: number[] = [];
    for (let i = 0; i < anonPerMinute + 10; i++) statuses.push((await api(children[i % 2]!, "/api/v1/datasets")).status);
    expect(statuses.filter((s) => s === 200)).toHaveLength(anonPerMinute);
    expect(statuses.filter((s) => s === 429)).toHaveLength(10);
    // Both processes refused: the count is shared, not each process's half.
    expect(new Set(statuses.map((s, i) => `${i % 2}:${s}`))).toEqual(new Set(["0:200", "1:200", "0:429", "1:429"]));
  });

  it("publishes 20 versions approved across both: each DOI registered once, each follower told once", async () => {
    const made = [];
    for (let i = 0; i < 20; i++) made.push(await versionInReview());
    const cookie = await signIn(children[0]!, reviewer.email);
    const answers = await Promise.all(
      made.map((m, i) =>
        api(children[i % 2]!, `/api/v1/curation/versions/${m.versionId}/approve`, { method: "POST", cookie, body: JSON.stringify({}) }),
      ),
    );
    expect(answers.map((a) => a.status)).toEqual(made.map(() => 200));
    const ids = made.map((m) => m.versionId);
    await until(
      "every DOI to be registered",
      async () => {
        const rows = await database.db.select({ s: versions.doiStatus }).from(versions).where(inArray(versions.id, ids));
        return rows.every((r) => r.s === "registered");
      },
      90_000,
    );
    const created = doi.created();
    for (const m of made) {
      expect(created.filter((d) => d === intendedDoi(m.slug))).toHaveLength(1);
      expect(created.filter((d) => d === `${doi.datacite.prefix}/plotbank.${m.slug}`)).toHaveLength(1);
    }
    expect(doi.calls.filter((c) => c.status === 422)).toEqual([]);
    await until(
      "every notice to be delivered",
      async () => {
        const [row] = await queryRows<{ n: string }>(
          database.db,
          sql`select count(*) as n from outbox where kind = 'new-version' and delivered_at is null`,
        );
        return Number(row!.n) === 0;
      },
      30_000,
    );
    for (const m of made)
      for (const email of followerEmails) {
        const notices = await database.db
          .select()
          .from(outbox)
          .where(and(eq(outbox.kind, "new-version"), eq(outbox.to, email), sql`${outbox.meta}->>'versionId' = ${m.versionId}`));
        expect(notices).toHaveLength(1);
        expect(notices[0]!.deliveryAttempts).toBe(1);
      }
  }, 180_000);

  it("finishes a job on the other process when the one running it is killed", async () => {
    slowCreates = true;
    const m = await versionInReview();
    const cookie = await signIn(children[1]!, reviewer.email);
    const approved = await api(children[1]!, `/api/v1/curation/versions/${m.versionId}/approve`, { method: "POST", cookie, body: "{}" });
    expect(approved.status).toBe(200);
    // Who took the job: its lock names a worker, and job_workers names the worker's process.
    const pid = await until(
      "the DOI job to be taken",
      async () => {
        const [row] = await queryRows<{ pid: number }>(
          database.db,
          sql`select w.pid from graphile_worker.jobs j join job_workers w on w.worker_id = j.locked_by where j.key = ${`doi:${m.versionId}`}`,
        );
        return row?.pid;
      },
      30_000,
    );
    const victim = children.find((c) => c.process.pid === pid)!;
    const survivor = children.find((c) => c !== victim)!;
    victim.process.kill("SIGKILL");
    await victim.exited;
    await until(
      "the survivor to register the DOI",
      async () => {
        const [row] = await database.db.select({ s: versions.doiStatus }).from(versions).where(eq(versions.id, m.versionId));
        return row?.s === "registered";
      },
      90_000,
    );
    expect(doi.created().filter((d) => d === intendedDoi(m.slug))).toHaveLength(1);
    expect((await api(survivor, "/api/v1/health/ready")).status).toBe(200);
  }, 180_000);

  it("on SIGTERM stops taking jobs, finishes the one it runs and exits cleanly", async () => {
    slowCreates = true;
    const last = children.find((c) => c.process.exitCode === null && c.process.signalCode === null)!;
    const m = await versionInReview();
    const cookie = await signIn(last, reviewer.email);
    expect((await api(last, `/api/v1/curation/versions/${m.versionId}/approve`, { method: "POST", cookie, body: "{}" })).status).toBe(200);
    await until(
      "the DOI job to be taken",
      async () => {
        const [row] = await queryRows<{ locked: boolean }>(
          database.db,
          sql`select locked_at is not null as locked from graphile_worker.jobs where key = ${`doi:${m.versionId}`}`,
        );
        return row?.locked;
      },
      30_000,
    );
    last.process.kill("SIGTERM");
    expect(await last.exited).toBe(0);
    const [row] = await database.db.select({ s: versions.doiStatus }).from(versions).where(eq(versions.id, m.versionId));
    expect(row?.s).toBe("registered");
    expect(doi.created().filter((d) => d === intendedDoi(m.slug))).toHaveLength(1);
    const [left] = await queryRows<{ n: string }>(database.db, sql`select count(*) as n from job_workers`);
    // The stopped process took its workers off the list; the killed one's were taken off by the survivor.
    expect(Number(left!.n)).toBe(0);
  }, 120_000);
});
