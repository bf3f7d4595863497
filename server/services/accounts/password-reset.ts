import { eq } from "drizzle-orm";
import { users } from "@/db/schema";
import type { CheckEmail } from "@/schemas/account";
import { hashPassword } from "@/server/auth/passwords";
import { endAllSessions } from "@/server/auth/sessions";
import type { AppContext } from "@/server/context";
import { createMailer } from "@/server/mail/mailer";
import { templates } from "@/server/mail/templates";
import { revokeAllTokens } from "@/server/services/tokens";
import { findUserByEmail } from "@/server/services/users";
import { consumeEmailToken, issueEmailToken, retireEmailTokens } from "./email-tokens";
import { checkYourEmail, refuseWeakPassword } from "./sign-up";

/** Send a reset link if the address has an account; answer the same either way. */
export async function requestPasswordReset(ctx: AppContext, email: string): Promise<CheckEmail> {
  const user = await findUserByEmail(ctx.db, email);
  if (user && !user.disabledAt) {
    const { secret } = await issueEmailToken(ctx.db, { purpose: "reset", email: user.email, userId: user.id });
    const mail = templates.passwordReset({ publicUrl: ctx.config.publicUrl, displayName: user.displayName, token: secret });
    await createMailer(ctx).send({ kind: "password-reset", to: user.email, ...mail, meta: { userId: user.id } });
  }
  return checkYourEmail;
}

/**
 * Set a new password from a reset link. The link is used up, every other open reset link for the address is retired,
 * every session ends and every API token is revoked (unless the caller keeps them): whoever knew the old password is
 * locked out. Opening the link also proves the address.
 */
export async function resetPassword(ctx: AppContext, token: string, password: string, revokeApiTokens = true): Promise<void> {
  // A refused password rolls the transaction back, so the link stays usable for a second try.
  const changed = await ctx.db.transaction(async (tx) => {
    const row = await consumeEmailToken(tx, "reset", token);
    const [user] = await tx.select().from(users).where(eq(users.id, row.userId!));
    if (!user) return;
    refuseWeakPassword(password, user.email);
    await tx
      .update(users)
      .set({ passwordHash: await hashPassword(password), emailVerifiedAt: user.emailVerifiedAt ?? new Date() })
      .where(eq(users.id, user.id));
    await retireEmailTokens(tx, "reset", user.email);
    await endAllSessions(tx, user.id);
    return { user, tokens: await revokeAllTokens(tx, user.id, revokeApiTokens) };
  });
  if (changed) await notifyPasswordChanged(ctx, changed.user, "reset", changed.tokens);
}

/** Tell the account its password changed and what became of its API tokens. */
export async function notifyPasswordChanged(
  ctx: AppContext,
  user: { id: string; email: string; displayName: string },
  how: "changed" | "reset",
  tokens: { revoked: number; kept: number },
) {
  const mail = templates.passwordChanged({
    publicUrl: ctx.config.publicUrl,
    displayName: user.displayName,
    how,
    revokedTokens: tokens.revoked,
    keptTokens: tokens.kept,
  });
  await createMailer(ctx).send({ kind: "password-changed", to: user.email, ...mail, meta: { userId: user.id, ...tokens } });
}
