import type { Router } from "express";
import { checkEmail, emailOnlyBody, signUpBody, tokenBody } from "@/schemas/account";
import { z } from "zod";
import type { AuthLimiters } from "@/server/auth/rate-limits";
import type { AppContext } from "@/server/context";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponse, problemResponses } from "@/server/openapi/registry";
import { resendVerification, signUp, verifyEmail } from "@/server/services/accounts/sign-up";

const verified = z.object({ email: z.string(), verified: z.literal(true) }).meta({ id: "EmailVerified" });

/** Creating an account and confirming its e-mail address. */
export function signUpRoutes(ctx: AppContext, limiters: AuthLimiters): Router {
  const { router, defineRoute } = routeModule(ctx.registry);

  defineRoute(
    {
      method: "post",
      path: "/api/v1/sign-up",
      operationId: "signUp",
      tags: ["Accounts"],
      summary: "Create a member account; a confirmation link is e-mailed",
      description:
        "The answer is the same whether or not the address already has an account. Fields other than e-mail, name and password are ignored.",
      guards: limiters.emailLinks,
      body: { json: signUpBody },
      responses: {
        202: { description: "Check your e-mail", content: { "application/json": { schema: checkEmail } } },
        ...problemResponses(400, 429),
      },
    },
    async ({ body }, _req, res) => {
      res.status(202).json(await signUp(ctx, body));
    },
  );

  defineRoute(
    {
      method: "post",
      path: "/api/v1/email-verification",
      operationId: "verifyEmail",
      tags: ["Accounts"],
      summary: "Confirm an e-mail address with the token from the e-mailed link",
      body: { json: tokenBody },
      responses: {
        200: { description: "Confirmed; the account can sign in", content: { "application/json": { schema: verified } } },
        ...problemResponses(400),
        ...problemResponse(410, "The link is unknown, used or expired"),
      },
    },
    async ({ body: { token } }, _req, res) => {
      const { email } = await verifyEmail(ctx, token);
      res.json({ email, verified: true });
    },
  );

  defineRoute(
    {
      method: "post",
      path: "/api/v1/email-verification/resend",
      operationId: "resendEmailVerification",
      tags: ["Accounts"],
      summary: "Send a new confirmation link to an unconfirmed address",
      guards: limiters.emailLinks,
      body: { json: emailOnlyBody },
      responses: {
        202: { description: "Check your e-mail", content: { "application/json": { schema: checkEmail } } },
        ...problemResponses(400, 429),
      },
    },
    async ({ body: { email } }, _req, res) => {
      res.status(202).json(await resendVerification(ctx, email));
    },
  );

  return router;
}
