import { eq } from "drizzle-orm";
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
  /** Facts for the outbox and for de-duplication (user id, version id, …). Never a secret. */
  meta?: Record<string, unknown>;
}

export interface Mailer {
  /**
   * Record the message in the outbox and start its delivery. Returns the outbox id once the record is stored; the
   * transport works in the background, so a slow or unreachable mail server never holds a request.
   */
  send(message: MailMessage): Promise<string>;
  /** Resolves when every delivery started so far has ended (sent, or failed with the failure recorded). */
  idle(): Promise<void>;
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
 */
export function createMailer(ctx: AppContext): Mailer {
  const existing = mailers.get(ctx);
  if (existing) return existing;
  const useSmtp = sendsMailBySmtp(ctx.config);
  const transporter: Transporter = useSmtp
    ? nodemailer.createTransport({ url: ctx.config.smtpUrl!, ...smtpTimeouts })
    : nodemailer.createTransport({ jsonTransport: true });
  const inFlight = new Set<Promise<void>>();
  const transport = useSmtp ? "smtp" : "outbox";

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
        })
        .returning({ id: outbox.id });
      const delivery = transporter
        .sendMail({ from: ctx.config.mailFrom, to: message.to, subject: message.subject, text: message.text, html: message.html })
        .then(
          () => undefined,
          async (error: unknown) => {
            // The request that caused the message has its answer already; the failure is kept beside the message.
            console.error(`mail to ${message.to} (${message.kind}) failed:`, error);
            await ctx.db
              .update(outbox)
              .set({ meta: { ...message.meta, deliveryError: (error as Error).message } })
              .where(eq(outbox.id, row!.id));
          },
        )
        .catch((error: unknown) => console.error(`recording the failed delivery of outbox message ${row!.id} failed:`, error))
        .finally(() => inFlight.delete(delivery));
      inFlight.add(delivery);
      return row!.id;
    },
    async idle() {
      while (inFlight.size > 0) await Promise.all([...inFlight]);
    },
  };
  mailers.set(ctx, mailer);
  return mailer;
}

/** Wait for the app's mail deliveries in flight (before closing its database, in tests and at shutdown). */
export async function mailDeliveriesEnded(ctx: AppContext): Promise<void> {
  await mailers.get(ctx)?.idle();
}
