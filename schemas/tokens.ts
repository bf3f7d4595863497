import { z } from "zod";
import { tokenScopes } from "@/constants/vocabulary";

import { line } from "./safe-text";

const tokenScope = z.enum(tokenScopes).meta({ id: "TokenScope" });
export type TokenScope = z.infer<typeof tokenScope>;

const maxTokenDays = 365;

export const createTokenBody = z
  .object({
    name: line().trim().min(1, "give the token a name").max(100).describe("What the token is for, e.g. “nightly pull”"),
    scope: tokenScope.default("read").describe("read for data pulls; write only for curators, reviewers and admins"),
    expiresInDays: z.coerce
      .number()
      .int("a whole number of days")
      .min(1, "at least 1 day")
      .max(maxTokenDays, `at most ${maxTokenDays} days`)
      .default(90)
      .describe(`Lifetime in days, 1–${maxTokenDays}`),
  })
  .strict()
  .meta({ id: "CreateToken" });
export type CreateTokenBody = z.input<typeof createTokenBody>;

const tokenStatus = z.enum(["active", "expired", "revoked"]);

/** A token as its owner sees it later: never the secret, only its first characters. */
const apiToken = z
  .object({
    id: z.string(),
    name: z.string(),
    prefix: z.string().describe("The secret's first characters, to tell tokens apart"),
    scope: tokenScope,
    status: tokenStatus,
    createdAt: z.string(),
    expiresAt: z.string().nullable(),
    lastUsedAt: z.string().nullable(),
    revokedAt: z.string().nullable(),
  })
  .meta({ id: "ApiToken" });
export type ApiToken = z.infer<typeof apiToken>;

/** The answer to creating a token: the only time the secret is ever shown. */
export const createdToken = z
  .object({ token: apiToken, secret: z.string().describe("Send as `Authorization: Bearer <secret>`. Shown once; store it now.") })
  .meta({ id: "CreatedToken" });
export type CreatedToken = z.infer<typeof createdToken>;

export const tokenList = z.object({ items: z.array(apiToken) }).meta({ id: "ApiTokenList" });
