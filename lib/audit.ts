import "server-only";
import { db, type Db } from "@/db";
import type { Tx } from "@/db/client";
import { auditEvents } from "@/db/schema";

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
  await tx.insert(auditEvents).values({
    actorId: input.actor?.id ?? null,
    actorEmail: input.actor?.email ?? null,
    action: input.action,
    objectType: input.objectType ?? null,
    objectId: input.objectId === undefined ? null : String(input.objectId),
    details: input.details ?? {},
    ip: input.ip ?? null,
  });
}

export type { Tx };
