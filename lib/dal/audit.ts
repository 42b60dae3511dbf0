import "server-only";
import { and, count, desc, eq, gte, ilike, lt, type SQL } from "drizzle-orm";
import { z } from "zod";
import { db } from "@/db";
import { auditEvents } from "@/db/schema";
import { authorize } from "@/lib/auth/session";
import { likeEscape } from "@/lib/dal/sql";

export const AUDIT_PAGE_SIZE = 50;

const dateOnly = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, "Use YYYY-MM-DD.")
  .refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)), "Not a date.");
const blankToUndefined = (v: unknown) => (typeof v === "string" && v.trim() === "" ? undefined : v);

export const auditFilterSchema = z.object({
  actor: z.preprocess(blankToUndefined, z.string().trim().max(254).optional()),
  action: z.preprocess(blankToUndefined, z.string().trim().max(64).optional()),
  objectType: z.preprocess(blankToUndefined, z.string().trim().max(32).optional()),
  objectId: z.preprocess(blankToUndefined, z.string().trim().max(64).optional()),
  from: z.preprocess(blankToUndefined, dateOnly.optional()),
  to: z.preprocess(blankToUndefined, dateOnly.optional()),
  page: z.preprocess(blankToUndefined, z.coerce.number().int().min(1).max(100_000).default(1)),
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

/** One page of events, newest first; dates are whole UTC days, `to` included. */
export async function listAuditEvents(filter: AuditFilter): Promise<{ rows: AuditRow[]; total: number; page: number; pageSize: number }> {
  await authorize("readAudit");
  const where: SQL[] = [];

  if (filter.actor) where.push(ilike(auditEvents.actorEmail, `%${likeEscape(filter.actor)}%`));
  if (filter.action) where.push(ilike(auditEvents.action, `${likeEscape(filter.action)}%`));
  if (filter.objectType) where.push(eq(auditEvents.objectType, filter.objectType));
  if (filter.objectId) where.push(eq(auditEvents.objectId, filter.objectId));
  if (filter.from) where.push(gte(auditEvents.at, new Date(`${filter.from}T00:00:00Z`)));
  if (filter.to) where.push(lt(auditEvents.at, new Date(Date.parse(`${filter.to}T00:00:00Z`) + 86_400_000)));
  const cond = where.length ? and(...where) : undefined;
  const [rows, [totalRow]] = await Promise.all([
    db()
      .select(auditRowColumns)
      .from(auditEvents)
      .where(cond)
      .orderBy(desc(auditEvents.at), desc(auditEvents.id))
      .limit(AUDIT_PAGE_SIZE)
      .offset((filter.page - 1) * AUDIT_PAGE_SIZE),
    db().select({ n: count() }).from(auditEvents).where(cond),
  ]);
  return {
    rows: rows.map(toAuditRow),
    total: totalRow?.n ?? 0,
    page: filter.page,
    pageSize: AUDIT_PAGE_SIZE,
  };
}
