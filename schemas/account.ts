import { z } from "zod";
import { roles, staffRoles } from "@/constants/vocabulary";

import { line } from "./safe-text";

const role = z.enum(roles).meta({ id: "Role" });
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

/** "Who am I": the signed-in user, or null for a visitor (an answer, not an error, so a browser logs nothing). */
// A union, not me.nullable(): the generated document keeps the null beside the Me component's $ref.
export const sessionState = z.object({ user: z.union([me, z.null()]) }).meta({ id: "SessionState" });
export type SessionState = z.infer<typeof sessionState>;

export const signInBody = z.object({ email: z.email().max(254), password: z.string().min(1).max(256) }).meta({ id: "SignIn" });

/**
 * Passwords: this is the part a form can check. The server also refuses common and easily guessed ones with a strength
 * estimator whose dictionaries stay on the server (server/auth/password-strength.ts).
 */
export const newPassword = line().min(12, "Use at least 12 characters.").max(256, "Use at most 256 characters.");
export const displayName = line().trim().min(1, "Enter a name.").max(120, "Use at most 120 characters.");
const emailAddress = z.email("Enter an e-mail address like name@example.org.").max(254);

/**
 * Sign-up. Unknown keys (role, emailVerified, …) are stripped, never stored: a new account is always an unverified
 * member.
 */
export const signUpBody = z.object({ email: emailAddress, displayName, password: newPassword }).meta({ id: "SignUp" });
export type SignUpBody = z.infer<typeof signUpBody>;

/** What the server answers to sign-up and reset requests, whether or not the address has an account. */
export const checkEmail = z.object({ status: z.literal("check-email"), message: z.string() }).meta({ id: "CheckEmail" });
export type CheckEmail = z.infer<typeof checkEmail>;

export const emailOnlyBody = z.object({ email: emailAddress }).strip().meta({ id: "EmailOnly" });
export const tokenBody = z
  .object({ token: line().min(10).max(200) })
  .strip()
  .meta({ id: "EmailLinkToken" });

export const resetPasswordBody = z
  .object({
    token: line().min(10).max(200),
    password: newPassword,
    revokeApiTokens: z.boolean().optional().describe("Also revoke every API token of the account (default true)"),
  })
  .meta({ id: "ResetPassword" });

export const acceptInvitationBody = z
  .object({ token: line().min(10).max(200), displayName, password: newPassword })
  .meta({ id: "AcceptInvitation" });

export const invitationPreview = z.object({ email: z.string(), role, expiresAt: z.string() }).meta({ id: "InvitationPreview" });
export type InvitationPreview = z.infer<typeof invitationPreview>;

/** Profile changes: a new password needs the current one. Role and verification cannot be set here. */
export const profilePatch = z
  .object({
    displayName: displayName.optional(),
    currentPassword: line().min(1, "Enter your current password.").max(256).optional(),
    newPassword: newPassword.optional(),
    revokeApiTokens: z
      .boolean()
      .optional()
      .describe("With a new password: also revoke every API token of the account (default true; false keeps them)"),
  })
  .refine((p) => !p.newPassword || !!p.currentPassword, {
    path: ["currentPassword"],
    message: "Enter your current password to set a new one.",
  })
  .meta({ id: "ProfilePatch" });
export type ProfilePatch = z.infer<typeof profilePatch>;

const followedDataset = z
  .object({ slug: z.string(), title: z.string(), followedAt: z.string(), latestVersion: z.string().nullable() })
  .meta({ id: "FollowedDataset" });
export const followList = z.object({ items: z.array(followedDataset) }).meta({ id: "FollowList" });
export type FollowList = z.infer<typeof followList>;
export const followState = z.object({ slug: z.string(), following: z.boolean() }).meta({ id: "FollowState" });

/** Admin views: an admin may see members' e-mail addresses; nobody else may. */
export const adminUser = me.extend({ disabled: z.boolean(), createdAt: z.string() }).meta({ id: "AdminUser" });
export type AdminUser = z.infer<typeof adminUser>;
export const adminUserList = z.object({ items: z.array(adminUser) }).meta({ id: "AdminUserList" });

export const roleChangeBody = z.object({ role }).strict().meta({ id: "RoleChange" });

const roleChangeEntry = z
  .object({
    id: z.string(),
    at: z.string(),
    /** Null when the account was created with the role by accepting an invitation. */
    // A union, not role.nullable(): the generated document keeps the null beside the Role component's $ref.
    fromRole: z.union([role, z.null()]),
    toRole: role,
    user: z.object({ id: z.string(), displayName: z.string(), email: z.string() }),
    actor: z.object({ id: z.string(), displayName: z.string() }).nullable(),
  })
  .meta({ id: "RoleChangeEntry" });
export type RoleChangeEntry = z.infer<typeof roleChangeEntry>;
export const roleChangeList = z.object({ items: z.array(roleChangeEntry) }).meta({ id: "RoleChangeList" });

/** Invitations are for the working roles; anyone can become a member by signing up. */
const invitableRole = z.enum(staffRoles).meta({ id: "InvitableRole" });
export const invitationBody = z.object({ email: emailAddress, role: invitableRole }).strict().meta({ id: "Invitation" });
export const invitationEntry = z
  .object({ id: z.string(), email: z.string(), role, createdAt: z.string(), expiresAt: z.string() })
  .meta({ id: "InvitationEntry" });
export const invitationList = z
  .object({
    items: z.array(invitationEntry),
    /** Whether this server keeps mail in an outbox admins can read (development, or production without SMTP by choice). */
    outboxAvailable: z.boolean(),
  })
  .meta({ id: "InvitationList" });

const outboxSummary = z
  .object({ id: z.string(), kind: z.string(), to: z.string(), subject: z.string(), transport: z.string(), createdAt: z.string() })
  .meta({ id: "OutboxSummary" });
export const outboxList = z.object({ items: z.array(outboxSummary) }).meta({ id: "OutboxList" });
export const outboxMessage = outboxSummary
  .extend({ text: z.string(), html: z.string().nullable(), links: z.array(z.string()) })
  .meta({ id: "OutboxMessage" });
export type OutboxMessage = z.infer<typeof outboxMessage>;

/** A background job that used up its attempts: what it was for, how often it ran and the last error. */
const failedJob = z
  .object({
    id: z.string(),
    task: z.enum(["doi-register", "mail-deliver"]),
    /** What the job is about: `doi:<version id>` or `mail:<outbox message id>`. */
    key: z.union([z.string(), z.null()]),
    attempts: z.number().int(),
    maxAttempts: z.number().int(),
    lastError: z.union([z.string(), z.null()]),
    failedAt: z.string(),
  })
  .meta({ id: "FailedJob" });
export type FailedJobEntry = z.infer<typeof failedJob>;
export const failedJobList = z.object({ items: z.array(failedJob) }).meta({ id: "FailedJobList" });
export const jobRetried = z.object({ id: z.string(), retried: z.literal(true) }).meta({ id: "JobRetried" });
