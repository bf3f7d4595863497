import type { Request, RequestHandler, Response } from "express";
import Ajv2020 from "ajv/dist/2020";
import addFormats from "ajv-formats";

/**
 * The answer check: every answer the API gives in a test is checked against what the generated OpenAPI document
 * declares for its operation (matched by method and path template), its status and its content type, and a JSON body
 * against that response's schema (JSON Schema 2020-12, as OpenAPI 3.1 has it, validated by ajv). testApp installs it
 * as the API router's first handler, so every supertest request of every server test passes through it, writes and
 * errors included; tests/support/answer-check-setup.ts fails the test that got a mismatched answer.
 */

type Json = Record<string, unknown>;
interface OpenApiDocument {
  paths: Record<string, Record<string, { responses?: Record<string, { content?: Record<string, { schema?: unknown }> }> }>>;
}

const mismatches: string[] = [];

/** Mismatches seen since the last call (the setup file calls it after each test). */
export function takeAnswerMismatches(): string[] {
  return mismatches.splice(0);
}

interface Operation {
  method: string;
  template: string;
  regex: RegExp;
  literal: number;
  responses: Record<string, { content?: Record<string, { schema?: unknown }> }>;
}

const escapePointer = (s: string) => s.replace(/~/g, "~0").replace(/\//g, "~1");

export interface AnswerChecker {
  /** Check one answer; returns the problem, or null when it matches the document. */
  check(method: string, path: string, status: number, contentType: string | undefined, body: Buffer): string | null;
  operations: Operation[];
}

export function answerChecker(doc: OpenApiDocument): AnswerChecker {
  const ajv = new Ajv2020({ strict: false, allErrors: false, validateFormats: true });
  addFormats(ajv);
  ajv.addSchema(doc as unknown as Json, "openapi.json");
  const operations: Operation[] = [];
  for (const [template, ops] of Object.entries(doc.paths)) {
    const source = template.split(/\{[^}]+\}/).map((part) => part.replace(/[.*+?^$()|[\]\\]/g, "\\$&"));
    const regex = new RegExp(`^${source.join("[^/]+")}$`);
    for (const [method, op] of Object.entries(ops)) {
      operations.push({ method: method.toUpperCase(), template, regex, literal: source.join("").length, responses: op.responses ?? {} });
    }
  }
  // The most literal template wins (…/versions/latest/schema before …/versions/{semver}/schema, were both declared).
  operations.sort((a, b) => b.literal - a.literal);
  const validators = new Map<string, ReturnType<typeof ajv.compile>>();

  return {
    operations,
    check(method, path, status, contentType, body) {
      const op = operations.find((o) => o.method === method && o.regex.test(path));
      const where = `${method} ${path} → ${status}`;
      if (!op) return null; // Not an operation (unknown /api paths answer 404 from the fallback): the contract test covers routes.
      const statusKey = [String(status), `${String(status)[0]}XX`, "default"].find((k) => op.responses[k]);
      if (!statusKey)
        return `${where}: status ${status} is not declared for ${op.method} ${op.template} (declared: ${Object.keys(op.responses).join(", ")})`;
      const declared = op.responses[statusKey]!;
      if (body.length === 0) return null;
      const type = (contentType ?? "").split(";")[0]!.trim().toLowerCase();
      if (!declared.content) return `${where}: answered ${type || "a body"} but ${op.template} declares no content for ${statusKey}`;
      const media = declared.content[type];
      if (!media)
        return `${where}: answered ${type || "no content type"}, ${op.template} declares ${Object.keys(declared.content).join(", ")} for ${statusKey}`;
      if (!/[/+]json$/.test(type) || media.schema === undefined) return null;
      const pointer = `openapi.json#/paths/${escapePointer(op.template)}/${op.method.toLowerCase()}/responses/${statusKey}/content/${escapePointer(type)}/schema`;
      let validate = validators.get(pointer);
      if (!validate) {
        validate = ajv.compile({ $ref: pointer });
        validators.set(pointer, validate);
      }
      let parsed: unknown;
      try {
        parsed = JSON.parse(body.toString("utf8"));
      } catch {
        return `${where}: ${type} body is not JSON`;
      }
      if (validate(parsed)) return null;
      const e = validate.errors?.[0];
      return `${where}: body does not match ${op.template} ${statusKey} ${type}: ${e?.instancePath || "/"} ${e?.message ?? ""} ${e ? JSON.stringify(e.params) : ""}`;
    },
  };
}

/**
 * Express middleware that records the answer's bytes as the app writes them (after the router's own handlers, before
 * compression) and checks them when the answer ends. `document` is called on the first request, once every route
 * has registered.
 */
export function answerCheckMiddleware(document: () => OpenApiDocument): RequestHandler {
  let checker: AnswerChecker | undefined;
  return (req: Request, res: Response, next) => {
    if (req.method === "HEAD" || req.method === "OPTIONS") return next();
    const chunks: Buffer[] = [];
    const write = res.write.bind(res) as (...args: unknown[]) => boolean;
    const end = res.end.bind(res) as (...args: unknown[]) => Response;
    const keep = (chunk: unknown, encoding: unknown) => {
      if (chunk === undefined || chunk === null || typeof chunk === "function") return;
      chunks.push(
        Buffer.isBuffer(chunk) ? chunk : Buffer.from(chunk as string, typeof encoding === "string" ? (encoding as BufferEncoding) : "utf8"),
      );
    };
    res.write = ((chunk: unknown, encoding?: unknown, cb?: unknown) => {
      keep(chunk, encoding);
      return write(chunk, encoding, cb);
    }) as Response["write"];
    res.end = ((chunk?: unknown, encoding?: unknown, cb?: unknown) => {
      keep(chunk, encoding);
      checker ??= answerChecker(document());
      const path = req.originalUrl.split("?")[0]!;
      const problem = checker.check(
        req.method,
        path,
        res.statusCode,
        res.getHeader("content-type") as string | undefined,
        Buffer.concat(chunks),
      );
      if (problem) mismatches.push(problem);
      return end(chunk, encoding, cb);
    }) as Response["end"];
    next();
  };
}
