import { index, integer, pgTable, text, timestamp, uuid, jsonb } from "drizzle-orm/pg-core";
import { emailTokenPurposeEnum, roleEnum, tokenScopeEnum } from "./enums";

export const users = pgTable("users", {
  id: uuid("id").primaryKey().defaultRandom(),
  /** Stored lower-cased; uniqueness is on the lower-cased value. */
  email: text("email").notNull().unique(),
  displayName: text("display_name").notNull(),
  /** scrypt hash in the form `scrypt$N$r$p$salt$hash`; never leaves the server. */
  passwordHash: text("password_hash"),
  role: roleEnum("role").notNull().default("member"),
  emailVerifiedAt: timestamp("email_verified_at", { withTimezone: true }),
  createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  disabledAt: timestamp("disabled_at", { withTimezone: true }),
});

/** Browser sessions: the cookie carries a random secret, the table only its SHA-256. */
export const sessions = pgTable(
  "sessions",
  {
    tokenHash: text("token_hash").primaryKey(),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
  },
  (t) => [index("sessions_user_idx").on(t.userId)],
);

/** Single-use links sent by e-mail: verification, password reset and invitations. */
export const emailTokens = pgTable(
  "email_tokens",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    purpose: emailTokenPurposeEnum("purpose").notNull(),
    email: text("email").notNull(),
    userId: uuid("user_id").references(() => users.id, { onDelete: "cascade" }),
    tokenHash: text("token_hash").notNull().unique(),
    /** For invitations: the role the invitee receives on accepting. */
    role: roleEnum("role"),
    invitedBy: uuid("invited_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    usedAt: timestamp("used_at", { withTimezone: true }),
  },
  (t) => [index("email_tokens_email_idx").on(t.email)],
);

export const apiTokens = pgTable(
  "api_tokens",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    /** First characters of the secret, shown in lists so an owner can tell tokens apart. */
    prefix: text("prefix").notNull(),
    tokenHash: text("token_hash").notNull().unique(),
    scope: tokenScopeEnum("scope").notNull().default("read"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    expiresAt: timestamp("expires_at", { withTimezone: true }),
    lastUsedAt: timestamp("last_used_at", { withTimezone: true }),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
  },
  (t) => [index("api_tokens_user_idx").on(t.userId)],
);

/** Every message the app sends; in development and tests this table is the outbox. */
export const outbox = pgTable("outbox", {
  id: uuid("id").primaryKey().defaultRandom(),
  kind: text("kind").notNull(),
  to: text("to").notNull(),
  subject: text("subject").notNull(),
  text: text("text").notNull(),
  html: text("html"),
  meta: jsonb("meta").$type<Record<string, unknown>>(),
  transport: text("transport").notNull().default("outbox"),
  createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  /**
   * One delivery record per message and recipient: a notice that may be asked for twice (a follower's new-version
   * notice) carries a key naming what it is about, so the second ask finds the first record instead of a new one.
   */
  deliveryKey: text("delivery_key").unique(),
  /** When the transport took the message; a retried delivery job that finds this set sends nothing. */
  deliveredAt: timestamp("delivered_at", { withTimezone: true }),
  deliveryAttempts: integer("delivery_attempts").notNull().default(0),
});

export const roleChanges = pgTable("role_changes", {
  id: uuid("id").primaryKey().defaultRandom(),
  actorId: uuid("actor_id").references(() => users.id, { onDelete: "set null" }),
  userId: uuid("user_id")
    .notNull()
    .references(() => users.id, { onDelete: "cascade" }),
  /** Null when the account was created with the role: an accepted invitation, whose actor is the inviter. */
  fromRole: roleEnum("from_role"),
  toRole: roleEnum("to_role").notNull(),
  at: timestamp("at", { withTimezone: true }).notNull().defaultNow(),
});
