import { alias } from "drizzle-orm/pg-core";
import { and, asc, count, desc, eq, ne } from "drizzle-orm";
import { roleChanges, users } from "@/db/schema";
import type { AdminUser, Role, RoleChangeEntry } from "@/schemas/account";
import type { AppContext } from "@/server/context";
import { conflict, notFound } from "@/server/errors";

const adminUserOf = (u: typeof users.$inferSelect): AdminUser => ({
  id: u.id,
  email: u.email,
  displayName: u.displayName,
  role: u.role,
  emailVerified: u.emailVerifiedAt !== null,
  disabled: u.disabledAt !== null,
  createdAt: u.createdAt.toISOString(),
});

export async function listUsers(ctx: AppContext): Promise<AdminUser[]> {
  const rows = await ctx.db.select().from(users).orderBy(asc(users.email)).limit(1000);
  return rows.map(adminUserOf);
}

/**
 * Change a user's role and write the audit row in the same transaction. The last admin cannot stop being one,
 * otherwise nobody could manage roles any more.
 */
export async function changeRole(ctx: AppContext, actor: Express.User, userId: string, toRole: Role): Promise<AdminUser> {
  return ctx.db.transaction(async (tx) => {
    const [user] = await tx.select().from(users).where(eq(users.id, userId)).for("update");
    if (!user) throw notFound("No user has this id.");
    if (user.role === toRole) return adminUserOf(user);
    if (user.role === "admin") {
      const [others] = await tx
        .select({ n: count() })
        .from(users)
        .where(and(eq(users.role, "admin"), ne(users.id, userId)));
      if ((others?.n ?? 0) === 0) throw conflict("This is the only admin; make someone else an admin first.");
    }
    const [updated] = await tx.update(users).set({ role: toRole }).where(eq(users.id, userId)).returning();
    await tx.insert(roleChanges).values({ actorId: actor.id, userId, fromRole: user.role, toRole });
    return adminUserOf(updated!);
  });
}

export async function listRoleChanges(ctx: AppContext, limit = 200): Promise<RoleChangeEntry[]> {
  const subject = alias(users, "subject");
  const actor = alias(users, "actor");
  const rows = await ctx.db
    .select({
      id: roleChanges.id,
      at: roleChanges.at,
      fromRole: roleChanges.fromRole,
      toRole: roleChanges.toRole,
      userId: subject.id,
      userName: subject.displayName,
      userEmail: subject.email,
      actorId: actor.id,
      actorName: actor.displayName,
    })
    .from(roleChanges)
    .innerJoin(subject, eq(subject.id, roleChanges.userId))
    .leftJoin(actor, eq(actor.id, roleChanges.actorId))
    .orderBy(desc(roleChanges.at))
    .limit(limit);
  return rows.map((r) => ({
    id: r.id,
    at: r.at.toISOString(),
    fromRole: r.fromRole,
    toRole: r.toRole,
    user: { id: r.userId, displayName: r.userName, email: r.userEmail },
    actor: r.actorId ? { id: r.actorId, displayName: r.actorName ?? "" } : null,
  }));
}
