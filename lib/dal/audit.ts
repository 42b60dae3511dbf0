import "server-only";
import { and, count, desc, eq, gte, ilike, lt, type SQL } from "drizzle-orm";
import { z } from "zod";
import { db } from "@/db";
import { auditEvents } from "@/db/schema";
import { flushAuditRollups, openAuditRollups, type OpenRollup } from "@/lib/audit";
import { authorize } from "@/lib/auth/session";
import { likeEscape } from "@/lib/dal/sql";
import { calendarDate, decimalNumber, singleLineText } from "@/lib/validation";

export const AUDIT_PAGE_SIZE = 50;

const blankToUndefined = (v: unknown) => (typeof v === "string" && v.trim() === "" ? undefined : v);
const optional = <T extends z.ZodType>(schema: T) => z.preprocess(blankToUndefined, schema.optional());

export const auditFilterSchema = z.object({
  actor: optional(singleLineText({ max: 254 })),
  action: optional(singleLineText({ max: 64 })),
  objectType: optional(singleLineText({ max: 32 })),
  objectId: optional(singleLineText({ max: 64 })),
  from: optional(calendarDate()),
  to: optional(calendarDate()),
  page: z.preprocess(
    blankToUndefined,
    decimalNumber("Use a page number.")
      .refine((n) => Number.isInteger(n) && n >= 1 && n <= 100_000, "Use a page number from 1 to 100000.")
      .default(1),
  ),
});

export type AuditFilter = z.infer<typeof auditFilterSchema>;

export interface AuditRow {
  id: number;
  at: string;
  actorEmail: string | null;
  action: string;
  objectType: string | null;
  objectId: string | null;
  details: unknown;
  ip: string | null;
}

/** The columns of an AuditRow (`at` still a Date: map rows with toAuditRow). */
export const auditRowColumns = {
  id: auditEvents.id,
  at: auditEvents.at,
  actorEmail: auditEvents.actorEmail,
  action: auditEvents.action,
  objectType: auditEvents.objectType,
  objectId: auditEvents.objectId,
  details: auditEvents.details,
  ip: auditEvents.ip,
};

export const toAuditRow = (r: Omit<AuditRow, "at"> & { at: Date }): AuditRow => ({ ...r, at: r.at.toISOString() });

/**
 * One page of events, newest first; dates are whole UTC days, `to` included. Closed roll-up windows
 * are written first; `counting` lists the open ones (repeats counted, summary not yet written).
 */
export async function listAuditEvents(
  filter: AuditFilter,
): Promise<{ rows: AuditRow[]; total: number; page: number; pageSize: number; counting: OpenRollup[] }> {
  await authorize("readAudit");
  await flushAuditRollups();
  const where: SQL[] = [];

  if (filter.actor) where.push(ilike(auditEvents.actorEmail, `%${likeEscape(filter.actor)}%`));
  if (filter.action) where.push(ilike(auditEvents.action, `${likeEscape(filter.action)}%`));
  if (filter.objectType) where.push(eq(auditEvents.objectType, filter.objectType));
  if (filter.objectId) where.push(eq(auditEvents.objectId, filter.objectId));
  if (filter.from) where.push(gte(auditEvents.at, new Date(`${filter.from}T00:00:00Z`)));
  if (filter.to) where.push(lt(auditEvents.at, new Date(Date.parse(`${filter.to}T00:00:00Z`) + 86_400_000)));
  const cond = where.length ? and(...where) : undefined;
  const [rows, [totalRow], counting] = await Promise.all([
    db()
      .select(auditRowColumns)
      .from(auditEvents)
      .where(cond)
      .orderBy(desc(auditEvents.at), desc(auditEvents.id))
      .limit(AUDIT_PAGE_SIZE)
      .offset((filter.page - 1) * AUDIT_PAGE_SIZE),
    db().select({ n: count() }).from(auditEvents).where(cond),
    openAuditRollups(),
  ]);
  return {
    rows: rows.map(toAuditRow),
    total: totalRow?.n ?? 0,
    page: filter.page,
    pageSize: AUDIT_PAGE_SIZE,
    counting,
  };
}
