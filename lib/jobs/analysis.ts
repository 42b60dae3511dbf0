/**
 * The analysis job: reads a revision's bytes and its program's machine, runs the engine (on a thread), and stores
 * the summary columns, the tool, work offset and finding rows and the result JSON in one transaction.
 */
import { and, eq, sql } from "drizzle-orm";
import type { Db } from "../../db/client";
import type { AnalyzeOptions } from "../gcode/types";
import {
  machines,
  type Machine,
  programs,
  revisionAnalyses,
  revisionFindings,
  revisionOffsets,
  revisions,
  revisionTools,
} from "../../db/schema";
import { getCachedFile, putCachedFile } from "../file-cache";
import { ENGINE_VERSION } from "../gcode/version";
import { toMachineProfile } from "../machine-profile";
import type { StoredAnalysis } from "./analyser";
import { takeEarlyAnalysis } from "./precompute";

/** Findings listed per rule in the stored analysis (the rest are only counted). */
export const STORED_FINDINGS_PER_RULE = 200;

export interface Analyse {
  analyse(bytes: Uint8Array, options: AnalyzeOptions): Promise<StoredAnalysis>;
}

/** The engine's options for a program on its machine: the machine's profile, the program's safe Z and parts. */
export function analysisOptions(machine: Machine, program: { safeZ: number | null; partsPerCycle: number }): AnalyzeOptions {
  return {
    machine: toMachineProfile(machine),
    safeZ: program.safeZ ?? undefined,
    parts: program.partsPerCycle,
    maxFindingsPerRule: STORED_FINDINGS_PER_RULE,
  };
}

/**
 * A file's bytes: from the in-memory cache when this process stored or read them lately, else from the database in
 * binary form (the default text form would double them as hex).
 */
export async function readFileBytes(db: Db, sha256: string): Promise<Buffer | null> {
  const cached = getCachedFile(sha256);
  if (cached) return cached;
  // node-postgres supports `binary` on a query config (its types do not list it); its binary parser would turn
  // bytea into a string, so this query keeps every value as the raw Buffer.
  const config = {
    text: "select bytes from program_files where sha256 = $1",
    values: [sha256],
    binary: true,
    types: { getTypeParser: () => (raw: Buffer) => raw },
  };
  const res = await db.$client.query<{ bytes: Buffer }>(config as import("pg").QueryConfig);
  const bytes = res.rows[0]?.bytes ?? null;
  if (bytes) putCachedFile(sha256, bytes);
  return bytes;
}

/**
 * Runs one analysis of `revisionId`. Returns "gone" when the revision was deleted meanwhile. Throws when the
 * engine or the database fails; the caller records the error and lets the queue retry.
 */
export async function analyseRevision(db: Db, revisionId: number, analyser: Analyse): Promise<"done" | "gone"> {
  const [started] = await db
    .update(revisionAnalyses)
    .set({
      state: "running",
      attempts: sql`${revisionAnalyses.attempts} + 1`,
      startedAt: sql`now()`,
      runSeq: sql`${revisionAnalyses.requestSeq}`,
    })
    .where(eq(revisionAnalyses.revisionId, revisionId))
    .returning({ runSeq: revisionAnalyses.runSeq });
  if (!started) return "gone";

  const [row] = await db
    .select({
      sha256: revisions.sha256,
      programSafeZ: programs.safeZ,
      partsPerCycle: programs.partsPerCycle,
      machine: machines,
    })
    .from(revisions)
    .innerJoin(programs, eq(programs.id, revisions.programId))
    .innerJoin(machines, eq(machines.id, programs.machineId))
    .where(eq(revisions.id, revisionId));
  if (!row) return "gone";
  const bytes = await readFileBytes(db, row.sha256);
  if (!bytes) return "gone";

  const options = analysisOptions(row.machine, { safeZ: row.programSafeZ, partsPerCycle: row.partsPerCycle });
  // Started while the upload was being stored, when the app process runs a worker; else analyse now.
  const early = takeEarlyAnalysis(row.sha256, options);
  const a = (early && (await early.catch(() => null))) || (await analyser.analyse(bytes, options));

  return db.transaction(async (tx) => {
    const [current] = await tx
      .select({ requestSeq: revisionAnalyses.requestSeq })
      .from(revisionAnalyses)
      .where(eq(revisionAnalyses.revisionId, revisionId))
      .for("update");
    if (!current) return "gone";
    await tx.delete(revisionTools).where(eq(revisionTools.revisionId, revisionId));
    await tx.delete(revisionOffsets).where(eq(revisionOffsets.revisionId, revisionId));
    await tx.delete(revisionFindings).where(eq(revisionFindings.revisionId, revisionId));
    if (a.tools.length > 0) {
      await tx.insert(revisionTools).values(
        a.tools.map((t) => ({
          revisionId,
          toolNumber: t.number,
          description: t.description?.slice(0, 300) ?? null,
          lengthOffsets: t.lengthOffsets,
          firstLine: t.firstLine,
          loads: t.loads,
          totalSeconds: t.time.totalSeconds,
          lowestZ: t.lowestZ,
        })),
      );
    }
    if (a.workOffsets.length > 0) {
      await tx.insert(revisionOffsets).values(
        a.workOffsets.map((o, position) => ({
          revisionId,
          code: o.code,
          position,
          firstLine: o.firstLine,
          totalSeconds: o.time.totalSeconds,
        })),
      );
    }
    for (let i = 0; i < a.findings.length; i += 1000) {
      await tx.insert(revisionFindings).values(
        a.findings.slice(i, i + 1000).map((f) => ({
          revisionId,
          rule: f.rule,
          severity: f.severity,
          line: f.line,
          message: f.message,
          hint: f.hint,
        })),
      );
    }
    const count = (severity: string) =>
      a.findingCounts.filter((c) => c.severity === severity).reduce((n, c) => n + c.count, 0);
    const toolSequence = a.toolChanges.map((c) => c.tool).filter((t): t is number => t !== null);
    const overtaken = current.requestSeq !== started.runSeq;
    await tx
      .update(revisionAnalyses)
      .set({
        // A request that came in while this run was going keeps the analysis queued for the next run.
        state: overtaken ? "queued" : "done",
        error: null,
        finishedAt: sql`now()`,
        engineVersion: ENGINE_VERSION,
        machineId: row.machine.id,
        safeZ: a.safeZ,
        partsPerCycle: a.parts,
        units: a.units,
        workOffsets: a.workOffsets.map((o) => o.code),
        toolCount: a.tools.length,
        toolChangeCount: a.toolChangeCount,
        toolSequence: toolSequence.length > 0 ? toolSequence : a.tools.map((t) => t.number),
        toolOrder: a.toolOrder,
        totalSeconds: a.time.totalSeconds,
        feedSeconds: a.time.feedSeconds,
        rapidSeconds: a.time.rapidSeconds,
        bounds: { all: a.bounds, cutting: a.cuttingBounds },
        errorCount: count("error"),
        warningCount: count("warning"),
        infoCount: count("info"),
        result: a,
      })
      .where(eq(revisionAnalyses.revisionId, revisionId));
    return "done" as const;
  });
}

/**
 * Records a failed attempt. On the last attempt the analysis is marked failed with the reason (unless a newer
 * request is waiting); otherwise it stays queued for the retry.
 */
export async function recordAnalysisFailure(db: Db, revisionId: number, reason: string, final: boolean): Promise<void> {
  await db
    .update(revisionAnalyses)
    .set({
      state: final ? sql`case when ${revisionAnalyses.requestSeq} = ${revisionAnalyses.runSeq} then 'failed'::analysis_state else 'queued'::analysis_state end` : "queued",
      error: reason.slice(0, 2000),
      finishedAt: final ? sql`now()` : undefined,
    })
    .where(and(eq(revisionAnalyses.revisionId, revisionId), sql`${revisionAnalyses.state} <> 'done'`));
}
