import { eq } from "drizzle-orm";
import nodemailer, { type Transporter } from "nodemailer";
import { outbox } from "@/db/schema";
import { sendsMailBySmtp } from "@/server/config";
import type { AppContext } from "@/server/context";

export interface MailMessage {
  /** What the message is for (verification, reset, invitation, …); the outbox screen groups by it. */
  kind: string;
  to: string;
  subject: string;
  text: string;
  html?: string;
  /** Facts for the outbox and for de-duplication (user id, version id, …). Never a secret. */
  meta?: Record<string, unknown>;
}

export interface Mailer {
  /** Record the message in the outbox, then hand it to the transport. Returns the outbox id. */
  send(message: MailMessage): Promise<string>;
  transport: "outbox" | "smtp";
}

export const redactLinkTokens = (body: string) => body.replace(/([?&](?:amp;)?token=)[^\s&"<]+/g, "$1[redacted]");

const mailers = new WeakMap<AppContext, Mailer>();

/**
 * The app's mailer. In development and tests nodemailer's JSON transport renders each message and nothing leaves the
 * machine; the outbox table is where it can be read (also in production with PLOTBANK_MAIL_OUTBOX_ONLY). In production
 * with SMTP_URL, messages go out over SMTP and are
 * recorded in the outbox too, so an admin can tell what was sent when someone says a link never came.
 */
export function createMailer(ctx: AppContext): Mailer {
  const existing = mailers.get(ctx);
  if (existing) return existing;
  const useSmtp = sendsMailBySmtp(ctx.config);
  const transporter: Transporter = useSmtp
    ? nodemailer.createTransport(ctx.config.smtpUrl!)
    : nodemailer.createTransport({ jsonTransport: true });
  const transport = useSmtp ? "smtp" : "outbox";

  const mailer: Mailer = {
    transport,
    async send(message) {
      // Real mail's record keeps no live link secrets: whoever reads the table must not be able to use the links.
      const keep = (body: string) => (useSmtp ? redactLinkTokens(body) : body);
      const [row] = await ctx.db
        .insert(outbox)
        .values({ kind: message.kind, to: message.to, subject: message.subject, text: keep(message.text), html: message.html ? keep(message.html) : null, meta: message.meta ?? {}, transport })
        .returning({ id: outbox.id });
      try {
        await transporter.sendMail({ from: ctx.config.mailFrom, to: message.to, subject: message.subject, text: message.text, html: message.html });
      } catch (error) {
        // The request that caused the message still succeeds; the failure is kept beside the message for the admin.
        console.error(`mail to ${message.to} (${message.kind}) failed:`, error);
        await ctx.db
          .update(outbox)
          .set({ meta: { ...message.meta, deliveryError: (error as Error).message } })
          .where(eq(outbox.id, row!.id));
      }
      return row!.id;
    },
  };
  mailers.set(ctx, mailer);
  return mailer;
}
