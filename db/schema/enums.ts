import { pgEnum } from "drizzle-orm/pg-core";

export const roleEnum = pgEnum("role", ["member", "curator", "reviewer", "admin"]);
export const versionStateEnum = pgEnum("version_state", ["draft", "in_review", "published", "withdrawn"]);
export const tokenScopeEnum = pgEnum("token_scope", ["read", "write"]);
export const emailTokenPurposeEnum = pgEnum("email_token_purpose", ["verify", "reset", "invite"]);
export const doiStatusEnum = pgEnum("doi_status", ["none", "pending", "registered", "failed"]);
