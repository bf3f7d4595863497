import type { Server } from "node:http";
import type { AddressInfo } from "node:net";
import { and, eq, inArray } from "drizzle-orm";
import express, { type Request, type Response } from "express";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { seedDemo } from "@/datasets";
import { datasets, follows, outbox, versions } from "@/db/schema";
import type { FakeDataCite } from "@/server/doi/fake-datacite";
import { compareSemver } from "@/server/services/catalogue";
import { drainDoiQueue } from "@/server/services/citation/doi-queue";
import { fakeDoiPrefix as prefix, startFakeDoiService } from "@/tests/support/fake-doi-service";
import { makeUser, testApp, type TestApp } from "@/tests/support/test-app";
import { draftWithData } from "./curation-fixtures";

describe("DOIs through the real publication path (the demo: submit and approve through the services)", () => {
  let fake: FakeDataCite;
  let t: TestApp;
  beforeAll(async () => {
    const service = await startFakeDoiService();
    fake = service.fake;
    t = await testApp({ datacite: service.datacite() });
    await seedDemo(t.ctx);
    await drainDoiQueue(t.ctx);
  }, 180_000);
  afterAll(async () => {
    await t?.close();
    await fake?.stop();
  });

  it("every published demo version ends with a findable DOI, linked to its neighbours and to the dataset's concept DOI", async () => {
    const rows = await t.ctx.db
      .select({
        slug: datasets.slug,
        conceptDoi: datasets.conceptDoi,
        semver: versions.semver,
        doi: versions.doi,
        doiStatus: versions.doiStatus,
        doiLastError: versions.doiLastError,
      })
      .from(versions)
      .innerJoin(datasets, eq(datasets.id, versions.datasetId))
      .where(eq(versions.state, "published"));
    const slugs = [...new Set(rows.map((r) => r.slug))];
    expect(slugs).toHaveLength(3);
    for (const slug of slugs) {
      const chain = rows.filter((r) => r.slug === slug).sort((a, b) => compareSemver(a.semver, b.semver));
      expect(chain.length).toBeGreaterThanOrEqual(2);
      const conceptDoi = `${prefix}/plotbank.${slug}`;
      chain.forEach((v, i) => {
        const doi = `${prefix}/plotbank.${slug}.v${v.semver}`;
        expect(v, `${slug} ${v.semver}`).toMatchObject({ doi, doiStatus: "registered", doiLastError: null, conceptDoi });
        const record = fake.records.get(doi);
        expect(record?.state, doi).toBe("findable");
        expect(record!.version).toBe(v.semver);
        const links = record!.relatedIdentifiers ?? [];
        expect(links).toContainEqual({ relatedIdentifier: conceptDoi, relatedIdentifierType: "DOI", relationType: "IsVersionOf" });
        const previous = chain[i - 1];
        const next = chain[i + 1];
        const newVersionOf = links.filter((l) => l.relationType === "IsNewVersionOf").map((l) => l.relatedIdentifier);
        const previousVersionOf = links.filter((l) => l.relationType === "IsPreviousVersionOf").map((l) => l.relatedIdentifier);
        expect(newVersionOf, doi).toEqual(previous ? [previous.doi] : []);
        expect(previousVersionOf, doi).toEqual(next ? [next.doi] : []);
      });
      const concept = fake.records.get(conceptDoi);
      expect(concept?.state).toBe("findable");
      expect(concept!.relatedIdentifiers!.filter((l) => l.relationType === "HasVersion").map((l) => l.relatedIdentifier)).toEqual(
        chain.map((v) => v.doi),
      );
    }
  });
});

/**
 * A DOI service that takes requests and does not answer until told to; then it hands the held requests (their
 * bodies still unread) to the local fake, as a slow service finally would.
 */
async function hangingDoiService(fake: FakeDataCite) {
  const held: [Request, Response][] = [];
  let answering = false;
  const app = express();
  app.use((req, res) => {
    if (answering) return fake.app(req, res);
    held.push([req, res]);
  });
  const server: Server = await new Promise((resolve) => {
    const s = app.listen(0, "127.0.0.1", () => resolve(s));
  });
  return {
    url: `http://127.0.0.1:${(server.address() as AddressInfo).port}`,
    held,
    answer() {
      answering = true;
      for (const [req, res] of held.splice(0)) fake.app(req, res);
    },
    async stop() {
      server.closeAllConnections();
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };
}

describe("publishing never waits on the DOI service", () => {
  let fake: FakeDataCite;
  let hanging: Awaited<ReturnType<typeof hangingDoiService>>;
  let t: TestApp;
  beforeAll(async () => {
    const service = await startFakeDoiService();
    fake = service.fake;
    hanging = await hangingDoiService(fake);
    t = await testApp({ datacite: service.datacite(hanging.url) });
  });
  afterAll(async () => {
    hanging?.answer();
    await t?.close();
    await hanging?.stop();
    await fake?.stop();
  });

  it("approve answers while the DOI service hangs; the DOI registers once the service answers, and followers are told at once", async () => {
    const f = await draftWithData(t.app, t.ctx);
    const follower = await makeUser(t.ctx, "member");
    const [dataset] = await t.ctx.db.select().from(datasets).where(eq(datasets.slug, f.slug));
    await t.ctx.db.insert(follows).values({ datasetId: dataset!.id, userId: follower.id });
    await f.curatorAgent
      .post(`/api/v1/curation/versions/${f.versionId}/submit`)
      .send({ changelog: "First release: 2021 season." })
      .expect(200);

    const started = performance.now();
    const approved = await f.reviewerAgent.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({}).expect(200);
    const elapsedMs = performance.now() - started;
    expect(approved.body.state).toBe("published");
    // The DOI client gives up after 10 s; an approval that waited on it would take at least that.
    expect(elapsedMs).toBeLessThan(3000);

    // The registration is on its way to the service, which has not answered.
    await expect.poll(() => hanging.held.length, { timeout: 5000 }).toBeGreaterThan(0);
    const [pending] = await t.ctx.db.select().from(versions).where(eq(versions.id, f.versionId));
    expect(pending).toMatchObject({ state: "published", doiStatus: "pending", doi: null });
    expect(fake.records.size).toBe(0);

    const notices = await t.ctx.db
      .select()
      .from(outbox)
      .where(and(eq(outbox.kind, "new-version"), inArray(outbox.to, [follower.email])));
    expect(notices).toHaveLength(1);

    hanging.answer();
    await drainDoiQueue(t.ctx);
    const doi = `${prefix}/plotbank.${f.slug}.v1.0.0`;
    const [registered] = await t.ctx.db.select().from(versions).where(eq(versions.id, f.versionId));
    expect(registered).toMatchObject({ doi, doiStatus: "registered", doiAttempts: 1, doiLastError: null });
    expect(fake.records.get(doi)?.state).toBe("findable");
  });
});
