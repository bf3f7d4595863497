import type { Request, RequestHandler } from "express";
import { ipKeyGenerator, rateLimit } from "express-rate-limit";
import type { AppConfig } from "./config";
import type { RateLimitStores } from "./rate-limit-store";
import { HttpProblem } from "./errors";

/** Health checks and the OpenAPI document are never limited: monitors and code generators poll them. */
export const rateLimitExempt = new Set(["/health", "/health/ready", "/openapi.json"]);

const readMethods = new Set(["GET", "HEAD", "OPTIONS"]);

function tooMany(who: string): RequestHandler {
  return (_req, res, next) => {
    // express-rate-limit has set Retry-After (seconds) and the RateLimit headers before calling this.
    const retryAfter = Number(res.getHeader("Retry-After") ?? 60);
    next(
      new HttpProblem(429, "Too many requests", `Over the ${who} rate limit. Wait ${retryAfter} s and try again.`, {
        retryAfter,
      }),
    );
  };
}

/**
 * The web app's dataset pages read the database to put the dataset's title and JSON-LD into the HTML: they share the
 * anonymous per-address quota's size, with counters of their own.
 */
export function pageRateLimit(
  config: Pick<AppConfig, "anonRatePerMinute" | "rateWindowMs">,
  stores: RateLimitStores = () => undefined,
): RequestHandler {
  return rateLimit({
    store: stores("pages"),
    windowMs: config.rateWindowMs,
    limit: config.anonRatePerMinute,
    standardHeaders: "draft-8",
    legacyHeaders: false,
    identifier: "pages",
    keyGenerator: (req) => `ip:${ipKeyGenerator(req.ip ?? "")}`,
    handler: tooMany("page"),
  });
}

/** Which quota a request counts against, and under which key: the one place that decides who is counted how. */
type QuotaClass = "anonymous" | "app" | "client";

function quotaClass(req: Request): QuotaClass {
  if (req.user) return "client";
  if (req.appBrowser) return "app";
  return "anonymous";
}

function quotaKey(req: Request): string {
  switch (quotaClass(req)) {
    case "client":
      return req.auth?.via === "token" && req.auth.tokenId ? `token:${req.auth.tokenId}` : `user:${req.user!.id}`;
    case "app":
      return `app:${req.appBrowser!.id}`;
    case "anonymous":
      return `ip:${ipKeyGenerator(req.ip ?? "")}`;
  }
}

/**
 * Per-client API quotas: a low one per address for anonymous callers (scripts without a token), one per browser for
 * the web app's own requests (its signed app cookie, server/auth/app-cookie.ts), and a higher one per token (or per
 * signed-in user for the web app's session). Headers follow the IETF RateLimit draft 8 on every answer. A 304 does
 * not count: `skipSuccessfulRequests` with "success" meaning exactly a 304 gives back the hit once the answer is sent.
 */
export function apiRateLimits(
  config: Pick<AppConfig, "anonRatePerMinute" | "tokenRatePerMinute" | "appRatePerMinute" | "rateWindowMs">,
  stores: RateLimitStores = () => undefined,
): RequestHandler[] {
  const common = {
    windowMs: config.rateWindowMs,
    standardHeaders: "draft-8" as const,
    legacyHeaders: false,
    skipSuccessfulRequests: true,
    requestWasSuccessful: (_req: Request, res: { statusCode: number }) => res.statusCode === 304,
    keyGenerator: quotaKey,
  };
  return [
    rateLimit({
      ...common,
      identifier: "anonymous",
      store: stores("anonymous"),
      limit: config.anonRatePerMinute,
      // Anonymous writes are sign-in, sign-up and resets, which have their own tighter limits; a spent read quota
      // must not stop someone from signing in to get the higher one.
      skip: (req) => rateLimitExempt.has(req.path) || quotaClass(req) !== "anonymous" || !readMethods.has(req.method),
      handler: tooMany("anonymous"),
    }),
    rateLimit({
      ...common,
      identifier: "app",
      store: stores("app"),
      limit: config.appRatePerMinute,
      skip: (req) => rateLimitExempt.has(req.path) || quotaClass(req) !== "app" || !readMethods.has(req.method),
      handler: tooMany("web app's per-browser"),
    }),
    rateLimit({
      ...common,
      identifier: "client",
      store: stores("client"),
      limit: config.tokenRatePerMinute,
      skip: (req) => rateLimitExempt.has(req.path) || quotaClass(req) !== "client",
      handler: tooMany("per-client"),
    }),
  ];
}
