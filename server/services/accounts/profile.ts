import { and, eq, ne } from "drizzle-orm";
import { sessions, users } from "@/db/schema";
import type { Me, ProfilePatch } from "@/schemas/account";
import { hashPassword, verifyPassword } from "@/server/auth/passwords";
import { sha256Hex } from "@/server/auth/secrets";
import type { AppContext } from "@/server/context";
import { badRequest, notFound } from "@/server/errors";
import { meOf } from "@/server/services/users";
import { revokeAllTokens } from "@/server/services/tokens";
import { notifyPasswordChanged } from "./password-reset";
import { refuseWeakPassword } from "./sign-up";

/**
 * Change one's own name or password. Only the named fields are written; a new password needs the current one and
 * signs out every other session (the one making the change stays signed in) and revokes the API tokens unless
 * `revokeApiTokens` is false; the account is told by e-mail.
 */
export async function updateProfile(ctx: AppContext, userId: string, patch: ProfilePatch, currentSessionSecret?: string): Promise<Me> {
  const [user] = await ctx.db.select().from(users).where(eq(users.id, userId));
  if (!user) throw notFound();
  const changes: Partial<typeof users.$inferInsert> = {};
  if (patch.displayName !== undefined) changes.displayName = patch.displayName;
  if (patch.newPassword !== undefined) {
    if (!(await verifyPassword(patch.currentPassword ?? "", user.passwordHash))) {
      throw badRequest("The current password is wrong.", [{ field: "body.currentPassword", message: "does not match" }]);
    }
    refuseWeakPassword(patch.newPassword, user.email, "body.newPassword");
    changes.passwordHash = await hashPassword(patch.newPassword);
  }
  if (Object.keys(changes).length > 0) await ctx.db.update(users).set(changes).where(eq(users.id, userId));
  if (changes.passwordHash) {
    const keep = currentSessionSecret ? sha256Hex(currentSessionSecret) : "";
    await ctx.db.delete(sessions).where(and(eq(sessions.userId, userId), ne(sessions.tokenHash, keep)));
    // Tokens made with the old password end with it unless the owner asked to keep them.
    const tokens = await revokeAllTokens(ctx.db, userId, patch.revokeApiTokens !== false);
    await notifyPasswordChanged(ctx, user, "changed", tokens);
  }
  return (await meOf(ctx.db, userId))!;
}
