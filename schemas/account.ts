import { z } from "zod";

export const role = z.enum(["member", "curator", "reviewer", "admin"]).meta({ id: "Role" });
export type Role = z.infer<typeof role>;

/** What the app knows about the signed-in user. Never carries a hash. */
export const me = z
  .object({
    id: z.string(),
    email: z.string(),
    displayName: z.string(),
    role,
    emailVerified: z.boolean(),
  })
  .meta({ id: "Me" });
export type Me = z.infer<typeof me>;

export const signInBody = z
  .object({ email: z.email().max(254), password: z.string().min(1).max(256) })
  .meta({ id: "SignIn" });
