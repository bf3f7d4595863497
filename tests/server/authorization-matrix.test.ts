/**
 * Who may call what: every route the Express app registers, called as each kind of caller, against the status this
 * table expects. A route without a row fails the test, so a new route cannot ship without deciding its access.
 *
 * Adding a route: add a row under its "METHOD /api/v1/path" (Express path syntax) with one of the policy helpers
 * below, and `params`/`body`/`query` builders if the defaults (the fixture dataset's slug, version 1.0.0, …) do not
 * fit. Each cell gets a fresh fixture dataset and a fresh session, so a cell that changes state never affects another.
 * Give a "pass" row a body that can succeed where one can be built: a 2xx proves access, a 409 only proves the door.
 *
 * No route can hide from the enumeration: `router.all()`, a route or mount whose path is not a plain string, and
 * middleware mounted at its own path under /api (listed as "USE /path", exercised with GET) all need a decision.
 */
import { and, eq, inArray } from "drizzle-orm";
import ExcelJS from "exceljs";
import express, { type Express } from "express";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { defaultTableSchema } from "@/datasets/default-table-schema";
import {
  apiTokens,
  datasetEditors,
  datasets,
  emailTokens,
  outbox,
  reviewComments,
  sessions,
  siteYears,
  sites,
  users,
  validationReports,
  versions,
} from "@/db/schema";
import { newSecret, sha256Hex } from "@/server/auth/secrets";
import { isDefinedRoute } from "@/server/openapi/define-route";
import { createSession, sessionCookieName } from "@/server/auth/sessions";
import { issueEmailToken } from "@/server/services/accounts/email-tokens";
import { sitesCsv } from "@/tests/server/curation-fixtures";
import { makeUser, testApp, testPassword, type TestApp } from "@/tests/support/test-app";
import { binary, unzip } from "@/tests/support/zip";

/** A workbook with one sheet, the sites of the CSV fixture. */
const sitesWorkbook = await (async () => {
  const workbook = new ExcelJS.Workbook();
  const sheet = workbook.addWorksheet("sites");
  for (const line of sitesCsv.trim().split("\n")) sheet.addRow(line.split(","));
  return Buffer.from(await workbook.xlsx.writeBuffer());
})();

const actors = [
  "anonymous",
  "member",
  "curatorOwner",
  "curatorEditor",
  "curatorOther",
  "reviewer",
  "admin",
  "readToken",
  "writeToken",
  "revokedToken",
  "expiredToken",
] as const;
type Actor = (typeof actors)[number];

/**
 * A cell's expectation: an exact status, or
 * - "ok": any 2xx;
 * - "pass": got past authorization (not 401/403/404, not 5xx): for routes whose minimal body may still be refused
 *   on its merits (400, 409, 410, 422);
 * - "hidden": refused as 403 or 404 (404 where a route hides that the resource exists).
 */
type Expectation = number | "ok" | "pass" | "hidden";
/** A revoked or expired token is refused with 401 wherever authentication runs, unless a row says otherwise. */
type Cells = Record<Exclude<Actor, "revokedToken" | "expiredToken">, Expectation> & {
  revokedToken?: Expectation;
  expiredToken?: Expectation;
};

interface Fixture {
  slug: string;
  datasetId: string;
  publishedId: string;
  draftId: string;
  inReviewId: string;
  reportId: string;
}

interface Cell {
  actor: Actor;
  user: typeof users.$inferSelect | null;
  fx: Fixture;
  t: TestApp;
  /** E-mail addresses the caller legitimately learns (the owner of a link they hold); builders add to it. */
  revealed: string[];
}

interface Row {
  expect: Cells;
  /** The path to request, when it is not the key's own (a mount's file, a trailing slash). */
  path?: string;
  /** Extra request headers (a CORS preflight's Origin and Access-Control-Request-Method). */
  headers?: Record<string, string>;
  /** A multipart file to attach instead of a JSON body. */
  file?: { field: string; name: string; content: string | Buffer };
  /** Checks beyond the status; returns what is wrong, or null. */
  check?: (res: request.Response, text: string, c: Cell) => string | null;
  params?: (c: Cell) => Promise<Record<string, string>> | Record<string, string>;
  body?: (c: Cell) => Promise<unknown> | unknown;
  query?: (c: Cell) => Record<string, string>;
}

// Policy helpers: read them as sentences ("signed in, write scope: 200").
const everyone = (e: Expectation): Cells => ({
  anonymous: e,
  member: e,
  curatorOwner: e,
  curatorEditor: e,
  curatorOther: e,
  reviewer: e,
  admin: e,
  readToken: e,
  writeToken: e,
});
/** Served before authentication runs: even a bad token gets the answer. */
const beforeAuthentication = (e: Expectation): Cells => ({ ...everyone(e), revokedToken: e, expiredToken: e });
const signedIn = (e: Expectation): Cells => ({ ...everyone(e), anonymous: 401 });
const signedInWrite = (e: Expectation): Cells => ({ ...signedIn(e), readToken: 403 });
const sessionOnly = (e: Expectation): Cells => ({ ...signedIn(e), readToken: 403, writeToken: 403 });
const adminOnly = (e: Expectation): Cells => ({
  anonymous: 401,
  member: 403,
  curatorOwner: 403,
  curatorEditor: 403,
  curatorOther: 403,
  reviewer: 403,
  admin: e,
  readToken: 403,
  writeToken: 403,
});
const reviewerWrite = (e: Expectation): Cells => ({ ...adminOnly(e), reviewer: e });
/** Changing a dataset: its owner, its editors and admins; another curator is refused. Tokens belong to the owner. */
const ownerWrite = (e: Expectation, other: Expectation = 403): Cells => ({
  anonymous: 401,
  member: 403,
  curatorOwner: e,
  curatorEditor: e,
  curatorOther: other,
  reviewer: 403,
  admin: e,
  readToken: 403,
  writeToken: e,
});
/** Choosing a dataset's editors: its owner and admins only; an editor does not pick co-editors. */
const ownerOnly = (e: Expectation): Cells => ({ ...ownerWrite(e), curatorEditor: 403 });
/** Seeing a draft: its editors, reviewers and admins; everyone else is told it does not exist. */
const draftView = (e: Expectation, anonymous: Expectation = 404): Cells => ({
  anonymous,
  member: 404,
  curatorOwner: e,
  curatorEditor: e,
  curatorOther: 404,
  reviewer: e,
  admin: e,
  readToken: e,
  writeToken: e,
});
/** A browser's CORS preflight from another origin, asking to send `method`. */
const preflight = (method: string) => ({
  Origin: "https://field-notes.example",
  "Access-Control-Request-Method": method,
  "Access-Control-Request-Headers": "content-type",
});

const fresh = (prefix: string) => `${prefix}-${Math.random().toString(36).slice(2, 10)}`;
const emailToken = async (c: Cell, purpose: "verify" | "reset" | "invite") => {
  const user = purpose === "invite" ? null : await makeUser(c.t.ctx, "member");
  const email = user?.email ?? `${fresh("invitee")}@tallgrass.test`;
  const { secret } = await issueEmailToken(c.t.ctx.db, {
    purpose,
    email,
    userId: user?.id,
    role: purpose === "invite" ? "curator" : undefined,
  });
  c.revealed.push(email);
  return { secret, email };
};

const table: Record<string, Row> = {
  // Health, documents, public catalogue and data: open to all; a revoked token is still refused (401).
  "GET /api/v1/health": { expect: everyone(200) },
  "GET /api/v1/health/ready": { expect: everyone(200) },
  "GET /api/v1/openapi.json": { expect: everyone(200) },
  // The docs page and its files are served outside the API router, before authentication; the rest of /api is a 404.
  "GET /api/docs": {
    expect: beforeAuthentication(200),
    path: "/api/docs/",
    check: (_res, text) => (/swagger-ui/.test(text) ? null : "not the docs page"),
  },
  "USE /api/docs": { expect: beforeAuthentication(200), path: "/api/docs/swagger-ui.css" },
  "USE /api": { expect: beforeAuthentication(404), path: "/api/v2/datasets" },

  // CORS preflights (answered for any path, before authentication): a read's is granted to every origin, a write's
  // gets no CORS headers at all, so a browser on another origin never sends the write.
  "OPTIONS /api/v1/datasets": {
    expect: beforeAuthentication(204),
    headers: preflight("GET"),
    check: (res) => (res.headers["access-control-allow-origin"] === "*" ? null : "a read's preflight lacks Access-Control-Allow-Origin: *"),
  },
  "OPTIONS /api/v1/datasets/:slug": {
    expect: beforeAuthentication(204),
    headers: preflight("PATCH"),
    check: (res) => (Object.keys(res.headers).some((h) => h.startsWith("access-control-")) ? "a write's preflight got CORS headers" : null),
  },
  "GET /api/v1/catalog": { expect: everyone(200) },
  "GET /api/v1/schemas/:view": { expect: everyone(200), params: () => ({ view: "observations" }) },
  "GET /api/v1/datasets": { expect: everyone(200) },
  "GET /api/v1/soil-test-schemes": { expect: everyone(200) },
  "GET /api/v1/datasets/:slug": { expect: everyone(200) },
  "GET /api/v1/datasets/:slug/versions": { expect: everyone(200) },
  "GET /api/v1/datasets/:slug/versions/:semver": { expect: everyone(200) },
  "GET /api/v1/datasets/:slug/versions/:semver/schema": { expect: everyone(200) },
  "GET /api/v1/datasets/:slug/versions/:semver/sites": { expect: everyone(200) },
  "GET /api/v1/datasets/:slug/versions/:semver/site-years": { expect: everyone(200) },
  "GET /api/v1/datasets/:slug/versions/:semver/treatments": { expect: everyone(200) },
  "GET /api/v1/datasets/:slug/versions/:semver/observations": { expect: everyone(200) },
  "GET /api/v1/datasets/:slug/versions/:semver/responses": { expect: everyone(200) },
  "GET /api/v1/datasets/:slug/versions/:semver/citation": { expect: everyone(200) },
  "GET /api/v1/datasets/:slug/versions/:semver/datapackage.zip": { expect: everyone(200) },
  "GET /api/v1/datasets/:slug/versions/:semver/datapackage.json": { expect: everyone(200) },
  "GET /api/v1/datasets/:slug/versions/:semver/resources/:resource.csv": { expect: everyone(200), params: () => ({ resource: "sites" }) },
  "GET /api/v1/responses": { expect: everyone(200) },
  "GET /api/v1/observations": { expect: everyone(200) },
  "GET /api/v1/site-years": { expect: everyone(200) },
  "GET /api/v1/datasets/:slug/versions/:semver/site-years/:code/anova": { expect: everyone(200), params: () => ({ code: "TB-02-2020" }) },
  "GET /api/v1/site-years/:code/anova": {
    expect: everyone(200),
    params: () => ({ code: "TB-02-2020" }),
    query: (c) => ({ dataset: c.fx.slug }),
  },
  "GET /api/v1/analyses/meta": { expect: everyone(200), query: (c) => ({ dataset: c.fx.slug }) },
  "GET /api/v1/analyses/seed-safety": { expect: everyone(200), query: (c) => ({ dataset: c.fx.slug }) },

  // Session: anyone may try to sign in or out; "who am I" answers everyone, and names only the caller (a visitor: no one).
  "POST /api/v1/session": {
    expect: everyone(200),
    body: async (c) => ({ email: (await makeUser(c.t.ctx, "member")).email, password: testPassword }),
  },
  "GET /api/v1/session": {
    expect: everyone(200),
    check: (_res, text, c) => {
      const answered = (JSON.parse(text) as { user: { id: string } | null }).user?.id ?? null;
      return answered === (c.user?.id ?? null) ? null : `answered user ${answered}, not the caller ${c.user?.id ?? "(none)"}`;
    },
  },
  "DELETE /api/v1/session": { expect: everyone(204) },

  // Sign-up and e-mailed links: anonymous by nature. Bodies are fresh per cell.
  "POST /api/v1/sign-up": {
    expect: everyone(202),
    body: () => ({ email: `${fresh("new")}@tallgrass.test`, displayName: "New Member", password: testPassword }),
  },
  "POST /api/v1/email-verification": {
    expect: everyone(200),
    body: async (c) => ({ token: (await emailToken(c, "verify")).secret }),
  },
  "POST /api/v1/email-verification/resend": { expect: everyone(202), body: () => ({ email: `${fresh("nobody")}@tallgrass.test` }) },
  "POST /api/v1/password-reset": { expect: everyone(202), body: () => ({ email: `${fresh("nobody")}@tallgrass.test` }) },
  "POST /api/v1/password-reset/confirm": {
    expect: everyone(204),
    body: async (c) => ({ token: (await emailToken(c, "reset")).secret, password: "new-basin-password-1" }),
  },
  "POST /api/v1/invitations/preview": { expect: everyone(200), body: async (c) => ({ token: (await emailToken(c, "invite")).secret }) },
  "POST /api/v1/invitations/accept": {
    expect: everyone(201),
    body: async (c) => ({ token: (await emailToken(c, "invite")).secret, displayName: "Invited Curator", password: testPassword }),
  },

  // Own account and follows.
  "GET /api/v1/account": { expect: signedIn(200) },
  "PATCH /api/v1/account": { expect: signedInWrite(200), body: () => ({ displayName: "Renamed", role: "admin" }) },
  "GET /api/v1/account/follows": { expect: signedIn(200) },
  "POST /api/v1/datasets/:slug/follow": { expect: signedInWrite(200) },
  "DELETE /api/v1/datasets/:slug/follow": { expect: signedInWrite(200) },

  // Administration. The API tokens in this matrix belong to a curator, so they are refused too.
  "GET /api/v1/admin/users": { expect: adminOnly(200) },
  "PATCH /api/v1/admin/users/:id": {
    expect: adminOnly(200),
    params: async (c) => ({ id: (await makeUser(c.t.ctx, "member")).id }),
    body: () => ({ role: "reviewer" }),
  },
  "GET /api/v1/admin/role-changes": { expect: adminOnly(200) },
  "GET /api/v1/admin/invitations": { expect: adminOnly(200) },
  "POST /api/v1/admin/invitations": {
    expect: adminOnly(201),
    body: () => ({ email: `${fresh("invite")}@tallgrass.test`, role: "curator" }),
  },
  "GET /api/v1/admin/jobs/failed": { expect: adminOnly(200) },
  "POST /api/v1/admin/jobs/:id/retry": {
    expect: adminOnly(202),
    // A delivery job for a message id that cannot exist fails on its one attempt and waits for an admin.
    params: async (c) => {
      const key = fresh("broken-mail");
      await c.t.ctx.jobs.add("mail-deliver", { outboxId: key }, { key, maxAttempts: 1 });
      await c.t.ctx.jobs.drain();
      const job = (await c.t.ctx.jobs.failed()).find((j) => j.key === key);
      return { id: job!.id };
    },
  },
  "GET /api/v1/admin/outbox": { expect: adminOnly(200) },
  "GET /api/v1/admin/outbox/:id": {
    expect: adminOnly(200),
    params: async (c) => {
      const [m] = await c.t.ctx.db
        .insert(outbox)
        .values({ kind: "test", to: "someone@tallgrass.test", subject: "Hello", text: "Body" })
        .returning();
      return { id: m!.id };
    },
  },

  // API tokens: managed from a session only. BOLA: another user's token id is "not yours" (404).
  "POST /api/v1/tokens": { expect: sessionOnly(201), body: () => ({ name: "matrix", scope: "read" }) },
  "GET /api/v1/tokens": { expect: sessionOnly(200) },
  "DELETE /api/v1/tokens/:id": {
    expect: { ...sessionOnly(404), curatorOwner: 204 },
    params: async (c) => ({ id: await tokenOf(c.t, world.curatorOwner.id, "read").then((x) => x.id) }),
  },

  // Curation.
  "POST /api/v1/datasets": {
    expect: { ...ownerWrite(201, 201) },
    body: () => ({ slug: fresh("matrix"), title: "Matrix dataset", crops: ["corn"], region: "Tallgrass Basin", description: "Invented." }),
  },
  "PATCH /api/v1/datasets/:slug": { expect: ownerWrite("ok"), body: () => ({ title: "Renamed dataset" }) },
  "GET /api/v1/curation/datasets": { expect: { ...signedIn(200), member: 403 } },
  "GET /api/v1/curation/datasets/:slug": { expect: { ...draftView(200, 401) } },
  "POST /api/v1/curation/datasets/:slug/editors": {
    expect: ownerOnly(200),
    body: async (c) => ({ email: (await makeUser(c.t.ctx, "curator")).email }),
  },
  "DELETE /api/v1/curation/datasets/:slug/editors/:userId": {
    expect: ownerOnly("ok"),
    params: async (c) => {
      const editor = await makeUser(c.t.ctx, "curator");
      await c.t.ctx.db.insert(datasetEditors).values({ datasetId: c.fx.datasetId, userId: editor.id });
      return { slug: c.fx.slug, userId: editor.id };
    },
  },
  "POST /api/v1/datasets/:slug/versions": {
    expect: ownerWrite(201, "hidden"),
    // One open version at a time: clear the fixture's draft and review so a new one can be made.
    params: async (c) => {
      await c.t.ctx.db.delete(versions).where(inArray(versions.id, [c.fx.draftId, c.fx.inReviewId]));
      return {};
    },
    body: () => ({ semver: "2.0.0" }),
  },
  "GET /api/v1/curation/versions/:id": { expect: draftView(200), params: (c) => ({ id: c.fx.draftId }) },
  "GET /api/v1/curation/versions/:id/site-years/:code/anova": {
    expect: draftView(200),
    params: (c) => ({ id: c.fx.draftId, code: "TB-01-2021" }),
  },
  "PATCH /api/v1/curation/versions/:id": {
    expect: ownerWrite("ok", "hidden"),
    params: (c) => ({ id: c.fx.draftId }),
    body: () => ({ changelog: "More site-years." }),
  },
  "PUT /api/v1/curation/versions/:id/table-schema": {
    expect: ownerWrite(200, "hidden"),
    params: (c) => ({ id: c.fx.draftId }),
    body: () => defaultTableSchema(),
  },
  "GET /api/v1/curation/versions/:id/reports/:report": {
    expect: draftView(200, 401),
    params: (c) => ({ id: c.fx.draftId, report: c.fx.reportId }),
  },
  "POST /api/v1/curation/versions/:id/submit": {
    expect: ownerWrite(200, "hidden"),
    params: (c) => ({ id: c.fx.draftId }),
    body: () => ({ changelog: "First release of the basin trials." }),
  },
  "POST /api/v1/curation/versions/:id/approve": {
    expect: reviewerWrite(200),
    params: (c) => ({ id: c.fx.inReviewId }),
    body: () => ({ comment: "Looks right." }),
  },
  "POST /api/v1/curation/versions/:id/return": {
    expect: reviewerWrite(200),
    params: (c) => ({ id: c.fx.inReviewId }),
    body: () => ({ comment: "Site 2 lacks soil tests." }),
  },
  "POST /api/v1/curation/versions/:id/withdraw": {
    expect: { ...ownerWrite(200), reviewer: 200 },
    params: (c) => ({ id: c.fx.publishedId }),
    body: () => ({ reason: "A unit error in site 4." }),
  },
  "POST /api/v1/curation/versions/:id/doi/requeue": {
    expect: { ...ownerWrite("pass"), reviewer: "pass" },
    params: (c) => ({ id: c.fx.publishedId }),
  },
  "GET /api/v1/curation/diff": { expect: draftView(200), query: (c) => ({ from: c.fx.publishedId, to: c.fx.draftId }) },
  "GET /api/v1/curation/diff/rows": {
    expect: draftView(200),
    query: (c) => ({ from: c.fx.publishedId, to: c.fx.draftId, resource: "site_years" }),
  },
  "GET /api/v1/curation/versions/:id/review": { expect: draftView(200), params: (c) => ({ id: c.fx.draftId }) },
  "GET /api/v1/curation/versions/:id/rows/:resource": {
    expect: draftView(200),
    params: (c) => ({ id: c.fx.draftId, resource: "site_years" }),
  },
  // The draft's Evidence preview: its editors and reviewers only, everyone else is told the draft does not exist.
  "GET /api/v1/curation/versions/:id/preview/meta": { expect: draftView(200), params: (c) => ({ id: c.fx.draftId }) },
  "GET /api/v1/curation/versions/:id/comments": { expect: draftView(200), params: (c) => ({ id: c.fx.inReviewId }) },
  "POST /api/v1/curation/versions/:id/comments": {
    expect: { ...reviewerWrite(201), curatorOwner: 403, curatorEditor: 403, curatorOther: 404, member: 404, writeToken: 403 },
    params: (c) => ({ id: c.fx.inReviewId }),
    body: () => ({ siteYear: "TB-01-2021", body: "Block 3 looks low against the other blocks." }),
  },
  "POST /api/v1/curation/versions/:id/comments/:commentId/resolve": {
    expect: { ...ownerWrite(200, 404), member: 404, reviewer: 200 },
    params: async (c) => {
      const [comment] = await c.t.ctx.db
        .insert(reviewComments)
        .values({
          versionId: c.fx.inReviewId,
          siteYearCode: "TB-01-2021",
          body: "Check the yields.",
          authorId: world.users.reviewer.id,
          stateWhenMade: "in_review",
        })
        .returning();
      return { id: c.fx.inReviewId, commentId: comment!.id };
    },
  },
  "GET /api/v1/curation/review-queue": { expect: { ...adminOnly(200), reviewer: 200 } },
  "POST /api/v1/curation/versions/:id/cells": {
    expect: ownerWrite(200, "hidden"),
    params: (c) => ({ id: c.fx.draftId }),
    body: () => ({ resource: "sites", key: { site: "TB-01" }, field: "location", value: "Wren County", reason: "Spelling of the county." }),
  },
  "POST /api/v1/curation/versions/:id/uploads/:resource": {
    expect: ownerWrite(201, "hidden"),
    params: (c) => ({ id: c.fx.draftId, resource: "sites" }),
    file: { field: "file", name: "sites.csv", content: sitesCsv },
  },
  "POST /api/v1/curation/versions/:id/workbook-uploads": {
    expect: ownerWrite(201, "hidden"),
    params: (c) => ({ id: c.fx.draftId }),
    file: { field: "file", name: "trials.xlsx", content: sitesWorkbook },
  },
  "POST /api/v1/curation/versions/:id/table-schema/fields": {
    expect: ownerWrite(200, "hidden"),
    params: (c) => ({ id: c.fx.draftId }),
    body: () => ({ resource: "sites", field: { name: "seed_lot", type: "string", description: "Seed lot of the site's variety." } }),
  },
  "PATCH /api/v1/curation/versions/:id/table-schema/fields/:resource/:name": {
    expect: ownerWrite(200, "hidden"),
    params: (c) => ({ id: c.fx.draftId, resource: "sites", name: "soil_series" }),
    body: () => ({ field: { description: "Soil series as the county survey maps it." } }),
  },
  "DELETE /api/v1/curation/versions/:id/table-schema/fields/:resource/:name": {
    expect: ownerWrite(200, "hidden"),
    params: (c) => ({ id: c.fx.draftId, resource: "sites", name: "soil_series" }),
  },
  "GET /api/v1/curation/versions/:id/templates/:resource.csv": {
    expect: draftView(200, 401),
    params: (c) => ({ id: c.fx.draftId, resource: "plots" }),
  },
  "GET /api/v1/curation/versions/:id/templates/workbook.xlsx": { expect: draftView(200, 401), params: (c) => ({ id: c.fx.draftId }) },
  "GET /api/v1/curation/versions/:id/templates/README.txt": { expect: draftView(200, 401), params: (c) => ({ id: c.fx.draftId }) },
};

type TokenActor = "readToken" | "writeToken" | "revokedToken" | "expiredToken";
interface World {
  users: Record<Exclude<Actor, "anonymous" | TokenActor>, typeof users.$inferSelect>;
  curatorOwner: typeof users.$inferSelect;
  /** A second editor of every fixture dataset, never a caller: whose address only the owner (and admins) may see. */
  coEditor: typeof users.$inferSelect;
  tokens: Record<TokenActor, string>;
}
let world: World;

async function tokenOf(t: TestApp, userId: string, scope: "read" | "write", state: "live" | "revoked" | "expired" = "live") {
  const secret = newSecret("pb_");
  const past = new Date(Date.now() - 60_000);
  const [row] = await t.ctx.db
    .insert(apiTokens)
    .values({
      userId,
      name: "matrix",
      prefix: secret.slice(0, 8),
      tokenHash: sha256Hex(secret),
      scope,
      revokedAt: state === "revoked" ? past : null,
      expiresAt: state === "expired" ? past : null,
    })
    .returning();
  return { secret, id: row!.id };
}

async function newFixture(t: TestApp): Promise<Fixture> {
  const db = t.ctx.db;
  const slug = fresh("basin");
  const [dataset] = await db
    .insert(datasets)
    .values({
      slug,
      title: "Tallgrass Basin N rates",
      crops: ["corn"],
      region: "Tallgrass Basin",
      description: "Invented trials",
      ownerId: world.curatorOwner.id,
    })
    .returning();
  const version = async (semver: string) =>
    (
      await db
        .insert(versions)
        .values({ datasetId: dataset!.id, semver, tableSchema: defaultTableSchema(), createdBy: world.curatorOwner.id })
        .returning()
    )[0]!;
  const published = await version("1.0.0");
  // One site-year in the published version (written before it is published), so its site-year reads can answer.
  const [publishedSite] = await db.insert(sites).values({ versionId: published.id, code: "TB-02", location: "Wren County" }).returning();
  await db
    .insert(siteYears)
    .values({ versionId: published.id, siteId: publishedSite!.id, code: "TB-02-2020", crop: "corn", year: 2020, blocks: 4 });
  const draft = await version("1.1.0");
  const inReview = await version("1.2.0");
  // A site-year in the version in review (written before it is in review), for reviewers' comments on it.
  const [reviewSite] = await db.insert(sites).values({ versionId: inReview.id, code: "TB-01", location: "Wren County" }).returning();
  await db
    .insert(siteYears)
    .values({ versionId: inReview.id, siteId: reviewSite!.id, code: "TB-01-2021", crop: "corn", year: 2021, blocks: 4 });
  await db
    .update(versions)
    .set({ state: "published", publishedAt: new Date(), submittedBy: world.curatorOwner.id })
    .where(eq(versions.id, published.id));
  await db
    .update(versions)
    .set({ state: "in_review", submittedAt: new Date(), submittedBy: world.curatorOwner.id })
    .where(eq(versions.id, inReview.id));
  const [report] = await db
    .insert(validationReports)
    .values({ versionId: draft.id, resource: "sites", filename: "sites.csv", accepted: true, problems: [] })
    .returning();
  await db
    .insert(datasetEditors)
    .values([world.users.curatorEditor, world.coEditor].map((u) => ({ datasetId: dataset!.id, userId: u.id })));
  // One site-year in the draft, so submitting it can succeed.
  const [site] = await db.insert(sites).values({ versionId: draft.id, code: "TB-01", location: "Wren County" }).returning();
  await db.insert(siteYears).values({ versionId: draft.id, siteId: site!.id, code: "TB-01-2021", crop: "corn", year: 2021, blocks: 4 });
  return { slug, datasetId: dataset!.id, publishedId: published.id, draftId: draft.id, inReviewId: inReview.id, reportId: report!.id };
}

function matches(e: Expectation, status: number) {
  if (typeof e === "number") return status === e;
  if (e === "ok") return status >= 200 && status < 300;
  if (e === "hidden") return status === 403 || status === 404;
  return ![401, 403, 404].includes(status) && status < 500;
}

type Layer = {
  route?: { path: unknown; methods: Record<string, boolean>; stack?: { handle?: unknown }[] };
  handle?: { stack?: Layer[] };
  rawPath?: unknown;
};

/** Served by the app itself rather than by an API operation: the document and the page that renders it. */
const notOperations = new Set(["GET /api/v1/openapi.json", "GET /api/docs"]);

/**
 * Every route registered on the app, as "METHOD /path" with Express's parameter syntax, and every middleware mounted
 * at a path of its own under /api as "USE /path". Whatever the walk cannot name exactly is a problem, not skipped:
 * `router.all()` (which methods does it answer?) and paths that are not plain strings (arrays, regular expressions).
 * So is an API route that was not made by defineRoute: its security, parsing and documentation would be its own.
 */
function enumerateRoutes(app: Express): { routes: string[]; problems: string[] } {
  const out: string[] = [];
  const problems: string[] = [];
  const walk = (stack: Layer[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        const path = layer.route.path;
        if (typeof path !== "string") {
          problems.push(`a route under "${prefix || "/"}" has a path that is not a plain string: ${String(path)}`);
          continue;
        }
        for (const m of Object.keys(layer.route.methods)) {
          if (m === "_all") problems.push(`${prefix}${path} is registered with router.all(); register each method it answers`);
          else out.push(`${m.toUpperCase()} ${prefix}${path}`);
          const key = `${m.toUpperCase()} ${prefix}${path}`;
          if (
            m !== "_all" &&
            key.includes(" /api/") &&
            !notOperations.has(key) &&
            !layer.route.stack?.some((l) => isDefinedRoute(l.handle))
          ) {
            problems.push(`${key} is not defined with defineRoute`);
          }
        }
        continue;
      }
      if (typeof layer.rawPath !== "string") {
        problems.push(`middleware under "${prefix || "/"}" is mounted at a path that is not a plain string: ${String(layer.rawPath)}`);
        continue;
      }
      const mount = layer.rawPath === "/" ? "" : layer.rawPath;
      if (layer.handle?.stack) walk(layer.handle.stack, prefix + mount);
      else if (mount) out.push(`USE ${prefix}${mount}`);
    }
  };
  walk((app as unknown as { router: { stack: Layer[] } }).router.stack, "");
  return { routes: [...new Set(out)].filter((r) => / \/api(\/|$)/.test(r)).sort(), problems };
}

const registeredRoutes = (app: Express) => enumerateRoutes(app).routes;
/** CORS preflights are answered for any path by the CORS layer, so their rows name a path rather than a route. */
const isPreflightRow = (key: string) => key.startsWith("OPTIONS ");

/**
 * What a response says, as text: zip archives (the data package) are opened and every entry read, so nothing in them
 * escapes the leak checks below; other binary bodies are read as UTF-8, which keeps any address in them findable.
 */
function bodyText(res: request.Response): string {
  const raw = Buffer.isBuffer(res.body) ? res.body : Buffer.from(res.text ?? "");
  if (/^application\/zip/.test(String(res.headers["content-type"]))) {
    return [...unzip(raw)].map(([name, data]) => `${name}\n${data.toString("utf8")}`).join("\n");
  }
  return raw.toString("utf8");
}

const ownerSide = new Set<Actor>(["curatorOwner", "admin", "readToken", "writeToken"]);

let t: TestApp;
const results: { key: string; actor: Actor; status: number; text: string; allowedEmails: Set<string> }[] = [];

beforeAll(async () => {
  t = await testApp({ authLimits: { windowMs: 60_000, perIp: 100_000, perAccount: 100_000 } });
  const u = {
    member: await makeUser(t.ctx, "member"),
    curatorOwner: await makeUser(t.ctx, "curator"),
    curatorEditor: await makeUser(t.ctx, "curator"),
    curatorOther: await makeUser(t.ctx, "curator"),
    reviewer: await makeUser(t.ctx, "reviewer"),
    admin: await makeUser(t.ctx, "admin"),
  };
  world = {
    users: u,
    curatorOwner: u.curatorOwner,
    coEditor: await makeUser(t.ctx, "curator"),
    tokens: {
      readToken: (await tokenOf(t, u.curatorOwner.id, "read")).secret,
      writeToken: (await tokenOf(t, u.curatorOwner.id, "write")).secret,
      revokedToken: (await tokenOf(t, u.curatorOwner.id, "write", "revoked")).secret,
      expiredToken: (await tokenOf(t, u.curatorOwner.id, "write", "expired")).secret,
    },
  };
});
afterAll(() => t.close());

describe("authorization matrix", () => {
  it("has a row for every registered route, and no row for a route that is gone", () => {
    const { routes, problems } = enumerateRoutes(t.app);
    expect(problems, "routes the enumeration cannot name exactly").toEqual([]);
    expect(routes.length).toBeGreaterThan(20);
    expect(
      routes.filter((r) => !(r in table)),
      "routes without a row in the matrix",
    ).toEqual([]);
    expect(
      Object.keys(table).filter((k) => !isPreflightRow(k) && !routes.includes(k)),
      "rows for routes that do not exist",
    ).toEqual([]);
  });

  it("refuses to enumerate router.all(), mounts whose path is not a plain string, and routes made without defineRoute", () => {
    const sneaky = express();
    const inner = express.Router();
    inner.all("/anything", (_req, res) => res.end());
    inner.get(/^\/regex-route$/, (_req, res) => res.end());
    inner.get("/by-hand", (_req, res) => res.end());
    sneaky.use("/api/v1", inner);
    sneaky.use(
      ["/api/a", "/api/b"],
      express.Router().get("/x", (_req, res) => res.end()),
    );
    sneaky.use(/^\/api\/hidden/, (_req, res) => res.end());
    const { problems } = enumerateRoutes(sneaky);
    expect(problems).toEqual([
      expect.stringMatching(/^\/api\/v1\/anything is registered with router\.all\(\)/),
      expect.stringMatching(/a route under "\/api\/v1" has a path that is not a plain string/),
      "GET /api/v1/by-hand is not defined with defineRoute",
      expect.stringMatching(/mounted at a path that is not a plain string: \/api\/a,\/api\/b/),
      expect.stringMatching(/mounted at a path that is not a plain string: \/\^\\\/api\\\/hidden\//),
    ]);
  });

  it("documents every route in the OpenAPI document", async () => {
    const doc = (await request(t.app).get("/api/v1/openapi.json").expect(200)).body as { paths: Record<string, Record<string, unknown>> };
    // Compared by shape: parameter names may differ, and a documented `{resource}.csv` is the route's `:resource`.
    const shape = (route: string) => route.replace(/\{\w+\}/g, ":p").replace(/:\w+/g, ":p");
    const documented = new Set(
      Object.entries(doc.paths).flatMap(([path, ops]) => Object.keys(ops).map((m) => shape(`${m.toUpperCase()} ${path}`))),
    );
    // The document itself, the docs page and path mounts are not API operations.
    const undocumented = registeredRoutes(t.app).filter((r) => !notOperations.has(r) && !r.startsWith("USE ") && !documented.has(shape(r)));
    expect(undocumented, "routes missing from the OpenAPI document").toEqual([]);
  });

  it("answers every cell as the table says", async () => {
    const failures: string[] = [];
    for (const [key, row] of Object.entries(table)) {
      const [method, pathPattern] = key.split(" ") as [string, string];
      for (const actor of actors) {
        const fx = await newFixture(t);
        const user =
          actor in world.users ? world.users[actor as keyof World["users"]] : actor.endsWith("Token") ? world.curatorOwner : null;
        const cell: Cell = { actor, user, fx, t, revealed: [] };
        const params = { slug: fx.slug, semver: "1.0.0", resource: "sites", ...(await row.params?.(cell)) };
        const path =
          row.path ??
          pathPattern.replace(/:(\w+)/g, (_m, name: string) => {
            const value = (params as Record<string, string>)[name];
            if (value === undefined) throw new Error(`${key}: no value for :${name}; give the row a params builder`);
            return encodeURIComponent(value);
          });
        const body = await row.body?.(cell);
        // A path mount answers whatever reaches it; GET is what a browser or script sends it.
        const verb = (method === "USE" ? "get" : method.toLowerCase()) as "get";
        const agent = request(t.app);
        let req = agent[verb](path)
          .set(row.headers ?? {})
          .buffer(true)
          .parse(binary);
        if (row.query) req = req.query(row.query(cell));
        if (actor.endsWith("Token")) req = req.set("Authorization", `Bearer ${world.tokens[actor as TokenActor]}`);
        else if (user) req = req.set("Cookie", `${sessionCookieName}=${(await createSession(t.ctx.db, user.id)).secret}`);
        if (row.file)
          req = req.attach(
            row.file.field,
            Buffer.isBuffer(row.file.content) ? row.file.content : Buffer.from(row.file.content, "utf8"),
            row.file.name,
          );
        else if (body !== undefined) req = req.send(body as object);
        const res = await req;
        const text = bodyText(res);
        const expected = row.expect[actor] ?? (actor === "revokedToken" || actor === "expiredToken" ? 401 : undefined);
        if (expected === undefined) throw new Error(`${key}: no expectation for ${actor}`);
        if (!matches(expected, res.status))
          failures.push(`${key} as ${actor}: expected ${expected}, got ${res.status} ${text.slice(0, 160)}`);
        else if (matches("ok", res.status) && row.check?.(res, text, cell))
          failures.push(`${key} as ${actor}: ${row.check(res, text, cell)}`);
        const allowedEmails = new Set<string>([
          ...(user ? [user.email] : []),
          ...(JSON.stringify(body ?? "").match(/[\w.+-]+@[\w.-]+/g) ?? []),
          ...cell.revealed,
        ]);
        // The owner (and its tokens) and admins choose a dataset's editors by address, so they may see the editors'.
        if (ownerSide.has(actor)) allowedEmails.add(world.users.curatorEditor.email).add(world.coEditor.email);
        results.push({ key, actor, status: res.status, text, allowedEmails });
      }
    }
    expect(failures).toEqual([]);
  }, 600_000);

  it("never answers with a password hash, a token hash or another user's e-mail address", async () => {
    expect(results.length).toBeGreaterThan(100);
    const db = t.ctx.db;
    const secrets = [
      ...(await db.select({ h: users.passwordHash }).from(users)).map((r) => r.h),
      ...(await db.select({ h: sessions.tokenHash }).from(sessions)).map((r) => r.h),
      ...(await db.select({ h: apiTokens.tokenHash }).from(apiTokens)).map((r) => r.h),
      ...(await db.select({ h: emailTokens.tokenHash }).from(emailTokens)).map((r) => r.h),
    ].filter((h): h is string => !!h);
    const emails = (await db.select({ e: users.email }).from(users)).map((r) => r.e);
    const leaks: string[] = [];
    for (const r of results) {
      if (/scrypt\$|passwordHash|tokenHash/.test(r.text)) leaks.push(`${r.key} as ${r.actor}: names a hash`);
      for (const h of secrets) if (r.text.includes(h)) leaks.push(`${r.key} as ${r.actor}: contains a stored hash`);
      // Admins manage people, so admin routes may list e-mail addresses to them; nowhere else.
      if (r.actor === "admin" && r.key.includes(" /api/v1/admin/")) continue;
      for (const e of emails) if (!r.allowedEmails.has(e) && r.text.includes(e)) leaks.push(`${r.key} as ${r.actor}: shows ${e}`);
    }
    expect(leaks).toEqual([]);
    // Zipped answers were opened and read, not skipped.
    const zipped = results.filter((r) => r.key.endsWith("/datapackage.zip") && r.status === 200);
    expect(zipped.length).toBeGreaterThan(0);
    for (const r of zipped) expect(r.text).toContain("datapackage.json");
  });

  it("shows a dataset's editors' addresses to its owner and admins only", async () => {
    const fx = await newFixture(t);
    const editorEmails = [world.users.curatorEditor.email, world.coEditor.email];
    const seen: Record<string, string[]> = {};
    for (const actor of actors) {
      const user = actor in world.users ? world.users[actor as keyof World["users"]] : actor.endsWith("Token") ? world.curatorOwner : null;
      const cookie = user && !actor.endsWith("Token") ? `${sessionCookieName}=${(await createSession(t.ctx.db, user.id)).secret}` : null;
      const auth = (req: request.Test) =>
        actor.endsWith("Token")
          ? req.set("Authorization", `Bearer ${world.tokens[actor as TokenActor]}`)
          : cookie
            ? req.set("Cookie", cookie)
            : req;
      const one = await auth(request(t.app).get(`/api/v1/curation/datasets/${fx.slug}`));
      const list = await auth(request(t.app).get("/api/v1/curation/datasets"));
      seen[actor] = editorEmails.filter((e) => one.text.includes(e) || list.text.includes(e));
      if (one.status === 200) {
        // Everyone who may see the dataset's desk sees who edits it, by name.
        expect(one.body.editors.map((e: { id: string }) => e.id).sort(), actor).toEqual(
          [world.users.curatorEditor.id, world.coEditor.id].sort(),
        );
      }
    }
    expect(seen).toEqual({
      anonymous: [],
      member: [],
      curatorOwner: editorEmails,
      curatorEditor: [world.users.curatorEditor.email],
      curatorOther: [],
      reviewer: [],
      admin: editorEmails,
      readToken: editorEmails,
      writeToken: editorEmails,
      revokedToken: [],
      expiredToken: [],
    });
  });
});

describe("mass assignment and object-level checks", () => {
  it("ignores role and emailVerified in a sign-up body", async () => {
    const email = `${fresh("mass")}@tallgrass.test`;
    await request(t.app)
      .post("/api/v1/sign-up")
      .send({ email, displayName: "Mass", password: testPassword, role: "admin", emailVerified: true, emailVerifiedAt: "2020-01-01" })
      .expect(202);
    const [row] = await t.ctx.db.select().from(users).where(eq(users.email, email));
    expect(row).toMatchObject({ role: "member", emailVerifiedAt: null });
  });

  it("ignores role in a profile body", async () => {
    const member = await makeUser(t.ctx, "member");
    const cookie = `${sessionCookieName}=${(await createSession(t.ctx.db, member.id)).secret}`;
    const res = await request(t.app)
      .patch("/api/v1/account")
      .set("Cookie", cookie)
      .send({ role: "admin", id: world.users.admin.id, email: "x@y.z" })
      .expect(200);
    expect(res.body).toMatchObject({ id: member.id, role: "member", email: member.email });
  });

  it("refuses a role change in the role-change body beyond the role itself", async () => {
    const admin = world.users.admin;
    const target = await makeUser(t.ctx, "member");
    const cookie = `${sessionCookieName}=${(await createSession(t.ctx.db, admin.id)).secret}`;
    const res = await request(t.app)
      .patch(`/api/v1/admin/users/${target.id}`)
      .set("Cookie", cookie)
      .send({ role: "curator", email: "taken@tallgrass.test" })
      .expect(400);
    expect(res.body.errors[0].field).toMatch(/^body/);
  });

  it("one curator cannot see or change another's draft", async () => {
    const fx = await newFixture(t);
    const cookie = `${sessionCookieName}=${(await createSession(t.ctx.db, world.users.curatorOther.id)).secret}`;
    await request(t.app).get(`/api/v1/curation/versions/${fx.draftId}`).set("Cookie", cookie).expect(404);
    const patch = await request(t.app).patch(`/api/v1/curation/versions/${fx.draftId}`).set("Cookie", cookie).send({ changelog: "hijack" });
    expect([403, 404]).toContain(patch.status);
    const [draft] = await t.ctx.db
      .select()
      .from(versions)
      .where(and(eq(versions.id, fx.draftId)));
    expect(draft?.changelog).not.toBe("hijack");
  });
});
