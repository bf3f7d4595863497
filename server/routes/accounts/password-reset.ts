import { Router } from "express";
import { checkEmail, emailOnlyBody, resetPasswordBody } from "@/schemas/account";
import type { AuthLimiters } from "@/server/auth/rate-limits";
import type { AppContext } from "@/server/context";
import { problemResponses } from "@/server/openapi/registry";
import { requestPasswordReset, resetPassword } from "@/server/services/accounts/password-reset";
import { parseBody } from "@/server/validate";

export function passwordResetRoutes(ctx: AppContext, limiters: AuthLimiters): Router {
  const router = Router();
  const { registry } = ctx;

  registry.registerPath({
    method: "post",
    path: "/api/v1/password-reset",
    tags: ["Accounts"],
    summary: "E-mail a single-use link (valid one hour) to set a new password",
    description: "The answer is the same whether or not the address has an account.",
    request: { body: { content: { "application/json": { schema: emailOnlyBody } } } },
    responses: { 202: { description: "Check your e-mail", content: { "application/json": { schema: checkEmail } } }, ...problemResponses(400, 429) },
  });
  router.post("/password-reset", ...limiters.emailLinks, async (req, res) => {
    const { email } = parseBody(emailOnlyBody, req);
    res.status(202).json(await requestPasswordReset(ctx, email));
  });

  registry.registerPath({
    method: "post",
    path: "/api/v1/password-reset/confirm",
    tags: ["Accounts"],
    summary: "Set a new password with the e-mailed link; every session of the account ends and its API tokens are revoked",
    request: { body: { content: { "application/json": { schema: resetPasswordBody } } } },
    responses: { 204: { description: "Password changed; sign in with it" }, ...problemResponses(400), 410: { description: "The link is unknown, used or expired" } },
  });
  router.post("/password-reset/confirm", async (req, res) => {
    const body = parseBody(resetPasswordBody, req);
    await resetPassword(ctx, body.token, body.password, body.revokeApiTokens !== false);
    res.status(204).end();
  });

  return router;
}
