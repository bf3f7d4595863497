import type { Router, RequestHandler } from "express";
import { z } from "zod";
import { followList, followState, me, profilePatch } from "@/schemas/account";
import { currentUser, requireUser, requireWriteScope } from "@/server/auth/guards";
import type { AuthLimiters } from "@/server/auth/rate-limits";
import { sessionCookieName } from "@/server/auth/sessions";
import type { AppContext } from "@/server/context";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponses } from "@/server/openapi/registry";
import { follow, listFollows, unfollow } from "@/server/services/accounts/follows";
import { updateProfile } from "@/server/services/accounts/profile";
import { meOf } from "@/server/services/users";

const slugParams = z.object({ slug: z.string().min(1).max(120) });

/** The signed-in user's own account: profile, password and the datasets they follow. */
export function profileRoutes(ctx: AppContext, limiters: AuthLimiters): Router {
  const { db } = ctx;
  const { router, defineRoute } = routeModule(ctx.registry);
  // Only a request with a password in it can guess one; only a refused one counts.
  const passwordGuard = limiters.currentPassword.map(
    (limit): RequestHandler =>
      (req, res, next) =>
        (req.body as { currentPassword?: unknown } | undefined)?.currentPassword === undefined ? next() : limit(req, res, next),
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/account",
      operationId: "getAccount",
      tags: ["Accounts"],
      summary: "Your profile",
      guards: [requireUser],
      responses: { 200: { description: "Your profile", content: { "application/json": { schema: me } } }, ...problemResponses(401) },
    },
    async (_input, req, res) => {
      res.set("Cache-Control", "private, no-store").json(await meOf(db, currentUser(req).id));
    },
  );

  defineRoute(
    {
      method: "patch",
      path: "/api/v1/account",
      operationId: "updateAccount",
      tags: ["Accounts"],
      summary: "Change your name, or your password (with the current one; other sessions end and API tokens are revoked)",
      description: "Role and e-mail confirmation cannot be changed here; such fields are ignored.",
      guards: [requireWriteScope, ...passwordGuard],
      body: { json: profilePatch },
      responses: {
        200: { description: "The updated profile", content: { "application/json": { schema: me } } },
        ...problemResponses(400, 401, 403, 429),
      },
    },
    async ({ body: patch }, req, res) => {
      const secret = (req.cookies as Record<string, string> | undefined)?.[sessionCookieName];
      res.json(await updateProfile(ctx, currentUser(req).id, patch, req.auth?.via === "session" ? secret : undefined));
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/account/follows",
      operationId: "listFollows",
      tags: ["Accounts"],
      summary: "Datasets you follow (you are e-mailed when a new version is published)",
      guards: [requireUser],
      responses: {
        200: { description: "Followed datasets", content: { "application/json": { schema: followList } } },
        ...problemResponses(401),
      },
    },
    async (_input, req, res) => {
      res.set("Cache-Control", "private, no-store").json(await listFollows(ctx, currentUser(req).id));
    },
  );

  defineRoute(
    {
      method: "post",
      path: "/api/v1/datasets/{slug}/follow",
      operationId: "followDataset",
      tags: ["Accounts"],
      summary: "Follow a published dataset",
      guards: [requireWriteScope],
      params: slugParams,
      responses: {
        200: { description: "Following", content: { "application/json": { schema: followState } } },
        ...problemResponses(401, 403, 404),
      },
    },
    async ({ params: { slug } }, req, res) => {
      res.json(await follow(ctx, currentUser(req).id, slug));
    },
  );

  defineRoute(
    {
      method: "delete",
      path: "/api/v1/datasets/{slug}/follow",
      operationId: "unfollowDataset",
      tags: ["Accounts"],
      summary: "Stop following a dataset",
      guards: [requireWriteScope],
      params: slugParams,
      responses: {
        200: { description: "Not following", content: { "application/json": { schema: followState } } },
        ...problemResponses(401, 403),
      },
    },
    async ({ params: { slug } }, req, res) => {
      res.json(await unfollow(ctx, currentUser(req).id, slug));
    },
  );

  return router;
}
