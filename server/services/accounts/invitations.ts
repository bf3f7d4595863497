import { and, desc, eq, gt, isNull } from "drizzle-orm";
import { emailTokens, roleChanges, users } from "@/db/schema";
import type { InvitationPreview, Role } from "@/schemas/account";
import type { AppContext } from "@/server/context";
import { conflict } from "@/server/errors";
import { createMailer } from "@/server/mail/mailer";
import { templates } from "@/server/mail/templates";
import { createUser, findUserByEmail, normaliseEmail } from "@/server/services/users";
import { consumeEmailToken, issueEmailToken, peekEmailToken, retireEmailTokens } from "./email-tokens";
import { refuseWeakPassword } from "./sign-up";

export async function inviteUser(ctx: AppContext, inviter: Express.User, input: { email: string; role: Role }) {
  const email = normaliseEmail(input.email);
  if (await findUserByEmail(ctx.db, email)) {
    throw conflict("This address already has an account; change its role under People & roles instead.", [
      { field: "body.email", message: "already has an account" },
    ]);
  }
  // A fresh invitation replaces any open one for the address, so only the newest link works.
  await retireEmailTokens(ctx.db, "invite", email);
  const { secret, id, expiresAt } = await issueEmailToken(ctx.db, { purpose: "invite", email, role: input.role, invitedBy: inviter.id });
  const mail = templates.invitation({ publicUrl: ctx.config.publicUrl, inviterName: inviter.displayName, role: input.role, token: secret });
  await createMailer(ctx).send({ kind: "invitation", to: email, ...mail, meta: { invitationId: id, role: input.role } });
  return { id, email, role: input.role, createdAt: new Date().toISOString(), expiresAt: expiresAt.toISOString() };
}

/** Invitations still waiting to be accepted. */
export async function listOpenInvitations(ctx: AppContext) {
  const rows = await ctx.db
    .select()
    .from(emailTokens)
    .where(and(eq(emailTokens.purpose, "invite"), isNull(emailTokens.usedAt), gt(emailTokens.expiresAt, new Date())))
    .orderBy(desc(emailTokens.createdAt))
    .limit(200);
  return rows.map((r) => ({
    id: r.id,
    email: r.email,
    role: r.role ?? "curator",
    createdAt: r.createdAt.toISOString(),
    expiresAt: r.expiresAt.toISOString(),
  }));
}

export async function previewInvitation(ctx: AppContext, token: string): Promise<InvitationPreview> {
  const row = await peekEmailToken(ctx.db, "invite", token);
  return { email: row.email, role: row.role ?? "curator", expiresAt: row.expiresAt.toISOString() };
}

/**
 * Accepting makes a verified account with the invited role: the link itself proved the address. The grant goes into
 * the role-change log in the same transaction, with the inviter as its actor, like any other change of role.
 */
export async function acceptInvitation(ctx: AppContext, input: { token: string; displayName: string; password: string }) {
  const preview = await peekEmailToken(ctx.db, "invite", input.token);
  refuseWeakPassword(input.password, preview.email);
  return ctx.db.transaction(async (tx) => {
    const row = await consumeEmailToken(tx, "invite", input.token);
    const [taken] = await tx.select({ id: users.id }).from(users).where(eq(users.email, row.email));
    if (taken) throw conflict("This address already has an account; sign in instead.");
    const user = await createUser(tx, {
      email: row.email,
      displayName: input.displayName,
      password: input.password,
      role: row.role ?? "curator",
      verified: true,
    });
    await tx.insert(roleChanges).values({ actorId: row.invitedBy, userId: user.id, fromRole: null, toRole: user.role });
    return user;
  });
}
