import { mkdtempSync, readdirSync, readFileSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { eq } from "drizzle-orm";
import request from "supertest";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { datasets, users, versions } from "@/db/schema";
import { createDataCiteClient, DataCiteRequestError } from "@/server/doi/datacite-client";
import { createFakeDataCite, type FakeDataCite } from "@/server/doi/fake-datacite";
import { startLocalDataCiteUnlessConfigured } from "@/server/doi/local-datacite";
import { loadConfig } from "@/server/config";
import { missingMandatoryProperties, type DataCiteAttributes } from "@/server/doi/datacite-metadata";
import { drainDoiQueue } from "@/server/services/citation/doi-queue";
import { retryDelayMs, retryPendingDois } from "@/server/services/citation/doi-registration";
import { citableFixture } from "@/tests/support/citable-fixture";
import { signedInAgent } from "@/tests/support/sign-in";
import { makeUser, testApp, type TestApp } from "@/tests/support/test-app";

const credentials = { user: "PLOTBANK.TEST", password: "fake-secret" };
const prefix = "10.80555";

let fake: FakeDataCite;
let t: TestApp;
beforeAll(async () => {
  fake = createFakeDataCite({ ...credentials, prefixes: [prefix] });
  const url = await fake.start();
  t = await testApp({ datacite: { url, ...credentials, prefix } });
});
afterEach(async () => {
  await fake.start();
});
afterAll(async () => {
  await fake.stop();
  await t.close();
});

const versionRow = async (id: string) => (await t.ctx.db.select().from(versions).where(eq(versions.id, id)))[0]!;

describe("DOI registration on publication", () => {
  it("registers a findable DOI with the mandatory DataCite properties and the version chain", async () => {
    const f = await citableFixture(t.ctx, "tb-doi-chain");
    const v1 = await f.publish("1.0.0", { publishedAt: new Date(Date.UTC(2024, 4, 2)) });
    const row1 = await versionRow(v1);
    expect(row1).toMatchObject({
      state: "published",
      doi: `${prefix}/plotbank.tb-doi-chain.v1.0.0`,
      doiStatus: "registered",
      doiAttempts: 1,
      doiLastError: null,
    });

    const first = fake.records.get(row1.doi!)!;
    expect(first.state).toBe("findable");
    expect(first).toMatchObject({
      url: "http://plotbank.test/datasets/tb-doi-chain?version=1.0.0",
      titles: [{ title: "Soybean starter phosphorus placement in the Tallgrass Basin" }],
      publisher: "Plotbank",
      publicationYear: 2024,
      types: { resourceTypeGeneral: "Dataset" },
      version: "1.0.0",
      rightsList: [expect.objectContaining({ rightsIdentifier: "cc-by-4.0", rightsUri: "https://creativecommons.org/licenses/by/4.0/" })],
    });
    // Creators are the project leader and the creator group; the funder is not one.
    expect(first.creators).toEqual([
      {
        name: "Quillon, Marta",
        nameType: "Personal",
        givenName: "Marta",
        familyName: "Quillon",
        nameIdentifiers: [
          { nameIdentifier: "https://orcid.org/0000-0002-1825-0097", nameIdentifierScheme: "ORCID", schemeUri: "https://orcid.org" },
        ],
        affiliation: [{ name: "Tallgrass Basin Agronomy Network" }],
      },
      { name: "Tallgrass Basin Agronomy Network", nameType: "Organizational" },
    ]);
    expect(missingMandatoryProperties(first)).toEqual([]);

    const v2 = await f.publish("1.1.0", { publishedAt: new Date(Date.UTC(2025, 0, 20)) });
    const row2 = await versionRow(v2);
    expect(row2.doi).toBe(`${prefix}/plotbank.tb-doi-chain.v1.1.0`);
    const second = fake.records.get(row2.doi!)!;
    expect(second.relatedIdentifiers).toEqual(
      expect.arrayContaining([
        { relatedIdentifier: row1.doi, relatedIdentifierType: "DOI", relationType: "IsNewVersionOf" },
        { relatedIdentifier: `${prefix}/plotbank.tb-doi-chain`, relatedIdentifierType: "DOI", relationType: "IsVersionOf" },
      ]),
    );
    // The earlier version's DOI metadata now points forward to the new one.
    expect(fake.records.get(row1.doi!)!.relatedIdentifiers).toContainEqual({
      relatedIdentifier: row2.doi,
      relatedIdentifierType: "DOI",
      relationType: "IsPreviousVersionOf",
    });

    // The concept DOI names the dataset and has both versions.
    const [d] = await t.ctx.db.select().from(datasets).where(eq(datasets.id, f.datasetId));
    expect(d!.conceptDoi).toBe(`${prefix}/plotbank.tb-doi-chain`);
    const concept = fake.records.get(d!.conceptDoi!)!;
    expect(concept.url).toBe("http://plotbank.test/datasets/tb-doi-chain");
    expect(concept.relatedIdentifiers!.filter((r) => r.relationType === "HasVersion").map((r) => r.relatedIdentifier)).toEqual([
      row1.doi,
      row2.doi,
    ]);
    expect(concept.publicationYear).toBe(2024);
  });

  it("carries the dataset's funding, methods and contributors: fundingReferences, a Methods description and typed contributors", async () => {
    const f = await citableFixture(t.ctx, "tb-doi-credits", [
      { name: "Marta Quillon", role: "project_leader", orcid: "0000-0002-1825-0097", affiliation: "Tallgrass Basin Agronomy Network" },
      { name: "Tallgrass Basin Agronomy Network", role: "creator" },
      { name: "Ines Varga", role: "curator", affiliation: "Tallgrass Basin Agronomy Network" },
      { name: "Basin Field Team", role: "data_collector" },
      { name: "Basin Soil Fund", role: "funder" },
    ]);
    await t.ctx.db
      .update(datasets)
      .set({
        funding: "Tallgrass Basin Growers' Fund (invented)",
        methods: "RCBD with 4 blocks per site-year; yields at 13 % moisture; Bray-P1, 0-6 in.",
      })
      .where(eq(datasets.id, f.datasetId));
    const id = await f.publish("1.0.0");
    const record = fake.records.get((await versionRow(id)).doi!)!;
    expect(record.fundingReferences).toEqual([
      { funderName: "Basin Soil Fund" },
      { funderName: "Tallgrass Basin Growers' Fund (invented)" },
    ]);
    expect(record.descriptions).toContainEqual({
      description: "RCBD with 4 blocks per site-year; yields at 13 % moisture; Bray-P1, 0-6 in.",
      descriptionType: "Methods",
    });
    expect(record.contributors).toEqual([
      expect.objectContaining({ name: "Quillon, Marta", nameType: "Personal", contributorType: "ProjectLeader" }),
      {
        name: "Varga, Ines",
        nameType: "Personal",
        givenName: "Ines",
        familyName: "Varga",
        affiliation: [{ name: "Tallgrass Basin Agronomy Network" }],
        contributorType: "DataCurator",
      },
      { name: "Basin Field Team", nameType: "Organizational", contributorType: "DataCollector" },
    ]);
    // The concept DOI carries them too.
    const [d] = await t.ctx.db.select().from(datasets).where(eq(datasets.id, f.datasetId));
    expect(fake.records.get(d!.conceptDoi!)!.fundingReferences).toHaveLength(2);
  });

  it("publishes while the DOI service is down, keeps the DOI pending, and registers it when the service is back", async () => {
    const f = await citableFixture(t.ctx, "tb-doi-retry");
    await fake.stop();
    const id = await f.publish("1.0.0");
    let row = await versionRow(id);
    expect(row.state).toBe("published");
    expect(row).toMatchObject({ doi: null, doiStatus: "pending", doiAttempts: 1 });
    expect(row.doiLastError).toMatch(/could not be reached/);

    // Still down: a retry pass that is due records another attempt and stays pending.
    const later = new Date(row.updatedAt.getTime() + retryDelayMs(1));
    expect((await retryPendingDois(t.ctx, { now: later })).pending).toBeGreaterThanOrEqual(1);
    row = await versionRow(id);
    expect(row).toMatchObject({ doiStatus: "pending", doiAttempts: 2 });

    // Before the back-off has passed, nothing is sent.
    await fake.start();
    const early = await retryPendingDois(t.ctx, { now: new Date(row.updatedAt.getTime() + 1000) });
    expect(early.attempted).toBe(0);
    expect((await versionRow(id)).doiStatus).toBe("pending");

    const summary = await retryPendingDois(t.ctx, { now: new Date(row.updatedAt.getTime() + retryDelayMs(2)) });
    expect(summary.registered).toBeGreaterThanOrEqual(1);
    row = await versionRow(id);
    expect(row).toMatchObject({
      doi: `${prefix}/plotbank.tb-doi-retry.v1.0.0`,
      doiStatus: "registered",
      doiAttempts: 3,
      doiLastError: null,
    });
    expect(fake.records.get(row.doi!)!.state).toBe("findable");
  });

  it("links only DOIs the service has; when a pending version registers later, its neighbour and the concept DOI gain the links", async () => {
    const f = await citableFixture(t.ctx, "tb-doi-links");
    const conceptDoi = `${prefix}/plotbank.tb-doi-links`;
    const [doi1, doi2] = [`${conceptDoi}.v1.0.0`, `${conceptDoi}.v1.1.0`];
    await fake.stop();
    const v1 = await f.publish("1.0.0", { publishedAt: new Date(Date.UTC(2024, 4, 2)) });
    expect(await versionRow(v1)).toMatchObject({ doiStatus: "pending", doi: null });
    await fake.start();
    const v2 = await f.publish("1.1.0", { publishedAt: new Date(Date.UTC(2025, 0, 20)) });
    expect(await versionRow(v2)).toMatchObject({ doiStatus: "registered", doi: doi2 });
    // 1.0.0 is still waiting for its back-off: 1.1.0 names no earlier version, and the concept DOI has only 1.1.0.
    const relations = (doi: string) =>
      (fake.records.get(doi)?.relatedIdentifiers ?? []).map((r) => `${r.relationType} ${r.relatedIdentifier}`);
    expect(relations(doi2)).toEqual([`IsVersionOf ${conceptDoi}`]);
    expect(relations(conceptDoi)).toEqual([`HasVersion ${doi2}`]);

    await retryPendingDois(t.ctx, { now: new Date(Date.now() + 24 * 3600_000) });
    expect(await versionRow(v1)).toMatchObject({ doiStatus: "registered", doi: doi1 });
    expect(relations(doi1)).toEqual([`IsVersionOf ${conceptDoi}`, `IsPreviousVersionOf ${doi2}`]);
    expect(relations(doi2)).toEqual([`IsVersionOf ${conceptDoi}`, `IsNewVersionOf ${doi1}`]);
    expect(relations(conceptDoi)).toEqual([`HasVersion ${doi1}`, `HasVersion ${doi2}`]);
  });

  it("never links a DOI the service refused", async () => {
    const f = await citableFixture(t.ctx, "tb-doi-refused-link");
    const v1 = await f.publish("1.0.0", { publishedAt: new Date(Date.UTC(2024, 4, 2)) });
    await t.ctx.db.update(versions).set({ doi: null, doiStatus: "failed", doiLastError: "refused" }).where(eq(versions.id, v1));
    const v2 = await f.publish("1.1.0", { publishedAt: new Date(Date.UTC(2025, 0, 20)) });
    const doi2 = (await versionRow(v2)).doi!;
    expect(fake.records.get(doi2)!.relatedIdentifiers!.map((r) => r.relationType)).toEqual(["IsVersionOf"]);
    const concept = fake.records.get(`${prefix}/plotbank.tb-doi-refused-link`)!;
    expect(concept.relatedIdentifiers!.map((r) => r.relatedIdentifier)).toEqual([doi2]);
  });

  it("re-registering after a lost answer updates the existing DOI instead of failing", async () => {
    const f = await citableFixture(t.ctx, "tb-doi-again");
    const id = await f.publish("1.0.0");
    const doi = (await versionRow(id)).doi!;
    // Forget the DOI on our side only, as if the service's answer had been lost.
    await t.ctx.db.update(versions).set({ doi: null, doiStatus: "pending" }).where(eq(versions.id, id));
    await retryPendingDois(t.ctx, { now: new Date(Date.now() + 24 * 3600_000) });
    expect(await versionRow(id)).toMatchObject({ doi, doiStatus: "registered" });
  });

  it("backs off exponentially up to an hour", () => {
    expect([0, 1, 2, 3, 4].map(retryDelayMs)).toEqual([0, 30_000, 60_000, 120_000, 240_000]);
    expect(retryDelayMs(40)).toBe(3_600_000);
  });
});

describe("withdrawing a version", () => {
  const withdraw = async (versionId: string, reason: string) => {
    const reviewer = await signedInAgent(t.app, (await makeUser(t.ctx, "reviewer")).email);
    await reviewer.post(`/api/v1/curation/versions/${versionId}/withdraw`).send({ reason }).expect(200);
  };

  it("keeps the DOI and updates its metadata: a note with the reason and a Withdrawn date", async () => {
    const f = await citableFixture(t.ctx, "tb-doi-withdrawn");
    const id = await f.publish("1.0.0", { publishedAt: new Date(Date.UTC(2024, 4, 2)) });
    const doi = (await versionRow(id)).doi!;
    expect(fake.records.get(doi)!.descriptions!.map((d) => d.descriptionType)).toEqual(["Abstract"]);

    await withdraw(id, "Plot yields at TB-01 were entered in bu/ac as kg/ha");
    await drainDoiQueue(t.ctx);
    const row = await versionRow(id);
    expect(row).toMatchObject({ state: "withdrawn", doi, doiStatus: "registered", doiLastError: null });
    const record = fake.records.get(doi)!;
    expect(record.state).toBe("findable");
    expect(record.url).toBe("http://plotbank.test/datasets/tb-doi-withdrawn?version=1.0.0");
    const withdrawnOn = row.withdrawnAt!.toISOString().slice(0, 10);
    expect(record.descriptions).toContainEqual({
      description: `Withdrawn on ${withdrawnOn}: Plot yields at TB-01 were entered in bu/ac as kg/ha. The data of this version are no longer served; its landing page keeps this record.`,
      descriptionType: "Other",
    });
    expect(record.dates).toContainEqual({
      date: withdrawnOn,
      dateType: "Withdrawn",
      dateInformation: "Plot yields at TB-01 were entered in bu/ac as kg/ha",
    });
  });

  it("while the DOI service is down, the update waits (the DOI is still cited) and goes out on a later pass", async () => {
    const f = await citableFixture(t.ctx, "tb-doi-withdrawn-later");
    const id = await f.publish("1.0.0");
    const doi = (await versionRow(id)).doi!;
    await fake.stop();
    await withdraw(id, "Duplicate of another dataset");
    await drainDoiQueue(t.ctx);
    expect(await versionRow(id)).toMatchObject({ state: "withdrawn", doi, doiStatus: "pending", doiAttempts: 1 });
    expect(fake.records.get(doi)!.descriptions!.some((d) => d.description.startsWith("Withdrawn"))).toBe(false);
    const citation = await request(t.app).get("/api/v1/datasets/tb-doi-withdrawn-later/versions/1.0.0/citation").expect(200);
    expect(citation.text).toContain(`https://doi.org/${doi}`);

    await fake.start();
    await retryPendingDois(t.ctx, { now: new Date(Date.now() + 24 * 3600_000) });
    expect(await versionRow(id)).toMatchObject({ doiStatus: "registered", doiLastError: null });
    expect(fake.records.get(doi)!.descriptions!.some((d) => d.description.includes("Duplicate of another dataset"))).toBe(true);
  });
});

describe("DOI registration on the version desk", () => {
  const desk = async (versionId: string, email?: string) => {
    const agent = email ? await signedInAgent(t.app, email) : request.agent(t.app);
    return (await agent.get(`/api/v1/curation/versions/${versionId}`).expect(200)).body as {
      doiRegistration: Record<string, unknown> | null;
    };
  };
  const ownerEmail = async (ownerId: string) => (await t.ctx.db.select().from(users).where(eq(users.id, ownerId)))[0]!.email;

  it("shows the dataset's editors and reviewers a refused registration with the service's reason; others see nothing", async () => {
    const f = await citableFixture(t.ctx, "tb-doi-desk", [{ name: "  ", role: "creator" }]);
    const id = await f.publish("1.0.0");
    const owner = await ownerEmail(f.ownerId);
    const reviewer = (await makeUser(t.ctx, "reviewer")).email;
    for (const email of [owner, reviewer]) {
      expect((await desk(id, email)).doiRegistration).toEqual({
        status: "failed",
        doi: null,
        intendedDoi: `${prefix}/plotbank.tb-doi-desk.v1.0.0`,
        attempts: 1,
        lastError: expect.stringMatching(/422.*creators\[0\]\.name: Each creator needs a name/),
        canRequeue: true,
      });
    }
    expect((await desk(id)).doiRegistration).toBeNull();
    expect((await desk(id, (await makeUser(t.ctx, "member")).email)).doiRegistration).toBeNull();
    expect((await desk(id, (await makeUser(t.ctx, "curator")).email)).doiRegistration).toBeNull();
  });

  it("sends a failed registration again when an editor asks, and it registers once the service accepts it", async () => {
    const f = await citableFixture(t.ctx, "tb-doi-requeue");
    const id = await f.publish("1.0.0");
    // As left by a service that refused this version's metadata before it was set up to accept it.
    const doi = `${prefix}/plotbank.tb-doi-requeue.v1.0.0`;
    fake.records.delete(doi);
    await t.ctx.db
      .update(versions)
      .set({ doi: null, doiStatus: "failed", doiLastError: "The DOI service answered 422 to POST /dois: types: not accepted." })
      .where(eq(versions.id, id));
    // The retry loop leaves a refused registration alone.
    await retryPendingDois(t.ctx, { now: new Date(Date.now() + 24 * 3600_000) });
    expect((await versionRow(id)).doiStatus).toBe("failed");

    const member = await signedInAgent(t.app, (await makeUser(t.ctx, "member")).email);
    await member.post(`/api/v1/curation/versions/${id}/doi/requeue`).expect(403);
    const editor = await signedInAgent(t.app, await ownerEmail(f.ownerId));
    const queued = await editor.post(`/api/v1/curation/versions/${id}/doi/requeue`).expect(202);
    expect(queued.body.doiRegistration).toMatchObject({ status: "pending", attempts: 0 });
    await drainDoiQueue(t.ctx);
    expect(await versionRow(id)).toMatchObject({ doi, doiStatus: "registered", doiLastError: null });
    expect(fake.records.get(doi)?.state).toBe("findable");
    // Nothing left to send: a registered DOI is not queued again.
    const again = await editor.post(`/api/v1/curation/versions/${id}/doi/requeue`).expect(409);
    expect(again.body.detail).toMatch(/registered already/);
  });
});

describe("the local DataCite fake", () => {
  const valid = (): DataCiteAttributes => ({
    doi: `${prefix}/plotbank.fake-check.v1.0.0`,
    event: "publish",
    url: "http://plotbank.test/datasets/fake-check?version=1.0.0",
    creators: [{ name: "Tallgrass Basin Agronomy Network", nameType: "Organizational" }],
    titles: [{ title: "Fake check" }],
    publisher: "Plotbank",
    publicationYear: 2025,
    types: { resourceTypeGeneral: "Dataset" },
  });
  const post = (body: unknown, auth = true) =>
    fetch(`${fake.url}/dois`, {
      method: "POST",
      headers: {
        "Content-Type": "application/vnd.api+json",
        ...(auth ? { Authorization: `Basic ${Buffer.from(`${credentials.user}:${credentials.password}`).toString("base64")}` } : {}),
      },
      body: JSON.stringify(body),
    });

  it("refuses requests without Basic credentials", async () => {
    const res = await post({ data: { type: "dois", attributes: valid() } }, false);
    expect(res.status).toBe(401);
    expect((await res.json()).errors[0].title).toBe("Bad credentials");
    const wrong = createDataCiteClient({ url: fake.url!, user: credentials.user, password: "nope" });
    await expect(wrong.getDoi(valid().doi!)).rejects.toMatchObject({ status: 401 });
  });

  it.each([
    ["creators", { creators: [] }],
    ["titles", { titles: undefined }],
    ["publisher", { publisher: "" }],
    ["publicationYear", { publicationYear: undefined }],
    ["types", { types: {} }],
    ["url", { url: undefined }],
    ["doi", { doi: undefined }],
  ])("rejects a findable DOI without %s with a 422 naming it", async (property, change) => {
    const res = await post({ data: { type: "dois", attributes: { ...valid(), ...change } } });
    expect(res.status).toBe(422);
    expect(res.headers.get("content-type")).toMatch(/application\/vnd\.api\+json/);
    const body = (await res.json()) as { errors: { source: string; title: string }[] };
    expect(body.errors.map((e) => e.source)).toContain(property);
    expect(body.errors.every((e) => typeof e.title === "string" && e.title.length > 0)).toBe(true);
  });

  it.each([
    ["types.resourceTypeGeneral", { types: { resourceTypeGeneral: "Spreadsheet" } }],
    // The schema's enumeration is case-sensitive.
    ["types.resourceTypeGeneral", { types: { resourceTypeGeneral: "dataset" } }],
    [
      "creators[1].nameType",
      {
        creators: [
          { name: "Quillon, Marta", nameType: "Personal" },
          { name: "Tallgrass Basin Agronomy Network", nameType: "Organisation" },
        ],
      },
    ],
    ["creators[0].nameType", { creators: [{ name: "Quillon, Marta", nameType: "Person" }] }],
    ["contributors[0].contributorType", { contributors: [{ name: "Varga, Ines", contributorType: "Curator" }] }],
    ["fundingReferences[0].funderName", { fundingReferences: [{ funderName: "" }] }],
  ])("rejects a findable DOI whose %s is outside DataCite's controlled list", async (property, change) => {
    const res = await post({ data: { type: "dois", attributes: { ...valid(), ...change } } });
    expect(res.status).toBe(422);
    const body = (await res.json()) as { errors: { source: string; title: string }[] };
    expect(body.errors.map((e) => e.source)).toEqual([property]);
    expect(fake.records.has(valid().doi!)).toBe(false);
  });

  it("accepts other values from the controlled lists, and a creator without a nameType", async () => {
    const client = createDataCiteClient({ url: fake.url!, ...credentials });
    const doi = `${prefix}/plotbank.fake-lists.v1.0.0`;
    const made = await client.createDoi({
      ...valid(),
      doi,
      types: { resourceTypeGeneral: "Software" },
      creators: [{ name: "Tallgrass Basin Agronomy Network" }],
    });
    expect(made).toMatchObject({ state: "findable", types: { resourceTypeGeneral: "Software" } });
    // A draft is not validated against the lists, as on the real service.
    const draft = await client.createDoi({ doi: `${prefix}/plotbank.fake-lists-draft`, types: { resourceTypeGeneral: "Spreadsheet" } });
    expect(draft.state).toBe("draft");
  });

  it("accepts a complete payload, refuses the same DOI twice, and refuses a prefix the account does not hold", async () => {
    const client = createDataCiteClient({ url: fake.url!, ...credentials });
    const made = await client.createDoi(valid());
    expect(made).toMatchObject({ doi: valid().doi, state: "findable" });
    const again = await client.createDoi(valid()).catch((e: unknown) => e);
    expect(again).toBeInstanceOf(DataCiteRequestError);
    expect((again as DataCiteRequestError).alreadyTaken).toBe(true);
    await expect(client.createDoi({ ...valid(), doi: "10.99999/not-ours" })).rejects.toMatchObject({ status: 403 });
    expect((await client.getDoi(valid().doi!)).titles).toEqual([{ title: "Fake check" }]);
  });

  it("a version whose metadata the service refuses is marked failed with the reason, and stays published", async () => {
    // A creator with a blank name, written past the API's own validation.
    const f = await citableFixture(t.ctx, "tb-doi-refused", [{ name: "  ", role: "creator" }]);
    const id = await f.publish("1.0.0");
    const row = await versionRow(id);
    expect(row).toMatchObject({ state: "published", doiStatus: "failed", doi: null });
    expect(row.doiLastError).toMatch(/creators\[0\]\.name/);
    // Refused metadata is not sent again unchanged.
    const pass = await retryPendingDois(t.ctx, { now: new Date(Date.now() + 24 * 3600_000) });
    expect((await versionRow(id)).doiAttempts).toBe(1);
    expect(pass.failed).toBe(0);
  });
});

describe("the fake DOI service as the server runs it", () => {
  it("starts in-process on a loopback port unless DATACITE_URL is set, and keeps its DOIs across a restart", async () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), "plotbank-doi-"));
    try {
      const config = loadConfig({ NODE_ENV: "test", PLOTBANK_DATA_DIR: path.join(dir, "pglite") } as NodeJS.ProcessEnv);
      expect(config.datacite.url).toBeUndefined();
      const running = await startLocalDataCiteUnlessConfigured(config);
      expect(config.datacite.url).toMatch(/^http:\/\/127\.0\.0\.1:\d+$/);
      const client = createDataCiteClient({ url: config.datacite.url!, user: config.datacite.user, password: config.datacite.password });
      const doi = `${config.datacite.prefix}/plotbank.kept.v1.0.0`;
      await client.createDoi({
        doi,
        event: "publish",
        url: "http://plotbank.test/datasets/kept?version=1.0.0",
        creators: [{ name: "Tallgrass Basin Agronomy Network" }],
        titles: [{ title: "Kept" }],
        publisher: "Plotbank",
        publicationYear: 2025,
        types: { resourceTypeGeneral: "Dataset" },
      });
      await running.stop();
      // Its store is inside PLOTBANK_DATA_DIR, never in the folder above it.
      expect(Object.keys(JSON.parse(readFileSync(path.join(dir, "pglite", "fake-datacite.json"), "utf8")))).toEqual([doi]);
      expect(readdirSync(dir)).toEqual(["pglite"]);

      const again = loadConfig({ NODE_ENV: "test", PLOTBANK_DATA_DIR: path.join(dir, "pglite") } as NodeJS.ProcessEnv);
      const restarted = await startLocalDataCiteUnlessConfigured(again);
      const back = createDataCiteClient({ url: again.datacite.url!, user: again.datacite.user, password: again.datacite.password });
      expect((await back.getDoi(doi)).titles).toEqual([{ title: "Kept" }]);
      await restarted.stop();

      const real = loadConfig({ NODE_ENV: "test", DATACITE_URL: "http://127.0.0.1:9" } as NodeJS.ProcessEnv);
      await startLocalDataCiteUnlessConfigured(real);
      expect(real.datacite.url).toBe("http://127.0.0.1:9");
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
