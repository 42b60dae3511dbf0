/**
 * Mail through an outbox. A change that should send mail writes the message into `mail_outbox` in its own
 * transaction; after commit a sender (in every worker) claims due rows with SELECT ... FOR UPDATE SKIP LOCKED,
 * sends them over SMTP with nodemailer and marks them sent, retrying with exponential backoff.
 *
 * Guarantees: a crash never loses a message (it is in the table before the change commits), and two senders never
 * send the same row at once (the claim is a row lock plus a lease). The remaining edge: a sender that dies after
 * the SMTP server accepted a message but before it marked the row sent leaves the lease to lapse, and the message
 * goes out again, with the same Message-ID so that mail systems and readers can tell it is the same message.
 *
 * No "server-only": the worker runs outside Next.
 */
import { randomUUID } from "node:crypto";
import { sql } from "drizzle-orm";
import nodemailer, { type Transporter } from "nodemailer";
import type { Db, Tx } from "../../db/client";
import { mailOutbox } from "../../db/schema";
import type { Env } from "../env";
import { wakeMailSender } from "../jobs/queue";

export interface OutgoingMail {
  kind: string;
  to: string[];
  subject: string;
  body: string;
  revisionId?: number;
}

/** Writes a message into the outbox inside `tx`; it is sent after the transaction commits. */
export async function queueMail(tx: Tx, mail: OutgoingMail): Promise<void> {
  if (mail.to.length === 0) return;
  await tx.insert(mailOutbox).values({
    messageId: `<${randomUUID()}@cyclegate.mail>`,
    kind: mail.kind,
    recipients: mail.to,
    subject: mail.subject.slice(0, 300),
    body: mail.body,
    revisionId: mail.revisionId ?? null,
  });
  await wakeMailSender(tx);
}

/** A claim lasts this long; a sender that has not finished by then is presumed dead. */
const LEASE_SECONDS = 120;

/** Seconds before retry n (1-based): 10 s, 20 s, 40 s ... capped at an hour. */
export function mailBackoffSeconds(attempt: number): number {
  return Math.min(10 * 2 ** (attempt - 1), 3600);
}

export function mailTransport(env: Pick<Env, "smtpUrl">): Transporter {
  const url = new URL(env.smtpUrl);
  const local = url.protocol === "smtp:" && /^(127\.0\.0\.1|localhost|\[::1\])$/.test(url.hostname);
  return nodemailer.createTransport({
    host: url.hostname.replace(/^\[|\]$/g, ""),
    port: Number(url.port) || (url.protocol === "smtps:" ? 465 : 25),
    secure: url.protocol === "smtps:",
    auth: url.username ? { user: decodeURIComponent(url.username), pass: decodeURIComponent(url.password) } : undefined,
    // The local catcher speaks no TLS; a real relay gets nodemailer's default (STARTTLS when offered).
    ignoreTLS: local,
  });
}

type Claimed = {
  id: number;
  message_id: string;
  recipients: string[];
  subject: string;
  body: string;
  attempts: number;
};

/**
 * Sends what is due, batch by batch, until nothing is left. Returns how many messages went out.
 * Safe to run in several processes at once.
 */
export async function deliverOutbox(
  db: Db,
  transport: Transporter,
  env: Pick<Env, "mailFrom" | "mailRetries">,
  batchSize = 10,
): Promise<number> {
  let sent = 0;
  for (;;) {
    const claimed = await db.execute<Claimed>(sql`
      update ${mailOutbox} set state = 'sending', attempts = attempts + 1,
        locked_until = now() + make_interval(secs => ${LEASE_SECONDS})
      where id in (
        select id from ${mailOutbox}
        where (state = 'pending' and next_attempt_at <= now()) or (state = 'sending' and locked_until < now())
        order by id
        for update skip locked
        limit ${batchSize}
      )
      returning id, message_id, recipients, subject, body, attempts`);
    if (claimed.rows.length === 0) return sent;
    for (const m of claimed.rows) {
      try {
        await transport.sendMail({ from: env.mailFrom, to: m.recipients, subject: m.subject, text: m.body, messageId: m.message_id });
        await db.execute(sql`update ${mailOutbox} set state = 'sent', sent_at = now(), locked_until = null, last_error = null where id = ${m.id}`);
        sent++;
      } catch (e) {
        const reason = (e instanceof Error ? e.message : String(e)).slice(0, 1000);
        const final = m.attempts > env.mailRetries;
        await db.execute(sql`
          update ${mailOutbox} set state = ${final ? "failed" : "pending"}, locked_until = null, last_error = ${reason},
            next_attempt_at = now() + make_interval(secs => ${mailBackoffSeconds(m.attempts)})
          where id = ${m.id}`);
      }
    }
  }
}
