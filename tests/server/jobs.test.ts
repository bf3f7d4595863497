import { and, eq } from "drizzle-orm";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { follows, outbox, versions } from "@/db/schema";
import { inProcessQueue, type JobHandlers } from "@/server/jobs/queue";
import { notifyFollowers } from "@/server/services/accounts/notifications";
import { versionDoiAttributes } from "@/server/services/citation/datacite-payload";
import { loadCitableDatasetOfVersion } from "@/server/services/citation/citable-version";
import { citableFixture } from "@/tests/support/citable-fixture";
import { startObservedFakeDoiService } from "@/tests/support/fake-doi-service";
import { signedInAgent } from "@/tests/support/sign-in";
import { makeUser, testApp, type TestApp } from "@/tests/support/test-app";

const quiet = { log: () => undefined };

describe("the in-process job queue", () => {
  const handlersWith = (handler: JobHandlers["doi-register"]): JobHandlers => ({ "doi-register": handler, "mail-deliver": handler });

  it("retries a failing job with growing waits until it succeeds", async () => {
    const at: number[] = [];
    const waits: number[] = [];
    const q = inProcessQueue(
      handlersWith(async () => {
        at.push(Date.now());
        if (at.length < 3) throw new Error(`attempt ${at.length} failed`);
      }),
      { ...quiet, backOff: (n) => (waits.push(20 * 2 ** (n - 1)), 20 * 2 ** (n - 1)) },
    );
    await q.add("doi-register", {}, { key: "k" });
    await expect.poll(() => at.length, { timeout: 5000 }).toBe(3);
    await q.drain();
    expect(waits).toEqual([20, 40]);
    expect(at[2]! - at[1]!).toBeGreaterThanOrEqual(at[1]! - at[0]!);
    expect(await q.failed()).toEqual([]);
    await q.stop();
  });

  it("keeps a job that used up its attempts as failed, with its error, until it is retried", async () => {
    let calls = 0;
    let healthy = false;
    const q = inProcessQueue(
      handlersWith(async () => {
        calls++;
        if (!healthy) throw new Error("the service said no");
      }),
      { ...quiet, backOff: () => 1 },
    );
    await q.add("mail-deliver", {}, { key: "mail:1", maxAttempts: 3 });
    await expect.poll(async () => (await q.failed()).length, { timeout: 5000 }).toBe(1);
    const [failed] = await q.failed();
    expect(failed).toMatchObject({ task: "mail-deliver", key: "mail:1", attempts: 3, maxAttempts: 3, lastError: "the service said no" });
    expect(calls).toBe(3);
    // A job of the same key that must not be duplicated stays the failed one.
    await q.add("mail-deliver", {}, { key: "mail:1", mode: "keep" });
    await q.drain();
    expect(calls).toBe(3);
    healthy = true;
    expect(await q.retry(failed!.id)).toBe(true);
    await q.drain();
    expect(calls).toBe(4);
    expect(await q.failed()).toEqual([]);
    expect(await q.retry(failed!.id)).toBe(false);
    await q.stop();
  });

  it("runs the jobs of one lane one at a time and other lanes beside them", async () => {
    let running = 0;
    let most = 0;
    const order: string[] = [];
    const q = inProcessQueue(
      handlersWith(async (p) => {
        running++;
        most = Math.max(most, running);
        await new Promise((r) => setTimeout(r, 20));
        order.push(String(p.n));
        running--;
      }),
      quiet,
    );
    for (const n of [1, 2, 3]) await q.add("doi-register", { n }, { key: `a${n}`, lane: "a" });
    await q.add("doi-register", { n: 9 }, { key: "b", lane: "b" });
    await q.drain();
    expect(order.filter((n) => n !== "9")).toEqual(["1", "2", "3"]);
    expect(most).toBe(2);
    await q.stop();
  });
});

describe("DOI and mail jobs", () => {
  let doi: Awaited<ReturnType<typeof startObservedFakeDoiService>>;
  let t: TestApp;
  beforeAll(async () => {
    doi = await startObservedFakeDoiService();
    t = await testApp({ datacite: doi.datacite, jobMaxAttempts: 1 });
  });
  afterAll(async () => {
    await t.close();
    await doi.stop();
  });

  it("finds a DOI that an earlier attempt minted and updates it instead of creating it again", async () => {
    const f = await citableFixture(t.ctx, "tb-jobs-lost-answer");
    // The version's DOI reached the service, but the answer was lost: the record is there, ours says nothing.
    const intended = `${doi.datacite.prefix}/plotbank.tb-jobs-lost-answer.v1.0.0`;
    const id = await f.publish("1.0.0", { hooks: false });
    const dataset = await loadCitableDatasetOfVersion(t.ctx.db, t.ctx.config, id);
    const attributes = versionDoiAttributes(
      dataset!,
      dataset!.versions.find((v) => v.versionId === id)!,
    );
    doi.fake.records.set(intended, { ...attributes, state: "findable" });
    doi.calls.length = 0;
    await t.ctx.db.update(versions).set({ doiStatus: "pending" }).where(eq(versions.id, id));
    await t.ctx.jobs.add("doi-register", { versionId: id }, { key: `doi:${id}` });
    await t.ctx.jobs.drain();
    const [row] = await t.ctx.db.select().from(versions).where(eq(versions.id, id));
    expect(row).toMatchObject({ doi: intended, doiStatus: "registered" });
    const aboutVersion = doi.calls.filter((c) => c.doi === intended).map((c) => `${c.method} ${c.status}`);
    expect(aboutVersion).toEqual(["GET 200", "PUT 200"]);
    expect(doi.created()).not.toContain(intended);
  });

  it("shows a DOI job that used up its attempts to admins, with the error, and sends it round again on request", async () => {
    const f = await citableFixture(t.ctx, "tb-jobs-failed");
    const admin = await makeUser(t.ctx, "admin");
    const agent = await signedInAgent(t.app, admin.email);
    const down = t.ctx.config.datacite.url;
    t.ctx.config.datacite.url = "http://127.0.0.1:9";
    let id: string;
    try {
      id = await f.publish("1.0.0");
    } finally {
      t.ctx.config.datacite.url = down;
    }
    const listed = await agent.get("/api/v1/admin/jobs/failed").expect(200);
    const job = (listed.body.items as { id: string; key: string; task: string; lastError: string }[]).find((j) => j.key === `doi:${id}`);
    expect(job).toMatchObject({ task: "doi-register", attempts: 1, maxAttempts: 1 });
    expect(job!.lastError).toMatch(/could not be reached/);

    await agent.post(`/api/v1/admin/jobs/${job!.id}/retry`).expect(202);
    await t.ctx.jobs.drain();
    const [row] = await t.ctx.db.select().from(versions).where(eq(versions.id, id));
    expect(row).toMatchObject({ doiStatus: "registered", doi: `${doi.datacite.prefix}/plotbank.tb-jobs-failed.v1.0.0` });
    const after = await agent.get("/api/v1/admin/jobs/failed").expect(200);
    expect(after.body.items.map((j: { key: string }) => j.key)).not.toContain(`doi:${id}`);
    await agent.post(`/api/v1/admin/jobs/${job!.id}/retry`).expect(404);
    await request(t.app).get("/api/v1/admin/jobs/failed").expect(401);
  });

  it("records and delivers one new-version notice per follower when the hook runs twice at once", async () => {
    const f = await citableFixture(t.ctx, "tb-jobs-followers");
    const people = await Promise.all([makeUser(t.ctx, "member"), makeUser(t.ctx, "member")]);
    await t.ctx.db.insert(follows).values(people.map((p) => ({ userId: p.id, datasetId: f.datasetId })));
    const id = await f.publish("1.0.0", { hooks: false });
    await Promise.all([notifyFollowers(t.ctx, id), notifyFollowers(t.ctx, id)]);
    await t.ctx.jobs.drain();
    for (const p of people) {
      const rows = await t.ctx.db
        .select()
        .from(outbox)
        .where(and(eq(outbox.kind, "new-version"), eq(outbox.to, p.email)));
      expect(rows).toHaveLength(1);
      expect(rows[0]!.deliveredAt).toBeInstanceOf(Date);
      expect(rows[0]!.deliveryAttempts).toBe(1);
    }
  });
});
