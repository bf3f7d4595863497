import path from "node:path";
import { validate as validateOpenApi } from "@readme/openapi-parser";
import { lintFromString, loadConfig } from "@redocly/openapi-core";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { answerChecker } from "@/tests/support/answer-check";
import { testApp, type TestApp } from "@/tests/support/test-app";

/**
 * The served OpenAPI document through two independent tools: Redocly's linter (@redocly/openapi-core) with the
 * ruleset in redocly.yaml, and ReadMe's parser (@readme/openapi-parser), which validates it against the OpenAPI 3.1
 * JSON Schema and dereferences every $ref.
 */

let t: TestApp;
let doc: Record<string, unknown>;
let text: string;
beforeAll(async () => {
  t = await testApp();
  const res = await request(t.app).get("/api/v1/openapi.json").expect(200);
  doc = res.body;
  text = res.text;
});
afterAll(() => t.close());

describe("the OpenAPI document", () => {
  it("passes the linter with the repository's ruleset (redocly.yaml): no errors", async () => {
    const config = await loadConfig({ configPath: path.resolve(__dirname, "../../redocly.yaml") });
    const problems = await lintFromString({ source: text, absoluteRef: "openapi.json", config });
    const errors = problems.filter((p) => p.severity === "error");
    const open = errors.map((p) => `${p.ruleId}: ${p.message} at ${p.location[0]?.pointer}`);
    expect(open).toEqual([]);
    // The ruleset does check what it says: a document without operationIds breaks it.
    const stripped = JSON.parse(text) as { paths: Record<string, Record<string, { operationId?: string }>> };
    for (const ops of Object.values(stripped.paths)) for (const op of Object.values(ops)) delete op.operationId;
    const again = await lintFromString({ source: JSON.stringify(stripped), absoluteRef: "openapi.json", config });
    expect(again.some((p) => p.ruleId === "operation-operationId" && p.severity === "error")).toBe(true);
  });

  it("is valid OpenAPI 3.1 to an independent parser, with every $ref resolved", async () => {
    const result = await validateOpenApi(structuredClone(doc) as never);
    expect(result.valid ? [] : result.errors.map((e) => e.message)).toEqual([]);
    expect(result.specification).toBe("OpenAPI");
  });

  it("the answer check matches answers to operations by method and path template, and catches a wrong shape", () => {
    const checker = answerChecker(doc as never);
    const body = (value: unknown) => Buffer.from(JSON.stringify(value));
    // A JSON answer of the wrong shape is caught, naming the operation.
    expect(checker.check("GET", "/api/v1/datasets", 200, "application/json", body({ items: 5 }))).toMatch(
      /GET \/api\/v1\/datasets → 200: body does not match \/api\/v1\/datasets 200/,
    );
    // A status the operation does not declare.
    expect(checker.check("GET", "/api/v1/catalog", 418, "application/json", body({}))).toMatch(/status 418 is not declared/);
    // A content type it does not declare.
    expect(checker.check("GET", "/api/v1/catalog", 200, "text/html", Buffer.from("<p>"))).toMatch(/answered text\/html/);
    // Templates: a concrete path finds its operation, and a problem answer is checked against the problem schema.
    expect(
      checker.check(
        "GET",
        "/api/v1/datasets/tb-x/versions/1.0.0/schema",
        404,
        "application/problem+json",
        body({ type: "about:blank", title: "Not found", status: 404 }),
      ),
    ).toBeNull();
    expect(
      checker.check("GET", "/api/v1/datasets/tb-x/versions/1.0.0/schema", 404, "application/problem+json", body({ status: "404" })),
    ).toMatch(/body does not match/);
    expect(checker.operations.length).toBeGreaterThan(60);
  });
});
