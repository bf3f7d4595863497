import { and, eq, isNull, sql } from "drizzle-orm";
import nodemailer, { type Transporter } from "nodemailer";
import { outbox } from "@/db/schema";
import { sendsMailBySmtp } from "@/server/config";
import type { AppContext } from "@/server/context";

interface MailMessage {
  /** What the message is for (verification, reset, invitation, …); the outbox screen groups by it. */
  kind: string;
  to: string;
  subject: string;
  text: string;
  html?: string;
  /** Facts for the outbox (user id, version id, …). Never a secret. */
  meta?: Record<string, unknown>;
  /**
   * What makes this message one of a kind, for notices that may be asked for twice (a publish hook run again): a
   * second send with the same key finds the first record and sends nothing. Without one, every send is a new message.
   */
  deliveryKey?: string;
}

/** What a delivery job carries: the message as sent (the outbox row may keep it without its link secrets). */
interface DeliveryPayload {
  outboxId: string;
  to: string;
  subject: string;
  text: string;
  html?: string;
}

export interface Mailer {
  /**
   * Record the message in the outbox and queue its delivery. Returns the outbox id once the record is stored; the
   * transport works in a background job, so a slow or unreachable mail server never holds a request.
   */
  send(message: MailMessage): Promise<string>;
  /** The delivery job's work: hand the message to the transport unless an earlier attempt already did. */
  deliver(payload: DeliveryPayload): Promise<void>;
  transport: "outbox" | "smtp";
}

/** Bounds on one SMTP conversation: a server that accepts and then says nothing is given up on, not waited for. */
const smtpTimeouts = { connectionTimeout: 10_000, greetingTimeout: 10_000, socketTimeout: 30_000 };

const redactLinkTokens = (body: string) => body.replace(/([?&](?:amp;)?token=)[^\s&"<]+/g, "$1[redacted]");

const mailers = new WeakMap<AppContext, Mailer>();

/**
 * The app's mailer. In development and tests nodemailer's JSON transport renders each message and nothing leaves the
 * machine; the outbox table is where it can be read (also in production with PLOTBANK_MAIL_OUTBOX_ONLY). In production
 * with SMTP_URL, messages go out over SMTP and are recorded in the outbox too, so an admin can tell what was sent when
 * someone says a link never came.
 *
 * Each outbox row is one delivery (one message to one recipient) and its delivery is one job keyed by the row: a
 * retried job finds delivered_at set and sends nothing. The one window left is a process dying after the mail server
 * took the message and before delivered_at is written; the message then goes again with the same Message-ID, which
 * mail systems use to drop the copy.
 */
export function createMailer(ctx: AppContext): Mailer {
  const existing = mailers.get(ctx);
  if (existing) return existing;
  const useSmtp = sendsMailBySmtp(ctx.config);
  const transporter: Transporter = useSmtp
    ? nodemailer.createTransport({ url: ctx.config.smtpUrl!, ...smtpTimeouts })
    : nodemailer.createTransport({ jsonTransport: true });
  const transport = useSmtp ? "smtp" : "outbox";
  const mailDomain = /@([^>\s]+)/.exec(ctx.config.mailFrom)?.[1] ?? "plotbank.invalid";

  const mailer: Mailer = {
    transport,
    async send(message) {
      // Real mail's record keeps no live link secrets: whoever reads the table must not be able to use the links.
      const keep = (body: string) => (useSmtp ? redactLinkTokens(body) : body);
      const [row] = await ctx.db
        .insert(outbox)
        .values({
          kind: message.kind,
          to: message.to,
          subject: message.subject,
          text: keep(message.text),
          html: message.html ? keep(message.html) : null,
          meta: message.meta ?? {},
          transport,
          deliveryKey: message.deliveryKey ?? null,
        })
        .onConflictDoNothing({ target: outbox.deliveryKey })
        .returning({ id: outbox.id });
      if (!row) {
        const [first] = await ctx.db.select({ id: outbox.id }).from(outbox).where(eq(outbox.deliveryKey, message.deliveryKey!));
        return first!.id;
      }
      const payload: DeliveryPayload = {
        outboxId: row.id,
        to: message.to,
        subject: message.subject,
        text: message.text,
        html: message.html,
      };
      await ctx.jobs.add("mail-deliver", { ...payload }, { key: `mail:${row.id}`, mode: "keep" });
      return row.id;
    },
    async deliver(payload) {
      const [claimed] = await ctx.db
        .update(outbox)
        .set({ deliveryAttempts: sql`${outbox.deliveryAttempts} + 1` })
        .where(and(eq(outbox.id, payload.outboxId), isNull(outbox.deliveredAt)))
        .returning({ meta: outbox.meta, kind: outbox.kind });
      if (!claimed) return; // delivered already (or the record is gone): nothing to send
      try {
        await transporter.sendMail({
          from: ctx.config.mailFrom,
          to: payload.to,
          subject: payload.subject,
          text: payload.text,
          html: payload.html,
          messageId: `<${payload.outboxId}@${mailDomain}>`,
        });
      } catch (error) {
        // The request that caused the message has its answer already; the failure is kept beside the message.
        console.error(`mail to ${payload.to} (${claimed.kind}) failed:`, error);
        await ctx.db
          .update(outbox)
          .set({ meta: { ...claimed.meta, deliveryError: (error as Error).message } })
          .where(eq(outbox.id, payload.outboxId));
        throw error;
      }
      const { deliveryError: _cleared, ...meta } = claimed.meta ?? {};
      await ctx.db.update(outbox).set({ deliveredAt: new Date(), meta }).where(eq(outbox.id, payload.outboxId));
    },
  };
  mailers.set(ctx, mailer);
  return mailer;
}

/** The delivery job's handler. */
export function deliverMail(ctx: AppContext, payload: Record<string, unknown>): Promise<void> {
  return createMailer(ctx).deliver(payload as unknown as DeliveryPayload);
}

/** Wait for the app's queued mail deliveries that are due (before closing its database, in tests and at shutdown). */
export async function mailDeliveriesEnded(ctx: AppContext): Promise<void> {
  await ctx.jobs.drain();
}
