import type { Router } from "express";
import { acceptInvitationBody, invitationPreview, me, tokenBody } from "@/schemas/account";
import type { AppContext } from "@/server/context";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponse, problemResponses } from "@/server/openapi/registry";
import { acceptInvitation, previewInvitation } from "@/server/services/accounts/invitations";
import { meOf } from "@/server/services/users";

/** The invitee's side of an invitation; sending one is an admin route. */
export function invitationRoutes(ctx: AppContext): Router {
  const { db } = ctx;
  const { router, defineRoute } = routeModule(ctx.registry);

  defineRoute(
    {
      method: "post",
      path: "/api/v1/invitations/preview",
      operationId: "previewInvitation",
      tags: ["Accounts"],
      summary: "Whom an invitation link is for, and with which role (does not use the link)",
      body: { json: tokenBody },
      responses: {
        200: { description: "The invitation", content: { "application/json": { schema: invitationPreview } } },
        ...problemResponses(400),
        ...problemResponse(410, "Unknown, used or expired"),
      },
    },
    async ({ body }, _req, res) => {
      res.json(await previewInvitation(ctx, body.token));
    },
  );

  defineRoute(
    {
      method: "post",
      path: "/api/v1/invitations/accept",
      operationId: "acceptInvitation",
      tags: ["Accounts"],
      summary: "Accept an invitation: choose a name and password; the account gets the invited role and is confirmed",
      body: { json: acceptInvitationBody },
      responses: {
        201: { description: "The new account (sign in next)", content: { "application/json": { schema: me } } },
        ...problemResponses(400, 409),
        ...problemResponse(410, "Unknown, used or expired"),
      },
    },
    async ({ body }, _req, res) => {
      const user = await acceptInvitation(ctx, body);
      res.status(201).json(await meOf(db, user.id));
    },
  );

  return router;
}
