import { Router, type RequestHandler } from "express";
import { z } from "zod";
import { followList, followState, me, profilePatch } from "@/schemas/account";
import { currentUser, requireUser, requireWriteScope } from "@/server/auth/guards";
import type { AuthLimiters } from "@/server/auth/rate-limits";
import { sessionCookieName } from "@/server/auth/sessions";
import type { AppContext } from "@/server/context";
import { problemResponses } from "@/server/openapi/registry";
import { follow, listFollows, unfollow } from "@/server/services/accounts/follows";
import { updateProfile } from "@/server/services/accounts/profile";
import { meOf } from "@/server/services/users";
import { parseBody, parseParams } from "@/server/validate";

const slugParams = z.object({ slug: z.string().min(1).max(120) });
const signedIn: Record<string, string[]>[] = [{ sessionCookie: [] }, { bearerToken: [] }];

/** The signed-in user's own account: profile, password and the datasets they follow. */
export function profileRoutes(ctx: AppContext, limiters: AuthLimiters): Router {
  const router = Router();
  const { registry, db } = ctx;

  registry.registerPath({
    method: "get",
    path: "/api/v1/account",
    tags: ["Accounts"],
    summary: "Your profile",
    security: signedIn,
    responses: { 200: { description: "Your profile", content: { "application/json": { schema: me } } }, ...problemResponses(401) },
  });
  router.get("/account", requireUser, async (req, res) => {
    res.set("Cache-Control", "private, no-store").json(await meOf(db, currentUser(req).id));
  });

  registry.registerPath({
    method: "patch",
    path: "/api/v1/account",
    tags: ["Accounts"],
    summary: "Change your name, or your password (with the current one; other sessions end and API tokens are revoked)",
    description: "Role and e-mail confirmation cannot be changed here; such fields are ignored.",
    security: signedIn,
    request: { body: { content: { "application/json": { schema: profilePatch } } } },
    responses: { 200: { description: "The updated profile", content: { "application/json": { schema: me } } }, ...problemResponses(400, 401, 403, 429) },
  });
  // Only a request with a password in it can guess one; only a refused one counts.
  const passwordGuard = limiters.currentPassword.map((limit): RequestHandler => (req, res, next) =>
    (req.body as { currentPassword?: unknown } | undefined)?.currentPassword === undefined ? next() : limit(req, res, next),
  );
  router.patch("/account", requireWriteScope, ...passwordGuard, async (req, res) => {
    const patch = parseBody(profilePatch, req);
    const secret = (req.cookies as Record<string, string> | undefined)?.[sessionCookieName];
    res.json(await updateProfile(ctx, currentUser(req).id, patch, req.auth?.via === "session" ? secret : undefined));
  });

  registry.registerPath({
    method: "get",
    path: "/api/v1/account/follows",
    tags: ["Accounts"],
    summary: "Datasets you follow (you are e-mailed when a new version is published)",
    security: signedIn,
    responses: { 200: { description: "Followed datasets", content: { "application/json": { schema: followList } } }, ...problemResponses(401) },
  });
  router.get("/account/follows", requireUser, async (req, res) => {
    res.set("Cache-Control", "private, no-store").json(await listFollows(ctx, currentUser(req).id));
  });

  registry.registerPath({
    method: "post",
    path: "/api/v1/datasets/{slug}/follow",
    tags: ["Accounts"],
    summary: "Follow a published dataset",
    security: signedIn,
    request: { params: slugParams },
    responses: { 200: { description: "Following", content: { "application/json": { schema: followState } } }, ...problemResponses(401, 403, 404) },
  });
  router.post("/datasets/:slug/follow", requireWriteScope, async (req, res) => {
    const { slug } = parseParams(slugParams, req);
    res.json(await follow(ctx, currentUser(req).id, slug));
  });

  registry.registerPath({
    method: "delete",
    path: "/api/v1/datasets/{slug}/follow",
    tags: ["Accounts"],
    summary: "Stop following a dataset",
    security: signedIn,
    request: { params: slugParams },
    responses: { 200: { description: "Not following", content: { "application/json": { schema: followState } } }, ...problemResponses(401, 403) },
  });
  router.delete("/datasets/:slug/follow", requireWriteScope, async (req, res) => {
    const { slug } = parseParams(slugParams, req);
    res.json(await unfollow(ctx, currentUser(req).id, slug));
  });

  return router;
}
