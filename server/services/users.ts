import { eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { users } from "@/db/schema";
import type { Me, Role } from "@/schemas/account";
import { hashPassword } from "@/server/auth/passwords";

export const normaliseEmail = (email: string) => email.trim().toLowerCase();

export async function createUser(db: Db, input: { email: string; displayName: string; password: string; role?: Role; verified?: boolean }) {
  const [user] = await db
    .insert(users)
    .values({
      email: normaliseEmail(input.email),
      displayName: input.displayName,
      passwordHash: await hashPassword(input.password),
      role: input.role ?? "member",
      emailVerifiedAt: input.verified ? new Date() : null,
    })
    .returning();
  return user!;
}

export async function findUserByEmail(db: Db, email: string) {
  const [user] = await db
    .select()
    .from(users)
    .where(eq(users.email, normaliseEmail(email)));
  return user ?? null;
}

export async function meOf(db: Db, id: string): Promise<Me | null> {
  const [user] = await db.select().from(users).where(eq(users.id, id));
  if (!user) return null;
  return { id: user.id, email: user.email, displayName: user.displayName, role: user.role, emailVerified: user.emailVerifiedAt != null };
}
