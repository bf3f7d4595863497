import { index, pgTable, text, timestamp, uuid } from "drizzle-orm/pg-core";
import { users } from "./accounts";
import { versions } from "./datasets";
import { versionStateEnum } from "./enums";

/**
 * A reviewer's comment on one site-year of a version. It names the site-year by its code, not its row: a returned
 * draft's site-years can be uploaded again (new rows), and the comment must stay beside the same site-year through
 * returns and re-submissions.
 */
export const reviewComments = pgTable(
  "review_comments",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    versionId: uuid("version_id")
      .notNull()
      .references(() => versions.id, { onDelete: "cascade" }),
    siteYearCode: text("site_year_code").notNull(),
    body: text("body").notNull(),
    authorId: uuid("author_id")
      .notNull()
      .references(() => users.id),
    stateWhenMade: versionStateEnum("state_when_made").notNull(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    resolvedAt: timestamp("resolved_at", { withTimezone: true }),
    resolvedBy: uuid("resolved_by").references(() => users.id),
  },
  (t) => [index("review_comments_version_idx").on(t.versionId, t.siteYearCode)],
);
