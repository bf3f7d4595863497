import { and, eq, inArray, ne, sql } from "drizzle-orm";
import { datasets, follows, outbox, users, versions } from "@/db/schema";
import type { AppContext } from "@/server/context";
import { createMailer } from "@/server/mail/mailer";
import { templates } from "@/server/mail/templates";

async function versionWithDataset(ctx: AppContext, versionId: string) {
  const [row] = await ctx.db
    .select({ version: versions, dataset: { id: datasets.id, slug: datasets.slug, title: datasets.title } })
    .from(versions)
    .innerJoin(datasets, eq(datasets.id, versions.datasetId))
    .where(eq(versions.id, versionId));
  if (!row) throw new Error(`version ${versionId} does not exist`);
  return row;
}

async function displayNameOf(ctx: AppContext, userId: string | null) {
  if (!userId) return "A curator";
  const [u] = await ctx.db.select({ displayName: users.displayName }).from(users).where(eq(users.id, userId));
  return u?.displayName ?? "A curator";
}

/** Already sent for this version to this address? Publish hooks may be retried; followers get one notice. */
async function alreadySent(ctx: AppContext, kind: string, to: string, versionId: string) {
  const [row] = await ctx.db
    .select({ id: outbox.id })
    .from(outbox)
    .where(and(eq(outbox.kind, kind), eq(outbox.to, to), sql`${outbox.meta}->>'versionId' = ${versionId}`))
    .limit(1);
  return !!row;
}

/**
 * Tell reviewers a version waits for them. The submitter is left out even when a reviewer: nobody approves their own
 * version. With no reviewer at all, admins are told instead, so a submission never waits unseen.
 */
export async function notifyReviewRequested(ctx: AppContext, versionId: string): Promise<number> {
  const { version, dataset } = await versionWithDataset(ctx, versionId);
  const submitterId = version.submittedBy ?? version.createdBy;
  const active = and(ne(users.id, submitterId), sql`${users.disabledAt} is null`, sql`${users.emailVerifiedAt} is not null`);
  let recipients = await ctx.db
    .select()
    .from(users)
    .where(and(eq(users.role, "reviewer"), active));
  if (recipients.length === 0)
    recipients = await ctx.db
      .select()
      .from(users)
      .where(and(eq(users.role, "admin"), active));
  const submitterName = await displayNameOf(ctx, submitterId);
  const mailer = createMailer(ctx);
  for (const reviewer of recipients) {
    const mail = templates.reviewRequested({
      publicUrl: ctx.config.publicUrl,
      reviewerName: reviewer.displayName,
      datasetTitle: dataset.title,
      semver: version.semver,
      submitterName,
      changelog: version.changelog,
    });
    await mailer.send({ kind: "review-requested", to: reviewer.email, ...mail, meta: { versionId, datasetSlug: dataset.slug } });
  }
  return recipients.length;
}

/** Tell the submitter (or, failing that, the version's author) what the reviewer decided, with the comment. */
export async function notifyReviewDecision(
  ctx: AppContext,
  versionId: string,
  decision: "approved" | "returned",
  comment: string,
): Promise<void> {
  const { version, dataset } = await versionWithDataset(ctx, versionId);
  const [submitter] = await ctx.db
    .select()
    .from(users)
    .where(eq(users.id, version.submittedBy ?? version.createdBy));
  if (!submitter || submitter.disabledAt) return;
  const mail = templates.reviewDecision({
    publicUrl: ctx.config.publicUrl,
    submitterName: submitter.displayName,
    datasetTitle: dataset.title,
    slug: dataset.slug,
    semver: version.semver,
    decision,
    reviewerName: await displayNameOf(ctx, version.reviewedBy),
    comment,
  });
  await createMailer(ctx).send({
    kind: `review-${decision}`,
    to: submitter.email,
    ...mail,
    meta: { versionId, decision, datasetSlug: dataset.slug },
  });
}

/**
 * Review mail is sent after the state change has committed. Failing to write or send it is logged and never passed
 * on: the submission or decision stands, and the outbox row (when one was written) carries the delivery error.
 */
export async function sendReviewMail(what: string, send: () => Promise<unknown>): Promise<void> {
  try {
    await send();
  } catch (error) {
    console.error(`${what} e-mail failed; the review state change stands:`, error);
  }
}

/** One message per follower (never a shared To: line, which would show every follower's address to all). */
export async function notifyFollowers(ctx: AppContext, versionId: string): Promise<number> {
  const { version, dataset } = await versionWithDataset(ctx, versionId);
  if (version.state !== "published") return 0;
  const followerIds = (await ctx.db.select({ userId: follows.userId }).from(follows).where(eq(follows.datasetId, dataset.id))).map(
    (f) => f.userId,
  );
  if (followerIds.length === 0) return 0;
  const followers = await ctx.db
    .select()
    .from(users)
    .where(and(inArray(users.id, followerIds), sql`${users.disabledAt} is null`, sql`${users.emailVerifiedAt} is not null`));
  const mailer = createMailer(ctx);
  let sent = 0;
  for (const follower of followers) {
    if (await alreadySent(ctx, "new-version", follower.email, versionId)) continue;
    const mail = templates.newVersion({
      publicUrl: ctx.config.publicUrl,
      followerName: follower.displayName,
      datasetTitle: dataset.title,
      slug: dataset.slug,
      semver: version.semver,
      changelog: version.changelog,
    });
    await mailer.send({
      kind: "new-version",
      to: follower.email,
      ...mail,
      meta: { versionId, datasetSlug: dataset.slug },
      // Two runs of the hook at once both pass the check above; the key lets only one record (and one delivery) in.
      deliveryKey: `new-version:${versionId}:${follower.email}`,
    });
    sent += 1;
  }
  return sent;
}
