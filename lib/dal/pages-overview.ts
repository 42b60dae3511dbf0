import "server-only";
import { and, asc, desc, eq, isNotNull, or, sql } from "drizzle-orm";
import { db } from "@/db";
import { machines, programs, revisionAnalyses, revisions, type RevisionStatus } from "@/db/schema";
import { authorize } from "@/lib/auth/session";
import { decider, revisionSummaryColumns, toRevisionSummary, uploader, type RevisionSummary } from "@/lib/dal/views";

/** A revision with the program it belongs to, for the overview's lists. */
export interface OverviewRevision extends RevisionSummary {
  program: { id: number; programNumber: string; title: string; machineName: string };
}

async function revisionsWhere(where: ReturnType<typeof and>, order: "newest" | "oldest", limit: number): Promise<OverviewRevision[]> {
  const rows = await db()
    .select({
      ...revisionSummaryColumns,
      programNumber: programs.programNumber,
      programTitle: programs.title,
      machineName: machines.name,
    })
    .from(revisions)
    .innerJoin(programs, eq(programs.id, revisions.programId))
    .innerJoin(machines, eq(machines.id, programs.machineId))
    .innerJoin(uploader, eq(uploader.id, revisions.uploadedBy))
    .leftJoin(decider, eq(decider.id, revisions.decidedBy))
    .leftJoin(revisionAnalyses, eq(revisionAnalyses.revisionId, revisions.id))
    .where(where)
    .orderBy(order === "newest" ? desc(revisions.createdAt) : asc(revisions.submittedAt), desc(revisions.id))
    .limit(limit);
  return rows.map((r) => ({
    ...toRevisionSummary(r),
    program: { id: r.programId, programNumber: r.programNumber, title: r.programTitle, machineName: r.machineName },
  }));
}

/** The caller's own drafts and rejected revisions not yet followed by another, newest first (what a programmer picks up next). */
export async function listMyOpenRevisions(limit = 20): Promise<OverviewRevision[]> {
  const user = await authorize("readPrograms");
  // A rejected revision with a newer one after it is dealt with already.
  return revisionsWhere(
    and(
      eq(revisions.uploadedBy, user.id),
      or(eq(revisions.status, "draft"), and(eq(revisions.status, "rejected"), eq(programs.latestRevisionId, revisions.id))),
    ),
    "newest",
    limit,
  );
}

/** Revisions submitted for review, the longest waiting first. */
export async function listRevisionsAwaitingReview(limit = 50): Promise<OverviewRevision[]> {
  await authorize("readPrograms");
  return revisionsWhere(and(eq(revisions.status, "submitted")), "oldest", limit);
}

export interface ReleasedProgram {
  programId: number;
  programNumber: string;
  title: string;
  revisionId: number;
  revisionNumber: number;
  releasedAt: string | null;
}

/** The released revision of every program, grouped by machine (what an operator may run where). */
export async function listReleasedByMachine(): Promise<{ machine: { id: number; name: string }; programs: ReleasedProgram[] }[]> {
  await authorize("readPrograms");
  const rows = await db()
    .select({
      machineId: machines.id,
      machineName: machines.name,
      programId: programs.id,
      programNumber: programs.programNumber,
      title: programs.title,
      revisionId: revisions.id,
      revisionNumber: revisions.number,
      releasedAt: revisions.decidedAt,
    })
    .from(programs)
    .innerJoin(machines, eq(machines.id, programs.machineId))
    .innerJoin(revisions, eq(revisions.id, programs.releasedRevisionId))
    .where(isNotNull(programs.releasedRevisionId))
    .orderBy(asc(machines.name), asc(sql`lower(${programs.programNumber})`))
    .limit(500);
  const byMachine = new Map<number, { machine: { id: number; name: string }; programs: ReleasedProgram[] }>();
  for (const r of rows) {
    let group = byMachine.get(r.machineId);
    if (!group) byMachine.set(r.machineId, (group = { machine: { id: r.machineId, name: r.machineName }, programs: [] }));
    group.programs.push({
      programId: r.programId,
      programNumber: r.programNumber,
      title: r.title,
      revisionId: r.revisionId,
      revisionNumber: r.revisionNumber,
      releasedAt: r.releasedAt?.toISOString() ?? null,
    });
  }
  return [...byMachine.values()];
}

/** How many revisions are in each status and how many server checks are waiting or failed. */
export async function countRevisions(): Promise<{ byStatus: Record<RevisionStatus, number>; programs: number; checksWaiting: number; checksFailed: number }> {
  await authorize("readPrograms");
  const [statusRows, [programCount], analysisRows] = await Promise.all([
    db().select({ status: revisions.status, n: sql<number>`count(*)::int` }).from(revisions).groupBy(revisions.status),
    db().select({ n: sql<number>`count(*)::int` }).from(programs),
    db().select({ state: revisionAnalyses.state, n: sql<number>`count(*)::int` }).from(revisionAnalyses).groupBy(revisionAnalyses.state),
  ]);
  const byStatus: Record<RevisionStatus, number> = { draft: 0, submitted: 0, released: 0, rejected: 0, superseded: 0 };
  for (const r of statusRows) byStatus[r.status] = r.n;
  const state = (s: string) => analysisRows.find((r) => r.state === s)?.n ?? 0;
  return { byStatus, programs: programCount?.n ?? 0, checksWaiting: state("queued") + state("running"), checksFailed: state("failed") };
}
