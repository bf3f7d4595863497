import type { Router } from "express";
import { me, sessionState, signInBody, type SessionState } from "@/schemas/account";
import type { AppContext } from "@/server/context";
import { unauthorized } from "@/server/errors";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponses } from "@/server/openapi/registry";
import { verifyPassword } from "@/server/auth/passwords";
import { createSession, endSession, sessionCookieName, sessionLifetimeMs } from "@/server/auth/sessions";
import type { AuthLimiters } from "@/server/auth/rate-limits";
import { findUserByEmail, meOf } from "@/server/services/users";

/** Sign-in, sign-out and "who am I" for the web app's cookie session. */
export function sessionRoutes({ db, registry, config }: AppContext, limiters: AuthLimiters): Router {
  const { router, defineRoute } = routeModule(registry);

  defineRoute(
    {
      method: "post",
      path: "/api/v1/session",
      operationId: "signIn",
      tags: ["Accounts"],
      summary: "Sign in with e-mail and password; sets the httpOnly session cookie",
      guards: limiters.signIn,
      body: { json: signInBody },
      responses: { 200: { description: "Signed in", content: { "application/json": { schema: me } } }, ...problemResponses(400, 401, 429) },
    },
    async ({ body }, _req, res) => {
      const user = await findUserByEmail(db, body.email);
      const ok = await verifyPassword(body.password, user?.passwordHash);
      if (!user || !ok || user.disabledAt) throw unauthorized("The e-mail or the password is wrong.");
      if (!user.emailVerifiedAt) throw unauthorized("Confirm your e-mail address first: open the link we sent you.");
      const session = await createSession(db, user.id);
      res.cookie(sessionCookieName, session.secret, {
        httpOnly: true,
        sameSite: "lax",
        secure: config.publicUrl.startsWith("https://"),
        maxAge: sessionLifetimeMs,
        path: "/",
      });
      res.json(await meOf(db, user.id));
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/session",
      operationId: "getSession",
      tags: ["Accounts"],
      summary: "Who am I: the signed-in user, or null",
      description:
        "Answers 200 to everyone: `user` is the caller's account, or null for a caller without a session or token. " +
        "A token that is revoked or expired is still refused with 401.",
      responses: {
        200: { description: "The signed-in user, or `user: null`", content: { "application/json": { schema: sessionState } } },
        ...problemResponses(401),
      },
    },
    async (_input, req, res) => {
      res.set("Cache-Control", "private, no-store");
      const answer: SessionState = { user: req.user ? await meOf(db, req.user.id) : null };
      res.json(answer);
    },
  );

  defineRoute(
    {
      method: "delete",
      path: "/api/v1/session",
      operationId: "signOut",
      tags: ["Accounts"],
      summary: "Sign out",
      responses: { 204: { description: "Signed out" } },
    },
    async (_input, req, res) => {
      const secret = (req.cookies as Record<string, string> | undefined)?.[sessionCookieName];
      if (secret) await endSession(db, secret);
      res.clearCookie(sessionCookieName, { path: "/" });
      res.status(204).end();
    },
  );

  return router;
}
