import { and, count, eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { apiTokens, auditEvents, mailOutbox, programs, revisions, signatures, users } from "@/db/schema";
import * as releaseRoute from "@/app/api/revisions/[id]/release/route";
import * as rejectRoute from "@/app/api/revisions/[id]/reject/route";
import * as submitRoute from "@/app/api/revisions/[id]/submit/route";
import * as revisionRoute from "@/app/api/revisions/[id]/route";
import { generateToken } from "@/lib/auth/tokens";
import { env } from "@/lib/env";
import { deliverOutbox, mailTransport } from "@/lib/mail/outbox";
import { actAs, dbError, jsonRequest, makeUser, params, TEST_PASSWORD } from "./helpers";
import { ensureWorker, makeProgram, ncProgram, readMails, stopWorker, upload, waitForAnalysis } from "./vault-helpers";

beforeAll(async () => {
  await ensureWorker();
});
afterAll(async () => {
  await stopWorker();
});

const post = (handler: typeof submitRoute.POST, id: number, body?: unknown, headers: Record<string, string> = {}) => {
  const req = new Request(`http://localhost/api/revisions/${id}`, {
    method: "POST",
    headers: { ...(body === undefined ? {} : { "content-type": "application/json" }), ...headers },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  return handler(req, params({ id: String(id) }));
};

/** A programmer's analysed, submitted revision; returns ids and the uploader. */
async function submitted(text = ncProgram()) {
  const programmer = await actAs("programmer");
  const { programId } = await makeProgram();
  const rev = await upload(programId, text);
  await waitForAnalysis(rev.id);
  expect((await post(submitRoute.POST, rev.id, { comment: "ready" })).status).toBe(200);
  return { programId, revisionId: rev.id, programmer: programmer! };
}

/** A fresh lead with an API token (so concurrent calls each carry their own identity). */
async function leadWithToken() {
  const lead = await makeUser("lead");
  const t = generateToken();
  await db().insert(apiTokens).values({ userId: lead.id, name: "test", tokenHash: t.tokenHash, prefix: t.prefix });
  return { ...lead, authorization: `Bearer ${t.token}` };
}

describe("workflow", () => {
  it("submits a draft: status, signature bound to the SHA-256, audit event, mail to the leads", async () => {
    const { revisionId } = await submitted();
    const [rev] = await db().select().from(revisions).where(eq(revisions.id, revisionId));
    expect(rev!.status).toBe("submitted");
    const sigs = await db().select().from(signatures).where(eq(signatures.revisionId, revisionId));
    expect(sigs).toHaveLength(1);
    expect(sigs[0]).toMatchObject({ meaning: "submitted", comment: "ready", sha256: rev!.sha256 });
    const mail = await db().select().from(mailOutbox).where(and(eq(mailOutbox.revisionId, revisionId), eq(mailOutbox.kind, "revision.submitted")));
    expect(mail).toHaveLength(1);
    const leads = await db().select({ email: users.email }).from(users).where(and(eq(users.role, "lead"), eq(users.disabled, false)));
    expect([...mail[0]!.recipients].sort()).toEqual(leads.map((l) => l.email).sort());
    // A second submit is a conflict.
    await actAs("programmer");
    expect((await post(submitRoute.POST, revisionId)).status).toBe(409);
  });

  it("release re-asks the password; a wrong one is refused, counted and audited", async () => {
    const { revisionId } = await submitted();
    const lead = await actAs("lead");
    const res = await post(releaseRoute.POST, revisionId, { password: "not-my-password", comment: "ok" });
    expect(res.status).toBe(422);
    expect(((await res.json()) as { issues: { fieldErrors: Record<string, string[]> } }).issues.fieldErrors.password).toEqual(["The password is wrong."]);
    const [failed] = await db().select({ n: count() }).from(auditEvents).where(and(eq(auditEvents.action, "session.reauth-failed"), eq(auditEvents.actorId, lead!.id)));
    expect(failed!.n).toBe(1);
    const ok = await post(releaseRoute.POST, revisionId, { password: TEST_PASSWORD, comment: "Dry run fine." });
    expect(ok.status).toBe(200);
    const body = (await ok.json()) as { revision: { status: string; signatures: { meaning: string; signer: { id: number }; sha256: string }[]; sha256: string } };
    expect(body.revision.status).toBe("released");
    const release = body.revision.signatures.find((s) => s.meaning === "released")!;
    expect(release).toMatchObject({ signer: { id: lead!.id }, sha256: body.revision.sha256 });
  });

  it("a lead cannot release a revision they uploaded", async () => {
    const { revisionId, programmer } = await submitted();
    // The uploader has since become a lead.
    await db().update(users).set({ role: "lead" }).where(eq(users.id, programmer.id));
    const { signIn } = await import("@/lib/auth/sign-in");
    const { requestContext } = await import("./request-context");
    requestContext.reset();
    await signIn(programmer.email, programmer.password);
    const res = await post(releaseRoute.POST, revisionId, { password: TEST_PASSWORD, comment: "mine" });
    expect(res.status).toBe(403);
    expect(((await res.json()) as { error: string }).error).toMatch(/another lead/);
    const [rev] = await db().select({ status: revisions.status }).from(revisions).where(eq(revisions.id, revisionId));
    expect(rev!.status).toBe("submitted");
  });

  it("error findings block the release until each has a waiver with a reason", async () => {
    // H2 with T1 in the spindle: length-offset-mismatch, an error.
    const text = ncProgram("waiver", "G43 H2 Z30");
    const { revisionId } = await submitted(text);
    await actAs("lead");
    const blocked = await post(releaseRoute.POST, revisionId, { password: TEST_PASSWORD, comment: "go" });
    expect(blocked.status).toBe(422);
    const issues = ((await blocked.json()) as { issues: { missing: { rule: string; line: number }[] } }).issues;
    expect(issues.missing.length).toBeGreaterThan(0);
    expect(issues.missing[0]!.rule).toBe("length-offset-mismatch");
    const stray = await post(releaseRoute.POST, revisionId, {
      password: TEST_PASSWORD,
      comment: "go",
      waivers: [...issues.missing.map((m) => ({ rule: m.rule, line: m.line, reason: "checked" })), { rule: "over-travel", line: 1, reason: "x" }],
    });
    expect(stray.status).toBe(422);
    const ok = await post(releaseRoute.POST, revisionId, {
      password: TEST_PASSWORD,
      comment: "Released with the waiver.",
      waivers: issues.missing.map((m) => ({ rule: m.rule, line: m.line, reason: "Second length offset of the long holder, checked at the machine." })),
    });
    expect(ok.status).toBe(200);
    const waived = await db().select().from(signatures).where(and(eq(signatures.revisionId, revisionId), eq(signatures.meaning, "waived")));
    expect(waived).toHaveLength(issues.missing.length);
    expect(waived[0]!.finding).toMatchObject({ rule: "length-offset-mismatch", line: issues.missing[0]!.line });
    const [events] = await db().select({ n: count() }).from(auditEvents).where(and(eq(auditEvents.action, "revision.waive"), eq(auditEvents.objectId, String(revisionId))));
    expect(events!.n).toBe(issues.missing.length);
  });

  it("releasing supersedes the program's released revision in the same transaction", async () => {
    const { programId, revisionId: first } = await submitted();
    await actAs("lead");
    expect((await post(releaseRoute.POST, first, { password: TEST_PASSWORD, comment: "one" })).status).toBe(200);
    await actAs("programmer");
    const second = await upload(programId, ncProgram("second"));
    await waitForAnalysis(second.id);
    // Another programmer submits it: any programmer may.
    expect((await post(submitRoute.POST, second.id)).status).toBe(200);
    await actAs("lead");
    expect((await post(releaseRoute.POST, second.id, { password: TEST_PASSWORD, comment: "two" })).status).toBe(200);
    const rows = await db().select({ id: revisions.id, status: revisions.status, supersededById: revisions.supersededById }).from(revisions).where(eq(revisions.programId, programId));
    expect(rows.find((r) => r.id === first)).toMatchObject({ status: "superseded", supersededById: second.id });
    expect(rows.find((r) => r.id === second.id)).toMatchObject({ status: "released" });
    const [program] = await db().select({ released: programs.releasedRevisionId }).from(programs).where(eq(programs.id, programId));
    expect(program!.released).toBe(second.id);
  });

  it("of 10 concurrent releases exactly one succeeds: one released revision, one audit event, one mail", async () => {
    const { programId, revisionId } = await submitted();
    const leads = await Promise.all(Array.from({ length: 10 }, () => leadWithToken()));
    const statuses = await Promise.all(
      leads.map((l) => post(releaseRoute.POST, revisionId, { password: TEST_PASSWORD, comment: `release by ${l.email}` }, { authorization: l.authorization }).then((r) => r.status)),
    );
    expect(statuses.filter((s) => s === 200)).toHaveLength(1);
    expect(statuses.filter((s) => s === 409)).toHaveLength(9);
    const released = await db().select({ n: count() }).from(revisions).where(and(eq(revisions.programId, programId), eq(revisions.status, "released")));
    expect(released[0]!.n).toBe(1);
    const events = await db().select({ n: count() }).from(auditEvents).where(and(eq(auditEvents.action, "revision.release"), eq(auditEvents.objectId, String(revisionId))));
    expect(events[0]!.n).toBe(1);
    const sigs = await db().select({ n: count() }).from(signatures).where(and(eq(signatures.revisionId, revisionId), eq(signatures.meaning, "released")));
    expect(sigs[0]!.n).toBe(1);
    const outbox = await db().select().from(mailOutbox).where(and(eq(mailOutbox.revisionId, revisionId), eq(mailOutbox.kind, "revision.released")));
    expect(outbox).toHaveLength(1);
    // Deliver (the in-process worker may already have): exactly one message with that Message-ID arrives.
    await deliverOutbox(db(), mailTransport(env()), env());
    const deadline = Date.now() + 10_000;
    let mails: { text: string }[] = [];
    while (Date.now() < deadline) {
      mails = (await readMails()).filter((m) => m.text.includes(outbox[0]!.messageId));
      if (mails.length > 0) break;
      await new Promise((r) => setTimeout(r, 100));
    }
    expect(mails).toHaveLength(1);
    const [sent] = await db().select({ state: mailOutbox.state }).from(mailOutbox).where(eq(mailOutbox.id, outbox[0]!.id));
    expect(sent!.state).toBe("sent");
  });

  it("rejects with a comment and tells the uploader; a rejected revision cannot be released", async () => {
    const { revisionId, programmer } = await submitted();
    await actAs("lead");
    expect((await post(rejectRoute.POST, revisionId, {})).status).toBe(422);
    expect((await post(rejectRoute.POST, revisionId, { comment: "Drill runs into the vise." })).status).toBe(200);
    const mail = await db().select().from(mailOutbox).where(and(eq(mailOutbox.revisionId, revisionId), eq(mailOutbox.kind, "revision.rejected")));
    expect(mail[0]!.recipients).toEqual([programmer.email]);
    expect(mail[0]!.body).toContain("Drill runs into the vise.");
    expect((await post(releaseRoute.POST, revisionId, { password: TEST_PASSWORD, comment: "x" })).status).toBe(409);
    await actAs("admin");
    expect((await revisionRoute.DELETE(jsonRequest("DELETE"), params({ id: String(revisionId) }))).status).toBe(409);
  });
});

describe("database guards", () => {
  it("refuses changes to a revision's hash, any change to a released revision but its supersession, and a second released revision", async () => {
    const { programId, revisionId } = await submitted();
    await actAs("lead");
    expect((await post(releaseRoute.POST, revisionId, { password: TEST_PASSWORD, comment: "ok" })).status).toBe(200);
    expect(await dbError(db().execute(sql`update revisions set sha256 = ${"0".repeat(64)} where id = ${revisionId}`))).toMatch(/never change/);
    expect(await dbError(db().execute(sql`update revisions set note = 'edited' where id = ${revisionId}`))).toMatch(/released/);
    expect(await dbError(db().execute(sql`update revisions set status = 'draft' where id = ${revisionId}`))).toMatch(/released/);
    expect(await dbError(db().execute(sql`delete from revisions where id = ${revisionId}`))).toMatch(/only drafts/);
    expect(await dbError(db().execute(sql`update program_files set size = 1 where sha256 = (select sha256 from revisions where id = ${revisionId})`))).toMatch(/immutable/);
    expect(await dbError(db().execute(sql`update signatures set comment = 'x' where revision_id = ${revisionId}`))).toMatch(/append-only/);
    await actAs("programmer");
    const other = await upload(programId, ncProgram());
    expect(await dbError(db().execute(sql`update revisions set status = 'released' where id = ${other.id}`))).toMatch(/revisions_one_released_idx/);
  });
});
