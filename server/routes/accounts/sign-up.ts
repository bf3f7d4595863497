import { Router } from "express";
import { checkEmail, emailOnlyBody, signUpBody, tokenBody } from "@/schemas/account";
import { z } from "zod";
import type { AuthLimiters } from "@/server/auth/rate-limits";
import type { AppContext } from "@/server/context";
import { problemResponses } from "@/server/openapi/registry";
import { resendVerification, signUp, verifyEmail } from "@/server/services/accounts/sign-up";
import { parseBody } from "@/server/validate";

const verified = z.object({ email: z.string(), verified: z.literal(true) }).meta({ id: "EmailVerified" });

/** Creating an account and confirming its e-mail address. */
export function signUpRoutes(ctx: AppContext, limiters: AuthLimiters): Router {
  const router = Router();
  const { registry } = ctx;

  registry.registerPath({
    method: "post",
    path: "/api/v1/sign-up",
    tags: ["Accounts"],
    summary: "Create a member account; a confirmation link is e-mailed",
    description: "The answer is the same whether or not the address already has an account. Fields other than e-mail, name and password are ignored.",
    request: { body: { content: { "application/json": { schema: signUpBody } } } },
    responses: { 202: { description: "Check your e-mail", content: { "application/json": { schema: checkEmail } } }, ...problemResponses(400, 429) },
  });
  router.post("/sign-up", ...limiters.emailLinks, async (req, res) => {
    res.status(202).json(await signUp(ctx, parseBody(signUpBody, req)));
  });

  registry.registerPath({
    method: "post",
    path: "/api/v1/email-verification",
    tags: ["Accounts"],
    summary: "Confirm an e-mail address with the token from the e-mailed link",
    request: { body: { content: { "application/json": { schema: tokenBody } } } },
    responses: {
      200: { description: "Confirmed; the account can sign in", content: { "application/json": { schema: verified } } },
      ...problemResponses(400),
      410: { description: "The link is unknown, used or expired" },
    },
  });
  router.post("/email-verification", async (req, res) => {
    const { token } = parseBody(tokenBody, req);
    const { email } = await verifyEmail(ctx, token);
    res.json({ email, verified: true });
  });

  registry.registerPath({
    method: "post",
    path: "/api/v1/email-verification/resend",
    tags: ["Accounts"],
    summary: "Send a new confirmation link to an unconfirmed address",
    request: { body: { content: { "application/json": { schema: emailOnlyBody } } } },
    responses: { 202: { description: "Check your e-mail", content: { "application/json": { schema: checkEmail } } }, ...problemResponses(400, 429) },
  });
  router.post("/email-verification/resend", ...limiters.emailLinks, async (req, res) => {
    const { email } = parseBody(emailOnlyBody, req);
    res.status(202).json(await resendVerification(ctx, email));
  });

  return router;
}
