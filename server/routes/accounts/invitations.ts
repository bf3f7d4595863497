import { Router } from "express";
import { acceptInvitationBody, invitationPreview, me, tokenBody } from "@/schemas/account";
import type { AppContext } from "@/server/context";
import { problemResponses } from "@/server/openapi/registry";
import { acceptInvitation, previewInvitation } from "@/server/services/accounts/invitations";
import { meOf } from "@/server/services/users";
import { parseBody } from "@/server/validate";

/** The invitee's side of an invitation; sending one is an admin route. */
export function invitationRoutes(ctx: AppContext): Router {
  const router = Router();
  const { registry, db } = ctx;

  registry.registerPath({
    method: "post",
    path: "/api/v1/invitations/preview",
    tags: ["Accounts"],
    summary: "Whom an invitation link is for, and with which role (does not use the link)",
    request: { body: { content: { "application/json": { schema: tokenBody } } } },
    responses: { 200: { description: "The invitation", content: { "application/json": { schema: invitationPreview } } }, ...problemResponses(400), 410: { description: "Unknown, used or expired" } },
  });
  router.post("/invitations/preview", async (req, res) => {
    res.json(await previewInvitation(ctx, parseBody(tokenBody, req).token));
  });

  registry.registerPath({
    method: "post",
    path: "/api/v1/invitations/accept",
    tags: ["Accounts"],
    summary: "Accept an invitation: choose a name and password; the account gets the invited role and is confirmed",
    request: { body: { content: { "application/json": { schema: acceptInvitationBody } } } },
    responses: {
      201: { description: "The new account (sign in next)", content: { "application/json": { schema: me } } },
      ...problemResponses(400, 409),
      410: { description: "Unknown, used or expired" },
    },
  });
  router.post("/invitations/accept", async (req, res) => {
    const user = await acceptInvitation(ctx, parseBody(acceptInvitationBody, req));
    res.status(201).json(await meOf(db, user.id));
  });

  return router;
}
