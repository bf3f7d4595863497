import { Router } from "express";
import { authLimiters } from "@/server/auth/rate-limits";
import type { AppContext } from "@/server/context";
// Registers the follower notice with the publish hooks; importing it here keeps it active wherever the API runs.
import "@/server/services/accounts/notifications";
import { adminRoutes } from "./admin";
import { invitationRoutes } from "./invitations";
import { passwordResetRoutes } from "./password-reset";
import { profileRoutes } from "./profile";
import { sessionRoutes } from "./session";
import { signUpRoutes } from "./sign-up";

/** Accounts: session, sign-up, e-mail links, profile, follows and administration. One set of abuse limiters per app. */
export function accountRoutes(ctx: AppContext): Router {
  const limiters = authLimiters(ctx.config.authLimits, ctx.rateLimitStores);
  const router = Router();
  router.use(sessionRoutes(ctx, limiters));
  router.use(signUpRoutes(ctx, limiters));
  router.use(passwordResetRoutes(ctx, limiters));
  router.use(invitationRoutes(ctx));
  router.use(profileRoutes(ctx, limiters));
  router.use(adminRoutes(ctx));
  return router;
}
