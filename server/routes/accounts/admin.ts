import type { RequestHandler, Router } from "express";
import { z } from "zod";
import {
  adminUser,
  adminUserList,
  failedJobList,
  jobRetried,
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
import { routeModule } from "@/server/openapi/define-route";
import { problemResponses } from "@/server/openapi/registry";
import { changeRole, listRoleChanges, listUsers } from "@/server/services/accounts/admin-users";
import { inviteUser, listOpenInvitations } from "@/server/services/accounts/invitations";
import { listOutbox, outboxMessageById } from "@/server/services/accounts/outbox";

const idParams = z.object({ id: z.uuid() });
const jobIdParams = z.object({ id: z.string().regex(/^\d{1,19}$/, "a job id is a number") });
const adminOnly = requireRole("admin");

/** People & roles, invitations and (where mail is kept rather than sent) the outbox. Admins only. */
export function adminRoutes(ctx: AppContext): Router {
  const { router, defineRoute } = routeModule(ctx.registry);

  defineRoute(
    {
      method: "get",
      path: "/api/v1/admin/users",
      operationId: "listUsers",
      tags: ["Admin"],
      summary: "Everyone with an account, with e-mail and role",
      guards: [adminOnly],
      responses: {
        200: { description: "Users", content: { "application/json": { schema: adminUserList } } },
        ...problemResponses(401, 403),
      },
    },
    async (_input, _req, res) => {
      res.set("Cache-Control", "private, no-store").json({ items: await listUsers(ctx) });
    },
  );

  defineRoute(
    {
      method: "patch",
      path: "/api/v1/admin/users/{id}",
      operationId: "changeUserRole",
      tags: ["Admin"],
      summary: "Change a user's role (recorded in the role-change log)",
      guards: [adminOnly, requireWriteScope],
      params: idParams,
      body: { json: roleChangeBody },
      responses: {
        200: { description: "The user", content: { "application/json": { schema: adminUser } } },
        ...problemResponses(400, 401, 403, 404, 409),
      },
    },
    async ({ params: { id }, body: { role } }, req, res) => {
      res.json(await changeRole(ctx, currentUser(req), id, role));
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/admin/role-changes",
      operationId: "listRoleChanges",
      tags: ["Admin"],
      summary: "Who changed whose role, and when (newest first)",
      guards: [adminOnly],
      responses: {
        200: { description: "Role changes", content: { "application/json": { schema: roleChangeList } } },
        ...problemResponses(401, 403),
      },
    },
    async (_input, _req, res) => {
      res.set("Cache-Control", "private, no-store").json({ items: await listRoleChanges(ctx) });
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/admin/invitations",
      operationId: "listInvitations",
      tags: ["Admin"],
      summary: "Invitations not yet accepted",
      guards: [adminOnly],
      responses: {
        200: { description: "Open invitations", content: { "application/json": { schema: invitationList } } },
        ...problemResponses(401, 403),
      },
    },
    async (_input, _req, res) => {
      res
        .set("Cache-Control", "private, no-store")
        .json({ items: await listOpenInvitations(ctx), outboxAvailable: outboxScreenAvailable(ctx.config) });
    },
  );

  defineRoute(
    {
      method: "post",
      path: "/api/v1/admin/invitations",
      operationId: "createInvitation",
      tags: ["Admin"],
      summary: "Invite someone by e-mail as a curator, reviewer or admin",
      guards: [adminOnly, requireWriteScope],
      body: { json: invitationBody },
      responses: {
        201: { description: "Invitation sent", content: { "application/json": { schema: invitationEntry } } },
        ...problemResponses(400, 401, 403, 409),
      },
    },
    async ({ body }, req, res) => {
      res.status(201).json(await inviteUser(ctx, currentUser(req), body));
    },
  );

  // The outbox screen exists only where mail is kept rather than sent (development, or production that opted into
  // PLOTBANK_MAIL_OUTBOX_ONLY); where mail goes out by SMTP the route is simply absent.
  const outboxOnly: RequestHandler = (_req, _res, next) => next(outboxScreenAvailable(ctx.config) ? undefined : notFound());

  defineRoute(
    {
      method: "get",
      path: "/api/v1/admin/outbox",
      operationId: "listOutbox",
      tags: ["Admin"],
      summary: "Where mail is not sent (development, outbox-only): every message the app has recorded",
      guards: [outboxOnly, adminOnly],
      responses: {
        200: { description: "Messages, newest first", content: { "application/json": { schema: outboxList } } },
        ...problemResponses(401, 403, 404),
      },
    },
    async (_input, _req, res) => {
      res.set("Cache-Control", "private, no-store").json({ items: await listOutbox(ctx) });
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/admin/outbox/{id}",
      operationId: "getOutboxMessage",
      tags: ["Admin"],
      summary: "Where mail is not sent (development, outbox-only): one message, with its links",
      guards: [outboxOnly, adminOnly],
      params: idParams,
      responses: {
        200: { description: "The message", content: { "application/json": { schema: outboxMessage } } },
        ...problemResponses(401, 403, 404),
      },
    },
    async ({ params: { id } }, _req, res) => {
      res.set("Cache-Control", "private, no-store").json(await outboxMessageById(ctx, id));
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/admin/jobs/failed",
      operationId: "listFailedJobs",
      tags: ["Admin"],
      summary: "Background jobs (DOI registration, mail delivery) that used up their attempts, with the last error",
      guards: [adminOnly],
      responses: {
        200: { description: "Failed jobs, newest first", content: { "application/json": { schema: failedJobList } } },
        ...problemResponses(401, 403),
      },
    },
    async (_input, _req, res) => {
      const items = (await ctx.jobs.failed()).map((j) => ({ ...j, task: j.task as "doi-register" | "mail-deliver" }));
      res.set("Cache-Control", "private, no-store").json({ items });
    },
  );

  defineRoute(
    {
      method: "post",
      path: "/api/v1/admin/jobs/{id}/retry",
      operationId: "retryFailedJob",
      tags: ["Admin"],
      summary: "Send a failed background job round again, from its first attempt",
      guards: [adminOnly, requireWriteScope],
      params: jobIdParams,
      responses: {
        202: { description: "Queued again", content: { "application/json": { schema: jobRetried } } },
        ...problemResponses(401, 403, 404),
      },
    },
    async ({ params: { id } }, _req, res) => {
      if (!(await ctx.jobs.retry(id))) throw notFound("No failed job has this id (it may have been retried already).");
      res.status(202).json({ id, retried: true as const });
    },
  );

  return router;
}
