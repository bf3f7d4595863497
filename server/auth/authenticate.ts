import { and, eq, isNull } from "drizzle-orm";
import type { RequestHandler } from "express";
import type { Db } from "@/db/client";
import { apiTokens, users } from "@/db/schema";
import { unauthorized } from "@/server/errors";
import { sessionCookieName, sessionUserId } from "./sessions";
import { sha256Hex } from "./secrets";

async function loadUser(db: Db, id: string): Promise<Express.User | null> {
  const [user] = await db
    .select({ id: users.id, email: users.email, displayName: users.displayName, role: users.role })
    .from(users)
    .where(and(eq(users.id, id), isNull(users.disabledAt)));
  return user ?? null;
}

/** The user and scope of a live API token, or null for an unknown, revoked or expired one (or a disabled owner). */
async function tokenUser(db: Db, secret: string): Promise<{ user: Express.User; scope: "read" | "write"; tokenId: string } | null> {
  const [token] = await db
    .select()
    .from(apiTokens)
    .where(eq(apiTokens.tokenHash, sha256Hex(secret)));
  if (!token || token.revokedAt || (token.expiresAt && token.expiresAt.getTime() <= Date.now())) return null;
  const user = await loadUser(db, token.userId);
  if (!user) return null;
  // A write-scoped token is only as strong as its owner's role allows; routes check the role too.
  await db.update(apiTokens).set({ lastUsedAt: new Date() }).where(eq(apiTokens.id, token.id));
  return { user, scope: token.scope, tokenId: token.id };
}

/**
 * Who is calling: an API token (Authorization: Bearer, RFC 6750) or the web app's session cookie. A bad token is
 * refused at once with 401 rather than treated as anonymous, so a revoked or expired token never silently loses its
 * rights. Both are looked up here directly: the header is one regular expression, and sign-in and sessions are
 * Plotbank's own, so no authentication framework sits in between.
 */
export function authenticate(db: Db): RequestHandler {
  return async (req, _res, next) => {
    const header = req.headers.authorization;
    if (header) {
      const bearer = /^Bearer\s+(\S+)$/i.exec(header);
      if (!bearer) return next(unauthorized("The Authorization header must be `Bearer <token>`."));
      const found = await tokenUser(db, bearer[1]!);
      if (!found) return next(unauthorized("The API token is unknown, revoked or expired."));
      req.user = found.user;
      req.auth = { via: "token", scope: found.scope, tokenId: found.tokenId };
      return next();
    }
    const secret = (req.cookies as Record<string, string> | undefined)?.[sessionCookieName];
    if (secret) {
      const userId = await sessionUserId(db, secret);
      const user = userId ? await loadUser(db, userId) : null;
      if (user) {
        req.user = user;
        req.auth = { via: "session", scope: "write" };
      }
    }
    next();
  };
}
