import type { Router } from "express";
import { checkEmail, emailOnlyBody, resetPasswordBody } from "@/schemas/account";
import type { AuthLimiters } from "@/server/auth/rate-limits";
import type { AppContext } from "@/server/context";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponse, problemResponses } from "@/server/openapi/registry";
import { requestPasswordReset, resetPassword } from "@/server/services/accounts/password-reset";

export function passwordResetRoutes(ctx: AppContext, limiters: AuthLimiters): Router {
  const { router, defineRoute } = routeModule(ctx.registry);

  defineRoute(
    {
      method: "post",
      path: "/api/v1/password-reset",
      operationId: "requestPasswordReset",
      tags: ["Accounts"],
      summary: "E-mail a single-use link (valid one hour) to set a new password",
      description: "The answer is the same whether or not the address has an account.",
      guards: limiters.emailLinks,
      body: { json: emailOnlyBody },
      responses: {
        202: { description: "Check your e-mail", content: { "application/json": { schema: checkEmail } } },
        ...problemResponses(400, 429),
      },
    },
    async ({ body: { email } }, _req, res) => {
      res.status(202).json(await requestPasswordReset(ctx, email));
    },
  );

  defineRoute(
    {
      method: "post",
      path: "/api/v1/password-reset/confirm",
      operationId: "confirmPasswordReset",
      tags: ["Accounts"],
      summary: "Set a new password with the e-mailed link; every session of the account ends and its API tokens are revoked",
      body: { json: resetPasswordBody },
      responses: {
        204: { description: "Password changed; sign in with it" },
        ...problemResponses(400),
        ...problemResponse(410, "The link is unknown, used or expired"),
      },
    },
    async ({ body }, _req, res) => {
      await resetPassword(ctx, body.token, body.password, body.revokeApiTokens !== false);
      res.status(204).end();
    },
  );

  return router;
}
