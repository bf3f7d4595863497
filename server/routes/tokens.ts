import type { RequestHandler, Router } from "express";
import { z } from "zod";
import { createdToken, createTokenBody, tokenList } from "@/schemas/tokens";
import { currentUser } from "@/server/auth/guards";
import type { AppContext } from "@/server/context";
import { forbidden, unauthorized } from "@/server/errors";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponses } from "@/server/openapi/registry";
import { guard, sessionOnly } from "@/server/openapi/security";
import { createToken, listTokens, revokeToken } from "@/server/services/tokens";

/** Tokens are managed from a signed-in session only: a leaked token must not be able to mint or hide others. */
const requireSession: RequestHandler = guard(sessionOnly, (req, _res, next) => {
  if (!req.user) return next(unauthorized("Sign in to manage API tokens."));
  if (req.auth?.via !== "session") return next(forbidden("API tokens are managed from a signed-in session, not with a token."));
  next();
});

const tokenParams = z.object({ id: z.uuid() });

export function tokenRoutes({ db, registry }: AppContext): Router {
  const { router, defineRoute } = routeModule(registry);

  defineRoute(
    {
      method: "post",
      path: "/api/v1/tokens",
      operationId: "createToken",
      tags: ["Tokens"],
      summary: "Make an API token; the secret is in this answer only",
      guards: [requireSession],
      body: { json: createTokenBody },
      responses: {
        201: { description: "The token and its secret (shown once)", content: { "application/json": { schema: createdToken } } },
        ...problemResponses(400, 401, 403, 429),
      },
    },
    async ({ body }, req, res) => {
      const created = await createToken(db, currentUser(req), body);
      res.status(201).set("Cache-Control", "no-store").json(created);
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/tokens",
      operationId: "listTokens",
      tags: ["Tokens"],
      summary: "Your API tokens: name, prefix, scope, dates and status (never the secret)",
      guards: [requireSession],
      responses: {
        200: { description: "Your tokens, newest first", content: { "application/json": { schema: tokenList } } },
        ...problemResponses(401, 403, 429),
      },
    },
    async (_input, req, res) => {
      res.set("Cache-Control", "no-store").json({ items: await listTokens(db, currentUser(req).id) });
    },
  );

  defineRoute(
    {
      method: "delete",
      path: "/api/v1/tokens/{id}",
      operationId: "revokeToken",
      tags: ["Tokens"],
      summary: "Revoke one of your tokens; it stops working at once",
      guards: [requireSession],
      params: tokenParams,
      responses: { 204: { description: "Revoked" }, ...problemResponses(401, 403, 404, 429) },
    },
    async ({ params: { id } }, req, res) => {
      await revokeToken(db, currentUser(req).id, id);
      res.status(204).end();
    },
  );

  return router;
}
