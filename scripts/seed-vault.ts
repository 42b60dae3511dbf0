/**
 * The demo shop's programs: parts, programs, revisions from db/demo-programs, analysed for real by the job's own
 * code (lib/jobs/analysis.ts), then carried through the workflow (submitted, released with waivers, superseded,
 * rejected) with signatures and audit events as the app would write them. Runs once per database, in stages with
 * markers, so a seed interrupted half-way finishes on the next start.
 */
import { createHash } from "node:crypto";
import { readFileSync } from "node:fs";
import path from "node:path";
import { and, eq, inArray, sql } from "drizzle-orm";
import type { Db, Tx } from "../db/client";
import { DEMO_PARTS, DEMO_PROGRAMS, DEMO_RUNS, DEMO_SHOP, DEMO_WORK_OFFSETS } from "../db/demo-data";
import {
  appState,
  auditEvents,
  machines,
  machineWorkOffsets,
  parts,
  programFiles,
  programs,
  revisionAnalyses,
  revisionFindings,
  revisions,
  runs,
  signatures,
  users,
} from "../db/schema";
import { analyzeProgram } from "../lib/gcode/index";
import { analyseRevision } from "../lib/jobs/analysis";
import { countLines } from "../lib/program-file";
import { offsetsAsRecorded, runChecksOf } from "../lib/run-record";

const STORED = "demo-vault-stored";
const WORKFLOW = "demo-vault-workflow";
const RUNS = "demo-vault-runs";
const LOCK = 727002;
const DAY = 86_400_000;

const programsDir = path.join(import.meta.dirname, "..", "db", "demo-programs");

async function marker(tx: Tx | Db, key: string): Promise<boolean> {
  return (await tx.select({ key: appState.key }).from(appState).where(eq(appState.key, key))).length > 0;
}

async function byEmail(tx: Tx) {
  const rows = await tx.select({ id: users.id, email: users.email, name: users.displayName }).from(users);
  return new Map(rows.map((r) => [r.email, r]));
}

export async function seedVault(db: Db): Promise<string> {
  const stored = await db.transaction(async (tx) => {
    await tx.execute(sql`select pg_advisory_xact_lock(${LOCK})`);
    if (await marker(tx, STORED)) return false;
    const people = await byEmail(tx);
    const machineRows = await tx.select({ id: machines.id, name: machines.name }).from(machines);
    const machineId = (name: string) => machineRows.find((m) => m.name === name)?.id;
    const partIds = new Map<string, number>();
    for (const p of DEMO_PARTS) {
      const [row] = await tx.insert(parts).values({ ...p, createdBy: people.get("programmer@cyclegate.test")?.id }).onConflictDoNothing().returning({ id: parts.id });
      if (row) partIds.set(p.number, row.id);
    }
    for (const p of DEMO_PROGRAMS) {
      const partId = partIds.get(p.part);
      const mId = machineId(p.machine);
      const creator = people.get(p.revisions[0]!.uploadedBy);
      // A part or machine renamed or removed before this seed ran: leave that program out.
      if (!partId || !mId || !creator) continue;
      const firstDay = p.revisions[0]!.daysAgo;
      const [program] = await tx
        .insert(programs)
        .values({
          programNumber: p.programNumber,
          title: p.title,
          partId,
          machineId: mId,
          operation: p.operation,
          partsPerCycle: p.partsPerCycle,
          safeZ: p.safeZ,
          createdBy: creator.id,
          createdAt: new Date(Date.now() - firstDay * DAY - 3_600_000),
        })
        .onConflictDoNothing()
        .returning({ id: programs.id });
      if (!program) continue;
      let number = 0;
      let latest = 0;
      for (const r of p.revisions) {
        const bytes = readFileSync(path.join(programsDir, r.file));
        const sha256 = createHash("sha256").update(bytes).digest("hex");
        await tx.insert(programFiles).values({ sha256, size: bytes.length, bytes }).onConflictDoNothing();
        const uploader = people.get(r.uploadedBy)!;
        const at = new Date(Date.now() - r.daysAgo * DAY);
        number++;
        const [rev] = await tx
          .insert(revisions)
          .values({
            programId: program.id,
            number,
            fileName: r.fileName,
            sha256,
            size: bytes.length,
            lineCount: countLines(bytes),
            uploadedBy: uploader.id,
            note: r.note,
            createdAt: at,
          })
          .returning({ id: revisions.id });
        latest = rev!.id;
        await tx.insert(revisionAnalyses).values({ revisionId: rev!.id });
        await tx.insert(auditEvents).values({
          actorId: uploader.id,
          actorEmail: uploader.email,
          action: "revision.upload",
          objectType: "revision",
          objectId: String(rev!.id),
          at,
          details: { programId: program.id, number, sha256, size: bytes.length, fileName: r.fileName, via: "web", demo: true },
        });
      }
      await tx.update(programs).set({ lastRevisionNumber: number, latestRevisionId: latest }).where(eq(programs.id, program.id));
    }
    const lead = people.get("lead@cyclegate.test");
    for (const o of DEMO_WORK_OFFSETS) {
      const mId = machineId(o.machine);
      if (!mId) continue;
      await tx
        .insert(machineWorkOffsets)
        .values({ machineId: mId, code: o.code, x: o.x, y: o.y, z: o.z, setBy: lead?.id ?? null, setAt: new Date(Date.now() - o.daysAgo * DAY) })
        .onConflictDoNothing();
    }
    await tx.insert(appState).values({ key: STORED, value: { shop: DEMO_SHOP, at: new Date().toISOString() } });
    return true;
  });

  // Analyse with the job's own code; the engine runs inline here (the app's worker runs it on a thread).
  const demoNumbers = DEMO_PROGRAMS.map((p) => p.programNumber);
  const pending = await db
    .select({ id: revisions.id })
    .from(revisions)
    .innerJoin(programs, eq(programs.id, revisions.programId))
    .innerJoin(revisionAnalyses, eq(revisionAnalyses.revisionId, revisions.id))
    .where(and(inArray(programs.programNumber, demoNumbers), sql`${revisionAnalyses.state} <> 'done'`));
  const inline = { analyse: async (bytes: Uint8Array, options: Parameters<typeof analyzeProgram>[1]) => analyzeProgram(bytes, { ...options, toolpath: false }) };
  for (const r of pending) await analyseRevision(db, r.id, inline);

  const walked = await db.transaction(async (tx) => {
    await tx.execute(sql`select pg_advisory_xact_lock(${LOCK})`);
    if (!(await marker(tx, STORED)) || (await marker(tx, WORKFLOW))) return false;
    await applyWorkflow(tx);
    await tx.insert(appState).values({ key: WORKFLOW, value: { at: new Date().toISOString() } });
    return true;
  });
  // Past runs at the machines, once (also into a database seeded before runs were recorded).
  const ran = await db.transaction(async (tx) => {
    await tx.execute(sql`select pg_advisory_xact_lock(${LOCK})`);
    if (!(await marker(tx, WORKFLOW)) || (await marker(tx, RUNS))) return 0;
    const n = await applyRuns(tx);
    await tx.insert(appState).values({ key: RUNS, value: { runs: n, at: new Date().toISOString() } });
    return n;
  });
  return stored || walked || ran > 0 ? `demo programs seeded (${pending.length} analysed, ${ran} past runs)` : "demo programs already present";
}

/**
 * The demo's past runs, as a sign-off at the machine writes them: the offsets the revision calls with the values
 * recorded for the machine, the tools in load order, the SHA-256, the audit event. A revision that is not where the
 * demo left it (renamed program, another revision released) is left out.
 */
async function applyRuns(tx: Tx): Promise<number> {
  const people = await byEmail(tx);
  let n = 0;
  for (const r of DEMO_RUNS) {
    const operator = people.get(r.by);
    const [rev] = await tx
      .select({ id: revisions.id, programId: programs.id, machineId: programs.machineId, status: revisions.status, sha256: revisions.sha256 })
      .from(revisions)
      .innerJoin(programs, eq(programs.id, revisions.programId))
      .where(and(eq(programs.programNumber, r.programNumber), eq(revisions.number, r.revision)));
    if (!operator || !rev || (rev.status !== "released" && rev.status !== "superseded")) continue;
    const checks = await runChecksOf(tx, rev.id, rev.machineId);
    const offsets = offsetsAsRecorded(checks);
    const tools = checks.tools;
    const at = new Date(Date.now() - r.daysAgo * DAY);
    const [run] = await tx
      .insert(runs)
      .values({
        revisionId: rev.id,
        programId: rev.programId,
        machineId: rev.machineId,
        sha256: rev.sha256,
        operatorId: operator.id,
        operatorName: operator.name,
        operatorEmail: operator.email,
        offsets,
        tools,
        identityChecked: true,
        dryRun: true,
        quantity: r.quantity,
        signedAt: at,
      })
      .returning({ id: runs.id });
    await tx.insert(auditEvents).values({
      actorId: operator.id,
      actorEmail: operator.email,
      action: "run.signed-off",
      objectType: "revision",
      objectId: String(rev.id),
      at,
      details: {
        runId: run!.id,
        programId: rev.programId,
        number: r.revision,
        machineId: rev.machineId,
        sha256: rev.sha256,
        offsets: offsets.map((o) => o.code),
        tools: tools.map((t) => t.number),
        quantity: r.quantity,
        demo: true,
      },
    });
    n++;
  }
  return n;
}

/** Walks each demo revision to its final state, as the workflow would (signatures, supersession, audit). */
async function applyWorkflow(tx: Tx): Promise<void> {
  const people = await byEmail(tx);
  for (const p of DEMO_PROGRAMS) {
    const [program] = await tx.select({ id: programs.id }).from(programs).where(eq(programs.programNumber, p.programNumber));
    if (!program) continue;
    const revs = await tx
      .select({ id: revisions.id, number: revisions.number, sha256: revisions.sha256, createdAt: revisions.createdAt })
      .from(revisions)
      .where(eq(revisions.programId, program.id))
      .orderBy(revisions.number);
    let released: { id: number; number: number } | null = null;
    for (const [i, r] of p.revisions.entries()) {
      const rev = revs[i];
      if (!rev || r.status === "draft") continue;
      const uploader = people.get(r.uploadedBy)!;
      const submittedAt = new Date(rev.createdAt.getTime() + 2 * 3_600_000);
      const event = (actor: { id: number; email: string }, action: string, at: Date, details: Record<string, unknown>) =>
        tx.insert(auditEvents).values({
          actorId: actor.id,
          actorEmail: actor.email,
          action,
          objectType: "revision",
          objectId: String(rev.id),
          at,
          details: { programId: program.id, number: rev.number, sha256: rev.sha256, demo: true, ...details },
        });
      const signature = (signer: { id: number; name: string; email: string }, meaning: "submitted" | "released" | "rejected" | "waived", comment: string, at: Date, finding: unknown = null) =>
        tx.insert(signatures).values({ revisionId: rev.id, signerId: signer.id, signerName: signer.name, signerEmail: signer.email, meaning, comment, sha256: rev.sha256, finding, signedAt: at });

      await tx.update(revisions).set({ status: "submitted", submittedAt }).where(eq(revisions.id, rev.id));
      await signature(uploader, "submitted", r.submitComment ?? "", submittedAt);
      await event(uploader, "revision.submit", submittedAt, { comment: r.submitComment ?? "" });
      if (r.status === "submitted") continue;

      const lead = people.get(r.decidedBy!)!;
      const decidedAt = new Date(submittedAt.getTime() + 5 * 3_600_000);
      if (r.status === "rejected") {
        await tx.update(revisions).set({ status: "rejected", decidedAt, decidedBy: lead.id }).where(eq(revisions.id, rev.id));
        await signature(lead, "rejected", r.decisionComment ?? "", decidedAt);
        await event(lead, "revision.reject", decidedAt, { comment: r.decisionComment ?? "" });
        continue;
      }
      const errors = await tx
        .select({ rule: revisionFindings.rule, line: revisionFindings.line, message: revisionFindings.message })
        .from(revisionFindings)
        .where(and(eq(revisionFindings.revisionId, rev.id), eq(revisionFindings.severity, "error")));
      for (const e of errors) {
        const reason = r.waivers?.[e.rule];
        if (!reason) throw new Error(`demo ${p.programNumber} r${rev.number}: error ${e.rule} on line ${e.line} has no waiver`);
        await signature(lead, "waived", reason, decidedAt, e);
        await event(lead, "revision.waive", decidedAt, { finding: e, reason });
      }
      if (released) {
        await tx.update(revisions).set({ status: "superseded", supersededAt: decidedAt, supersededById: rev.id }).where(eq(revisions.id, released.id));
      }
      await tx.update(revisions).set({ status: "released", decidedAt, decidedBy: lead.id }).where(eq(revisions.id, rev.id));
      await tx.update(programs).set({ releasedRevisionId: rev.id }).where(eq(programs.id, program.id));
      await signature(lead, "released", r.decisionComment ?? "", decidedAt);
      await event(lead, "revision.release", decidedAt, { comment: r.decisionComment ?? "", waivers: errors.length, superseded: released?.number ?? null });
      released = { id: rev.id, number: rev.number };
    }
  }
}
