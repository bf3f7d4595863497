import { and, eq, isNull } from "drizzle-orm";
import type { RequestHandler } from "express";
import passport from "passport";
import { Strategy as BearerStrategy } from "passport-http-bearer";
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

interface TokenInfo {
  scope: "read" | "write";
  tokenId: string;
}

/**
 * Who is calling: an API token (Authorization: Bearer) or the web app's session cookie. A bad token is refused at
 * once with 401 rather than treated as anonymous, so a revoked or expired token never silently loses its rights.
 */
export function authenticate(db: Db): RequestHandler {
  // One Passport per app: the default instance is process-wide, which breaks tests that build several apps.
  const authenticator = new passport.Passport();
  authenticator.use(
    new BearerStrategy(async (secret, done) => {
      try {
        const [token] = await db.select().from(apiTokens).where(eq(apiTokens.tokenHash, sha256Hex(secret)));
        if (!token || token.revokedAt || (token.expiresAt && token.expiresAt.getTime() <= Date.now())) return done(null, false);
        const user = await loadUser(db, token.userId);
        if (!user) return done(null, false);
        // A write-scoped token is only as strong as its owner's role allows; routes check the role too.
        await db.update(apiTokens).set({ lastUsedAt: new Date() }).where(eq(apiTokens.id, token.id));
        return done(null, user, { scope: token.scope, tokenId: token.id } satisfies TokenInfo as never);
      } catch (error) {
        return done(error as Error);
      }
    }),
  );

  return async (req, res, next) => {
    const header = req.headers.authorization;
    if (header) {
      if (!/^Bearer\s+\S+$/i.test(header)) return next(unauthorized("The Authorization header must be `Bearer <token>`."));
      return authenticator.authenticate("bearer", { session: false }, (err: unknown, user: Express.User | false, info: unknown) => {
        if (err) return next(err);
        if (!user) return next(unauthorized("The API token is unknown, revoked or expired."));
        const token = info as TokenInfo;
        req.user = user;
        req.auth = { via: "token", scope: token.scope, tokenId: token.tokenId };
        next();
      })(req, res, next);
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
