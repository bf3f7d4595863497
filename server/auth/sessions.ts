import { and, eq, gt, lt } from "drizzle-orm";
import type { Db } from "@/db/client";
import { sessions } from "@/db/schema";
import { newSecret, sha256Hex } from "./secrets";

export const sessionCookieName = "pb_session";
export const sessionLifetimeMs = 14 * 24 * 60 * 60 * 1000;

export async function createSession(db: Db, userId: string): Promise<{ secret: string; expiresAt: Date }> {
  const secret = newSecret("pbs_");
  const expiresAt = new Date(Date.now() + sessionLifetimeMs);
  await db.insert(sessions).values({ tokenHash: sha256Hex(secret), userId, expiresAt });
  // Expired sessions are swept on the way, so the table never grows without bound.
  await db.delete(sessions).where(and(eq(sessions.userId, userId), lt(sessions.expiresAt, new Date())));
  return { secret, expiresAt };
}

export async function sessionUserId(db: Db, secret: string): Promise<string | null> {
  const [row] = await db
    .select({ userId: sessions.userId })
    .from(sessions)
    .where(and(eq(sessions.tokenHash, sha256Hex(secret)), gt(sessions.expiresAt, new Date())));
  return row?.userId ?? null;
}

export async function endSession(db: Db, secret: string): Promise<void> {
  await db.delete(sessions).where(eq(sessions.tokenHash, sha256Hex(secret)));
}

export async function endAllSessions(db: Db, userId: string): Promise<void> {
  await db.delete(sessions).where(eq(sessions.userId, userId));
}
