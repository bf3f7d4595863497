import type { RequestHandler } from "express";
import { ipKeyGenerator, rateLimit } from "express-rate-limit";
import type { AppConfig } from "@/server/config";
import type { RateLimitStores } from "@/server/rate-limit-store";
import { HttpProblem } from "@/server/errors";
import { normaliseEmail } from "@/server/services/users";

type Limits = AppConfig["authLimits"];

function refuse(what: string): RequestHandler {
  return (_req, res, next) => {
    // express-rate-limit has already set Retry-After (seconds); repeat it in the problem so a form can show it.
    const retryAfter = Number(res.getHeader("Retry-After") ?? 0);
    const minutes = Math.max(1, Math.ceil(retryAfter / 60));
    next(
      new HttpProblem(429, "Too many requests", `Too many ${what}. Wait ${minutes} minute${minutes === 1 ? "" : "s"} and try again.`, {
        retryAfter,
      }),
    );
  };
}

function emailKey(req: Parameters<RequestHandler>[0]): string {
  const email = (req.body as { email?: unknown } | undefined)?.email;
  return typeof email === "string" ? `email:${normaliseEmail(email)}` : "email:";
}

/**
 * Two limiters for each sensitive form: one per client address (slows a spray over many accounts) and one per
 * e-mail address (slows guessing one account's password from many addresses, and keeps a mailbox from being
 * flooded with links). Each app gets its own counters, so parallel test apps never share them.
 */
function pair(limits: Limits, what: string, onlyFailures: boolean, stores: RateLimitStores, name: string): RequestHandler[] {
  const common = {
    windowMs: limits.windowMs,
    standardHeaders: "draft-7" as const,
    legacyHeaders: false,
    skipSuccessfulRequests: onlyFailures,
    handler: refuse(what),
  };
  return [
    rateLimit({ ...common, store: stores(`${name}-ip`), limit: limits.perIp, keyGenerator: (req) => `ip:${ipKeyGenerator(req.ip ?? "")}` }),
    rateLimit({ ...common, store: stores(`${name}-email`), limit: limits.perAccount, keyGenerator: emailKey }),
  ];
}

export interface AuthLimiters {
  /** Sign-in: only failed attempts count, so people who sign in often are never slowed. */
  signIn: RequestHandler[];
  /** Requests that send an e-mail (sign-up, new verification link, password reset): every request counts. */
  emailLinks: RequestHandler[];
  /** Checks of a signed-in account's current password (changing it): failures count, per account and per IP. */
  currentPassword: RequestHandler[];
}

export function authLimiters(limits: Limits, stores: RateLimitStores = () => undefined): AuthLimiters {
  const common = {
    windowMs: limits.windowMs,
    standardHeaders: "draft-7" as const,
    legacyHeaders: false,
    skipSuccessfulRequests: true,
    handler: refuse("wrong current passwords"),
  };
  return {
    signIn: pair(limits, "sign-in attempts", true, stores, "sign-in"),
    emailLinks: pair(limits, "requests for e-mailed links", false, stores, "email-links"),
    currentPassword: [
      rateLimit({
        ...common,
        store: stores("password-ip"),
        limit: limits.perIp,
        keyGenerator: (req) => `ip:${ipKeyGenerator(req.ip ?? "")}`,
      }),
      rateLimit({
        ...common,
        store: stores("password-user"),
        limit: limits.perAccount,
        keyGenerator: (req) => `user:${req.user?.id ?? ""}`,
      }),
    ],
  };
}
