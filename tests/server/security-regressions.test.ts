/**
 * Regressions of a security review: each test names what it proves. They run the real app on a real in-memory
 * database over HTTP.
 */
import { and, eq, isNull, sql } from "drizzle-orm";
import { createHash } from "node:crypto";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import http from "node:http";
import type { AddressInfo } from "node:net";
import { tmpdir } from "node:os";
import path from "node:path";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiTokens, datasets, outbox, users } from "@/db/schema";
import { issueEmailToken } from "@/server/services/accounts/email-tokens";
import { renderCitation } from "@/server/services/citation/citation-formats";
import { draftWithData, plotsCsv, sitesCsv, upload } from "@/tests/server/curation-fixtures";
import { signedInAgent } from "@/tests/support/sign-in";
import { makeUser, testApp, testPassword, type TestApp } from "@/tests/support/test-app";

let t: TestApp;
beforeAll(async () => {
  t = await testApp();
});
afterAll(async () => {
  await t.close();
});

async function writeToken(agent: ReturnType<typeof request.agent>) {
  const res = await agent.post("/api/v1/tokens").send({ name: "nightly pull", scope: "write" }).expect(201);
  return res.body.secret as string;
}

describe("partial dataset edits", () => {
  it("a PATCH changes only the fields it sends: keywords, contributors and licence survive {} and a title-only edit", async () => {
    const curator = await makeUser(t.ctx, "curator");
    const agent = await signedInAgent(t.app, curator.email);
    const slug = `keep-metadata-${Date.now().toString(36)}`;
    await agent
      .post("/api/v1/datasets")
      .send({
        slug,
        title: "Keep metadata",
        crops: ["corn"],
        region: "Tallgrass Basin",
        description: "Test.",
        licence: "CC0-1.0",
        keywords: ["starter", "potassium"],
        contributors: [{ name: "Ada Fieldhand", role: "creator" }],
      })
      .expect(201);
    await agent.patch(`/api/v1/datasets/${slug}`).send({}).expect(200);
    const res = await agent.patch(`/api/v1/datasets/${slug}`).send({ title: "Keep metadata, renamed" }).expect(200);
    expect(res.body).toMatchObject({
      title: "Keep metadata, renamed",
      licence: "CC0-1.0",
      keywords: ["starter", "potassium"],
      contributors: [{ name: "Ada Fieldhand", role: "creator" }],
    });
    const [row] = await t.ctx.db.select().from(datasets).where(eq(datasets.slug, slug));
    expect(row).toMatchObject({ licence: "CC0-1.0", keywords: ["starter", "potassium"] });
  });

  it("no PATCH or PUT body schema in the OpenAPI registry fills in a default for a field the request left out", async () => {
    const checked: string[] = [];
    for (const def of t.ctx.registry.definitions) {
      if (def.type !== "route" || !["patch", "put"].includes(def.route.method)) continue;
      const media = def.route.request?.body?.content["application/json"] as { schema?: unknown } | undefined;
      const schema = media?.schema as { safeParse?: (v: unknown) => { success: boolean; data?: unknown } } | undefined;
      if (!schema?.safeParse) continue;
      const parsed = schema.safeParse({});
      checked.push(`${def.route.method} ${def.route.path}`);
      if (parsed.success) expect(parsed.data, `${def.route.method} ${def.route.path}`).toEqual({});
    }
    expect(checked).toContain("patch /api/v1/datasets/{slug}");
    expect(checked).toContain("patch /api/v1/account");
  });

  it("a JSON body sent as text/plain with a write token is refused with 415, not ignored", async () => {
    const curator = await makeUser(t.ctx, "curator");
    const agent = await signedInAgent(t.app, curator.email);
    const slug = `typed-body-${Date.now().toString(36)}`;
    await agent
      .post("/api/v1/datasets")
      .send({ slug, title: "Typed body", crops: ["corn"], region: "Tallgrass Basin", description: "Test." })
      .expect(201);
    const secret = await writeToken(agent);
    const res = await request(t.app)
      .patch(`/api/v1/datasets/${slug}`)
      .set("Authorization", `Bearer ${secret}`)
      .set("Content-Type", "text/plain")
      .send(JSON.stringify({ title: "Renamed by text" }));
    expect(res.status).toBe(415);
    expect(res.body.errors[0].field).toBe("body");
  });
});

describe("control characters", () => {
  it("NUL in a query parameter, a path segment or a JSON string is a 400 naming the field, anonymous or signed in", async () => {
    const query = await request(t.app).get("/api/v1/responses?dataset=%00");
    expect(query.status).toBe(400);
    expect(query.body.errors.map((e: { field: string }) => e.field)).toContain("query.dataset");
    const path = await request(t.app).get("/api/v1/datasets/%00");
    expect(path.status).toBe(400);
    expect(path.body.errors[0].field).toBe("path.slug");
    const curator = await makeUser(t.ctx, "curator");
    const agent = await signedInAgent(t.app, curator.email);
    const body = await agent
      .post("/api/v1/datasets")
      .send({ slug: "nul-title", title: "Bad\u0000title", crops: ["corn"], region: "Tallgrass Basin", description: "Test." });
    expect(body.status).toBe(400);
    expect(body.body.errors.map((e: { field: string }) => e.field)).toContain("body.title");
  });

  it("a one-line field refuses a line break, while a paragraph field keeps tabs and line breaks", async () => {
    const curator = await makeUser(t.ctx, "curator");
    const agent = await signedInAgent(t.app, curator.email);
    const forged = await agent.post("/api/v1/datasets").send({
      slug: "forged-ris",
      title: "Trial\r\nER  -\r\nTY  - DATA",
      crops: ["corn"],
      region: "Tallgrass Basin",
      description: "Test.",
    });
    expect(forged.status).toBe(400);
    expect(forged.body.errors.map((e: { field: string }) => e.field)).toContain("body.title");
    const ok = await agent.post("/api/v1/datasets").send({
      slug: `paragraphs-${Date.now().toString(36)}`,
      title: "Paragraphs",
      crops: ["corn"],
      region: "Tallgrass Basin",
      description: "One.\n\n\tTwo.",
    });
    expect(ok.status).toBe(201);
  });
});

describe("cut-off uploads", () => {
  it("a multipart upload cut off before its closing boundary is a 400, and the server keeps serving", async () => {
    const f = await draftWithData(t.app, t.ctx, { plots: false });
    const secret = await writeToken(f.curatorAgent);
    const server = http.createServer(t.app).listen(0, "127.0.0.1");
    await new Promise((resolve) => server.once("listening", resolve));
    const { port } = server.address() as AddressInfo;
    try {
      const boundary = "----plotbankcut";
      const head = `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="sites.csv"\r\nContent-Type: text/csv\r\n\r\n${sitesCsv}`;
      const answer = await new Promise<{ status: number; body: string }>((resolve, reject) => {
        const req = http.request(
          {
            port,
            host: "127.0.0.1",
            method: "POST",
            path: `/api/v1/curation/versions/${f.versionId}/uploads/sites`,
            headers: { Authorization: `Bearer ${secret}`, "Content-Type": `multipart/form-data; boundary=${boundary}` },
          },
          (res) => {
            let body = "";
            res.on("data", (c) => (body += c));
            res.on("end", () => resolve({ status: res.statusCode!, body }));
          },
        );
        req.on("error", reject);
        // The body ends in the middle of the file part: no closing boundary ever comes.
        req.end(head);
      });
      expect(answer.status).toBe(400);
      expect(JSON.parse(answer.body).detail).toMatch(/cut off/);
      const health = await fetch(`http://127.0.0.1:${port}/api/v1/health`);
      expect(health.status).toBe(200);
    } finally {
      await new Promise((resolve) => server.close(resolve));
    }
  });

  it("a multipart upload without a boundary is a 400 problem, not a 500", async () => {
    const f = await draftWithData(t.app, t.ctx, { plots: false });
    const res = await f.curatorAgent
      .post(`/api/v1/curation/versions/${f.versionId}/uploads/sites`)
      .set("Content-Type", "multipart/form-data")
      .send("site,location\n");
    expect(res.status).toBe(400);
    expect(res.type).toBe("application/problem+json");
  });
});

describe("tokens end with the password", () => {
  async function liveTokens(userId: string) {
    return t.ctx.db
      .select()
      .from(apiTokens)
      .where(and(eq(apiTokens.userId, userId), isNull(apiTokens.revokedAt)));
  }

  it("changing the password revokes every API token (401 at once) and e-mails the account; revokeApiTokens: false keeps them", async () => {
    const member = await makeUser(t.ctx, "member");
    const agent = await signedInAgent(t.app, member.email);
    const { body } = await agent.post("/api/v1/tokens").send({ name: "pull" }).expect(201);
    await request(t.app).get("/api/v1/account").set("Authorization", `Bearer ${body.secret}`).expect(200);
    await agent.patch("/api/v1/account").send({ currentPassword: testPassword, newPassword: "furrow-openers-2027!" }).expect(200);
    await request(t.app).get("/api/v1/account").set("Authorization", `Bearer ${body.secret}`).expect(401);
    const mail = await t.ctx.db
      .select()
      .from(outbox)
      .where(and(eq(outbox.to, member.email), eq(outbox.kind, "password-changed")));
    expect(mail).toHaveLength(1);
    expect(mail[0]!.text).toMatch(/1 API token was revoked/);

    await agent.post("/api/v1/tokens").send({ name: "kept" }).expect(201);
    await agent
      .patch("/api/v1/account")
      .send({ currentPassword: "furrow-openers-2027!", newPassword: "seed-firmers-2028!", revokeApiTokens: false })
      .expect(200);
    expect(await liveTokens(member.id)).toHaveLength(1);
  });

  it("a password reset revokes every API token of the account and e-mails it", async () => {
    const member = await makeUser(t.ctx, "member");
    const agent = await signedInAgent(t.app, member.email);
    const { body } = await agent.post("/api/v1/tokens").send({ name: "pull" }).expect(201);
    const { secret } = await issueEmailToken(t.ctx.db, { purpose: "reset", email: member.email, userId: member.id });
    await request(t.app).post("/api/v1/password-reset/confirm").send({ token: secret, password: "closing-wheels-2027!" }).expect(204);
    await request(t.app).get("/api/v1/account").set("Authorization", `Bearer ${body.secret}`).expect(401);
    expect(await liveTokens(member.id)).toHaveLength(0);
    const mail = await t.ctx.db
      .select()
      .from(outbox)
      .where(and(eq(outbox.to, member.email), eq(outbox.kind, "password-changed")));
    expect(mail[0]!.text).toMatch(/reset/);
  });
});

describe("accounts", () => {
  it("four sign-ups of one new address at the same moment all get the normal answer, and one account exists", async () => {
    const email = `race-${Date.now().toString(36)}@plotbank.test`;
    const answers = await Promise.all(
      [1, 2, 3, 4].map(() =>
        request(t.app).post("/api/v1/sign-up").send({ email, displayName: "Racer", password: "strip-till-bars-2026!" }),
      ),
    );
    expect(answers.map((a) => a.status)).toEqual([202, 202, 202, 202]);
    expect(await t.ctx.db.select().from(users).where(eq(users.email, email))).toHaveLength(1);
  });

  it("sign-up of an existing address runs the same password hashing as a new one (timing within a factor of 2)", async () => {
    const existing = await makeUser(t.ctx, "member");
    const time = async (email: string) => {
      const start = performance.now();
      await request(t.app).post("/api/v1/sign-up").send({ email, displayName: "Timer", password: "strip-till-bars-2026!" }).expect(202);
      return performance.now() - start;
    };
    // Warm up, then take the median of three of each.
    await time(`warm-${Date.now().toString(36)}@plotbank.test`);
    const known: number[] = [];
    const fresh: number[] = [];
    for (let i = 0; i < 3; i++) {
      known.push(await time(existing.email));
      fresh.push(await time(`new-${i}-${Date.now().toString(36)}@plotbank.test`));
    }
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[1]!;
    expect(median(known) / median(fresh)).toBeGreaterThan(0.5);
  });

  it("wrong current passwords in PATCH /account are rate-limited per account (429)", async () => {
    const fresh = await testApp({ authLimits: { windowMs: 60_000, perIp: 100, perAccount: 3 } });
    try {
      const member = await makeUser(fresh.ctx, "member");
      const agent = await signedInAgent(fresh.app, member.email);
      const statuses: number[] = [];
      for (let i = 0; i < 5; i++)
        statuses.push(
          (await agent.patch("/api/v1/account").send({ currentPassword: `wrong-guess-${i}`, newPassword: "closing-wheels-2027!" })).status,
        );
      expect(statuses.slice(0, 3)).toEqual([400, 400, 400]);
      expect(statuses.slice(3)).toEqual([429, 429]);
      // A name change carries no password and is not slowed.
      await agent.patch("/api/v1/account").send({ displayName: "Still here" }).expect(200);
    } finally {
      await fresh.close();
    }
  });

  it("X-Forwarded-For is ignored unless PLOTBANK_TRUST_PROXY names the proxy, so it cannot dodge the per-IP limits", async () => {
    const fresh = await testApp({ authLimits: { windowMs: 60_000, perIp: 2, perAccount: 100 } });
    try {
      const from = (ip: string) =>
        request(fresh.app)
          .post("/api/v1/password-reset")
          .set("X-Forwarded-For", ip)
          .send({ email: `x-${ip}@plotbank.test` });
      expect((await from("203.0.113.1")).status).toBe(202);
      expect((await from("203.0.113.2")).status).toBe(202);
      expect((await from("203.0.113.3")).status).toBe(429);
    } finally {
      await fresh.close();
    }
  });
});

describe("four eyes", () => {
  it("an admin who uploaded data into a version may not approve it; a reviewer who only read it may", async () => {
    const f = await draftWithData(t.app, t.ctx, { plots: false });
    const admin = await makeUser(t.ctx, "admin");
    const adminAgent = await signedInAgent(t.app, admin.email);
    await upload(adminAgent, f.versionId, "plots", plotsCsv()).expect(201);
    await f.curatorAgent.post(`/api/v1/curation/versions/${f.versionId}/submit`).send({ changelog: "First release." }).expect(200);
    const desk = await adminAgent.get(`/api/v1/curation/versions/${f.versionId}`).expect(200);
    expect(desk.body.canReview).toBe(false);
    const queue = await adminAgent.get("/api/v1/curation/review-queue").expect(200);
    expect(queue.body.items.find((i: { versionId: string }) => i.versionId === f.versionId).canApprove).toBe(false);
    const refused = await adminAgent.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({});
    expect(refused.status).toBe(403);
    await f.reviewerAgent.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({}).expect(200);
  });

  it("an admin who edited a draft's changelog or data dictionary may not approve it", async () => {
    const f = await draftWithData(t.app, t.ctx);
    const admin = await makeUser(t.ctx, "admin");
    const adminAgent = await signedInAgent(t.app, admin.email);
    await adminAgent.patch(`/api/v1/curation/versions/${f.versionId}`).send({ changelog: "Tidied by an admin." }).expect(200);
    await f.curatorAgent.post(`/api/v1/curation/versions/${f.versionId}/submit`).send({ changelog: "First release." }).expect(200);
    expect((await adminAgent.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({})).status).toBe(403);
  });
});

describe("what others may not learn", () => {
  it("a dataset with no published version is a 404, not a 403, to a curator who may not see it", async () => {
    const f = await draftWithData(t.app, t.ctx, { plots: false });
    const other = await makeUser(t.ctx, "curator");
    const agent = await signedInAgent(t.app, other.email);
    const patch = await agent.patch(`/api/v1/datasets/${f.slug}`).send({ title: "Taken over" });
    expect(patch.status).toBe(404);
    const missing = await agent.patch(`/api/v1/datasets/no-such-dataset-here`).send({ title: "Taken over" });
    expect(patch.body.detail).toBe(missing.body.detail.replace("no-such-dataset-here", f.slug));
    expect((await agent.post(`/api/v1/datasets/${f.slug}/versions`).send({})).status).toBe(404);
  });

  it("sharing a dataset answers alike for an address without an account and for a member's address", async () => {
    const curator = await makeUser(t.ctx, "curator");
    const agent = await signedInAgent(t.app, curator.email);
    const slug = `share-probe-${Date.now().toString(36)}`;
    await agent
      .post("/api/v1/datasets")
      .send({ slug, title: "Share probe", crops: ["corn"], region: "Tallgrass Basin", description: "Test." })
      .expect(201);
    const member = await makeUser(t.ctx, "member");
    const nobody = await agent.post(`/api/v1/curation/datasets/${slug}/editors`).send({ email: "nobody-here@plotbank.test" });
    const someone = await agent.post(`/api/v1/curation/datasets/${slug}/editors`).send({ email: member.email });
    expect(someone.status).toBe(nobody.status);
    expect(someone.body.errors).toEqual([{ field: "body.email", message: nobody.body.errors[0].message }]);
    expect(someone.body.detail).toBe(nobody.body.detail.replace("nobody-here@plotbank.test", member.email));
  });

  it("the validation report of a rejected upload stays with editors and reviewers, even on a published version", async () => {
    const f = await draftWithData(t.app, t.ctx);
    const rejected = await upload(
      f.curatorAgent,
      f.versionId,
      "plots",
      plotsCsv({ override: { "TB-01-2021/101": "TB-01-2021,101,x,CHK,3700,13.1" } }),
    );
    expect(rejected.status).toBe(422);
    await f.curatorAgent.post(`/api/v1/curation/versions/${f.versionId}/submit`).send({ changelog: "First release." }).expect(200);
    await f.reviewerAgent.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({}).expect(200);
    const member = await signedInAgent(t.app, (await makeUser(t.ctx, "member")).email);
    await member.get(`/api/v1/curation/versions/${f.versionId}/reports/${rejected.body.reportId}`).expect(404);
    await member.get(`/api/v1/curation/versions/${f.versionId}/reports/${rejected.body.reportId}.csv`).expect(404);
    const desk = await member.get(`/api/v1/curation/versions/${f.versionId}`).expect(200);
    expect(desk.body.reports.every((r: { accepted: boolean }) => r.accepted)).toBe(true);
    await f.curatorAgent.get(`/api/v1/curation/versions/${f.versionId}/reports/${rejected.body.reportId}`).expect(200);
    await f.reviewerAgent.get(`/api/v1/curation/versions/${f.versionId}/reports/${rejected.body.reportId}`).expect(200);
  });
});

describe("database guards", () => {
  const refusal = async (statement: ReturnType<typeof sql>) => {
    const error = await t.ctx.db.execute(statement).then(
      () => null,
      (e: unknown) => e as { cause?: { hint?: string } },
    );
    expect(error, "the statement should have been refused").not.toBeNull();
    expect(error!.cause?.hint).toBe("plotbank:immutable");
  };

  it("TRUNCATE of version content (even CASCADE), rewriting a published version's review history and renaming a dataset with a DOI are refused", async () => {
    const f = await draftWithData(t.app, t.ctx);
    await f.curatorAgent.post(`/api/v1/curation/versions/${f.versionId}/submit`).send({ changelog: "First release." }).expect(200);
    await f.reviewerAgent.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({ comment: "Checked." }).expect(200);
    await refusal(sql`truncate plots cascade`);
    await refusal(sql`truncate sites cascade`);
    await refusal(sql`truncate versions cascade`);
    await refusal(sql`update versions set review_comment = 'rubber-stamped' where id = ${f.versionId}`);
    await refusal(sql`update versions set submitted_by = ${f.reviewer.id} where id = ${f.versionId}`);
    await refusal(sql`update versions set submitted_at = now() - interval '1 year' where id = ${f.versionId}`);
    await t.ctx.db.execute(sql`update versions set doi = '10.80555/plotbank.test' where id = ${f.versionId}`);
    await refusal(sql`update datasets set slug = 'renamed-under-a-doi' where slug = ${f.slug}`);
    const counted = (await t.ctx.db.execute(sql`select count(*)::int as n from plots where version_id = ${f.versionId}`)) as unknown as {
      rows: { n: number }[];
    };
    const [plots] = counted.rows;
    expect(plots!.n).toBe(32);
  });
});

describe("caching of errors", () => {
  it("an error answer is never publicly cacheable, even from a route that set public caching first", async () => {
    const res = await request(t.app).get("/api/v1/datasets/no-such-dataset/versions/1.0.0/resources/sites.csv");
    expect(res.status).toBe(404);
    expect(res.headers["cache-control"]).toBe("no-store");
    const bad = await request(t.app).get("/api/v1/responses?yearFrom=abc");
    expect(bad.headers["cache-control"]).toBe("no-store");
  });
});

describe("citations", () => {
  it("a line break stored in a title cannot forge a second RIS record, nor break a BibTeX entry's line", () => {
    const item = {
      id: "forged-v1.0.0",
      type: "dataset" as const,
      title: "Starter trial\r\nER  - \r\nTY  - DATA\r\nTI  - Forged",
      author: [{ literal: "Tallgrass Basin Agronomy Network" }],
      publisher: "Plotbank",
      issued: { "date-parts": [[2026, 5, 1]] as [[number, number, number]] },
      version: "1.0.0",
      URL: "http://plotbank.test/datasets/forged?version=1.0.0",
    };
    const ris = renderCitation(item, "ris");
    expect(ris.match(/^TY {2}- /gm)).toHaveLength(1);
    expect(ris.match(/^ER {2}-/gm)).toHaveLength(1);
    const titles = ris.split("\n").filter((l) => l.startsWith("TI  - "));
    expect(titles).toHaveLength(1);
    expect(titles[0]).toMatch(/^TI {2}- Starter trial ER {2}- +TY {2}- DATA TI {2}- Forged$/);
    const bib = renderCitation(item, "bibtex");
    expect(bib).not.toMatch(/Starter trial\r?\n/);
  });
});

describe("web pages", () => {
  let dist: string;
  let web: TestApp;
  const inline = "window.__plotbankBoot = 1;";
  beforeAll(async () => {
    dist = mkdtempSync(path.join(tmpdir(), "plotbank-csp-"));
    writeFileSync(
      path.join(dist, "index.html"),
      `<!doctype html><html><head><title>Plotbank</title><script>${inline}</script></head><body><div id="root"></div><script src="/_expo/entry.js" defer></script></body></html>`,
    );
    web = await testApp({ anonRatePerMinute: 3 }, { webDistDir: dist });
  });
  afterAll(async () => {
    await web.close();
    rmSync(dist, { recursive: true, force: true });
  });

  it("the CSP allows no inline script but the web export's own, by its SHA-256 hash; 'unsafe-inline' is gone from script-src", async () => {
    const res = await request(web.app).get("/").expect(200);
    const scriptSrc = /script-src ([^;]*)/.exec(res.headers["content-security-policy"]!)![1]!;
    expect(scriptSrc).not.toContain("unsafe-inline");
    expect(scriptSrc).toContain(`'sha256-${createHash("sha256").update(inline).digest("base64")}'`);
    const api = await request(web.app).get("/api/v1/health").expect(200);
    expect(/script-src ([^;]*)/.exec(api.headers["content-security-policy"]!)![1]).not.toContain("unsafe-inline");
  });

  it("the server-rendered dataset pages are rate-limited per address", async () => {
    const statuses: number[] = [];
    for (let i = 0; i < 4; i++) statuses.push((await request(web.app).get(`/datasets/no-such-dataset-${i}`)).status);
    // No such dataset: the app draws its not-found state with a 404, until the page limit answers 429.
    expect(statuses).toEqual([404, 404, 404, 429]);
    // Other pages of the app do not read the database and are not counted.
    await request(web.app).get("/developers").expect(200);
  });
});
