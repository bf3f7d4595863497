import type { RouteConfig } from "@asteasolutions/zod-to-openapi";
import type { Express } from "express";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { z } from "zod";
import { insertPublicFixture, type PublicFixture } from "@/tests/support/public-fixture";
import { signedInAgent } from "@/tests/support/sign-in";
import { makeUser, testApp, type TestApp } from "@/tests/support/test-app";

/**
 * The OpenAPI document and the app cannot drift apart: every Express route under /api is documented, and the real
 * answer of every documented GET is one of its documented statuses, with a body its documented schema accepts.
 */

interface Layer {
  route?: { path: string | string[]; methods: Record<string, boolean> };
  handle?: { stack?: Layer[] };
  rawPath?: string | string[];
}

/** Walk Express 5's router stack, nested routers included; :param becomes {param} as in OpenAPI. */
function expressRoutes(app: Express): string[] {
  const found: string[] = [];
  const walk = (stack: Layer[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        const paths = Array.isArray(layer.route.path) ? layer.route.path : [layer.route.path];
        for (const p of paths) {
          for (const [method, on] of Object.entries(layer.route.methods)) {
            // Express answers HEAD through the GET handler; it is not a route of its own.
            if (on && method !== "_all" && method !== "head") found.push(`${method} ${(prefix + p).replace(/:(\w+)/g, "{$1}")}`);
          }
        }
      } else if (layer.handle?.stack) {
        const mount = typeof layer.rawPath === "string" && layer.rawPath !== "/" ? layer.rawPath : "";
        walk(layer.handle.stack, prefix + mount);
      }
    }
  };
  walk((app as unknown as { router: { stack: Layer[] } }).router.stack, "");
  return found;
}

/** The document describes the API, not itself, nor the HTML page that renders it. */
const undocumentedByDesign = new Set(["get /api/v1/openapi.json", "get /api/docs"]);

let t: TestApp;
let fixture: PublicFixture;
let doc: { paths: Record<string, Record<string, unknown>> };
beforeAll(async () => {
  t = await testApp({ anonRatePerMinute: 1_000_000, tokenRatePerMinute: 1_000_000 });
  fixture = await insertPublicFixture(t.ctx);
  doc = (await request(t.app).get("/api/v1/openapi.json").expect(200)).body;
});
afterAll(() => t.close());

describe("every Express route is in the OpenAPI document", () => {
  it("finds the routes by walking the router", () => {
    const routes = expressRoutes(t.app);
    expect(routes).toContain("get /api/v1/datasets/{slug}/versions/{semver}/responses");
    expect(routes).toContain("delete /api/v1/tokens/{id}");
  });
  it("documents each of them", () => {
    const documented = new Set(Object.entries(doc.paths).flatMap(([path, ops]) => Object.keys(ops).map((m) => `${m} ${path}`)));
    const missing = expressRoutes(t.app)
      .filter((r) => r.startsWith("get /api") || /^\w+ \/api/.test(r))
      .filter((r) => !documented.has(r) && !undocumentedByDesign.has(r));
    expect(missing).toEqual([]);
  });
  it("documents nothing that is not a route", () => {
    const routes = new Set(expressRoutes(t.app));
    const extra = Object.entries(doc.paths)
      .flatMap(([path, ops]) => Object.keys(ops).map((m) => `${m} ${path}`))
      .filter((r) => !routes.has(r));
    expect(extra).toEqual([]);
  });
});

describe("real answers of every documented GET match their documented schemas", () => {
  /** Sample path values: the fixture's own dataset and version, or ids that exist nowhere (a documented 404). */
  const sample = (name: string): string => {
    if (name === "slug") return "tb-soy-starter-p";
    if (name === "semver") return "1.1.0";
    if (name === "resource") return "plots";
    if (name === "view") return "observations";
    if (name === "id") return fixture.versionIds.get("tb-soy-starter-p@1.1.0")!;
    return "00000000-0000-4000-8000-000000000000";
  };

  const getRoutes = () =>
    (t.ctx.registry.definitions as { type: string; route?: RouteConfig }[])
      .filter((d): d is { type: "route"; route: RouteConfig } => d.type === "route" && !!d.route && d.route.method === "get")
      .map((d) => d.route);

  it("covers every documented GET", () => {
    expect(getRoutes().length).toBe(Object.values(doc.paths).filter((ops) => "get" in ops).length);
  });

  it("each answer's status is documented and its JSON body validates", async () => {
    const admin = await makeUser(t.ctx, "admin");
    const agent = await signedInAgent(t.app, admin.email);
    const failures: string[] = [];
    for (const route of getRoutes()) {
      const url = route.path.replace(/\{(\w+)\}/g, (_m, name: string) => sample(name));
      const res = await agent.get(url).set("Accept", "application/json, */*;q=0.1");
      const documented = route.responses[res.status] as { content?: Record<string, { schema: z.ZodType }> } | undefined;
      if (!documented) {
        failures.push(`GET ${url}: answered ${res.status}, documented ${Object.keys(route.responses).join("/")}`);
        continue;
      }
      const type = String(res.headers["content-type"] ?? "").split(";")[0]!;
      const schema = documented.content?.[type]?.schema;
      if (!documented.content || res.status === 304) continue;
      if (!schema) {
        failures.push(`GET ${url}: ${res.status} answered ${type}, documented ${Object.keys(documented.content).join(", ")}`);
        continue;
      }
      if (!type.endsWith("json")) continue;
      const parsed = schema.safeParse(res.body);
      if (!parsed.success)
        failures.push(
          `GET ${url}: ${res.status} body does not match: ${parsed.error.issues
            .slice(0, 3)
            .map((i) => `${i.path.join(".")} ${i.message}`)
            .join("; ")}`,
        );
    }
    expect(failures).toEqual([]);
  });

  it("the public rows endpoints answer 200 with data for the sample version (not just documented errors)", async () => {
    for (const r of ["sites", "site-years", "treatments", "observations", "responses"]) {
      const res = await request(t.app).get(`/api/v1/datasets/tb-soy-starter-p/versions/1.1.0/${r}`).expect(200);
      expect(res.body.items.length, r).toBeGreaterThan(0);
    }
  });
});
