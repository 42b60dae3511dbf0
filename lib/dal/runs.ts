import "server-only";
import { and, count, desc, eq, gte, lt, sql, type SQL } from "drizzle-orm";
import { db, type Db, type Tx } from "@/db";
import {
  machines,
  programFiles,
  programs,
  revisionAnalyses,
  revisions,
  runs,
  type AnalysisState,
  type RevisionStatus,
} from "@/db/schema";
import { recordEvent } from "@/lib/audit";
import { RequestError } from "@/lib/auth/errors";
import { requireOwnPassword } from "@/lib/auth/reauth";
import { authorize, requestIp } from "@/lib/auth/session";
import { recordRevisionView } from "@/lib/dal/revisions";
import { likeEscape } from "@/lib/dal/sql";
import { programHeader, type ProgramHeader } from "@/lib/program-file";
import { checkGaps, gapMessages, hasGaps } from "@/lib/run-checklist";
import { offsetsAsRecorded, runChecksOf, type RunChecks, type RunOffsetValue, type RunTool } from "@/lib/run-record";
import type { RunListQuery, RunSignOffInput } from "@/lib/vault-validation";

export type { RunOffsetValue, RunTool };

/** One run signed off at a machine. */
export interface RunView {
  id: number;
  revision: { id: number; number: number; status: RevisionStatus };
  program: { id: number; programNumber: string; title: string };
  machine: { id: number; name: string };
  /** The SHA-256 signed (the revision's bytes). */
  sha256: string;
  /** Name and e-mail as they were at the time. */
  operator: { id: number; name: string; email: string };
  offsets: RunOffsetValue[];
  /** In load order. */
  tools: RunTool[];
  quantity: number | null;
  signedAt: string;
}

const runColumns = {
  id: runs.id,
  revisionId: runs.revisionId,
  revisionNumber: revisions.number,
  revisionStatus: revisions.status,
  programId: runs.programId,
  programNumber: programs.programNumber,
  programTitle: programs.title,
  machineId: runs.machineId,
  machineName: machines.name,
  sha256: runs.sha256,
  operatorId: runs.operatorId,
  operatorName: runs.operatorName,
  operatorEmail: runs.operatorEmail,
  offsets: runs.offsets,
  tools: runs.tools,
  quantity: runs.quantity,
  signedAt: runs.signedAt,
};

type RunRowOut = Omit<{ [K in keyof typeof runColumns]: (typeof runColumns)[K]["_"]["data"] }, "quantity"> & { quantity: number | null };

const toRunView = (r: RunRowOut): RunView => ({
  id: r.id,
  revision: { id: r.revisionId, number: r.revisionNumber, status: r.revisionStatus },
  program: { id: r.programId, programNumber: r.programNumber, title: r.programTitle },
  machine: { id: r.machineId, name: r.machineName },
  sha256: r.sha256,
  operator: { id: r.operatorId, name: r.operatorName, email: r.operatorEmail },
  offsets: r.offsets as RunOffsetValue[],
  tools: r.tools as RunTool[],
  quantity: r.quantity,
  signedAt: r.signedAt.toISOString(),
});

const runsJoined = () =>
  db()
    .select(runColumns)
    .from(runs)
    .innerJoin(revisions, eq(revisions.id, runs.revisionId))
    .innerJoin(programs, eq(programs.id, runs.programId))
    .innerJoin(machines, eq(machines.id, runs.machineId));

/** One page of runs, newest first; `from`/`to` are whole UTC days, `to` included. */
export async function listRuns(query: RunListQuery): Promise<{ runs: RunView[]; total: number; page: number; pageSize: number }> {
  await authorize("readRuns");
  const where: SQL[] = [];
  if (query.machine) where.push(eq(runs.machineId, query.machine));
  if (query.programId) where.push(eq(runs.programId, query.programId));
  if (query.program) where.push(sql`lower(${programs.programNumber}) like ${`${likeEscape(query.program.toLowerCase())}%`}`);
  if (query.operator) where.push(eq(runs.operatorId, query.operator));
  if (query.from) where.push(gte(runs.signedAt, new Date(`${query.from}T00:00:00Z`)));
  if (query.to) where.push(lt(runs.signedAt, new Date(Date.parse(`${query.to}T00:00:00Z`) + 86_400_000)));
  const cond = where.length > 0 ? and(...where) : undefined;
  const [rows, [total]] = await Promise.all([
    runsJoined()
      .where(cond)
      .orderBy(desc(runs.signedAt), desc(runs.id))
      .limit(query.pageSize)
      .offset((query.page - 1) * query.pageSize),
    db().select({ n: count() }).from(runs).innerJoin(programs, eq(programs.id, runs.programId)).where(cond),
  ]);
  return { runs: rows.map(toRunView), total: total?.n ?? 0, page: query.page, pageSize: query.pageSize };
}

export async function getRun(id: number): Promise<RunView | null> {
  await authorize("readRuns");
  const [row] = await runsJoined().where(eq(runs.id, id));
  return row ? toRunView(row) : null;
}

/** Everyone who has signed off a run, by the name of their latest one (the record's filter). */
export async function listRunOperators(): Promise<{ id: number; name: string }[]> {
  await authorize("readRuns");
  const rows = await db()
    .selectDistinctOn([runs.operatorId], { id: runs.operatorId, name: runs.operatorName })
    .from(runs)
    .orderBy(runs.operatorId, desc(runs.signedAt));
  return rows.sort((a, b) => a.name.localeCompare(b.name));
}

/** How much of the file's start the run page reads for the program's opening lines. */
export const HEAD_BYTES = 8192;

/**
 * The program's opening lines (number line and comments) as the control shows them; null when there is no such
 * revision. Looking at them counts as a view of the code (rolled up per person and revision).
 */
export async function readRevisionHeader(id: number): Promise<ProgramHeader | null> {
  const actor = await authorize("readPrograms");
  const [row] = await db()
    .select({
      head: sql<Buffer>`substring(${programFiles.bytes} from 1 for ${HEAD_BYTES})`,
      size: programFiles.size,
      programId: revisions.programId,
      number: revisions.number,
      sha256: revisions.sha256,
    })
    .from(revisions)
    .innerJoin(programFiles, eq(programFiles.sha256, revisions.sha256))
    .where(eq(revisions.id, id));
  if (!row) return null;
  await recordRevisionView(actor, id, { programId: row.programId, number: row.number, sha256: row.sha256 });
  return programHeader(row.head, { complete: row.size <= HEAD_BYTES });
}

/** What the server needs to decide a sign-off, read (and with `lock`, held) in the sign-off's transaction. */
interface SignOffPlan extends RunChecks {
  revisionId: number;
  number: number;
  status: RevisionStatus;
  sha256: string;
  programId: number;
  programNumber: string;
  machineId: number;
  releasedRevisionId: number | null;
  analysisState: AnalysisState | null;
}

/**
 * Reads the plan. With `lock`, in the order every writer takes them (program, then revision, then its analysis),
 * FOR SHARE: a release that would supersede the revision, or a new analysis of it, waits until this sign-off
 * commits, and a sign-off that comes after either reads the new state.
 */
async function readPlan(tx: Tx | Db, revisionId: number, lock: boolean): Promise<SignOffPlan> {
  const [peek] = await tx.select({ programId: revisions.programId }).from(revisions).where(eq(revisions.id, revisionId));
  if (!peek) throw new RequestError(404, "No such revision.");
  const programQuery = tx
    .select({ programNumber: programs.programNumber, machineId: programs.machineId, releasedRevisionId: programs.releasedRevisionId })
    .from(programs)
    .where(eq(programs.id, peek.programId));
  const [program] = lock ? await programQuery.for("share") : await programQuery;
  const revisionQuery = tx
    .select({ number: revisions.number, status: revisions.status, sha256: revisions.sha256 })
    .from(revisions)
    .where(eq(revisions.id, revisionId));
  const [rev] = lock ? await revisionQuery.for("share") : await revisionQuery;
  if (!program || !rev) throw new RequestError(404, "No such revision.");
  const analysisQuery = tx.select({ state: revisionAnalyses.state }).from(revisionAnalyses).where(eq(revisionAnalyses.revisionId, revisionId));
  const [analysis] = lock ? await analysisQuery.for("share") : await analysisQuery;
  return {
    revisionId,
    number: rev.number,
    status: rev.status,
    sha256: rev.sha256,
    programId: peek.programId,
    programNumber: program.programNumber,
    machineId: program.machineId,
    releasedRevisionId: program.releasedRevisionId,
    analysisState: analysis?.state ?? null,
    ...(await runChecksOf(tx, revisionId, program.machineId)),
  };
}

/** Refuses a sign-off the plan does not allow: 409 for the revision's state, 422 for boxes not ticked. */
function checkSignOff(plan: SignOffPlan, input: RunSignOffInput): void {
  const label = `${plan.programNumber} revision ${plan.number}`;
  if (plan.status !== "released") {
    throw new RequestError(409, `${label} is ${plan.status}: only the released revision of a program may run.`, {
      status: plan.status,
      releasedRevisionId: plan.releasedRevisionId,
    });
  }
  if (plan.analysisState !== "done") {
    throw new RequestError(409, `The server's check of ${label} is ${plan.analysisState ?? "missing"}; a run is signed off only on a finished check.`);
  }
  if (input.sha256 !== plan.sha256) {
    const message = `That is not the SHA-256 of ${label}; compare the program on the control again.`;
    throw new RequestError(422, message, { formErrors: [], fieldErrors: { sha256: [message] } });
  }
  const gaps = checkGaps({ offsets: plan.offsetCodes, tools: plan.tools.map((t) => t.number) }, input);
  if (hasGaps(gaps)) {
    throw new RequestError(422, "Every check must be ticked before the run is signed off; nothing was signed.", {
      formErrors: [],
      fieldErrors: gapMessages(gaps),
      missing: { identity: gaps.identity, offsets: gaps.offsets, tools: gaps.tools, dryRun: gaps.dryRun },
    });
  }
  for (const seen of input.shown ?? []) {
    const now = plan.recorded.get(seen.code)?.setAt ?? null;
    if (plan.offsetCodes.includes(seen.code) && now !== seen.setAt) {
      const who = plan.recorded.get(seen.code)?.setBy?.name;
      throw new RequestError(
        409,
        now
          ? `${seen.code} was recorded again for this machine${who ? ` by ${who}` : ""} after the page was loaded; check it again.`
          : `${seen.code} was cleared for this machine after the page was loaded; check it again.`,
      );
    }
  }
}

/**
 * An operator (or a lead) signs off a run of a released revision before cycle start: every work offset it calls set
 * at the control and checked, every tool loaded with its length offset measured, the program on the control compared,
 * a dry run done; their password again (the electronic signature, bound to the revision's SHA-256). Stores one run
 * and its audit event in one transaction. A revision superseded, or sent for a new check, between the page's load and
 * the sign-off is refused (409).
 */
export async function signOffRun(revisionId: number, input: RunSignOffInput): Promise<RunView> {
  const actor = await authorize("signOffRuns");
  // The same checks without locks first, so a revision that may not run or a box not ticked costs no password try.
  checkSignOff(await readPlan(db(), revisionId, false), input);
  await requireOwnPassword(actor, input.password, "run-signoff");
  const ip = await requestIp();
  const runId = await db().transaction(async (tx) => {
    const plan = await readPlan(tx, revisionId, true);
    checkSignOff(plan, input);
    const offsets = offsetsAsRecorded(plan);
    const [row] = await tx
      .insert(runs)
      .values({
        revisionId,
        programId: plan.programId,
        machineId: plan.machineId,
        sha256: plan.sha256,
        operatorId: actor.id,
        operatorName: actor.name,
        operatorEmail: actor.email,
        offsets,
        tools: plan.tools,
        identityChecked: true,
        dryRun: true,
        quantity: input.quantity,
      })
      .returning({ id: runs.id });
    await recordEvent(
      {
        actor,
        action: "run.signed-off",
        objectType: "revision",
        objectId: revisionId,
        details: {
          runId: row!.id,
          programId: plan.programId,
          number: plan.number,
          machineId: plan.machineId,
          sha256: plan.sha256,
          offsets: offsets.map((o) => o.code),
          tools: plan.tools.map((t) => t.number),
          quantity: input.quantity,
        },
        ip,
      },
      tx,
    );
    return row!.id;
  });
  return (await getRun(runId))!;
}
