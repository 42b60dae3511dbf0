/**
 * The background worker: analysis jobs from the queue, the mail outbox, and the start-up sweep. `npm start` runs
 * one inside the app process (scripts/serve.ts); `npm run worker` runs more against the same database
 * (scripts/worker.ts). Any number may run at once: jobs and mail are claimed with row locks.
 */
import { and, eq, inArray, lt, or, sql } from "drizzle-orm";
import PgBoss from "pg-boss";
import { Client } from "pg";
import { createDb, type Db } from "../../db/client";
import { revisionAnalyses } from "../../db/schema";
import type { Env } from "../env";
import { ENGINE_VERSION } from "../gcode/version";
import { deliverOutbox, mailTransport } from "../mail/outbox";
import { ThreadAnalyser } from "./analyser";
import { analyseRevision, recordAnalysisFailure } from "./analysis";
import { offerAnalyser } from "./precompute";
import {
  ANALYSIS_FAILED_QUEUE,
  ANALYSIS_QUEUE,
  JOB_SCHEMA,
  WAKE_CHANNEL,
  analysisJobKey,
  ensureQueues,
  requestAnalysis,
  type AnalysisJobData,
} from "./queue";

export interface RunningWorker {
  /** Stops taking work, waits for the job in hand, closes connections. */
  stop(): Promise<void>;
  /** Analyses finished by this worker since it started. */
  readonly analysed: number;
}

export interface WorkerOptions {
  env: Env;
  log?: (msg: string) => void;
  /** Running inside the app process: offer the analyser for early analysis of uploads (lib/jobs/precompute.ts). */
  inAppProcess?: boolean;
}

/** How often the outbox is looked at when nobody woke the sender. */
const MAIL_POLL_MS = 10_000;

/** Creates the job schema and queues (pg-boss migrates itself); used by scripts/migrate.ts. */
export async function prepareJobQueue(env: Env): Promise<void> {
  const boss = new PgBoss({ connectionString: env.databaseUrl, schema: JOB_SCHEMA, max: 2, supervise: false, schedule: false });
  boss.on("error", () => undefined);
  await boss.start();
  try {
    await ensureQueues(boss, env);
  } finally {
    await boss.stop({ graceful: false, wait: true });
  }
}

/** Staged upload bytes whose upload never finished (the request failed after the COPY committed). */
export async function dropStaleUploads(db: Db): Promise<number> {
  const res = await db.execute(sql`delete from program_file_uploads where created_at < now() - interval '1 hour'`);
  return res.rowCount ?? 0;
}

/**
 * Revisions to (re-)analyse after a start: analyses waiting or running with no job left in the queue (the job was
 * lost with a dead process or never written), and analyses made by an older engine.
 */
export async function requeueOnStart(db: Db): Promise<number> {
  const orphaned = await db
    .select({ id: revisionAnalyses.revisionId })
    .from(revisionAnalyses)
    .where(
      or(
        and(
          inArray(revisionAnalyses.state, ["queued", "running"]),
          sql`not exists (select 1 from ${sql.raw(JOB_SCHEMA)}.job j where j.name = ${ANALYSIS_QUEUE}
                and j.singleton_key = 'revision-' || ${revisionAnalyses.revisionId} and j.state < 'completed')`,
        ),
        and(eq(revisionAnalyses.state, "done"), lt(revisionAnalyses.engineVersion, ENGINE_VERSION)),
      ),
    );
  const ids = orphaned.map((r) => r.id);
  for (let i = 0; i < ids.length; i += 500) {
    const chunk = ids.slice(i, i + 500);
    await db.transaction((tx) => requestAnalysis(tx, chunk));
  }
  return ids.length;
}

export async function startWorker(opts: WorkerOptions): Promise<RunningWorker> {
  const { env } = opts;
  const log = opts.log ?? ((m: string) => console.log(`[worker] ${m}`));
  const db = createDb(env.databaseUrl, 4);
  const boss = new PgBoss({
    connectionString: env.databaseUrl,
    schema: JOB_SCHEMA,
    max: 4,
    supervise: true,
    schedule: false,
    maintenanceIntervalSeconds: env.jobMaintenanceSeconds,
  });
  boss.on("error", (e: Error) => log(`queue error: ${e.message}`));
  await boss.start();
  await ensureQueues(boss, env);

  const analyser = new ThreadAnalyser(env.analysisDelayMs);
  if (opts.inAppProcess) offerAnalyser(analyser);
  let analysed = 0;
  const workOptions = { pollingIntervalSeconds: env.jobPollSeconds, batchSize: 1, includeMetadata: true } as const;

  let analysisWorker = "";
  analysisWorker = await boss.work<AnalysisJobData>(ANALYSIS_QUEUE, workOptions, async ([job]) => {
    if (!job) return;
    const { revisionId } = job.data;
    // pg-boss waits out the polling interval after a job unless notified: go straight on to the next one.
    boss.notifyWorker(analysisWorker);
    try {
      const outcome = await analyseRevision(db, revisionId, analyser);
      if (outcome === "done") analysed++;
      return { outcome };
    } catch (e) {
      const reason = e instanceof Error ? e.message : String(e);
      const final = job.retryCount >= job.retryLimit;
      log(`analysis of revision ${revisionId} failed (attempt ${job.retryCount + 1} of ${job.retryLimit + 1}): ${reason}`);
      await recordAnalysisFailure(db, revisionId, reason, final).catch(() => undefined);
      throw e;
    }
  });

  // A job that failed for the last time, including one whose worker died or timed out (no handler saw its end).
  await boss.work<AnalysisJobData>(ANALYSIS_FAILED_QUEUE, workOptions, async ([job]) => {
    if (!job) return;
    await db
      .update(revisionAnalyses)
      .set({
        state: "failed",
        finishedAt: sql`now()`,
        error: sql`coalesce(${revisionAnalyses.error}, ${`The analysis did not finish after ${env.analysisRetries + 1} attempts: the worker stopped, or it ran longer than ${env.analysisTimeoutSeconds} s.`})`,
      })
      .where(
        and(
          eq(revisionAnalyses.revisionId, job.data.revisionId),
          inArray(revisionAnalyses.state, ["queued", "running"]),
          sql`${revisionAnalyses.requestSeq} = ${revisionAnalyses.runSeq}`,
          sql`not exists (select 1 from ${sql.raw(JOB_SCHEMA)}.job j where j.name = ${ANALYSIS_QUEUE}
                and j.singleton_key = ${analysisJobKey(job.data.revisionId)} and j.state < 'completed')`,
        ),
      );
  });

  // Mail: one delivery at a time in this process; a wake-up during a run schedules one more run.
  const transport = mailTransport(env);
  let mailRunning: Promise<void> | null = null;
  let mailAgain = false;
  const deliverMail = () => {
    if (mailRunning) {
      mailAgain = true;
      return;
    }
    mailRunning = (async () => {
      do {
        mailAgain = false;
        try {
          await deliverOutbox(db, transport, env);
        } catch (e) {
          log(`mail delivery: ${e instanceof Error ? e.message : String(e)}`);
        }
      } while (mailAgain && !stopping);
    })().finally(() => {
      mailRunning = null;
    });
  };
  const mailTimer = setInterval(deliverMail, MAIL_POLL_MS);
  const stagedTimer = setInterval(() => void dropStaleUploads(db).catch(() => undefined), 10 * 60_000);
  stagedTimer.unref();

  // LISTEN for wake-ups (sent on commit by uploads, re-analysis requests and queued mail).
  let stopping = false;
  let listener: Client | null = null;
  const listen = async () => {
    const client = new Client({ connectionString: env.databaseUrl });
    client.on("notification", (n) => {
      if (n.payload === "analysis") boss.notifyWorker(analysisWorker);
      else if (n.payload === "mail") deliverMail();
    });
    client.on("error", (e) => {
      log(`wake-up listener lost (${e.message}); polling until it is back`);
      listener = null;
      client.end().catch(() => undefined);
      if (!stopping) setTimeout(() => void listen().catch(() => undefined), 5_000).unref();
    });
    await client.connect();
    await client.query(`LISTEN ${WAKE_CHANNEL}`);
    listener = client;
  };
  await listen();

  await dropStaleUploads(db);
  const requeued = await requeueOnStart(db);
  if (requeued > 0) log(`queued ${requeued} revision(s) for analysis (lost jobs or an older engine than v${ENGINE_VERSION})`);
  deliverMail();

  return {
    get analysed() {
      return analysed;
    },
    async stop() {
      stopping = true;
      clearInterval(mailTimer);
      clearInterval(stagedTimer);
      await boss.stop({ graceful: true, wait: true, timeout: 10_000 });
      await mailRunning;
      await (listener as Client | null)?.end().catch(() => undefined);
      if (opts.inAppProcess) offerAnalyser(null);
      await analyser.close();
      transport.close();
      await db.$client.end();
    },
  };
}
