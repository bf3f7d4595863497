import type { ResponseConfig, RouteConfig, ZodContentObject } from "@asteasolutions/zod-to-openapi";
import { Router, type Request, type RequestHandler, type Response } from "express";
import type { z } from "zod";
import { rateLimitExempt } from "@/server/rate-limit";
import { parseBody, parseParams, parseQuery } from "@/server/validate";
import { problemResponses, type Registry } from "./registry";
import { securityOf } from "./security";

/** Every API path starts here; the routers are mounted at it. */
const apiBase = "/api/v1";

type Method = "get" | "post" | "put" | "patch" | "delete";
export type Responses = Record<number, ResponseConfig>;
type Infer<T> = T extends z.ZodType ? z.output<T> : undefined;

/** The request as parsed: handlers take these and never read req.params, req.query or req.body themselves. */
interface ParsedRequest<P, Q, B> {
  params: Infer<P>;
  query: Infer<Q>;
  body: Infer<B>;
}

export interface RouteSpec<P extends z.ZodObject | undefined, Q extends z.ZodObject | undefined, B extends z.ZodType | undefined> {
  method: Method;
  /** The OpenAPI path, `/api/v1/datasets/{slug}`; the Express path (`/datasets/:slug`) is derived from it. */
  path: `${typeof apiBase}/${string}`;
  /** Unique across the API: code generators name their functions after it. */
  operationId: string;
  tags: string[];
  summary: string;
  description?: string;
  /** Run in order before the handler. Guards among them (see ./security) decide the operation's declared security. */
  guards?: RequestHandler[];
  /** Path parameters; a value that does not parse is a 404 naming it. */
  params?: P;
  /** Query parameters; a value that does not parse is a 400 naming it. Without a schema the query is not read. */
  query?: Q;
  /**
   * `json`: an application/json body, parsed (a 400 names each bad field). `stream`: a body in other media types
   * (CSV, multipart) that the handler reads from the request as a stream; it is documented, not parsed here.
   */
  body?: { json: B } | { stream: ZodContentObject; description?: string };
  responses: Responses;
}

export type RouteHandler<P, Q, B> = (input: ParsedRequest<P, Q, B>, req: Request, res: Response) => unknown;

const definedRoute = Symbol("plotbank.definedRoute");

/** Whether an Express route handler was made by defineRoute (the authorization matrix refuses any that was not). */
export const isDefinedRoute = (handle: unknown): boolean => typeof handle === "function" && definedRoute in handle;

const headerRef = (name: string) => ({ $ref: `#/components/headers/${name}` });
/** Set by express-rate-limit on every answer of a limited route; the components are registered with the registry. */
const rateLimitHeaders = { RateLimit: headerRef("RateLimit"), "RateLimit-Policy": headerRef("RateLimit-Policy") };
const retryAfterHeader = { "Retry-After": headerRef("Retry-After") };

/** Every response of a rate-limited operation carries the RateLimit headers; its 429 also Retry-After. */
function withRateLimitHeaders(responses: Responses): Responses {
  const all: Responses = { ...problemResponses(429), ...responses };
  return Object.fromEntries(
    Object.entries(all).map(([status, r]) => [
      status,
      { ...r, headers: { ...(r.headers as object | undefined), ...rateLimitHeaders, ...(status === "429" ? retryAfterHeader : {}) } },
    ]),
  );
}

/** `/api/v1/datasets/{slug}/resources/{resource}.csv` → `/datasets/:slug/resources/:resource.csv` */
const expressPath = (openApiPath: string) => openApiPath.slice(apiBase.length).replace(/\{(\w+)\}/g, ":$1");

/**
 * One API operation, written once: its OpenAPI description (path, operationId, security from its guards, request
 * parts, responses with their rate-limit headers) is registered, and the same request schemas parse the request
 * before the handler runs, in the order path (404), query (400), body (400). Whatever the handler or a guard throws
 * goes to the problem middleware. A route file takes `const { router, defineRoute } = routeModule(registry)` and returns the router.
 */
export function routeModule(registry: Registry) {
  const router = Router();
  function defineRoute<
    P extends z.ZodObject | undefined = undefined,
    Q extends z.ZodObject | undefined = undefined,
    B extends z.ZodType | undefined = undefined,
  >(spec: RouteSpec<P, Q, B>, handler: RouteHandler<P, Q, B>): void {
    if (!spec.path.startsWith(`${apiBase}/`)) throw new Error(`${spec.operationId}: the path must start with ${apiBase}/`);
    if (registry.definitions.some((d) => d.type === "route" && d.route.operationId === spec.operationId)) {
      throw new Error(`operationId ${spec.operationId} is already defined`);
    }
    const path = expressPath(spec.path);
    const guards = spec.guards ?? [];
    const json = spec.body && "json" in spec.body ? spec.body.json : undefined;
    const body =
      spec.body && "stream" in spec.body
        ? { description: spec.body.description, content: spec.body.stream }
        : json
          ? { content: { "application/json": { schema: json } } }
          : undefined;
    // The answers the shared parts can give before or after the handler, declared on every operation that can meet
    // them: a path, query or body value that is refused (400, e.g. a control character in a path segment), a
    // credential that is sent but invalid, revoked or expired (401, on any operation), the cross-site guard on writes
    // (403), the body's size and media type (413, 415) and the error handler (500).
    const write = spec.method !== "get";
    const parsed = spec.params || spec.query || body;
    const shared = problemResponses(...(parsed ? [400] : []), 401, ...(write ? [403] : []), ...(body ? [413, 415] : []), 500);
    const route: RouteConfig = {
      method: spec.method,
      path: spec.path,
      operationId: spec.operationId,
      tags: spec.tags,
      summary: spec.summary,
      ...(spec.description ? { description: spec.description } : {}),
      security: securityOf(guards),
      request: { ...(spec.params ? { params: spec.params } : {}), ...(spec.query ? { query: spec.query } : {}), ...(body ? { body } : {}) },
      responses: rateLimitExempt.has(path) ? { ...shared, ...spec.responses } : withRateLimitHeaders({ ...shared, ...spec.responses }),
    };
    registry.registerPath(route);

    const handle: RequestHandler = async (req, res, next) => {
      try {
        const input = {
          params: spec.params ? parseParams(spec.params, req) : undefined,
          query: spec.query ? parseQuery(spec.query, req) : undefined,
          body: json ? parseBody(json, req) : undefined,
        } as ParsedRequest<P, Q, B>;
        await handler(input, req, res);
      } catch (error) {
        next(error);
      }
    };
    Object.defineProperty(handle, definedRoute, { value: spec.operationId });
    router[spec.method](path, ...guards, handle);
  }
  return { router, defineRoute };
}
