import { createHash, randomUUID } from "node:crypto";
import { readdir, readFile } from "node:fs/promises";
import path from "node:path";
import { eq, sql } from "drizzle-orm";
import { db } from "@/db";
import { machines, revisionAnalyses } from "@/db/schema";
import * as uploadRoute from "@/app/api/programs/[id]/revisions/route";
import { createPart } from "@/lib/dal/parts";
import { createProgram } from "@/lib/dal/programs";
import { env, loadEnv, type Env } from "@/lib/env";
import { ENGINE_VERSION } from "@/lib/gcode";
import { startWorker, type RunningWorker } from "@/lib/jobs/worker";
import { machineFields, params } from "./helpers";

export const sha256 = (b: Uint8Array | string) => createHash("sha256").update(b).digest("hex");

/** A small clean program; `tag` makes its bytes (and hash) unique. */
export function ncProgram(tag: string = randomUUID(), extra = ""): string {
  return [
    "%",
    `O1001 (TEST ${tag})`,
    "G90 G94 G17 G40 G49 G80 G21",
    "T1 M6 (D10 END MILL)",
    "G54 G0 X0 Y0 S3000 M3",
    "G43 H1 Z25",
    "G0 Z2",
    "G1 Z-1 F200",
    "G1 X20 F600",
    "G1 Y10",
    extra,
    "G0 Z25",
    "M5",
    "M30",
    "%",
    "",
  ].join("\n");
}

/** A machine straight into the database (no role needed). */
export async function makeMachine(overrides: Record<string, string | number | boolean> = {}) {
  const f = machineFields(overrides) as unknown as typeof machines.$inferInsert;
  const [row] = await db().insert(machines).values(f).returning({ id: machines.id });
  return row!.id;
}

/** A part and a program as the signed-in programmer (actAs("programmer") first). */
export async function makeProgram(opts: { machineId?: number; safeZ?: number | null } = {}) {
  const machineId = opts.machineId ?? (await makeMachine());
  const part = await createPart({ number: `IT-${randomUUID().slice(0, 8)}`, name: "Test part", customer: "", material: "", notes: "" });
  const program = await createProgram({
    programNumber: `O${Math.floor(Math.random() * 9000) + 1000}`,
    title: "Test program",
    partId: part.id,
    machineId,
    operation: "",
    partsPerCycle: 1,
    safeZ: opts.safeZ ?? null,
  });
  return { programId: program.id, partId: part.id, machineId };
}

/** POST /api/programs/{id}/revisions in process, with a streamed body. */
export function uploadRequest(programId: number, body: Uint8Array | string, headers: Record<string, string> = {}) {
  const bytes = typeof body === "string" ? new TextEncoder().encode(body) : body;
  const req = new Request(`http://localhost/api/programs/${programId}/revisions`, {
    method: "POST",
    headers: { "content-type": "text/plain", ...headers },
    body: bytes as Uint8Array<ArrayBuffer>,
  });
  return uploadRoute.POST(req, params({ id: String(programId) }));
}

/** Uploads and returns the revision (fails the test on a non-201). */
export async function upload(programId: number, body: string | Uint8Array, headers: Record<string, string> = {}) {
  const res = await uploadRequest(programId, body, headers);
  if (res.status !== 201) throw new Error(`upload answered ${res.status}: ${await res.text()}`);
  return ((await res.json()) as { revision: { id: number; number: number; sha256: string; status: string } }).revision;
}

/** Settings for a worker in this process, with overrides (as env variables). */
export function workerEnv(overrides: Record<string, string> = {}): Env {
  return loadEnv({ ...process.env, ...overrides }, { needSecret: false });
}

let shared: RunningWorker | null = null;

/** One worker in this test process for the files that need analyses done. */
export async function ensureWorker(): Promise<RunningWorker> {
  shared ??= await startWorker({ env: workerEnv({ JOB_POLL_SECONDS: "0.5" }), log: () => undefined, inAppProcess: true });
  return shared;
}

export async function stopWorker(): Promise<void> {
  await shared?.stop();
  shared = null;
}

export async function analysisOf(revisionId: number) {
  const [row] = await db().select().from(revisionAnalyses).where(eq(revisionAnalyses.revisionId, revisionId));
  return row;
}

/** Waits until the revision's analysis reaches one of `states`. */
export async function waitForAnalysis(revisionId: number, states: string[] = ["done"], timeoutMs = 20_000) {
  const t0 = Date.now();
  for (;;) {
    const a = await analysisOf(revisionId);
    if (a && states.includes(a.state)) return a;
    if (Date.now() - t0 > timeoutMs) throw new Error(`analysis of ${revisionId} is ${a?.state} after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

/** The .eml files the fake SMTP server stored, as text. */
export async function readMails(): Promise<{ file: string; text: string }[]> {
  const dir = env().mailDir;
  const files = (await readdir(dir).catch(() => [] as string[])).filter((f) => f.endsWith(".eml")).sort();
  return Promise.all(files.map(async (f) => ({ file: f, text: await readFile(path.join(dir, f), "utf8") })));
}

/**
 * A revision straight into the database (no worker): its bytes, the row in `status`, and a finished analysis with
 * no findings. For tests about who may do what, not about the analysis.
 */
export async function insertRevision(opts: { programId: number; uploadedBy: number; status?: "draft" | "submitted" | "released"; text?: string }) {
  const { programFiles, programs: programsTable, revisions: revisionsTable } = await import("@/db/schema");
  const text = opts.text ?? ncProgram();
  const bytes = Buffer.from(text);
  const hash = sha256(bytes);
  await db().insert(programFiles).values({ sha256: hash, size: bytes.length, bytes }).onConflictDoNothing();
  return db().transaction(async (tx) => {
    const [p] = await tx
      .update(programsTable)
      .set({ lastRevisionNumber: sql`${programsTable.lastRevisionNumber} + 1` })
      .where(eq(programsTable.id, opts.programId))
      .returning({ n: programsTable.lastRevisionNumber });
    const [rev] = await tx
      .insert(revisionsTable)
      .values({
        programId: opts.programId,
        number: p!.n,
        fileName: "fixture.nc",
        sha256: hash,
        size: bytes.length,
        lineCount: 15,
        uploadedBy: opts.uploadedBy,
        status: opts.status ?? "draft",
      })
      .returning({ id: revisionsTable.id });
    await tx.insert(revisionAnalyses).values({
      revisionId: rev!.id,
      state: "done",
      engineVersion: ENGINE_VERSION,
      errorCount: 0,
      warningCount: 0,
      infoCount: 0,
      result: { findingCounts: [], findings: [], tools: [], workOffsets: [], units: "mm", lineCount: 15, toolOrder: "single", toolChangeCount: 0, bounds: {}, cuttingBounds: {}, time: { totalSeconds: 1, feedSeconds: 1, rapidSeconds: 0, dwellSeconds: 0, toolChangeSeconds: 0 } },
    });
    await tx.update(programsTable).set({ latestRevisionId: rev!.id }).where(eq(programsTable.id, opts.programId));
    return rev!.id;
  });
}

/** A part and a program straight into the database, created by `userId`. */
export async function insertProgram(userId: number, machineId: number) {
  const { parts: partsTable, programs: programsTable } = await import("@/db/schema");
  const [part] = await db().insert(partsTable).values({ number: `FX-${randomUUID().slice(0, 8)}`, name: "Fixture part" }).returning({ id: partsTable.id });
  const [program] = await db()
    .insert(programsTable)
    .values({ programNumber: `O${randomUUID().slice(0, 6)}`, title: "Fixture program", partId: part!.id, machineId, createdBy: userId })
    .returning({ id: programsTable.id });
  return program!.id;
}

/** A work offset value straight into the database. */
export async function setFixtureOffset(machineId: number, code: string) {
  const { machineWorkOffsets } = await import("@/db/schema");
  await db().insert(machineWorkOffsets).values({ machineId, code, x: -1, y: -2, z: -3 }).onConflictDoNothing();
}
