import { spawn, type ChildProcess } from "node:child_process";
import path from "node:path";
import { eq, sql } from "drizzle-orm";
import { afterAll, afterEach, describe, expect, it } from "vitest";
import { db } from "@/db";
import { mailOutbox, revisionAnalyses, revisionOffsets, revisionTools } from "@/db/schema";
import * as programRoute from "@/app/api/programs/[id]/route";
import { ENGINE_VERSION } from "@/lib/gcode";
import { requeueOnStart, startWorker, type RunningWorker } from "@/lib/jobs/worker";
import { deliverOutbox, mailTransport } from "@/lib/mail/outbox";
import { actAs, jsonRequest, params } from "./helpers";
import { analysisOf, ensureWorker, makeProgram, ncProgram, stopWorker, upload, waitForAnalysis, workerEnv } from "./vault-helpers";

const root = path.resolve(import.meta.dirname, "../..");
const children: ChildProcess[] = [];
const extraWorkers: RunningWorker[] = [];

/** `npm run worker` as a separate process (so that it can be killed for real). */
function spawnWorker(envOverrides: Record<string, string>): ChildProcess {
  const child = spawn(process.execPath, ["--import", "tsx", "scripts/worker.ts"], {
    cwd: root,
    env: { ...process.env, ...envOverrides },
    stdio: ["ignore", "pipe", "pipe"],
  });
  children.push(child);
  return child;
}

function started(child: ChildProcess): Promise<void> {
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error("worker did not start")), 20_000);
    child.stdout!.on("data", (d: Buffer) => {
      if (d.toString().includes("worker started")) {
        clearTimeout(timer);
        resolve();
      }
    });
    child.on("exit", (code) => reject(new Error(`worker exited early (${code})`)));
  });
}

afterEach(async () => {
  for (const c of children.splice(0)) if (c.exitCode === null) c.kill("SIGKILL");
  for (const w of extraWorkers.splice(0)) await w.stop();
  await stopWorker();
});
afterAll(async () => {
  // Put the queue settings back to the defaults for the next files.
  const w = await startWorker({ env: workerEnv(), log: () => undefined });
  await w.stop();
});

describe("analysis jobs", () => {
  it("analyses an upload and stores the summary, tool and offset rows and the JSON", async () => {
    await ensureWorker();
    await actAs("programmer");
    const { programId } = await makeProgram();
    const rev = await upload(programId, ncProgram());
    const a = await waitForAnalysis(rev.id);
    expect(a).toMatchObject({ state: "done", engineVersion: ENGINE_VERSION, units: "mm", workOffsets: ["G54"], toolCount: 1, error: null, attempts: 1 });
    expect(await db().select({ n: revisionTools.toolNumber }).from(revisionTools).where(eq(revisionTools.revisionId, rev.id))).toEqual([{ n: 1 }]);
    expect(await db().select({ c: revisionOffsets.code }).from(revisionOffsets).where(eq(revisionOffsets.revisionId, rev.id))).toEqual([{ c: "G54" }]);
    expect((a!.result as { lineCount: number }).lineCount).toBe(15);
    expect(a!.result).not.toHaveProperty("toolpath");
  });

  it("takes the analysis started during the upload when bytes and options match, and only then", async () => {
    const { analyzeProgram } = await import("@/lib/gcode");
    const { offerAnalyser } = await import("@/lib/jobs/precompute");
    const { analyseRevision } = await import("@/lib/jobs/analysis");
    let early = 0;
    offerAnalyser({
      analyse: async (bytes, options) => {
        early++;
        return analyzeProgram(bytes, { ...options, toolpath: false });
      },
    });
    try {
      await actAs("programmer");
      const { programId } = await makeProgram();
      const rev = await upload(programId, ncProgram());
      expect(early).toBe(1);
      const refuse = { analyse: () => Promise.reject(new Error("should have taken the early result")) };
      expect(await analyseRevision(db(), rev.id, refuse)).toBe("done");
      expect((await analysisOf(rev.id))!.toolCount).toBe(1);
      // Taken once: a second run (options unchanged) analyses again.
      await expect(analyseRevision(db(), rev.id, refuse)).rejects.toThrow(/should have taken/);
      // Options changed after the upload (safe Z): the early result does not fit and is not used.
      const other = await upload(programId, ncProgram());
      await programRoute.PATCH(jsonRequest("PATCH", { safeZ: 12 }), params({ id: String(programId) }));
      await expect(analyseRevision(db(), other.id, refuse)).rejects.toThrow(/should have taken/);
    } finally {
      offerAnalyser(null);
    }
  });

  it("re-analyses every revision of a program whose safe Z or machine changes", async () => {
    await ensureWorker();
    await actAs("programmer");
    const { programId } = await makeProgram();
    const rev = await upload(programId, ncProgram());
    expect((await waitForAnalysis(rev.id))!.safeZ).toBe(5); // the test machine's
    const res = await programRoute.PATCH(jsonRequest("PATCH", { safeZ: 30 }), params({ id: String(programId) }));
    expect(res.status).toBe(200);
    const deadline = Date.now() + 15_000;
    let a = await analysisOf(rev.id);
    while (Date.now() < deadline && !(a?.state === "done" && a.safeZ === 30)) {
      await new Promise((r) => setTimeout(r, 100));
      a = await analysisOf(rev.id);
    }
    expect(a).toMatchObject({ state: "done", safeZ: 30 });
    // Rapids to Z2 are now below the program's safe Z of 30.
    expect(a!.warningCount! + a!.errorCount!).toBeGreaterThan(0);
  });

  it("re-analyses on start what an older engine analysed", async () => {
    await actAs("programmer");
    const { programId } = await makeProgram();
    await ensureWorker();
    const rev = await upload(programId, ncProgram());
    await waitForAnalysis(rev.id);
    await stopWorker();
    await db().update(revisionAnalyses).set({ engineVersion: ENGINE_VERSION - 1 }).where(eq(revisionAnalyses.revisionId, rev.id));
    expect(await requeueOnStart(db())).toBeGreaterThan(0);
    expect((await analysisOf(rev.id))!.state).toBe("queued");
    await ensureWorker();
    const a = await waitForAnalysis(rev.id);
    expect(a!.engineVersion).toBe(ENGINE_VERSION);
  });

  /** Uploads while only a slow worker process runs, and kills it with SIGKILL once the analysis is running. */
  async function uploadAndKillWorkerMidJob(settings: Record<string, string>): Promise<number> {
    const slow = spawnWorker({ ...settings, CYCLEGATE_ANALYSIS_DELAY_MS: "60000" });
    await started(slow);
    await actAs("programmer");
    const { programId } = await makeProgram();
    const rev = await upload(programId, ncProgram());
    await waitForAnalysis(rev.id, ["running"]);
    slow.kill("SIGKILL");
    await new Promise((r) => slow.once("exit", r));
    expect((await analysisOf(rev.id))!.state).toBe("running");
    return rev.id;
  }

  it("picks up again the job of a worker killed mid-job", async () => {
    const fast = { ANALYSIS_TIMEOUT_SECONDS: "3", JOB_MAINTENANCE_SECONDS: "1", JOB_POLL_SECONDS: "0.5" };
    const rev = { id: await uploadAndKillWorkerMidJob(fast) };
    // Another worker: the queue's maintenance fails the dead job by timeout and retries it.
    extraWorkers.push(await startWorker({ env: workerEnv(fast), log: () => undefined }));
    const a = await waitForAnalysis(rev.id, ["done"], 30_000);
    expect(a).toMatchObject({ state: "done", attempts: 2, error: null });
  });

  it("marks the analysis failed with its reason, never left running, when the retries are used up", async () => {
    const once = { ANALYSIS_TIMEOUT_SECONDS: "2", ANALYSIS_RETRIES: "0", JOB_MAINTENANCE_SECONDS: "1", JOB_POLL_SECONDS: "0.5" };
    const rev = { id: await uploadAndKillWorkerMidJob(once) };
    extraWorkers.push(await startWorker({ env: workerEnv(once), log: () => undefined }));
    const a = await waitForAnalysis(rev.id, ["failed"], 30_000);
    expect(a!.error).toMatch(/did not finish after 1 attempts/);
  });
});

describe("mail outbox", () => {
  it("retries a failed send with backoff and gives up after the retries", async () => {
    const [row] = await db()
      .insert(mailOutbox)
      .values({ messageId: `<retry-${Date.now()}@cyclegate.mail>`, kind: "test", recipients: ["nobody@it.cyclegate.test"], subject: "retry test", body: "x" })
      .returning({ id: mailOutbox.id });
    // Nothing listens on port 9 of loopback.
    const dead = mailTransport({ smtpUrl: "smtp://127.0.0.1:9" });
    const settings = { mailFrom: "Cyclegate <no-reply@cyclegate.test>", mailRetries: 1 };
    await deliverOutbox(db(), dead, settings);
    let [m] = await db().select().from(mailOutbox).where(eq(mailOutbox.id, row!.id));
    expect(m).toMatchObject({ state: "pending", attempts: 1 });
    expect(m!.lastError).toBeTruthy();
    expect(m!.nextAttemptAt.getTime()).toBeGreaterThan(Date.now() + 5_000);
    await db().update(mailOutbox).set({ nextAttemptAt: sql`now()` }).where(eq(mailOutbox.id, row!.id));
    await deliverOutbox(db(), dead, settings);
    [m] = await db().select().from(mailOutbox).where(eq(mailOutbox.id, row!.id));
    expect(m).toMatchObject({ state: "failed", attempts: 2 });
  });

  it("takes back a claim whose sender died (lease lapsed) and sends it once", async () => {
    const messageId = `<lease-${Date.now()}@cyclegate.mail>`;
    const [row] = await db()
      .insert(mailOutbox)
      .values({ messageId, kind: "test", recipients: ["lease@it.cyclegate.test"], subject: "lease test", body: "x", state: "sending", attempts: 1, lockedUntil: sql`now() - interval '1 second'` })
      .returning({ id: mailOutbox.id });
    const { env } = await import("@/lib/env");
    const sent = await deliverOutbox(db(), mailTransport(env()), env());
    expect(sent).toBeGreaterThanOrEqual(1);
    const [m] = await db().select().from(mailOutbox).where(eq(mailOutbox.id, row!.id));
    expect(m).toMatchObject({ state: "sent", attempts: 2, messageId });
    // Nothing is left to send twice.
    const again = await db().select({ id: mailOutbox.id }).from(mailOutbox).where(eq(mailOutbox.state, "sending"));
    expect(again.find((r) => r.id === row!.id)).toBeUndefined();
  });
});
