import type { RequestHandler } from "express";
import type { Role } from "@/schemas/account";
import { forbidden, unauthorized } from "@/server/errors";
import { guard, sessionOrToken } from "@/server/openapi/security";

export function currentUser(req: Express.Request): Express.User {
  if (!req.user) throw unauthorized();
  return req.user;
}

export const requireUser: RequestHandler = guard(sessionOrToken, (req, _res, next) => next(req.user ? undefined : unauthorized()));

/** Only these roles; admins pass every role check. */
export function requireRole(...roles: Role[]): RequestHandler {
  return guard(sessionOrToken, (req, _res, next) => {
    if (!req.user) return next(unauthorized());
    if (req.user.role !== "admin" && !roles.includes(req.user.role)) {
      return next(forbidden(`This needs the ${roles.join(" or ")} role; you are signed in as ${req.user.role}.`));
    }
    next();
  });
}

/** Writes need a session or a write-scoped token. */
export const requireWriteScope: RequestHandler = guard(sessionOrToken, (req, _res, next) => {
  if (!req.user) return next(unauthorized());
  if (req.auth?.scope !== "write") return next(forbidden("This token is read-only; make a write token to change data."));
  next();
});
