import "server-only";
import { desc, eq, sql } from "drizzle-orm";
import { db } from "@/db";
import { mailOutbox, type MailState } from "@/db/schema";
import { authorize } from "@/lib/auth/session";
import { iso } from "@/lib/dal/sql";

export const OUTBOX_PAGE_SIZE = 50;

export interface OutboxMessage {
  id: number;
  messageId: string;
  kind: string;
  recipients: string[];
  subject: string;
  revisionId: number | null;
  /** pending (waiting or retrying), sending (claimed by a sender), sent, failed (gave up). */
  state: MailState;
  attempts: number;
  nextAttemptAt: string | null;
  lastError: string | null;
  createdAt: string;
  sentAt: string | null;
}

/** The mail outbox, newest first, optionally one state; with the count per state. */
export async function listOutbox(filter: { state?: MailState; page: number }): Promise<{
  messages: OutboxMessage[];
  counts: Record<MailState, number>;
  total: number;
  page: number;
  pageSize: number;
}> {
  await authorize("readOutbox");
  const cond = filter.state ? eq(mailOutbox.state, filter.state) : undefined;
  const [rows, counts] = await Promise.all([
    db()
      .select({
        id: mailOutbox.id,
        messageId: mailOutbox.messageId,
        kind: mailOutbox.kind,
        recipients: mailOutbox.recipients,
        subject: mailOutbox.subject,
        revisionId: mailOutbox.revisionId,
        state: mailOutbox.state,
        attempts: mailOutbox.attempts,
        nextAttemptAt: mailOutbox.nextAttemptAt,
        lastError: mailOutbox.lastError,
        createdAt: mailOutbox.createdAt,
        sentAt: mailOutbox.sentAt,
      })
      .from(mailOutbox)
      .where(cond)
      .orderBy(desc(mailOutbox.id))
      .limit(OUTBOX_PAGE_SIZE)
      .offset((filter.page - 1) * OUTBOX_PAGE_SIZE),
    db().select({ state: mailOutbox.state, n: sql<number>`count(*)::int` }).from(mailOutbox).groupBy(mailOutbox.state),
  ]);
  const byState: Record<MailState, number> = { pending: 0, sending: 0, sent: 0, failed: 0 };
  for (const c of counts) byState[c.state] = c.n;
  return {
    messages: rows.map((r) => ({
      ...r,
      nextAttemptAt: r.state === "pending" ? iso(r.nextAttemptAt) : null,
      createdAt: r.createdAt.toISOString(),
      sentAt: iso(r.sentAt),
    })),
    counts: byState,
    total: filter.state ? byState[filter.state] : Object.values(byState).reduce((a, b) => a + b, 0),
    page: filter.page,
    pageSize: OUTBOX_PAGE_SIZE,
  };
}
