import { Router, type RequestHandler } from "express";
import { z } from "zod";
import {
  adminUser,
  adminUserList,
  invitationBody,
  invitationEntry,
  invitationList,
  outboxList,
  outboxMessage,
  roleChangeBody,
  roleChangeList,
} from "@/schemas/account";
import { currentUser, requireRole, requireWriteScope } from "@/server/auth/guards";
import { outboxScreenAvailable } from "@/server/config";
import type { AppContext } from "@/server/context";
import { notFound } from "@/server/errors";
import { problemResponses } from "@/server/openapi/registry";
import { changeRole, listRoleChanges, listUsers } from "@/server/services/accounts/admin-users";
import { inviteUser, listOpenInvitations } from "@/server/services/accounts/invitations";
import { listOutbox, outboxMessageById } from "@/server/services/accounts/outbox";
import { parseBody, parseParams } from "@/server/validate";

const idParams = z.object({ id: z.uuid() });
const adminOnly = requireRole("admin");
const security: Record<string, string[]>[] = [{ sessionCookie: [] }, { bearerToken: [] }];

/** People & roles, invitations and (where mail is kept rather than sent) the outbox. Admins only. */
export function adminRoutes(ctx: AppContext): Router {
  const router = Router();
  const { registry } = ctx;

  registry.registerPath({
    method: "get",
    path: "/api/v1/admin/users",
    tags: ["Admin"],
    summary: "Everyone with an account, with e-mail and role",
    security,
    responses: { 200: { description: "Users", content: { "application/json": { schema: adminUserList } } }, ...problemResponses(401, 403) },
  });
  router.get("/admin/users", adminOnly, async (_req, res) => {
    res.set("Cache-Control", "private, no-store").json({ items: await listUsers(ctx) });
  });

  registry.registerPath({
    method: "patch",
    path: "/api/v1/admin/users/{id}",
    tags: ["Admin"],
    summary: "Change a user's role (recorded in the role-change log)",
    security,
    request: { params: idParams, body: { content: { "application/json": { schema: roleChangeBody } } } },
    responses: { 200: { description: "The user", content: { "application/json": { schema: adminUser } } }, ...problemResponses(400, 401, 403, 404, 409) },
  });
  router.patch("/admin/users/:id", adminOnly, requireWriteScope, async (req, res) => {
    const { id } = parseParams(idParams, req);
    const { role } = parseBody(roleChangeBody, req);
    res.json(await changeRole(ctx, currentUser(req), id, role));
  });

  registry.registerPath({
    method: "get",
    path: "/api/v1/admin/role-changes",
    tags: ["Admin"],
    summary: "Who changed whose role, and when (newest first)",
    security,
    responses: { 200: { description: "Role changes", content: { "application/json": { schema: roleChangeList } } }, ...problemResponses(401, 403) },
  });
  router.get("/admin/role-changes", adminOnly, async (_req, res) => {
    res.set("Cache-Control", "private, no-store").json({ items: await listRoleChanges(ctx) });
  });

  registry.registerPath({
    method: "get",
    path: "/api/v1/admin/invitations",
    tags: ["Admin"],
    summary: "Invitations not yet accepted",
    security,
    responses: { 200: { description: "Open invitations", content: { "application/json": { schema: invitationList } } }, ...problemResponses(401, 403) },
  });
  router.get("/admin/invitations", adminOnly, async (_req, res) => {
    res.set("Cache-Control", "private, no-store").json({ items: await listOpenInvitations(ctx), outboxAvailable: outboxScreenAvailable(ctx.config) });
  });

  registry.registerPath({
    method: "post",
    path: "/api/v1/admin/invitations",
    tags: ["Admin"],
    summary: "Invite someone by e-mail as a curator, reviewer or admin",
    security,
    request: { body: { content: { "application/json": { schema: invitationBody } } } },
    responses: { 201: { description: "Invitation sent", content: { "application/json": { schema: invitationEntry } } }, ...problemResponses(400, 401, 403, 409) },
  });
  router.post("/admin/invitations", adminOnly, requireWriteScope, async (req, res) => {
    res.status(201).json(await inviteUser(ctx, currentUser(req), parseBody(invitationBody, req)));
  });

  // The outbox screen exists only where mail is kept rather than sent (development, or production that opted into
  // PLOTBANK_MAIL_OUTBOX_ONLY); where mail goes out by SMTP the route is simply absent.
  const outboxOnly: RequestHandler = (_req, _res, next) => next(outboxScreenAvailable(ctx.config) ? undefined : notFound());

  registry.registerPath({
    method: "get",
    path: "/api/v1/admin/outbox",
    tags: ["Admin"],
    summary: "Where mail is not sent (development, outbox-only): every message the app has recorded",
    security,
    responses: { 200: { description: "Messages, newest first", content: { "application/json": { schema: outboxList } } }, ...problemResponses(401, 403, 404) },
  });
  router.get("/admin/outbox", outboxOnly, adminOnly, async (_req, res) => {
    res.set("Cache-Control", "private, no-store").json({ items: await listOutbox(ctx) });
  });

  registry.registerPath({
    method: "get",
    path: "/api/v1/admin/outbox/{id}",
    tags: ["Admin"],
    summary: "Where mail is not sent (development, outbox-only): one message, with its links",
    security,
    request: { params: idParams },
    responses: { 200: { description: "The message", content: { "application/json": { schema: outboxMessage } } }, ...problemResponses(401, 403, 404) },
  });
  router.get("/admin/outbox/:id", outboxOnly, adminOnly, async (req, res) => {
    const { id } = parseParams(idParams, req);
    res.set("Cache-Control", "private, no-store").json(await outboxMessageById(ctx, id));
  });

  return router;
}
