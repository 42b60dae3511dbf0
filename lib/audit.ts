import "server-only";
import { desc, gt, sql } from "drizzle-orm";
import { db, type Db } from "@/db";
import type { Tx } from "@/db/client";
import { auditEvents, auditRollups } from "@/db/schema";

export interface AuditInput {
  actor: { id: number; email: string } | null;
  action: string;
  objectType?: string;
  objectId?: string | number;
  details?: Record<string, unknown>;
  ip?: string | null;
}

/** Appends one event; pass the transaction so the event and the change land together or not at all. */
export async function recordEvent(input: AuditInput, tx: Tx | Db = db()): Promise<void> {
  await tx.insert(auditEvents).values(eventRow(input));
}

const eventRow = (input: AuditInput) => ({
  actorId: input.actor?.id ?? null,
  actorEmail: input.actor?.email ?? null,
  action: input.action,
  objectType: input.objectType ?? null,
  objectId: input.objectId === undefined ? null : String(input.objectId),
  details: input.details ?? {},
  ip: input.ip ?? null,
});

/** How long repeated events are counted before their summary row is written. */
export const ROLLUP_WINDOW_SECONDS = 15 * 60;
/** Distinct varying values (e.g. e-mails tried) a summary row keeps. */
export const ROLLUP_SAMPLES = 10;

export interface RepeatedEvent extends AuditInput {
  /**
   * What makes events "the same": the action plus the actor or the address plus what is constant
   * (a permission, a purpose). Never free text a caller chooses, or each new value opens a new row.
   */
  key: string;
  /** Details the summary row repeats (those the same for every event of the key). */
  summary?: Record<string, unknown>;
  /** A value that varies between the events and is worth showing (up to ROLLUP_SAMPLES distinct ones are kept). */
  sample?: { name: string; value: string };
}

/** What audit_rollups.event holds: the first event's who, what and where. */
interface RollupEvent extends AuditInput {
  summary?: Record<string, unknown>;
  sampleName?: string;
}

/**
 * Records an event that an attacker could repeat at will (a throttled try, a refusal) without
 * letting them grow the record: the first event of a ROLLUP_WINDOW_SECONDS window under `key` is
 * written at once, the rest are counted, and when the window has ended one summary row carries the
 * count (`repeated`), the first and last times and the samples. Safe under concurrency: the count
 * is one atomic upsert, and each summary is written by exactly one transaction.
 */
export async function recordRepeatedEvent(input: RepeatedEvent): Promise<void> {
  const { key, summary, sample, ...event } = input;
  const stored: RollupEvent = { ...event, summary, sampleName: sample?.name };
  const sampleValue = sample?.value ?? null;
  await db().transaction(async (tx) => {
    await flushRollups(tx);
    const [row] = await tx
      .insert(auditRollups)
      .values({
        key: key.slice(0, 200),
        event: stored,
        windowEnd: sql`now() + make_interval(secs => ${ROLLUP_WINDOW_SECONDS})`,
        samples: sampleValue === null ? [] : [sampleValue],
      })
      .onConflictDoUpdate({
        target: auditRollups.key,
        set: {
          repeats: sql`${auditRollups.repeats} + 1`,
          lastAt: sql`now()`,
          samples: sql`case
            when ${sampleValue}::text is null
              or ${auditRollups.samples} @> jsonb_build_array(${sampleValue}::text)
              or jsonb_array_length(${auditRollups.samples}) >= ${ROLLUP_SAMPLES}
            then ${auditRollups.samples}
            else ${auditRollups.samples} || jsonb_build_array(${sampleValue}::text) end`,
        },
      })
      .returning({ repeats: auditRollups.repeats });
    if (row?.repeats === 0) await recordEvent(event, tx);
  });
}

/**
 * Writes the summary row of every roll-up whose window has ended and forgets the roll-up. Runs
 * before the record is read, so a reader sees every closed window counted. Rows another
 * transaction is flushing are skipped, never waited for.
 */
export async function flushAuditRollups(): Promise<void> {
  await db().transaction((tx) => flushRollups(tx));
}

async function flushRollups(tx: Tx): Promise<void> {
  const done = await tx
    .delete(auditRollups)
    .where(
      sql`${auditRollups.key} in (select key from audit_rollups where window_end <= now() for update skip locked)`,
    )
    .returning();
  const rows = done
    .filter((r) => r.repeats > 0)
    .map((r) => {
      const e = r.event as RollupEvent;
      const details: Record<string, unknown> = {
        ...e.summary,
        repeated: r.repeats,
        firstAt: r.firstAt.toISOString(),
        lastAt: r.lastAt.toISOString(),
        ...(e.sampleName && { [e.sampleName]: r.samples }),
      };
      // Dated at the window's last event, so the summary sits beside the events it counts.
      return { ...eventRow({ ...e, details }), at: r.lastAt };
    });
  if (rows.length > 0) await tx.insert(auditEvents).values(rows);
}

/** A roll-up whose window is still open: events counted so far that have no summary row yet. */
export interface OpenRollup {
  action: string;
  actorEmail: string | null;
  ip: string | null;
  /** Events after the first one, so far. */
  repeated: number;
  lastAt: string;
  /** When the summary row will be written. */
  windowEnd: string;
}

/** The open roll-ups with repeats, most recent first (at most `limit`), so a reader sees what is still being counted. */
export async function openAuditRollups(limit = 20): Promise<OpenRollup[]> {
  const rows = await db()
    .select({ event: auditRollups.event, repeats: auditRollups.repeats, lastAt: auditRollups.lastAt, windowEnd: auditRollups.windowEnd })
    .from(auditRollups)
    .where(gt(auditRollups.repeats, 0))
    .orderBy(desc(auditRollups.lastAt))
    .limit(limit);
  return rows.map((r) => {
    const e = r.event as RollupEvent;
    return {
      action: e.action,
      actorEmail: e.actor?.email ?? null,
      ip: e.ip ?? null,
      repeated: r.repeats,
      lastAt: r.lastAt.toISOString(),
      windowEnd: r.windowEnd.toISOString(),
    };
  });
}

export type { Tx };
