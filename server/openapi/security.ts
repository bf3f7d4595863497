import type { RequestHandler } from "express";

/** One OpenAPI security requirement: scheme names (from the registry's securitySchemes) and their scopes. */
export type SecurityRequirement = Record<string, string[]>;

/** A signed-in caller: the web app's session cookie, or an API token. */
export const sessionOrToken: SecurityRequirement[] = [{ sessionCookie: [] }, { bearerToken: [] }];
/** A signed-in session only; tokens are refused. */
export const sessionOnly: SecurityRequirement[] = [{ sessionCookie: [] }];
/**
 * Anyone. The empty requirement says credentials are optional; a session or token, when sent, is still checked (a
 * revoked token is a 401) and moves the caller to the higher per-client rate limit.
 */
const optionalCredentials: SecurityRequirement[] = [{}, { sessionCookie: [] }, { bearerToken: [] }];

const admitted = new WeakMap<RequestHandler, SecurityRequirement[]>();

/** Mark a middleware as a guard that lets through only callers with one of these credentials. */
export function guard<T extends RequestHandler>(security: SecurityRequirement[], middleware: T): T {
  admitted.set(middleware, security);
  return middleware;
}

const key = (r: SecurityRequirement) =>
  JSON.stringify(
    Object.keys(r)
      .sort()
      .map((k) => [k, r[k]]),
  );

/**
 * The security an operation declares, from its middlewares: the requirements every guard admits (a session-only guard
 * with a signed-in guard admits a session only), or optional credentials when no middleware is a guard. Middlewares
 * that are not guards (rate limiters, feature gates) do not count.
 */
export function securityOf(middlewares: readonly RequestHandler[]): SecurityRequirement[] {
  let security: SecurityRequirement[] | undefined;
  for (const m of middlewares) {
    const admits = admitted.get(m);
    if (!admits) continue;
    security = security ? security.filter((r) => admits.some((a) => key(a) === key(r))) : admits;
  }
  if (security && !security.length) throw new Error("These guards admit no credential in common.");
  return security ?? optionalCredentials;
}
