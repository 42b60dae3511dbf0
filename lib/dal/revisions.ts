import "server-only";
import { asc, desc, eq, sql } from "drizzle-orm";
import { db, type Tx } from "@/db";
import {
  machines,
  parts,
  programFiles,
  programFileUploads,
  programs,
  revisionAnalyses,
  revisionFindings,
  revisionOffsets,
  revisions,
  revisionTools,
  signatures,
  type SignatureMeaning,
} from "@/db/schema";
import { recordEvent, recordRepeatedEvent } from "@/lib/audit";
import { RequestError } from "@/lib/auth/errors";
import { can } from "@/lib/auth/roles";
import { authorize, requestIp, type CurrentUser } from "@/lib/auth/session";
import { analysisDiff, type AnalysisDiff, type ComparableAnalysis } from "@/lib/compare/analysis-diff";
import { lineDiff, type LineDiff } from "@/lib/compare/line-diff";
import { decider, revisionSummaryColumns, toRevisionSummary, uploader, type RevisionSummary } from "@/lib/dal/views";
import type { Severity } from "@/lib/gcode";
import { putCachedFile } from "@/lib/file-cache";
import { analysisOptions, readFileBytes } from "@/lib/jobs/analysis";
import { startEarlyAnalysis } from "@/lib/jobs/precompute";
import { requestAnalysis } from "@/lib/jobs/queue";
import type { ReceivedProgram } from "@/lib/upload";

export interface RevisionFindingRow {
  id: number;
  rule: string;
  severity: Severity;
  line: number;
  message: string;
  hint: string;
}

export interface SignatureView {
  id: number;
  meaning: SignatureMeaning;
  signer: { id: number; name: string; email: string };
  comment: string;
  sha256: string;
  /** For a waiver: the finding waived. */
  finding: { rule: string; line: number; message: string } | null;
  signedAt: string;
}

export interface RevisionDetail extends RevisionSummary {
  program: {
    id: number;
    programNumber: string;
    title: string;
    part: { id: number; number: string; name: string };
    machine: { id: number; name: string };
    releasedRevisionId: number | null;
  };
  /** Listed findings, errors first, then by line. */
  findings: RevisionFindingRow[];
  /** Per rule, including findings beyond the listed ones. */
  findingCounts: { rule: string; severity: Severity; count: number; listed: number }[];
  tools: { number: number; description: string | null; lengthOffsets: number[]; firstLine: number; loads: number; totalSeconds: number; lowestZ: number | null }[];
  offsets: { code: string; firstLine: number | null; totalSeconds: number }[];
  signatures: SignatureView[];
  /** What the caller may do with it now. */
  can: { submit: boolean; release: boolean; reject: boolean; delete: boolean };
  /** The engine's whole result less the toolpath, when asked for (`result=1`). */
  result?: unknown;
}

/** What an upload adds to the revision beyond the bytes. */
export interface UploadMeta {
  note?: string;
  /** How it came: "api" with a token, "web" otherwise. */
  via?: "web" | "api";
}

/**
 * Stores the bytes (once per content) and makes them revision N+1 of the program, as a draft, with its analysis
 * requested, all in one transaction with the audit event. Numbers come from the program row under its lock, so
 * concurrent uploads get consecutive numbers with no gap, and a deleted draft's number is never reused.
 */
export async function uploadRevision(programId: number, file: ReceivedProgram, meta: UploadMeta = {}): Promise<RevisionDetail> {
  try {
    return await storeRevision(programId, file, meta);
  } catch (e) {
    // Staged bytes of a refused upload go now (the worker also drops any left after an hour).
    if (file.stagedUploadId) await db().delete(programFileUploads).where(eq(programFileUploads.uploadId, file.stagedUploadId));
    throw e;
  }
}

async function storeRevision(programId: number, file: ReceivedProgram, meta: UploadMeta): Promise<RevisionDetail> {
  const actor = await authorize("writePrograms");
  const ip = await requestIp();
  // Where the app process runs a worker, the analysis starts now, alongside the write (the job takes the result).
  const [setup] = await db()
    .select({ machine: machines, safeZ: programs.safeZ, partsPerCycle: programs.partsPerCycle })
    .from(programs)
    .innerJoin(machines, eq(machines.id, programs.machineId))
    .where(eq(programs.id, programId));
  if (!setup) throw new RequestError(404, "No such program.");
  startEarlyAnalysis(file.sha256, file.bytes, analysisOptions(setup.machine, setup));
  const id = await db().transaction(async (tx) => {
    await storeFile(tx, file);
    // Before commit, so the in-process worker (woken by the commit) finds the bytes without reading them back.
    // Right even if this transaction fails: the cache is keyed by the content's own hash.
    putCachedFile(file.sha256, file.bytes);
    const [program] = await tx
      .select({ id: programs.id, last: programs.lastRevisionNumber })
      .from(programs)
      .where(eq(programs.id, programId))
      .for("update");
    if (!program) throw new RequestError(404, "No such program.");
    const number = program.last + 1;
    const [rev] = await tx
      .insert(revisions)
      .values({
        programId,
        number,
        fileName: file.fileName,
        sha256: file.sha256,
        size: file.size,
        lineCount: file.lineCount,
        uploadedBy: actor.id,
        note: meta.note ?? "",
      })
      .returning({ id: revisions.id });
    if (!rev) throw new Error("insert returned nothing");
    await tx
      .update(programs)
      .set({ lastRevisionNumber: number, latestRevisionId: rev.id, updatedAt: sql`now()` })
      .where(eq(programs.id, programId));
    await requestAnalysis(tx, [rev.id]);
    await recordEvent(
      {
        actor,
        action: "revision.upload",
        objectType: "revision",
        objectId: rev.id,
        details: { programId, number, sha256: file.sha256, size: file.size, fileName: file.fileName, via: meta.via ?? (actor.via === "token" ? "api" : "web") },
        ip,
      },
      tx,
    );
    return rev.id;
  });
  return (await getRevision(id))!;
}

/**
 * Inserts the file row unless it exists, and holds it (FOR KEY SHARE) so a concurrent clean-up cannot remove it.
 * Bytes already streamed into program_file_uploads are moved from there inside PostgreSQL, not sent again.
 */
async function storeFile(tx: Tx, file: ReceivedProgram): Promise<void> {
  try {
    for (let attempt = 0; attempt < 3; attempt++) {
      const held = await tx.execute(sql`select 1 from ${programFiles} where sha256 = ${file.sha256} for key share`);
      if (held.rows.length > 0) return;
      if (file.stagedUploadId) {
        await tx.execute(sql`
          insert into ${programFiles} (sha256, size, bytes)
          select ${file.sha256}, ${file.size}, bytes from ${programFileUploads} where upload_id = ${file.stagedUploadId}
          on conflict do nothing`);
      } else {
        await tx.insert(programFiles).values({ sha256: file.sha256, size: file.size, bytes: file.bytes }).onConflictDoNothing();
      }
    }
    throw new Error("could not store the file");
  } finally {
    if (file.stagedUploadId) await tx.delete(programFileUploads).where(eq(programFileUploads.uploadId, file.stagedUploadId));
  }
}

/** Removes a file row nobody refers to any more (inside the transaction that dropped the last reference). */
async function dropFileIfUnused(tx: Tx, sha256: string): Promise<boolean> {
  const res = await tx.execute(
    sql`delete from ${programFiles} where sha256 = ${sha256} and not exists (select 1 from ${revisions} where ${revisions.sha256} = ${sha256})`,
  );
  return (res.rowCount ?? 0) > 0;
}

/** Every question a page asks about one revision; null when there is none. `withResult` adds the engine's JSON. */
export async function getRevision(id: number, opts: { withResult?: boolean } = {}): Promise<RevisionDetail | null> {
  const user = await authorize("readPrograms");
  const [row] = await db()
    .select({
      ...revisionSummaryColumns,
      programNumber: programs.programNumber,
      programTitle: programs.title,
      releasedRevisionId: programs.releasedRevisionId,
      partId: parts.id,
      partNumber: parts.number,
      partName: parts.name,
      machineId: machines.id,
      machineName: machines.name,
      counts: sql<RevisionDetail["findingCounts"] | null>`${revisionAnalyses.result}->'findingCounts'`,
      ...(opts.withResult ? { result: revisionAnalyses.result } : {}),
    })
    .from(revisions)
    .innerJoin(programs, eq(programs.id, revisions.programId))
    .innerJoin(parts, eq(parts.id, programs.partId))
    .innerJoin(machines, eq(machines.id, programs.machineId))
    .innerJoin(uploader, eq(uploader.id, revisions.uploadedBy))
    .leftJoin(decider, eq(decider.id, revisions.decidedBy))
    .leftJoin(revisionAnalyses, eq(revisionAnalyses.revisionId, revisions.id))
    .where(eq(revisions.id, id));
  if (!row) return null;
  const [findings, tools, offsets, sigs] = await Promise.all([
    db()
      .select({
        id: revisionFindings.id,
        rule: revisionFindings.rule,
        severity: revisionFindings.severity,
        line: revisionFindings.line,
        message: revisionFindings.message,
        hint: revisionFindings.hint,
      })
      .from(revisionFindings)
      .where(eq(revisionFindings.revisionId, id))
      .orderBy(asc(revisionFindings.severity), asc(revisionFindings.line), asc(revisionFindings.id)),
    db()
      .select({
        number: revisionTools.toolNumber,
        description: revisionTools.description,
        lengthOffsets: revisionTools.lengthOffsets,
        firstLine: revisionTools.firstLine,
        loads: revisionTools.loads,
        totalSeconds: revisionTools.totalSeconds,
        lowestZ: revisionTools.lowestZ,
      })
      .from(revisionTools)
      .where(eq(revisionTools.revisionId, id))
      .orderBy(asc(revisionTools.firstLine)),
    db()
      .select({ code: revisionOffsets.code, firstLine: revisionOffsets.firstLine, totalSeconds: revisionOffsets.totalSeconds })
      .from(revisionOffsets)
      .where(eq(revisionOffsets.revisionId, id))
      .orderBy(asc(revisionOffsets.position)),
    signaturesOf(id),
  ]);
  const summary = toRevisionSummary(row);
  const detail: RevisionDetail = {
    ...summary,
    program: {
      id: row.programId!,
      programNumber: row.programNumber,
      title: row.programTitle,
      part: { id: row.partId, number: row.partNumber, name: row.partName },
      machine: { id: row.machineId, name: row.machineName },
      releasedRevisionId: row.releasedRevisionId,
    },
    findings,
    findingCounts: row.counts ?? [],
    tools,
    offsets,
    signatures: sigs,
    can: capabilities(user, summary),
  };
  if (opts.withResult) detail.result = (row as { result?: unknown }).result ?? null;
  return detail;
}

function capabilities(user: CurrentUser, r: RevisionSummary): RevisionDetail["can"] {
  return {
    submit: can(user.role, "writePrograms") && r.status === "draft",
    release:
      can(user.role, "reviewRevisions") && r.status === "submitted" && r.uploadedBy.id !== user.id && r.analysis?.state === "done",
    reject: can(user.role, "reviewRevisions") && r.status === "submitted",
    delete: r.status === "draft" && (user.role === "admin" || (can(user.role, "deleteDrafts") && r.uploadedBy.id === user.id)),
  };
}

export async function signaturesOf(revisionId: number): Promise<SignatureView[]> {
  const rows = await db()
    .select({
      id: signatures.id,
      meaning: signatures.meaning,
      signerId: signatures.signerId,
      signerName: signatures.signerName,
      signerEmail: signatures.signerEmail,
      comment: signatures.comment,
      sha256: signatures.sha256,
      finding: signatures.finding,
      signedAt: signatures.signedAt,
    })
    .from(signatures)
    .where(eq(signatures.revisionId, revisionId))
    .orderBy(asc(signatures.signedAt), asc(signatures.id));
  return rows.map((s) => ({
    id: s.id,
    meaning: s.meaning,
    signer: { id: s.signerId, name: s.signerName, email: s.signerEmail },
    comment: s.comment,
    sha256: s.sha256,
    finding: (s.finding as SignatureView["finding"]) ?? null,
    signedAt: s.signedAt.toISOString(),
  }));
}

/** The exact bytes of a revision with its display name, for a download; audited. */
/**
 * A revision's exact bytes. A download (the file taken away, e.g. to the machine) is one audit event each time; a
 * view (the app's own code pane and 3D view reading the text) is rolled up to one event per person, revision and
 * window, so looking at a page does not flood the record.
 */
export async function readRevisionFile(
  id: number,
  purpose: "download" | "view" = "download",
): Promise<{ bytes: Buffer; fileName: string; sha256: string } | null> {
  const actor = await authorize("readPrograms");
  const [row] = await db()
    .select({ sha256: revisions.sha256, fileName: revisions.fileName, programId: revisions.programId, number: revisions.number })
    .from(revisions)
    .where(eq(revisions.id, id));
  if (!row) return null;
  const bytes = await readFileBytes(db(), row.sha256);
  if (!bytes) return null;
  const event = {
    actor,
    objectType: "revision",
    objectId: id,
    details: { programId: row.programId, number: row.number, sha256: row.sha256 },
    ip: await requestIp(),
  };
  if (purpose === "view") {
    await recordRevisionView(actor, id, event.details);
  } else {
    await recordEvent({ ...event, action: "revision.download" });
  }
  return { bytes, fileName: row.fileName, sha256: row.sha256 };
}

/**
 * Deletes a draft: its uploader (a programmer) or an admin. The bytes go too when no other revision shares them;
 * the number is not reused. Audited in the same transaction.
 */
export async function deleteDraft(id: number): Promise<void> {
  const actor = await authorize("deleteDrafts");
  const ip = await requestIp();
  await db().transaction(async (tx) => {
    const [peek] = await tx.select({ programId: revisions.programId }).from(revisions).where(eq(revisions.id, id));
    if (!peek) throw new RequestError(404, "No such revision.");
    // Lock order everywhere: program, then revision.
    await tx.select({ id: programs.id }).from(programs).where(eq(programs.id, peek.programId)).for("update");
    const [rev] = await tx
      .select({ status: revisions.status, uploadedBy: revisions.uploadedBy, sha256: revisions.sha256, number: revisions.number })
      .from(revisions)
      .where(eq(revisions.id, id))
      .for("update");
    if (!rev) throw new RequestError(404, "No such revision.");
    if (actor.role !== "admin" && rev.uploadedBy !== actor.id) throw new RequestError(403, "Only its uploader or an admin may delete a draft.");
    if (rev.status !== "draft") throw new RequestError(409, `Revision ${rev.number} is ${rev.status}; only drafts may be deleted.`);
    await tx.delete(revisions).where(eq(revisions.id, id));
    const [latest] = await tx
      .select({ id: revisions.id })
      .from(revisions)
      .where(eq(revisions.programId, peek.programId))
      .orderBy(desc(revisions.number))
      .limit(1);
    await tx.update(programs).set({ latestRevisionId: latest?.id ?? null, updatedAt: sql`now()` }).where(eq(programs.id, peek.programId));
    const bytesRemoved = await dropFileIfUnused(tx, rev.sha256);
    await recordEvent(
      { actor, action: "revision.delete-draft", objectType: "revision", objectId: id, details: { programId: peek.programId, number: rev.number, sha256: rev.sha256, bytesRemoved }, ip },
      tx,
    );
  });
}

/** A look at a revision's code (the code pane, the 3D view, the run check's opening lines): one event per person, revision and window. */
export async function recordRevisionView(actor: CurrentUser, id: number, details: { programId: number; number: number; sha256: string }): Promise<void> {
  await recordRepeatedEvent({ actor, objectType: "revision", objectId: id, details, ip: await requestIp(), action: "revision.view", key: `revision.view:${actor.id}:${id}`, summary: details });
}

export interface RevisionComparison {
  a: RevisionSummary;
  b: RevisionSummary;
  lines: LineDiff;
  /** Null until both analyses are done. */
  analysis: AnalysisDiff | null;
  /** Milliseconds spent on each part (the page may show them; the benchmark reads them). */
  timing: { lineDiffMs: number; analysisDiffMs: number };
}

async function summaryOf(id: number): Promise<(RevisionSummary & { result: unknown }) | null> {
  const [row] = await db()
    .select({ ...revisionSummaryColumns, result: revisionAnalyses.result })
    .from(revisions)
    .innerJoin(uploader, eq(uploader.id, revisions.uploadedBy))
    .leftJoin(decider, eq(decider.id, revisions.decidedBy))
    .leftJoin(revisionAnalyses, eq(revisionAnalyses.revisionId, revisions.id))
    .where(eq(revisions.id, id));
  return row ? { ...toRevisionSummary(row), result: row.result } : null;
}

/** Line diff (with line numbers) and analysis diff of any two revisions (any programs). */
export async function compareRevisions(aId: number, bId: number, options: { context?: number } = {}): Promise<RevisionComparison | null> {
  await authorize("readPrograms");
  const [a, b] = await Promise.all([summaryOf(aId), summaryOf(bId)]);
  if (!a || !b) return null;
  const [aBytes, bBytes] = await Promise.all([readFileBytes(db(), a.sha256), readFileBytes(db(), b.sha256)]);
  if (!aBytes || !bBytes) return null;
  const t0 = performance.now();
  const lines = lineDiff(aBytes, bBytes, { context: options.context });
  const t1 = performance.now();
  const done = a.analysis?.state === "done" && b.analysis?.state === "done" && a.result && b.result;
  const analysis = done ? analysisDiff(a.result as ComparableAnalysis, b.result as ComparableAnalysis) : null;
  const t2 = performance.now();
  const { result: _ra, ...aSummary } = a;
  const { result: _rb, ...bSummary } = b;
  return { a: aSummary, b: bSummary, lines, analysis, timing: { lineDiffMs: t1 - t0, analysisDiffMs: t2 - t1 } };
}
