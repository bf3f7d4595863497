/**
 * The OpenAPI document says what the API does: one component per schema id, an operationId and a security declaration
 * on every operation, the vocabularies of the filters as enums, the rate-limit headers where they are sent, and the
 * rejected upload's `errors` as the list it is. Each check reads the document the app serves, and where a claim is
 * about behaviour, a real answer backs it.
 */
import { readdirSync } from "node:fs";
import { resolve } from "node:path";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { z } from "zod";
import { placements, soilTestClasses } from "@/schemas/filters";
import { uploadRejection } from "@/schemas/curation";
import { testApp, type TestApp } from "@/tests/support/test-app";
import { draftWithData, plotsCsv, upload } from "./curation-fixtures";

interface Operation {
  operationId?: string;
  security?: Record<string, string[]>[];
  parameters?: { name: string; in: string; schema?: { type?: string; items?: { enum?: string[] } } }[];
  responses: Record<string, { headers?: Record<string, unknown>; content?: Record<string, { schema: { $ref?: string } }> }>;
}
interface Document {
  paths: Record<string, Record<string, Operation>>;
  components: {
    schemas: Record<string, { properties?: Record<string, { type?: string; $ref?: string }> }>;
    securitySchemes: Record<string, unknown>;
    headers?: Record<string, unknown>;
  };
}

let t: TestApp;
let doc: Document;
beforeAll(async () => {
  t = await testApp();
  doc = (await request(t.app).get("/api/v1/openapi.json").expect(200)).body as Document;
});
afterAll(() => t.close());

const operations = () =>
  Object.entries(doc.paths).flatMap(([path, ops]) =>
    Object.entries(ops).map(([method, op]) => ({ key: `${method.toUpperCase()} ${path}`, op })),
  );
const refName = (ref: string | undefined) => ref?.replace("#/components/schemas/", "");

/** Every zod schema reachable from a root, through objects, arrays, unions, wrappers and pipes. */
function* reachable(root: z.ZodType, seen = new Set<z.ZodType>()): Generator<z.ZodType> {
  if (seen.has(root)) return;
  seen.add(root);
  yield root;
  const def = (root as unknown as { _zod: { def: Record<string, unknown> } })._zod.def;
  const children: unknown[] = [];
  if (def.shape) children.push(...Object.values(def.shape as object));
  for (const key of ["element", "innerType", "in", "out", "left", "right", "keyType", "valueType", "rest"]) children.push(def[key]);
  for (const key of ["options", "items"]) if (Array.isArray(def[key])) children.push(...(def[key] as unknown[]));
  for (const child of children) if (child instanceof z.ZodType) yield* reachable(child, seen);
}

describe("the OpenAPI document", () => {
  it("gives each component id to one schema only, across the shared contracts and every route", async () => {
    const files = readdirSync(resolve("schemas")).filter((f) => f.endsWith(".ts"));
    const modules = (await Promise.all(files.map((f) => import(resolve("schemas", f))))) as Record<string, unknown>[];
    expect(modules.length).toBeGreaterThan(5);
    const roots = modules.flatMap((m) => Object.values(m).filter((v): v is z.ZodType => v instanceof z.ZodType));
    // Schemas written beside a route (a path's params, a small answer) count too: the registry holds them.
    const routeSchemas = JSON.stringify(t.ctx.registry.definitions, (_k, v: unknown) =>
      v instanceof z.ZodType ? (roots.push(v), undefined) : v,
    );
    expect(routeSchemas.length).toBeGreaterThan(0);
    expect(roots.length).toBeGreaterThan(100);
    const byId = new Map<string, Set<z.ZodType>>();
    const seen = new Set<z.ZodType>();
    for (const root of roots) {
      for (const schema of reachable(root, seen)) {
        const id = z.globalRegistry.get(schema)?.id;
        if (id) byId.set(id, (byId.get(id) ?? new Set()).add(schema));
      }
    }
    expect(byId.size).toBeGreaterThan(50);
    expect(
      [...byId].filter(([, schemas]) => schemas.size > 1).map(([id]) => id),
      "ids named by more than one schema",
    ).toEqual([]);
  });

  it("describes a curation version with the curation shape, and a public version with the public one", () => {
    const curation = refName(doc.paths["/api/v1/curation/versions/{id}"]!.get!.responses["200"]!.content!["application/json"]!.schema.$ref);
    const published = refName(
      doc.paths["/api/v1/datasets/{slug}/versions/{semver}"]!.get!.responses["200"]!.content!["application/json"]!.schema.$ref,
    );
    expect(curation).not.toBe(published);
    expect(Object.keys(doc.components.schemas[curation!]!.properties!)).toEqual(
      expect.arrayContaining(["canEdit", "canReview", "uploads", "reports"]),
    );
    expect(Object.keys(doc.components.schemas[published!]!.properties!)).not.toContain("canEdit");
  });

  it("names every operation with an operationId of its own", () => {
    const ops = operations();
    expect(ops.length).toBeGreaterThanOrEqual(64);
    expect(
      ops.filter(({ op }) => !op.operationId).map(({ key }) => key),
      "operations without an operationId",
    ).toEqual([]);
    const ids = ops.map(({ op }) => op.operationId);
    expect(
      ids.filter((id, i) => ids.indexOf(id) !== i),
      "operationIds used twice",
    ).toEqual([]);
  });

  it("declares security on every operation, with registered schemes; anonymous access is an explicit empty requirement", () => {
    const schemes = new Set(Object.keys(doc.components.securitySchemes));
    const failures: string[] = [];
    for (const { key, op } of operations()) {
      if (!op.security?.length) failures.push(`${key}: no security`);
      for (const requirement of op.security ?? [])
        for (const name of Object.keys(requirement)) if (!schemes.has(name)) failures.push(`${key}: unknown scheme ${name}`);
    }
    expect(failures).toEqual([]);
    const anonymous = (key: string) =>
      operations()
        .find((o) => o.key === key)!
        .op.security!.some((r) => Object.keys(r).length === 0);
    expect(anonymous("GET /api/v1/datasets")).toBe(true);
    expect(anonymous("GET /api/v1/analyses/meta")).toBe(true);
    expect(anonymous("POST /api/v1/session")).toBe(true);
    // "Who am I" answers everyone: a visitor gets `user: null`.
    expect(anonymous("GET /api/v1/session")).toBe(true);
    expect(anonymous("POST /api/v1/curation/versions/{id}/approve")).toBe(false);
    // Tokens are managed from a session only, and the document says so.
    expect(operations().find((o) => o.key === "POST /api/v1/tokens")!.op.security).toEqual([{ sessionCookie: [] }]);
  });

  it("agrees with the server about who may call: an operation without anonymous access refuses an anonymous caller", async () => {
    const sample = (name: string) =>
      name === "id" || name === "userId"
        ? "00000000-0000-4000-8000-000000000000"
        : name === "semver"
          ? "1.0.0"
          : name === "resource"
            ? "sites"
            : "x";
    const failures: string[] = [];
    for (const { key, op } of operations()) {
      if (op.security!.some((r) => Object.keys(r).length === 0)) continue;
      const [method, path] = key.split(" ") as [string, string];
      const verb = method.toLowerCase() as "get";
      const agent = request(t.app);
      const res = await agent[verb](path.replace(/\{(\w+)\}/g, (_m, n: string) => sample(n))).send({});
      if (res.status !== 401) failures.push(`${key}: anonymous got ${res.status}`);
    }
    expect(failures).toEqual([]);
  });

  it("declares the allowed values of placement and soil-test class wherever they are parameters", () => {
    const found: string[] = [];
    const failures: string[] = [];
    for (const { key, op } of operations()) {
      for (const p of op.parameters ?? []) {
        const expected = p.name === "placement" ? placements : p.name === "soilTestClass" ? soilTestClasses : null;
        if (!expected || p.in !== "query") continue;
        found.push(`${key} ${p.name}`);
        if (JSON.stringify(p.schema?.items?.enum) !== JSON.stringify(expected))
          failures.push(`${key} ${p.name}: ${JSON.stringify(p.schema)}`);
      }
    }
    expect(found).toContain("GET /api/v1/analyses/meta placement");
    expect(found).toContain("GET /api/v1/analyses/meta soilTestClass");
    expect(found).toContain("GET /api/v1/responses soilTestClass");
    expect(failures).toEqual([]);
  });

  it("declares the RateLimit headers on every rate-limited answer and Retry-After on every 429, as the server sends them", async () => {
    expect(Object.keys(doc.components.headers ?? {})).toEqual(expect.arrayContaining(["RateLimit", "RateLimit-Policy", "Retry-After"]));
    const failures: string[] = [];
    for (const { key, op } of operations()) {
      if (key === "GET /api/v1/health" || key === "GET /api/v1/health/ready") continue;
      if (!op.responses["429"]) failures.push(`${key}: no 429`);
      for (const [status, r] of Object.entries(op.responses)) {
        const names = Object.keys(r.headers ?? {});
        for (const h of ["RateLimit", "RateLimit-Policy", ...(status === "429" ? ["Retry-After"] : [])])
          if (!names.includes(h)) failures.push(`${key} ${status}: no ${h}`);
      }
    }
    expect(failures).toEqual([]);
    // The health check is exempt from the limits: it neither sends nor declares them.
    const health = await request(t.app).get("/api/v1/health");
    expect(health.headers.ratelimit).toBeUndefined();
    expect(doc.paths["/api/v1/health"]!.get!.responses["200"]!.headers).toBeUndefined();
    const read = await request(t.app).get("/api/v1/datasets").expect(200);
    expect(read.headers.ratelimit).toMatch(/^"anonymous"; r=\d+; t=\d+/);
    expect(read.headers["ratelimit-policy"]).toMatch(/^"anonymous"; q=\d+; w=\d+/);
  });

  it("declares a rejected upload's errors as the list of located problems it is, and a real rejection matches", async () => {
    const rejected = doc.paths["/api/v1/curation/versions/{id}/uploads/{resource}"]!.post!.responses["422"]!;
    const schema = doc.components.schemas[refName(rejected.content!["application/problem+json"]!.schema.$ref)!]!;
    expect(schema.properties!.errors).toMatchObject({ type: "array", items: { $ref: "#/components/schemas/ProblemLocation" } });
    expect(schema.properties!.errorCount).toMatchObject({ type: "integer" });

    const fixture = await draftWithData(t.app, t.ctx, { plots: false });
    const res = await upload(
      fixture.curatorAgent,
      fixture.versionId,
      "plots",
      plotsCsv({ override: { "TB-01-2021/101": "TB-01-2021,101,1,CHK,lots,13.1" } }),
    );
    expect(res.status).toBe(422);
    expect(res.headers["content-type"]).toMatch(/^application\/problem\+json/);
    const body = uploadRejection.parse(res.body);
    expect(body.errors.length).toBeGreaterThan(0);
    expect(body.errors).toContainEqual(expect.objectContaining({ file: "plots.csv", row: 1, column: "yield_kg_ha", value: "lots" }));
    expect(body.errorCount).toBe(body.errors.length);
  }, 180_000);
});
