import { and, desc, eq, gt, isNull, or } from "drizzle-orm";
import type { Db } from "@/db/client";
import { apiTokens } from "@/db/schema";
import type { Role } from "@/schemas/account";
import type { ApiToken, CreatedToken, TokenScope } from "@/schemas/tokens";
import { newSecret, sha256Hex } from "@/server/auth/secrets";
import { staffRoles } from "@/constants/vocabulary";
import { forbidden, notFound } from "@/server/errors";
import type { Tx } from "@/server/services/ingest/write-rows";

const dayMs = 24 * 60 * 60 * 1000;
/** Enough of the secret to recognise it in a list, far too little to guess the rest (32 random bytes follow). */
const prefixLength = 10;
const writeRoles: readonly Role[] = staffRoles;

type TokenRow = typeof apiTokens.$inferSelect;

function toApiToken(t: TokenRow, now = Date.now()): ApiToken {
  const status = t.revokedAt ? "revoked" : t.expiresAt && t.expiresAt.getTime() <= now ? "expired" : "active";
  return {
    id: t.id,
    name: t.name,
    prefix: t.prefix,
    scope: t.scope,
    status,
    createdAt: t.createdAt.toISOString(),
    expiresAt: t.expiresAt?.toISOString() ?? null,
    lastUsedAt: t.lastUsedAt?.toISOString() ?? null,
    revokedAt: t.revokedAt?.toISOString() ?? null,
  };
}

/** Make a token; the secret is returned this once and only its SHA-256 is kept. */
export async function createToken(
  db: Db,
  owner: { id: string; role: Role },
  input: { name: string; scope: TokenScope; expiresInDays: number },
): Promise<CreatedToken> {
  if (input.scope === "write" && !writeRoles.includes(owner.role)) {
    throw forbidden(`Write tokens are for curators, reviewers and admins; you are signed in as ${owner.role}. Make a read token.`);
  }
  const secret = newSecret("pb_");
  const [row] = await db
    .insert(apiTokens)
    .values({
      userId: owner.id,
      name: input.name,
      prefix: secret.slice(0, prefixLength),
      tokenHash: sha256Hex(secret),
      scope: input.scope,
      expiresAt: new Date(Date.now() + input.expiresInDays * dayMs),
    })
    .returning();
  return { token: toApiToken(row!), secret };
}

export async function listTokens(db: Db, userId: string): Promise<ApiToken[]> {
  const rows = await db.select().from(apiTokens).where(eq(apiTokens.userId, userId)).orderBy(desc(apiTokens.createdAt));
  const now = Date.now();
  return rows.map((t) => toApiToken(t, now));
}

/**
 * Revoke every live token of an account (a new password ends whatever the old one let anybody create). Returns how many
 * were revoked and how many live ones are left.
 */
export async function revokeAllTokens(db: Db | Tx, userId: string, revoke = true): Promise<{ revoked: number; kept: number }> {
  const live = and(
    eq(apiTokens.userId, userId),
    isNull(apiTokens.revokedAt),
    or(isNull(apiTokens.expiresAt), gt(apiTokens.expiresAt, new Date())),
  );
  if (!revoke) return { revoked: 0, kept: (await db.select({ id: apiTokens.id }).from(apiTokens).where(live)).length };
  const rows = await db.update(apiTokens).set({ revokedAt: new Date() }).where(live).returning({ id: apiTokens.id });
  return { revoked: rows.length, kept: 0 };
}

/**
 * Revoke one of the owner's tokens. Someone else's token answers exactly like a missing one (404), so ids cannot
 * be probed. Revoking twice is harmless.
 */
export async function revokeToken(db: Db, userId: string, tokenId: string): Promise<void> {
  const [owned] = await db
    .select({ id: apiTokens.id })
    .from(apiTokens)
    .where(and(eq(apiTokens.id, tokenId), eq(apiTokens.userId, userId)));
  if (!owned) throw notFound("You have no token with this id.");
  await db
    .update(apiTokens)
    .set({ revokedAt: new Date() })
    .where(and(eq(apiTokens.id, tokenId), isNull(apiTokens.revokedAt)));
}
