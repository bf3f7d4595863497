import { and, eq, gt, isNull } from "drizzle-orm";
import type { Db } from "@/db/client";
import { emailTokens } from "@/db/schema";
import type { Role } from "@/schemas/account";
import { newSecret, sha256Hex } from "@/server/auth/secrets";
import { HttpProblem } from "@/server/errors";

export type EmailTokenPurpose = "verify" | "reset" | "invite";

const emailTokenLifetimeMs: Record<EmailTokenPurpose, number> = {
  verify: 48 * 60 * 60 * 1000,
  reset: 60 * 60 * 1000,
  invite: 7 * 24 * 60 * 60 * 1000,
};

const what: Record<EmailTokenPurpose, { noun: string; again: string }> = {
  verify: { noun: "confirmation link", again: "Sign in to have a new one sent, or create the account again." },
  reset: { noun: "password link", again: "Ask for a new one on the Forgot password screen." },
  invite: { noun: "invitation", again: "Ask the admin who invited you to send a new one." },
};

/** Make a single-use link secret; only its SHA-256 is stored. */
export async function issueEmailToken(
  db: Db,
  input: { purpose: EmailTokenPurpose; email: string; userId?: string; role?: Role; invitedBy?: string },
): Promise<{ secret: string; id: string; expiresAt: Date }> {
  const secret = newSecret(`pb${input.purpose[0]}_`);
  const expiresAt = new Date(Date.now() + emailTokenLifetimeMs[input.purpose]);
  const [row] = await db
    .insert(emailTokens)
    .values({
      purpose: input.purpose,
      email: input.email,
      userId: input.userId ?? null,
      role: input.role ?? null,
      invitedBy: input.invitedBy ?? null,
      tokenHash: sha256Hex(secret),
      expiresAt,
    })
    .returning({ id: emailTokens.id });
  return { secret, id: row!.id, expiresAt };
}

export type EmailTokenRow = typeof emailTokens.$inferSelect;

/** Why a link no longer works, in words the person holding it can act on. */
function refusal(purpose: EmailTokenPurpose, row: EmailTokenRow | undefined): HttpProblem {
  const { noun, again } = what[purpose];
  const reason = !row ? `This ${noun} is not valid.` : row.usedAt ? `This ${noun} has already been used.` : `This ${noun} has expired.`;
  return new HttpProblem(410, "Link no longer valid", `${reason} ${again}`, {
    type: "https://plotbank.test/problems/email-link",
    reason: !row ? "unknown" : row.usedAt ? "used" : "expired",
    errors: [{ field: "body.token", message: reason }],
  });
}

/** Look a link up without using it (to show whom an invitation is for). */
export async function peekEmailToken(db: Db, purpose: EmailTokenPurpose, secret: string): Promise<EmailTokenRow> {
  const [row] = await db
    .select()
    .from(emailTokens)
    .where(and(eq(emailTokens.tokenHash, sha256Hex(secret)), eq(emailTokens.purpose, purpose)));
  if (!row || row.usedAt || row.expiresAt.getTime() <= Date.now()) throw refusal(purpose, row);
  return row;
}

/**
 * Use a link exactly once. The update claims it atomically, so two clicks racing each other cannot both succeed.
 * Pass the transaction when the link's effect must commit together with its use.
 */
export async function consumeEmailToken(db: Db, purpose: EmailTokenPurpose, secret: string): Promise<EmailTokenRow> {
  const hash = sha256Hex(secret);
  const [claimed] = await db
    .update(emailTokens)
    .set({ usedAt: new Date() })
    .where(
      and(
        eq(emailTokens.tokenHash, hash),
        eq(emailTokens.purpose, purpose),
        isNull(emailTokens.usedAt),
        gt(emailTokens.expiresAt, new Date()),
      ),
    )
    .returning();
  if (claimed) return claimed;
  const [row] = await db
    .select()
    .from(emailTokens)
    .where(and(eq(emailTokens.tokenHash, hash), eq(emailTokens.purpose, purpose)));
  throw refusal(purpose, row);
}

/** Retire a user's other open links of one purpose (a new password makes older reset links useless). */
export async function retireEmailTokens(db: Db, purpose: EmailTokenPurpose, email: string): Promise<void> {
  await db
    .update(emailTokens)
    .set({ usedAt: new Date() })
    .where(and(eq(emailTokens.purpose, purpose), eq(emailTokens.email, email), isNull(emailTokens.usedAt)));
}
