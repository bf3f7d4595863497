import { desc, eq } from "drizzle-orm";
import { outbox } from "@/db/schema";
import type { OutboxMessage } from "@/schemas/account";
import type { AppContext } from "@/server/context";
import { notFound } from "@/server/errors";

const summaryOf = (m: typeof outbox.$inferSelect) => ({
  id: m.id,
  kind: m.kind,
  to: m.to,
  subject: m.subject,
  transport: m.transport,
  createdAt: m.createdAt.toISOString(),
});

export async function listOutbox(ctx: AppContext, limit = 200) {
  const rows = await ctx.db.select().from(outbox).orderBy(desc(outbox.createdAt)).limit(limit);
  return rows.map(summaryOf);
}

export async function outboxMessageById(ctx: AppContext, id: string): Promise<OutboxMessage> {
  const [m] = await ctx.db.select().from(outbox).where(eq(outbox.id, id));
  if (!m) throw notFound("No message has this id.");
  // Links are pulled out of the plain text so the screen can make them tappable without rendering mail HTML.
  const links = [...new Set(m.text.match(/https?:\/\/[^\s<>"]+/g) ?? [])];
  return { ...summaryOf(m), text: m.text, html: m.html, links };
}
