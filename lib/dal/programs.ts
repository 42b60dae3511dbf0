import "server-only";
import { and, asc, desc, eq, ilike, inArray, isNotNull, or, sql, type SQL } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { db } from "@/db";
import {
  auditEvents,
  machines,
  parts,
  programs,
  revisionAnalyses,
  revisionFindings,
  revisionOffsets,
  revisions,
  revisionTools,
  users,
  type RevisionStatus,
} from "@/db/schema";
import { recordEvent } from "@/lib/audit";
import { RequestError } from "@/lib/auth/errors";
import { authorize, requestIp, type CurrentUser } from "@/lib/auth/session";
import { auditRowColumns, toAuditRow, type AuditRow } from "@/lib/dal/audit";
import { likeEscape } from "@/lib/dal/sql";
import { decider, revisionSummaryColumns, toRevisionSummary, uploader, type RevisionSummary, type UserRef } from "@/lib/dal/views";
import { isUniqueViolation } from "@/lib/db-errors";
import { requestAnalysis } from "@/lib/jobs/queue";
import type { ProgramInput, ProgramListQuery, ProgramUpdate } from "@/lib/vault-validation";

export interface ProgramListItem {
  id: number;
  programNumber: string;
  title: string;
  operation: string;
  part: { id: number; number: string; name: string };
  machine: { id: number; name: string };
  partsPerCycle: number;
  safeZ: number | null;
  updatedAt: string;
  /** The newest revision (what the tool, rule and offset filters look at). */
  latest: {
    id: number;
    number: number;
    status: RevisionStatus;
    analysisState: string | null;
    errorCount: number | null;
    warningCount: number | null;
    totalSeconds: number | null;
    toolCount: number | null;
    workOffsets: string[];
  } | null;
  released: { id: number; number: number } | null;
}

export interface ProgramList {
  programs: ProgramListItem[];
  total: number;
  page: number;
  pageSize: number;
}

export interface ProgramDetail extends Omit<ProgramListItem, "latest" | "released"> {
  part: { id: number; number: string; name: string; customer: string; material: string };
  machine: { id: number; name: string; units: "mm" | "inch"; safeZ: number };
  createdBy: UserRef;
  createdAt: string;
  releasedRevisionId: number | null;
  /** Newest first. */
  revisions: RevisionSummary[];
}

const latestRev = alias(revisions, "latest_rev");
const latestAnalysis = alias(revisionAnalyses, "latest_analysis");
const releasedRev = alias(revisions, "released_rev");

const SORTS: Record<ProgramListQuery["sort"], { col: SQL | typeof programs.programNumber; dir: "asc" | "desc" }> = {
  programNumber: { col: sql`lower(${programs.programNumber})`, dir: "asc" },
  title: { col: sql`lower(${programs.title})`, dir: "asc" },
  part: { col: sql`lower(${parts.number})`, dir: "asc" },
  machine: { col: sql`lower(${machines.name})`, dir: "asc" },
  updated: { col: sql`${programs.updatedAt}`, dir: "desc" },
  status: { col: sql`${latestRev.status}`, dir: "asc" },
};

/**
 * One page of programs with search, filters and sorting done in the database. `status=released` means "has a
 * released revision"; other statuses, `tool`, `rule` and `offset` look at the newest revision.
 */
export async function listPrograms(query: ProgramListQuery): Promise<ProgramList> {
  await authorize("readPrograms");
  const where: SQL[] = [];
  if (query.q) {
    const like = `%${likeEscape(query.q.toLowerCase())}%`;
    where.push(
      or(
        sql`lower(${programs.programNumber} || ' ' || ${programs.title}) like ${like}`,
        ilike(parts.number, like),
        ilike(parts.name, like),
      )!,
    );
  }
  if (query.part) {
    where.push(/^\d+$/.test(query.part) ? eq(parts.id, Number(query.part)) : ilike(parts.number, `${likeEscape(query.part)}%`));
  }
  if (query.program) where.push(sql`lower(${programs.programNumber}) like ${`${likeEscape(query.program.toLowerCase())}%`}`);
  if (query.machine) where.push(eq(programs.machineId, query.machine));
  if (query.status === "released") where.push(isNotNull(programs.releasedRevisionId));
  else if (query.status) where.push(eq(latestRev.status, query.status));
  if (query.tool !== undefined) {
    where.push(
      sql`exists (select 1 from ${revisionTools} where ${revisionTools.revisionId} = ${programs.latestRevisionId} and ${revisionTools.toolNumber} = ${query.tool})`,
    );
  }
  if (query.rule) {
    where.push(
      sql`exists (select 1 from ${revisionFindings} where ${revisionFindings.revisionId} = ${programs.latestRevisionId} and ${revisionFindings.rule} = ${query.rule})`,
    );
  }
  if (query.offset) {
    where.push(
      sql`exists (select 1 from ${revisionOffsets} where ${revisionOffsets.revisionId} = ${programs.latestRevisionId} and ${revisionOffsets.code} = ${query.offset.toUpperCase()})`,
    );
  }
  const cond = where.length > 0 ? and(...where) : undefined;
  const sort = SORTS[query.sort];
  const dir = query.dir ?? sort.dir;
  const order = dir === "asc" ? asc(sort.col) : desc(sort.col);

  const base = () =>
    db()
      .select({
        id: programs.id,
        programNumber: programs.programNumber,
        title: programs.title,
        operation: programs.operation,
        partId: parts.id,
        partNumber: parts.number,
        partName: parts.name,
        machineId: machines.id,
        machineName: machines.name,
        partsPerCycle: programs.partsPerCycle,
        safeZ: programs.safeZ,
        updatedAt: programs.updatedAt,
        latestId: latestRev.id,
        latestNumber: latestRev.number,
        latestStatus: latestRev.status,
        aState: latestAnalysis.state,
        aErrors: latestAnalysis.errorCount,
        aWarnings: latestAnalysis.warningCount,
        aTotal: latestAnalysis.totalSeconds,
        aTools: latestAnalysis.toolCount,
        aOffsets: latestAnalysis.workOffsets,
        releasedId: releasedRev.id,
        releasedNumber: releasedRev.number,
      })
      .from(programs)
      .innerJoin(parts, eq(parts.id, programs.partId))
      .innerJoin(machines, eq(machines.id, programs.machineId))
      .leftJoin(latestRev, eq(latestRev.id, programs.latestRevisionId))
      .leftJoin(latestAnalysis, eq(latestAnalysis.revisionId, programs.latestRevisionId))
      .leftJoin(releasedRev, eq(releasedRev.id, programs.releasedRevisionId));

  const countQuery = db()
    .select({ n: sql<number>`count(*)::int` })
    .from(programs)
    .innerJoin(parts, eq(parts.id, programs.partId))
    .leftJoin(latestRev, eq(latestRev.id, programs.latestRevisionId))
    .where(cond);
  const [rows, [count]] = await Promise.all([
    base()
      .where(cond)
      .orderBy(order, asc(programs.id))
      .limit(query.pageSize)
      .offset((query.page - 1) * query.pageSize),
    countQuery,
  ]);
  return {
    programs: rows.map((r) => ({
      id: r.id,
      programNumber: r.programNumber,
      title: r.title,
      operation: r.operation,
      part: { id: r.partId, number: r.partNumber, name: r.partName },
      machine: { id: r.machineId, name: r.machineName },
      partsPerCycle: r.partsPerCycle,
      safeZ: r.safeZ,
      updatedAt: r.updatedAt.toISOString(),
      latest:
        r.latestId !== null
          ? {
              id: r.latestId,
              number: r.latestNumber!,
              status: r.latestStatus!,
              analysisState: r.aState,
              errorCount: r.aErrors,
              warningCount: r.aWarnings,
              totalSeconds: r.aTotal,
              toolCount: r.aTools,
              workOffsets: r.aOffsets ?? [],
            }
          : null,
      released: r.releasedId !== null ? { id: r.releasedId, number: r.releasedNumber! } : null,
    })),
    total: count?.n ?? 0,
    page: query.page,
    pageSize: query.pageSize,
  };
}

/** All revisions of a program as summaries, newest first (no bytes). */
export async function programRevisions(programId: number): Promise<RevisionSummary[]> {
  const rows = await db()
    .select(revisionSummaryColumns)
    .from(revisions)
    .innerJoin(uploader, eq(uploader.id, revisions.uploadedBy))
    .leftJoin(decider, eq(decider.id, revisions.decidedBy))
    .leftJoin(revisionAnalyses, eq(revisionAnalyses.revisionId, revisions.id))
    .where(eq(revisions.programId, programId))
    .orderBy(desc(revisions.number));
  return rows.map(toRevisionSummary);
}

const creator = alias(users, "creator");

/** A program with its part, machine and every revision (newest first), or null. */
export async function getProgram(id: number): Promise<ProgramDetail | null> {
  await authorize("readPrograms");
  const [row] = await db()
    .select({
      id: programs.id,
      programNumber: programs.programNumber,
      title: programs.title,
      operation: programs.operation,
      partsPerCycle: programs.partsPerCycle,
      safeZ: programs.safeZ,
      updatedAt: programs.updatedAt,
      createdAt: programs.createdAt,
      releasedRevisionId: programs.releasedRevisionId,
      part: { id: parts.id, number: parts.number, name: parts.name, customer: parts.customer, material: parts.material },
      machine: { id: machines.id, name: machines.name, units: machines.units, safeZ: machines.safeZ },
      createdBy: { id: creator.id, name: creator.displayName },
    })
    .from(programs)
    .innerJoin(parts, eq(parts.id, programs.partId))
    .innerJoin(machines, eq(machines.id, programs.machineId))
    .innerJoin(creator, eq(creator.id, programs.createdBy))
    .where(eq(programs.id, id));
  if (!row) return null;
  return {
    ...row,
    updatedAt: row.updatedAt.toISOString(),
    createdAt: row.createdAt.toISOString(),
    revisions: await programRevisions(id),
  };
}

async function assertRefs(input: { partId?: number; machineId?: number }) {
  const [p, m] = await Promise.all([
    input.partId ? db().select({ id: parts.id }).from(parts).where(eq(parts.id, input.partId)) : [{ id: 0 }],
    input.machineId ? db().select({ id: machines.id }).from(machines).where(eq(machines.id, input.machineId)) : [{ id: 0 }],
  ]);
  const fieldErrors: Record<string, string[]> = {};
  if (p.length === 0) fieldErrors.partId = ["No such part."];
  if (m.length === 0) fieldErrors.machineId = ["No such machine."];
  if (Object.keys(fieldErrors).length > 0) throw new RequestError(422, "Some fields are invalid.", { fieldErrors });
}

const numberTaken = () =>
  new RequestError(409, "This machine already has a program with this number.", {
    fieldErrors: { programNumber: ["This machine already has a program with this number."] },
  });

async function insertProgram(actor: CurrentUser, input: ProgramInput, ip: string | null): Promise<number> {
  try {
    return await db().transaction(async (tx) => {
      const [row] = await tx.insert(programs).values({ ...input, createdBy: actor.id }).returning({ id: programs.id });
      if (!row) throw new Error("insert returned nothing");
      await recordEvent(
        { actor, action: "program.create", objectType: "program", objectId: row.id, details: { programNumber: input.programNumber, partId: input.partId, machineId: input.machineId }, ip },
        tx,
      );
      return row.id;
    });
  } catch (e) {
    if (isUniqueViolation(e)) throw numberTaken();
    throw e;
  }
}

/** Creates a program (409 when its machine has the number already; 422 for an unknown part or machine). */
export async function createProgram(input: ProgramInput): Promise<ProgramDetail> {
  const actor = await authorize("writePrograms");
  await assertRefs(input);
  const id = await insertProgram(actor, input, await requestIp());
  return (await getProgram(id))!;
}

/**
 * Changes a program. A change of machine, safe Z or parts per cycle re-analyses every revision of the program in
 * the background (released ones included: the checks follow the machine the program now runs on).
 */
export async function updateProgram(id: number, input: ProgramUpdate): Promise<ProgramDetail> {
  const actor = await authorize("writePrograms");
  await assertRefs(input);
  const ip = await requestIp();
  try {
    await db().transaction(async (tx) => {
      const [before] = await tx.select().from(programs).where(eq(programs.id, id)).for("update");
      if (!before) throw new RequestError(404, "No such program.");
      const [after] = await tx.update(programs).set({ ...input, updatedAt: sql`now()` }).where(eq(programs.id, id)).returning();
      const changed: Record<string, { from: unknown; to: unknown }> = {};
      for (const key of Object.keys(input) as (keyof ProgramUpdate)[]) {
        if (before[key] !== after![key]) changed[key] = { from: before[key], to: after![key] };
      }
      const reanalyse = ["machineId", "safeZ", "partsPerCycle"].some((k) => k in changed);
      if (reanalyse) {
        const revs = await tx.select({ id: revisions.id }).from(revisions).where(eq(revisions.programId, id));
        await requestAnalysis(
          tx,
          revs.map((r) => r.id),
        );
      }
      await recordEvent({ actor, action: "program.update", objectType: "program", objectId: id, details: { changed, reanalysed: reanalyse }, ip }, tx);
    });
  } catch (e) {
    if (isUniqueViolation(e)) throw numberTaken();
    throw e;
  }
  return (await getProgram(id))!;
}

/**
 * A program's audit events (the program's own and its revisions': uploads, submissions, releases, rejections,
 * waivers, downloads, draft deletions), newest first, at most `limit`.
 */
export async function listProgramEvents(programId: number, limit = 200): Promise<AuditRow[]> {
  await authorize("readPrograms");
  const revIds = await db().select({ id: revisions.id }).from(revisions).where(eq(revisions.programId, programId));
  const revisionIds = revIds.map((r) => String(r.id));
  const rows = await db()
    .select(auditRowColumns)
    .from(auditEvents)
    .where(
      or(
        and(eq(auditEvents.objectType, "program"), eq(auditEvents.objectId, String(programId))),
        // Deleted drafts keep their events; their details name the program.
        and(eq(auditEvents.objectType, "revision"), sql`${auditEvents.details}->>'programId' = ${String(programId)}`),
        revisionIds.length > 0 ? and(eq(auditEvents.objectType, "revision"), inArray(auditEvents.objectId, revisionIds)) : undefined,
      ),
    )
    .orderBy(desc(auditEvents.at), desc(auditEvents.id))
    .limit(limit);
  return rows.map(toAuditRow);
}

/**
 * For pushes from a CAM post-processor: the program with this number on this machine (id or exact name, any
 * case), created when missing (then `part` is required: found by number, created when missing).
 */
export async function findOrCreateProgram(input: {
  program: string;
  machine: string;
  part?: string;
  title?: string;
  operation?: string;
}): Promise<{ id: number; created: boolean }> {
  const actor = await authorize("writePrograms");
  const ip = await requestIp();
  const [machine] = await db()
    .select({ id: machines.id })
    .from(machines)
    .where(/^\d+$/.test(input.machine) ? eq(machines.id, Number(input.machine)) : eq(sql`lower(${machines.name})`, input.machine.toLowerCase()));
  if (!machine) throw new RequestError(422, "No such machine.", { fieldErrors: { machine: ["No machine with this id or name."] } });
  const find = async () =>
    (
      await db()
        .select({ id: programs.id })
        .from(programs)
        .where(and(eq(programs.machineId, machine.id), eq(sql`lower(${programs.programNumber})`, input.program.toLowerCase())))
    )[0];
  const existing = await find();
  if (existing) return { id: existing.id, created: false };
  if (!input.part) {
    throw new RequestError(422, "No program with this number on this machine; name a part to create it.", {
      fieldErrors: { part: ["Required to create the program."] },
    });
  }
  const partNumber = input.part;
  const partId = await db().transaction(async (tx) => {
    const found = await tx.select({ id: parts.id }).from(parts).where(eq(sql`lower(${parts.number})`, partNumber.toLowerCase()));
    if (found[0]) return found[0].id;
    const [row] = await tx
      .insert(parts)
      .values({ number: partNumber, name: partNumber, createdBy: actor.id })
      .onConflictDoNothing()
      .returning({ id: parts.id });
    if (row) {
      await recordEvent({ actor, action: "part.create", objectType: "part", objectId: row.id, details: { number: partNumber, via: "push" }, ip }, tx);
      return row.id;
    }
    const again = await tx.select({ id: parts.id }).from(parts).where(eq(sql`lower(${parts.number})`, partNumber.toLowerCase()));
    return again[0]!.id;
  });
  try {
    const id = await insertProgram(
      actor,
      {
        programNumber: input.program,
        title: input.title ?? input.program,
        partId,
        machineId: machine.id,
        operation: input.operation ?? "",
        partsPerCycle: 1,
        safeZ: null,
      },
      ip,
    );
    return { id, created: true };
  } catch (e) {
    // Another push created it meanwhile.
    const raced = e instanceof RequestError && e.status === 409 ? await find() : undefined;
    if (raced) return { id: raced.id, created: false };
    throw e;
  }
}
