import { pgEnum } from "drizzle-orm/pg-core";
// A relative import: drizzle-kit loads db/schema without the @/ alias.
import { doiStatuses, emailTokenPurposes, roles, tokenScopes, versionStates } from "../../constants/vocabulary";

export const roleEnum = pgEnum("role", roles);
export const versionStateEnum = pgEnum("version_state", versionStates);
export const tokenScopeEnum = pgEnum("token_scope", tokenScopes);
export const emailTokenPurposeEnum = pgEnum("email_token_purpose", emailTokenPurposes);
export const doiStatusEnum = pgEnum("doi_status", doiStatuses);
