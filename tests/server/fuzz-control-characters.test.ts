/**
 * Control characters in every string parameter and body field of every route the OpenAPI document describes, as an
 * anonymous caller and as an admin (who gets past every role check), against a version published over HTTP. No
 * answer may be a 5xx; a string body field or query parameter that carried the character and got a 400 must be the
 * field the answer names. The route list comes from the same registry that builds the document, so a new route is
 * fuzzed without editing this file.
 */
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { hasControlCharacter } from "@/schemas/safe-text";
import { generateOpenApiDocument } from "@/server/openapi/registry";
import { draftWithData, plotsCsv, upload, type Fixture } from "@/tests/server/curation-fixtures";
import { signedInAgent } from "@/tests/support/sign-in";
import { makeUser, testApp, type TestApp } from "@/tests/support/test-app";

/** NUL, other C0 controls, DEL, a C1 control, a bare CR, CRLF, the Unicode line separator and an escape sequence. */
const controls = ["\u0000", "a\u0001b", "\u001b[31m", "x\u007f", "\u0085", "line\rbreak", "two\r\nlines", "\u2028", "tab\there"];

type Schema = {
  $ref?: string;
  type?: string | string[];
  properties?: Record<string, Schema>;
  items?: Schema;
  anyOf?: Schema[];
  oneOf?: Schema[];
  allOf?: Schema[];
};
interface Operation {
  parameters?: { name: string; in: "path" | "query" | "header"; schema?: Schema }[];
  requestBody?: { content: Record<string, { schema?: Schema }> };
}

let t: TestApp;
let f: Fixture;
let admin: ReturnType<typeof request.agent>;
let doc: { paths: Record<string, Record<string, Operation>>; components?: { schemas?: Record<string, Schema> } };
const ids: Record<string, string> = {};

beforeAll(async () => {
  t = await testApp({
    anonRatePerMinute: 1_000_000,
    tokenRatePerMinute: 1_000_000,
    authLimits: { windowMs: 60_000, perIp: 1_000_000, perAccount: 1_000_000 },
  });
  f = await draftWithData(t.app, t.ctx);
  await f.curatorAgent.post(`/api/v1/curation/versions/${f.versionId}/submit`).send({ changelog: "First release." }).expect(200);
  await f.reviewerAgent.post(`/api/v1/curation/versions/${f.versionId}/approve`).send({}).expect(200);
  const draft = await f.curatorAgent.post(`/api/v1/datasets/${f.slug}/versions`).send({}).expect(201);
  const report = await upload(
    f.curatorAgent,
    draft.body.id,
    "plots",
    plotsCsv({ override: { "TB-01-2021/101": "TB-01-2021,101,x,CHK,3700,13.1" } }),
  );
  const adminUser = await makeUser(t.ctx, "admin");
  admin = await signedInAgent(t.app, adminUser.email);
  const token = await admin.post("/api/v1/tokens").send({ name: "fuzz" }).expect(201);
  Object.assign(ids, {
    slug: f.slug,
    semver: "1.0.0",
    id: draft.body.id,
    report: report.body.reportId,
    resource: "sites",
    userId: f.curator.id,
    token: token.body.token.id,
  });
  doc = generateOpenApiDocument(t.ctx.registry, "fuzz") as unknown as typeof doc;
}, 120_000);
afterAll(() => t.close());

function resolve(schema: Schema | undefined): Schema | undefined {
  if (!schema?.$ref) return schema;
  return resolve(doc.components?.schemas?.[schema.$ref.replace("#/components/schemas/", "")]);
}

/** Paths (a.b.c, with [] for array items) of every string leaf of a body schema, to a depth of four. */
function stringLeaves(schema: Schema | undefined, at: string[] = [], depth = 0): string[][] {
  const s = resolve(schema);
  if (!s || depth > 4) return [];
  const variants = [...(s.anyOf ?? []), ...(s.oneOf ?? []), ...(s.allOf ?? [])];
  if (variants.length) return variants.flatMap((v) => stringLeaves(v, at, depth + 1));
  const types = Array.isArray(s.type) ? s.type : [s.type];
  if (types.includes("string")) return [at];
  if (s.properties) return Object.entries(s.properties).flatMap(([k, v]) => stringLeaves(v, [...at, k], depth + 1));
  if (types.includes("array") && s.items) return stringLeaves(s.items, [...at, "[]"], depth + 1);
  return [];
}

function bodyWith(path: string[], value: string): unknown {
  const [head, ...rest] = path;
  if (head === undefined) return value;
  if (head === "[]") return [bodyWith(rest, value)];
  return { [head]: bodyWith(rest, value) };
}

const pathFor = (template: string, override?: [string, string]) =>
  template.replace(/\{(\w+)\}/g, (_, name: string) =>
    encodeURIComponent(
      override?.[0] === name ? override[1] : name === "id" && template.startsWith("/api/v1/tokens") ? ids.token! : (ids[name] ?? "x"),
    ),
  );

interface Probe {
  method: string;
  url: string;
  query?: Record<string, string>;
  body?: unknown;
  /** The field a 400 must name. */
  field?: string;
  /** The character is one no field accepts (paragraph fields keep tab, CR, LF and U+2028/9). */
  neverAllowed?: boolean;
}

function probes(): Probe[] {
  const out: Probe[] = [];
  for (const [template, operations] of Object.entries(doc.paths)) {
    for (const [method, op] of Object.entries(operations)) {
      for (const c of controls) {
        for (const p of op.parameters ?? []) {
          if (p.in === "path") out.push({ method, url: pathFor(template, [p.name, `${ids[p.name] ?? "x"}${c}`]), field: `path.${p.name}` });
          if (p.in === "query") {
            const string = stringLeaves(p.schema).length > 0;
            out.push({ method, url: pathFor(template), query: { [p.name]: c }, ...(string ? { field: `query.${p.name}` } : {}) });
          }
        }
        const json = op.requestBody?.content["application/json"]?.schema;
        for (const leaf of stringLeaves(json)) {
          out.push({
            method,
            url: pathFor(template),
            body: bodyWith(leaf, c),
            field: `body.${leaf.filter((k) => k !== "[]").join(".")}`,
            neverAllowed: hasControlCharacter(c, true),
          });
        }
      }
    }
  }
  return out;
}

function send(agent: ReturnType<typeof request.agent> | ReturnType<typeof request>, p: Probe) {
  const m = p.method as "get" | "post" | "put" | "patch" | "delete";
  let req = (agent as ReturnType<typeof request.agent>)[m](p.url);
  if (p.query) req = req.query(p.query);
  if (p.body !== undefined) req = req.send(p.body as object);
  return req;
}

describe("control characters in every parameter and field of every route", () => {
  it("no 5xx, anonymous or as an admin, and a refused string field is the one the answer names", async () => {
    const all = probes();
    expect(all.length).toBeGreaterThan(500);
    const failures: string[] = [];
    let refusedNamed = 0;
    for (const p of all) {
      for (const [who, agent] of [
        ["anonymous", request(t.app)],
        ["admin", admin],
      ] as const) {
        if (who === "anonymous" && p.method !== "get") continue;
        const res = await send(agent, p);
        const what = `${who} ${p.method.toUpperCase()} ${p.url}${p.query ? ` ?${JSON.stringify(p.query)}` : ""}${p.body ? ` ${JSON.stringify(p.body)}` : ""}`;
        if (res.status >= 500) failures.push(`${res.status} ${what}: ${res.text.slice(0, 200)}`);
        if (res.status >= 200 && res.status < 300 && p.neverAllowed) failures.push(`accepted ${what}`);
        if (res.status === 400 && p.field) {
          const named = ((res.body as { errors?: { field?: string }[] }).errors ?? []).map((e) => e.field ?? "");
          if (named.some((n) => n === p.field || n.startsWith(`${p.field}.`))) refusedNamed++;
          else if (p.field.startsWith("path") || p.field.startsWith("query"))
            failures.push(`400 not naming ${p.field}: ${what} → ${JSON.stringify(named)}`);
        }
      }
    }
    expect(failures, failures.slice(0, 30).join("\n")).toEqual([]);
    expect(refusedNamed).toBeGreaterThan(all.length / 4);
  }, 600_000);
});
