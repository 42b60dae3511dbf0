/**
 * The analysis job queue (pg-boss 10 on the app's own PostgreSQL, schema "pgboss"). Requests are written inside the
 * caller's transaction, so a revision and its analysis job commit together or not at all, and a NOTIFY (delivered
 * on commit) wakes every worker at once instead of waiting for its next poll.
 *
 * No "server-only" here: the worker (scripts/worker.ts, scripts/serve.ts) runs outside Next and imports it too.
 */
import { sql } from "drizzle-orm";
import PgBoss from "pg-boss";
import type { PoolClient } from "pg";
import type { Tx } from "../../db/client";
import { revisionAnalyses } from "../../db/schema";
import type { Env } from "../env";

export const JOB_SCHEMA = "pgboss";
export const ANALYSIS_QUEUE = "analyse-revision";
/** Where pg-boss moves an analysis job that failed for the last time (error, timeout or a dead worker). */
export const ANALYSIS_FAILED_QUEUE = "analyse-revision-failed";
/** NOTIFY channel; the payload says what to do: "analysis" or "mail". */
export const WAKE_CHANNEL = "cyclegate_work";

export interface AnalysisJobData {
  revisionId: number;
}

/** One job per revision may wait and one may run at a time (pg-boss "stately" policy keyed by this). */
export const analysisJobKey = (revisionId: number) => `revision-${revisionId}`;

/** Queue settings from the env; applied when the queue is created and again whenever a worker starts. */
export function analysisQueueOptions(env: Pick<Env, "analysisTimeoutSeconds" | "analysisRetries">) {
  return {
    policy: "stately" as const,
    retryLimit: env.analysisRetries,
    retryDelay: 2,
    retryBackoff: true,
    expireInSeconds: env.analysisTimeoutSeconds,
    deadLetter: ANALYSIS_FAILED_QUEUE,
    retentionDays: 7,
  };
}

/** Creates the queues, or brings their settings up to date. Needs a started PgBoss. */
export async function ensureQueues(boss: PgBoss, env: Pick<Env, "analysisTimeoutSeconds" | "analysisRetries">) {
  if (!(await boss.getQueue(ANALYSIS_FAILED_QUEUE))) {
    await boss.createQueue(ANALYSIS_FAILED_QUEUE, { name: ANALYSIS_FAILED_QUEUE, policy: "standard", retryLimit: 5, retryDelay: 5 });
  }
  const options = analysisQueueOptions(env);
  if (await boss.getQueue(ANALYSIS_QUEUE)) await boss.updateQueue(ANALYSIS_QUEUE, { name: ANALYSIS_QUEUE, ...options });
  else await boss.createQueue(ANALYSIS_QUEUE, { name: ANALYSIS_QUEUE, ...options });
}

const g = globalThis as unknown as { cyclegateJobSender?: PgBoss };

/** A pg-boss used only to write jobs through a caller's connection; it opens no pool of its own. */
function sender(): PgBoss {
  g.cyclegateJobSender ??= new PgBoss({
    schema: JOB_SCHEMA,
    db: {
      executeSql: () => {
        throw new Error("job sender: pass the transaction's connection");
      },
    },
  });
  return g.cyclegateJobSender;
}

/** The pg client under a Drizzle node-postgres transaction. */
function clientOf(tx: Tx): PoolClient {
  const client = (tx as unknown as { session?: { client?: PoolClient } }).session?.client;
  if (!client || typeof client.query !== "function") throw new Error("not a node-postgres transaction");
  return client;
}

/**
 * Asks for (re-)analysis of revisions, inside the caller's transaction: marks each analysis queued (creating its row
 * when missing), writes a job unless one is already waiting, and wakes the workers on commit.
 */
export async function requestAnalysis(tx: Tx, revisionIds: number[]): Promise<void> {
  if (revisionIds.length === 0) return;
  await tx
    .insert(revisionAnalyses)
    .values(revisionIds.map((revisionId) => ({ revisionId })))
    .onConflictDoUpdate({
      target: revisionAnalyses.revisionId,
      set: { state: "queued", requestSeq: sql`${revisionAnalyses.requestSeq} + 1`, queuedAt: sql`now()` },
    });
  const client = clientOf(tx);
  const db = { executeSql: (text: string, values: unknown[]) => client.query(text, values) };
  for (const revisionId of revisionIds) {
    // null when a job for this revision is already waiting: that one will read the newest data when it runs.
    await sender().send(ANALYSIS_QUEUE, { revisionId } satisfies AnalysisJobData, { singletonKey: analysisJobKey(revisionId), db });
  }
  await tx.execute(sql`select pg_notify(${WAKE_CHANNEL}, 'analysis')`);
}

/** Wakes the workers' mail senders when the transaction commits. */
export async function wakeMailSender(tx: Tx): Promise<void> {
  await tx.execute(sql`select pg_notify(${WAKE_CHANNEL}, 'mail')`);
}
