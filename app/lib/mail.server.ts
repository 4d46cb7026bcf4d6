import { and, asc, desc, isNull, lte, sql } from "drizzle-orm";
import nodemailer, { type Transporter } from "nodemailer";
import { mailAttachments, mailOutbox } from "~/db/schema";
import { db, type DbOrTx } from "./db.server";
import { env } from "./env.server";

export type Mail = { to: string; subject: string; text: string; html: string };
export type MailAttachment = { filename: string; contentType: string; content: Buffer };

/** Writes the message (and any files it carries) to the outbox in the caller's transaction; the worker sends it. */
export async function enqueueMail(tx: DbOrTx, mail: Mail, attachments: MailAttachment[] = []): Promise<void> {
  const [row] = await tx.insert(mailOutbox).values(mail).returning({ id: mailOutbox.id });
  if (attachments.length) await tx.insert(mailAttachments).values(attachments.map((a) => ({ ...a, mailId: row.id })));
}

const escapeHtml = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);

/** Our plain mail layout: a greeting, paragraphs, one action link, a footer. */
export function composeMail(opts: {
  to: string;
  subject: string;
  greeting: string;
  paragraphs: string[];
  action?: { label: string; url: string };
  footer?: string;
}): Mail {
  const footer = opts.footer ?? "Benchreel, the shop's knowledge base.";
  const text = [
    opts.greeting,
    "",
    ...opts.paragraphs.flatMap((p) => [p, ""]),
    ...(opts.action ? [`${opts.action.label}: ${opts.action.url}`, ""] : []),
    "--",
    footer,
  ].join("\n");
  const html = `<!doctype html><html><body style="font-family:Georgia,serif;color:#2b2925;background:#faf6ee;padding:24px">
<p>${escapeHtml(opts.greeting)}</p>
${opts.paragraphs.map((p) => `<p>${escapeHtml(p)}</p>`).join("\n")}
${opts.action ? `<p><a href="${escapeHtml(opts.action.url)}" style="color:#1f6f6b">${escapeHtml(opts.action.label)}</a></p>` : ""}
<p style="color:#6b655b;font-size:12px">${escapeHtml(footer)}</p>
</body></html>`;
  return { to: opts.to, subject: opts.subject, text, html };
}

export function createTransport(smtpUrl: string): Transporter {
  const u = new URL(smtpUrl);
  const loopback = ["127.0.0.1", "localhost", "[::1]"].includes(u.hostname);
  return nodemailer.createTransport({
    host: u.hostname,
    port: Number(u.port || (u.protocol === "smtps:" ? 465 : 587)),
    secure: u.protocol === "smtps:",
    // The local fake speaks plain SMTP only (its bundled certificate has expired).
    ignoreTLS: loopback && u.protocol === "smtp:",
    auth: u.username ? { user: decodeURIComponent(u.username), pass: decodeURIComponent(u.password) } : undefined,
    connectionTimeout: 5000,
    greetingTimeout: 5000,
    socketTimeout: 10000,
  });
}

export function retryDelayMs(attempts: number, baseMs: number): number {
  return Math.min(baseMs * 2 ** Math.max(0, attempts - 1), 10 * 60 * 1000);
}

/**
 * Sends what is due, `lanes` messages at a time, each row under a row lock that the other lanes
 * and workers skip, so no two take the same message (one that SMTP accepted just before a crash
 * is sent again: at least once, never twice at once). A change that notifies every editor
 * queues one message each; sent one at a time they kept the messages behind them waiting.
 * Messages to one person may therefore arrive out of order. A failure leaves the row pending
 * with a later next attempt; while SMTP is down, each lane's first row of a tick counts one.
 */
export async function drainOutbox(opts: { transport: Transporter; from?: string; retryBaseMs?: number; limit?: number; lanes?: number }) {
  const lanes = Math.max(1, opts.lanes ?? 4);
  const limit = opts.limit ?? 50;
  const each = await Promise.all(Array.from({ length: lanes }, (_, i) => drainLane({ ...opts, limit: Math.ceil((limit - i) / lanes) })));
  return { sent: each.reduce((n, r) => n + r.sent, 0), failed: each.reduce((n, r) => n + r.failed, 0) };
}

async function drainLane(opts: { transport: Transporter; from?: string; retryBaseMs?: number; limit: number }) {
  const from = opts.from ?? env().MAIL_FROM;
  const base = opts.retryBaseMs ?? 5000;
  let sent = 0;
  let failed = 0;
  for (let i = 0; i < opts.limit; i++) {
    const outcome = await db().transaction(async (tx) => {
      const [row] = await tx
        .select()
        .from(mailOutbox)
        .where(and(isNull(mailOutbox.sentAt), lte(mailOutbox.nextAttemptAt, sql`now()`)))
        .orderBy(asc(mailOutbox.id))
        .limit(1)
        .for("update", { skipLocked: true });
      if (!row) return "empty" as const;
      try {
        const attachments = await tx
          .select({ filename: mailAttachments.filename, contentType: mailAttachments.contentType, content: mailAttachments.content })
          .from(mailAttachments)
          .where(sql`${mailAttachments.mailId} = ${row.id}`)
          .orderBy(asc(mailAttachments.id));
        await opts.transport.sendMail({ from, to: row.to, subject: row.subject, text: row.text, html: row.html, attachments });
        await tx
          .update(mailOutbox)
          .set({ sentAt: new Date(), attempts: row.attempts + 1, lastError: null })
          .where(sql`${mailOutbox.id} = ${row.id}`);
        return "sent" as const;
      } catch (err) {
        const attempts = row.attempts + 1;
        await tx
          .update(mailOutbox)
          .set({
            attempts,
            lastError: String((err as Error).message ?? err).slice(0, 500),
            nextAttemptAt: new Date(Date.now() + retryDelayMs(attempts, base)),
          })
          .where(sql`${mailOutbox.id} = ${row.id}`);
        return "failed" as const;
      }
    });
    if (outcome === "empty") break;
    if (outcome === "sent") sent++;
    else {
      failed++;
      break; // SMTP is likely down; try again on the next tick
    }
  }
  return { sent, failed };
}

export async function mailStatus(): Promise<{ pending: number; failing: number }> {
  const [r] = await db()
    .select({
      pending: sql<number>`count(*) filter (where ${mailOutbox.sentAt} is null)::int`,
      failing: sql<number>`count(*) filter (where ${mailOutbox.sentAt} is null and ${mailOutbox.attempts} > 0)::int`,
    })
    .from(mailOutbox);
  return r ?? { pending: 0, failing: 0 };
}

/** The newest messages of the outbox, sent or not, with their delivery state (the admin's Outbox page). */
export async function recentOutbox(limit = 30) {
  return db()
    .select({
      id: mailOutbox.id,
      to: mailOutbox.to,
      subject: mailOutbox.subject,
      attempts: mailOutbox.attempts,
      lastError: mailOutbox.lastError,
      sentAt: mailOutbox.sentAt,
      createdAt: mailOutbox.createdAt,
    })
    .from(mailOutbox)
    .orderBy(desc(mailOutbox.id))
    .limit(limit);
}
