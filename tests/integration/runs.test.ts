import { randomUUID } from "node:crypto";
import { and, count, eq, sql } from "drizzle-orm";
import { Client } from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { auditEvents, machineWorkOffsets, revisionAnalyses, revisions, runs } from "@/db/schema";
import * as runsRoute from "@/app/api/runs/route";
import * as releaseRoute from "@/app/api/revisions/[id]/release/route";
import * as signOffRoute from "@/app/api/revisions/[id]/runs/route";
import * as submitRoute from "@/app/api/revisions/[id]/submit/route";
import { signOffRunAction } from "@/app/(app)/runs/actions";
import { env } from "@/lib/env";
import { initialFormState } from "@/lib/form-state";
import { actAs, dbError, formData, jsonRequest, params, TEST_PASSWORD } from "./helpers";
import { ensureWorker, makeProgram, ncProgram, stopWorker, upload, waitForAnalysis } from "./vault-helpers";

beforeAll(async () => {
  await ensureWorker();
});
afterAll(async () => {
  await stopWorker();
});

/** Two tools (T1 then T2) under two work offsets (G54, then G55): the shared clean program with a second setup. */
const twoSetupProgram = (tag = randomUUID()) =>
  ncProgram(tag, ["G0 Z25", "T2 M6 (D6 DRILL)", "G55 G0 X5 Y5 S2000 M3", "G43 H2 Z25", "G0 Z2", "G1 Z-3 F100"].join("\n"));

const post = (handler: typeof submitRoute.POST, id: number, body?: unknown) =>
  handler(
    new Request(`http://localhost/api/revisions/${id}`, {
      method: "POST",
      headers: body === undefined ? {} : { "content-type": "application/json" },
      body: body === undefined ? undefined : JSON.stringify(body),
    }),
    params({ id: String(id) }),
  );

/** An uploaded, analysed revision of a fresh program, taken to `status` through the workflow. */
async function revisionIn(status: "draft" | "submitted" | "released", opts: { programId?: number } = {}) {
  await actAs("programmer");
  const made = opts.programId ? { programId: opts.programId, machineId: 0 } : await makeProgram();
  const rev = await upload(made.programId, twoSetupProgram());
  await waitForAnalysis(rev.id);
  if (status !== "draft") expect((await post(submitRoute.POST, rev.id, { comment: "ready" })).status).toBe(200);
  if (status === "released") {
    await actAs("lead");
    expect((await post(releaseRoute.POST, rev.id, { password: TEST_PASSWORD, comment: "Proved out." })).status).toBe(200);
  }
  const [row] = await db().select({ programId: revisions.programId }).from(revisions).where(eq(revisions.id, rev.id));
  return { id: rev.id, sha256: rev.sha256, programId: row!.programId };
}

const allChecks = (sha256: string, extra: Record<string, unknown> = {}) => ({
  password: TEST_PASSWORD,
  sha256,
  identity: true,
  offsets: ["G54", "G55"],
  tools: [1, 2],
  dryRun: true,
  quantity: 12,
  ...extra,
});

const runCount = async (revisionId: number) =>
  (await db().select({ n: count() }).from(runs).where(eq(runs.revisionId, revisionId)))[0]!.n;
const signOffEvents = async (revisionId: number) =>
  db().select().from(auditEvents).where(and(eq(auditEvents.action, "run.signed-off"), eq(auditEvents.objectId, String(revisionId))));

describe("signing off a run", () => {
  it("stores exactly one run and one audit event, bound to the revision's SHA-256, with the values shown", async () => {
    const rev = await revisionIn("released");
    const [program] = await db().execute<{ machine_id: number }>(sql`select machine_id from programs where id = ${rev.programId}`).then((r) => r.rows);
    await db().insert(machineWorkOffsets).values({ machineId: program!.machine_id, code: "G54", x: -250.5, y: -120, z: -300.25 });
    const operator = await actAs("operator");
    const res = await post(signOffRoute.POST, rev.id, allChecks(rev.sha256.toUpperCase()));
    expect(res.status).toBe(201);
    const body = (await res.json()) as { run: { id: number; sha256: string; operator: { email: string }; offsets: unknown[]; tools: unknown[]; quantity: number } };
    expect(body.run).toMatchObject({ sha256: rev.sha256, operator: { email: operator!.email }, quantity: 12 });

    const stored = await db().select().from(runs).where(eq(runs.revisionId, rev.id));
    expect(stored).toHaveLength(1);
    expect(stored[0]).toMatchObject({
      sha256: rev.sha256,
      operatorId: operator!.id,
      operatorName: "Test operator",
      operatorEmail: operator!.email,
      programId: rev.programId,
      machineId: program!.machine_id,
      identityChecked: true,
      dryRun: true,
      quantity: 12,
    });
    // The offsets in the order the program calls them, with the value recorded for the machine (or none).
    expect(stored[0]!.offsets).toMatchObject([
      { code: "G54", x: -250.5, y: -120, z: -300.25 },
      { code: "G55", x: null, y: null, z: null, setAt: null },
    ]);
    expect(stored[0]!.tools).toEqual([
      { number: 1, lengthOffsets: [1], diameterOffsets: [] },
      { number: 2, lengthOffsets: [2], diameterOffsets: [] },
    ]);
    const events = await signOffEvents(rev.id);
    expect(events).toHaveLength(1);
    expect(events[0]).toMatchObject({ actorId: operator!.id, details: { runId: stored[0]!.id, sha256: rev.sha256, offsets: ["G54", "G55"], tools: [1, 2], quantity: 12 } });
  });

  it("a lead may sign off too (the first part); a programmer and an admin may not", async () => {
    const rev = await revisionIn("released");
    await actAs("lead");
    expect((await post(signOffRoute.POST, rev.id, allChecks(rev.sha256))).status).toBe(201);
    for (const role of ["programmer", "admin"] as const) {
      await actAs(role);
      expect((await post(signOffRoute.POST, rev.id, allChecks(rev.sha256))).status).toBe(403);
    }
    await actAs("anonymous");
    expect((await post(signOffRoute.POST, rev.id, allChecks(rev.sha256))).status).toBe(401);
    expect(await runCount(rev.id)).toBe(1);
  });

  it("refuses a revision that is not released (409), and one whose check is not done", async () => {
    for (const status of ["draft", "submitted"] as const) {
      const rev = await revisionIn(status);
      await actAs("operator");
      const res = await post(signOffRoute.POST, rev.id, allChecks(rev.sha256));
      expect(res.status).toBe(409);
      expect(((await res.json()) as { error: string }).error).toContain(`is ${status}`);
      expect(await runCount(rev.id)).toBe(0);
    }
    const released = await revisionIn("released");
    await db().update(revisionAnalyses).set({ state: "queued" }).where(eq(revisionAnalyses.revisionId, released.id));
    await actAs("operator");
    const res = await post(signOffRoute.POST, released.id, allChecks(released.sha256));
    expect(res.status).toBe(409);
    expect(((await res.json()) as { error: string }).error).toMatch(/check .* is queued/);
    expect(await runCount(released.id)).toBe(0);
  });

  it("names every box not ticked (422) before asking for the password", async () => {
    const rev = await revisionIn("released");
    const operator = await actAs("operator");
    const res = await post(signOffRoute.POST, rev.id, { password: "not-my-password", sha256: rev.sha256, identity: true, offsets: ["G54"], tools: [2, 9] });
    expect(res.status).toBe(422);
    const body = (await res.json()) as { issues: { fieldErrors: Record<string, string[]>; missing: unknown } };
    expect(body.issues.missing).toEqual({ identity: false, offsets: ["G55"], tools: [1], dryRun: true });
    expect(body.issues.fieldErrors.offsets!.join(" ")).toContain("G55");
    expect(body.issues.fieldErrors.tools!.join(" ")).toMatch(/T1\b/);
    expect(body.issues.fieldErrors.tools!.join(" ")).toContain("T9");
    expect(body.issues.fieldErrors.dryRun).toBeDefined();
    expect(body.issues.fieldErrors.identity).toBeUndefined();
    // The wrong password was never checked: no try counted against the operator.
    const [tries] = await db()
      .select({ n: count() })
      .from(auditEvents)
      .where(and(eq(auditEvents.action, "session.reauth-failed"), eq(auditEvents.actorId, operator!.id)));
    expect(tries!.n).toBe(0);
    expect(await runCount(rev.id)).toBe(0);
  });

  it("refuses a SHA-256 that is not the revision's (422)", async () => {
    const rev = await revisionIn("released");
    await actAs("operator");
    const res = await post(signOffRoute.POST, rev.id, allChecks("0".repeat(64)));
    expect(res.status).toBe(422);
    expect(((await res.json()) as { issues: { fieldErrors: Record<string, string[]> } }).issues.fieldErrors.sha256).toBeDefined();
    expect(await runCount(rev.id)).toBe(0);
  });

  it("a wrong password is refused (422) and audited; past the limit the answer is 429 with Retry-After", async () => {
    const rev = await revisionIn("released");
    const operator = await actAs("operator");
    for (let i = 0; i < 5; i++) {
      const res = await post(signOffRoute.POST, rev.id, allChecks(rev.sha256, { password: `wrong-${i}` }));
      expect(res.status).toBe(422);
      expect(((await res.json()) as { issues: { fieldErrors: Record<string, string[]> } }).issues.fieldErrors.password).toEqual(["The password is wrong."]);
    }
    const throttled = await post(signOffRoute.POST, rev.id, allChecks(rev.sha256));
    expect(throttled.status).toBe(429);
    expect(Number(throttled.headers.get("retry-after"))).toBeGreaterThan(0);
    const failed = await db()
      .select({ details: auditEvents.details })
      .from(auditEvents)
      .where(and(eq(auditEvents.action, "session.reauth-failed"), eq(auditEvents.actorId, operator!.id)));
    expect(failed).toHaveLength(5);
    expect(failed[0]!.details).toEqual({ purpose: "run-signoff" });
    expect(await runCount(rev.id)).toBe(0);
    expect(await signOffEvents(rev.id)).toHaveLength(0);
  });

  it("refuses a work offset value recorded again after the page showed it (409)", async () => {
    const rev = await revisionIn("released");
    await actAs("operator");
    const shown = [
      { code: "G54", setAt: null },
      { code: "G55", setAt: null },
    ];
    const [program] = await db().execute<{ machine_id: number }>(sql`select machine_id from programs where id = ${rev.programId}`).then((r) => r.rows);
    await db().insert(machineWorkOffsets).values({ machineId: program!.machine_id, code: "G55", x: -1, y: -2, z: -3 });
    const res = await post(signOffRoute.POST, rev.id, allChecks(rev.sha256, { shown }));
    expect(res.status).toBe(409);
    expect(((await res.json()) as { error: string }).error).toMatch(/G55 was recorded again/);
    expect(await runCount(rev.id)).toBe(0);
  });

  it("of sign-offs racing a supersession, the one before it is kept and the ones after it are refused", async () => {
    const rev = await revisionIn("released");
    const next = await revisionIn("submitted", { programId: rev.programId });
    await actAs("operator");
    expect((await post(signOffRoute.POST, rev.id, allChecks(rev.sha256))).status).toBe(201);

    // A release of the next revision, held open: it locks the program and supersedes `rev` but has not committed.
    const release = new Client({ connectionString: env().databaseUrl });
    await release.connect();
    try {
      await release.query("begin");
      await release.query("select id from programs where id = $1 for update", [rev.programId]);
      await release.query("update revisions set status = 'superseded', superseded_at = now(), superseded_by_id = $2 where id = $1", [rev.id, next.id]);
      await release.query("update revisions set status = 'released', decided_at = now() where id = $1", [next.id]);
      await release.query("update programs set released_revision_id = $2 where id = $1", [rev.programId, next.id]);

      // Two sign-offs arrive while it is open: they still read the revision as released, check the password, then
      // wait for the program's lock.
      const racing = [post(signOffRoute.POST, rev.id, allChecks(rev.sha256)), post(signOffRoute.POST, rev.id, allChecks(rev.sha256))].map((p) =>
        p.then(async (r) => ({ status: r.status, body: (await r.json()) as { error?: string } })),
      );
      const waiting = async () =>
        (
          await db().execute<{ n: number }>(
            sql`select count(*)::int as n from pg_stat_activity where datname = current_database() and wait_event_type = 'Lock'`,
          )
        ).rows[0]!.n;
      const deadline = Date.now() + 15_000;
      while ((await waiting()) < 2 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 50));
      expect(await waiting()).toBeGreaterThanOrEqual(2);
      await release.query("commit");

      const outcomes = await Promise.all(racing);
      expect(outcomes.map((o) => o.status)).toEqual([409, 409]);
      for (const o of outcomes) expect(o.body.error).toContain("is superseded");
    } finally {
      await release.end();
    }
    expect(await runCount(rev.id)).toBe(1);
    expect(await signOffEvents(rev.id)).toHaveLength(1);
    // The released one may run.
    expect((await post(signOffRoute.POST, next.id, allChecks(next.sha256))).status).toBe(201);
  });

  it("the runs table refuses UPDATE, DELETE and TRUNCATE", async () => {
    const rev = await revisionIn("released");
    await actAs("operator");
    expect((await post(signOffRoute.POST, rev.id, allChecks(rev.sha256))).status).toBe(201);
    expect(await dbError(db().update(runs).set({ quantity: 99 }).where(eq(runs.revisionId, rev.id)))).toMatch(/append-only: UPDATE refused/);
    expect(await dbError(db().delete(runs).where(eq(runs.revisionId, rev.id)))).toMatch(/append-only: DELETE refused/);
    expect(await dbError(db().execute(sql`truncate runs`))).toMatch(/append-only: TRUNCATE refused/);
    const [row] = await db().select({ quantity: runs.quantity }).from(runs).where(eq(runs.revisionId, rev.id));
    expect(row!.quantity).toBe(12);
  });
});

describe("the page's sign-off action", () => {
  it("records the run from the form's boxes and goes to the run page; a missing box is named", async () => {
    const rev = await revisionIn("released");
    await actAs("operator");
    const base = { password: TEST_PASSWORD, sha256: rev.sha256, identity: true, dryRun: true, quantity: "" };
    const fd = formData(base);
    fd.append("offset", "G54");
    fd.append("tool", "1");
    fd.append("tool", "2");
    const refused = await signOffRunAction(rev.id, initialFormState, fd);
    expect(refused.status).toBe(422);
    expect(refused.fieldErrors?.offsets?.join(" ")).toContain("G55");
    expect(refused.values?.password).toBeUndefined();

    fd.append("offset", "G55");
    let target = "";
    try {
      await signOffRunAction(rev.id, initialFormState, fd);
    } catch (e) {
      target = String((e as { digest?: string }).digest ?? "");
    }
    const [run] = await db().select({ id: runs.id, quantity: runs.quantity }).from(runs).where(eq(runs.revisionId, rev.id));
    expect(run).toBeDefined();
    expect(run!.quantity).toBeNull();
    expect(target).toContain(`/revisions/${rev.id}/run?signed=${run!.id}`);
    // A bound id that is not a number is refused before anything else.
    expect((await signOffRunAction(String(rev.id), initialFormState, fd)).status).toBe(400);
  });
});

describe("the record of runs", () => {
  it("filters by machine, program, operator and days, newest first, paged; refuses bad filters", async () => {
    const a = await revisionIn("released");
    const b = await revisionIn("released");
    const first = await actAs("operator");
    expect((await post(signOffRoute.POST, a.id, allChecks(a.sha256))).status).toBe(201);
    expect((await post(signOffRoute.POST, b.id, allChecks(b.sha256))).status).toBe(201);
    const second = await actAs("operator");
    expect((await post(signOffRoute.POST, a.id, allChecks(a.sha256, { quantity: 3 }))).status).toBe(201);

    const list = async (q: string) => {
      const res = await runsRoute.GET(jsonRequest("GET", undefined, `http://localhost/api/runs?${q}`), undefined);
      return { status: res.status, body: (await res.json()) as { runs: { id: number; revision: { id: number }; operator: { id: number }; quantity: number | null; signedAt: string }[]; total: number; pageSize: number } };
    };
    await actAs("programmer");
    const byProgram = await list(`programId=${a.programId}`);
    expect(byProgram.status).toBe(200);
    expect(byProgram.body.total).toBe(2);
    expect(byProgram.body.runs[0]).toMatchObject({ operator: { id: second!.id }, quantity: 3 });
    expect(byProgram.body.runs[0]!.signedAt >= byProgram.body.runs[1]!.signedAt).toBe(true);

    const byOperator = await list(`operator=${first!.id}`);
    expect(byOperator.body.runs.map((r) => r.revision.id).sort()).toEqual([a.id, b.id].sort());

    const [pa] = await db().execute<{ machine_id: number; program_number: string }>(sql`select machine_id, program_number from programs where id = ${a.programId}`).then((r) => r.rows);
    const byMachine = await list(`machine=${pa!.machine_id}`);
    expect(byMachine.body.runs.every((r) => r.revision.id === a.id)).toBe(true);
    expect(byMachine.body.total).toBe(2);
    const byNumber = await list(`program=${pa!.program_number.toLowerCase()}&operator=${second!.id}`);
    expect(byNumber.body.runs.map((r) => r.revision.id)).toEqual([a.id]);

    const today = new Date().toISOString().slice(0, 10);
    expect((await list(`operator=${first!.id}&from=${today}&to=${today}`)).body.total).toBe(2);
    expect((await list(`operator=${first!.id}&to=2001-01-01`)).body.total).toBe(0);
    const paged = await list(`operator=${first!.id}&pageSize=1&page=2`);
    expect(paged.body.runs).toHaveLength(1);
    expect(paged.body.total).toBe(2);

    expect((await list("from=2026-02-30")).status).toBe(422);
    expect((await list("from=2026-05-02&to=2026-05-01")).status).toBe(422);
    expect((await list("machine=abc")).status).toBe(422);
    expect((await list("pageSize=500")).status).toBe(422);
  });
});
