import { and, eq, isNull } from "drizzle-orm";
import { users } from "@/db/schema";
import type { CheckEmail, SignUpBody } from "@/schemas/account";
import { hashPassword } from "@/server/auth/passwords";
import { passwordWeakness } from "@/server/auth/password-strength";
import { isUniqueViolation } from "@/server/errors";
import type { AppContext } from "@/server/context";
import { badRequest } from "@/server/errors";
import { createMailer } from "@/server/mail/mailer";
import { templates } from "@/server/mail/templates";
import { createUser, findUserByEmail, normaliseEmail } from "@/server/services/users";
import { consumeEmailToken, issueEmailToken } from "./email-tokens";

/** The same answer whether or not the address already has an account, so sign-up cannot be used to probe for members. */
export const checkYourEmail: CheckEmail = {
  status: "check-email",
  message: "We sent a link to that address. Open it to continue; it may take a minute to arrive.",
};

export function refuseWeakPassword(password: string, email?: string, field = "body.password") {
  const weakness = passwordWeakness(password, email);
  if (weakness) throw badRequest("Choose a stronger password.", [{ field, message: weakness }]);
}

async function sendVerification(ctx: AppContext, user: { id: string; email: string; displayName: string }) {
  const { secret } = await issueEmailToken(ctx.db, { purpose: "verify", email: user.email, userId: user.id });
  const mail = templates.verification({ publicUrl: ctx.config.publicUrl, displayName: user.displayName, token: secret });
  await createMailer(ctx).send({ kind: "verification", to: user.email, ...mail, meta: { userId: user.id } });
}

/**
 * Create an unverified member and send the confirmation link. Only the three named fields are read: the body has
 * already been parsed with a schema that drops anything else, and the role is fixed here, not taken from input.
 */
export async function signUp(ctx: AppContext, body: SignUpBody): Promise<CheckEmail> {
  refuseWeakPassword(body.password, body.email);
  const existing = await findUserByEmail(ctx.db, body.email);
  if (!existing) {
    try {
      const user = await createUser(ctx.db, {
        email: body.email,
        displayName: body.displayName,
        password: body.password,
        role: "member",
        verified: false,
      });
      await sendVerification(ctx, user);
      return checkYourEmail;
    } catch (error) {
      // Two sign-ups of one new address at once: the second loses the race on the unique address and is answered
      // like any sign-up of an address that has an account.
      if (!isUniqueViolation(error)) throw error;
    }
  } else {
    // The same scrypt run a new account costs, so the answer's timing does not tell which addresses have accounts.
    await hashPassword(body.password);
  }
  const known = existing ?? (await findUserByEmail(ctx.db, body.email));
  if (known) await tellExisting(ctx, known);
  return checkYourEmail;
}

/** An address that has an account gets a new confirmation link (not yet confirmed) or a note that it is registered. */
async function tellExisting(ctx: AppContext, existing: NonNullable<Awaited<ReturnType<typeof findUserByEmail>>>) {
  if (!existing.emailVerifiedAt && !existing.disabledAt) await sendVerification(ctx, existing);
  else if (!existing.disabledAt) {
    const mail = templates.alreadyRegistered({ publicUrl: ctx.config.publicUrl, displayName: existing.displayName });
    await createMailer(ctx).send({ kind: "already-registered", to: existing.email, ...mail, meta: { userId: existing.id } });
  }
}

export async function resendVerification(ctx: AppContext, email: string): Promise<CheckEmail> {
  const user = await findUserByEmail(ctx.db, email);
  if (user && !user.emailVerifiedAt && !user.disabledAt) await sendVerification(ctx, user);
  return checkYourEmail;
}

export async function verifyEmail(ctx: AppContext, token: string): Promise<{ email: string }> {
  const row = await consumeEmailToken(ctx.db, "verify", token);
  if (row.userId) {
    await ctx.db
      .update(users)
      .set({ emailVerifiedAt: new Date() })
      .where(and(eq(users.id, row.userId), isNull(users.emailVerifiedAt)));
  }
  return { email: normaliseEmail(row.email) };
}
