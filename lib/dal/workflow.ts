import "server-only";
import { and, eq, sql } from "drizzle-orm";
import { db, type Tx } from "@/db";
import { programs, revisionAnalyses, revisionFindings, revisions, signatures, users } from "@/db/schema";
import { recordEvent } from "@/lib/audit";
import { RequestError } from "@/lib/auth/errors";
import { authorize, requestIp, type CurrentUser } from "@/lib/auth/session";
import { requireOwnPassword } from "@/lib/auth/reauth";
import { getRevision, type RevisionDetail } from "@/lib/dal/revisions";
import { env } from "@/lib/env";
import { queueMail } from "@/lib/mail/outbox";
import type { ReleaseInput, WaiverInput } from "@/lib/vault-validation";

/**
 * The review workflow: draft -> submitted (a programmer) -> released or rejected (a lead, with a comment).
 * Each step locks the program row, then the revision row, checks the state it starts from (409 otherwise), writes
 * the signature, the audit event and the outbox mail in the same transaction.
 */

interface LockedRevision {
  id: number;
  programId: number;
  number: number;
  status: string;
  sha256: string;
  uploadedBy: number;
  programNumber: string;
  programTitle: string;
}

async function lockRevision(tx: Tx, id: number): Promise<LockedRevision> {
  const [peek] = await tx.select({ programId: revisions.programId }).from(revisions).where(eq(revisions.id, id));
  if (!peek) throw new RequestError(404, "No such revision.");
  const [program] = await tx
    .select({ number: programs.programNumber, title: programs.title })
    .from(programs)
    .where(eq(programs.id, peek.programId))
    .for("update");
  const [rev] = await tx
    .select({
      id: revisions.id,
      programId: revisions.programId,
      number: revisions.number,
      status: revisions.status,
      sha256: revisions.sha256,
      uploadedBy: revisions.uploadedBy,
    })
    .from(revisions)
    .where(eq(revisions.id, id))
    .for("update");
  if (!rev || !program) throw new RequestError(404, "No such revision.");
  return { ...rev, programNumber: program.number, programTitle: program.title };
}

const conflict = (rev: LockedRevision, wanted: string, action: string) =>
  new RequestError(409, `Revision ${rev.number} is ${rev.status}; only a ${wanted} revision can be ${action}.`);

async function sign(
  tx: Tx,
  user: CurrentUser,
  rev: LockedRevision,
  meaning: "submitted" | "released" | "rejected" | "waived",
  comment: string,
  finding: { rule: string; line: number; message: string } | null = null,
) {
  await tx.insert(signatures).values({
    revisionId: rev.id,
    signerId: user.id,
    signerName: user.name,
    signerEmail: user.email,
    meaning,
    comment,
    sha256: rev.sha256,
    finding,
  });
}

const label = (rev: LockedRevision) => `${rev.programNumber} revision ${rev.number}`;
const link = (rev: LockedRevision) => `${env().appUrl}/revisions/${rev.id}`;

async function uploaderEmail(tx: Tx, userId: number): Promise<string[]> {
  const [u] = await tx.select({ email: users.email }).from(users).where(and(eq(users.id, userId), eq(users.disabled, false)));
  return u ? [u.email] : [];
}

/** A programmer submits a draft for review; the leads get a mail. */
export async function submitRevision(id: number, comment: string): Promise<RevisionDetail> {
  const actor = await authorize("writePrograms");
  const ip = await requestIp();
  await db().transaction(async (tx) => {
    const rev = await lockRevision(tx, id);
    if (rev.status !== "draft") throw conflict(rev, "draft", "submitted");
    await tx.update(revisions).set({ status: "submitted", submittedAt: sql`now()` }).where(eq(revisions.id, id));
    await sign(tx, actor, rev, "submitted", comment);
    await recordEvent({ actor, action: "revision.submit", objectType: "revision", objectId: id, details: { programId: rev.programId, number: rev.number, sha256: rev.sha256, comment }, ip }, tx);
    const leads = await tx.select({ email: users.email }).from(users).where(and(eq(users.role, "lead"), eq(users.disabled, false)));
    await queueMail(tx, {
      kind: "revision.submitted",
      to: leads.map((l) => l.email),
      revisionId: id,
      subject: `Review please: ${label(rev)} (${rev.programTitle})`,
      body: [
        `${actor.name} submitted ${label(rev)} (${rev.programTitle}) for review.`,
        comment ? `\nComment: ${comment}\n` : "",
        `SHA-256: ${rev.sha256}`,
        `Review it at ${link(rev)}`,
      ].join("\n"),
    });
  });
  return (await getRevision(id))!;
}

/**
 * A lead releases a submitted revision: password re-asked (electronic signature bound to the SHA-256), not their
 * own upload, analysis done, every listed error finding waived with a reason. Supersedes the program's released
 * revision in the same transaction; of concurrent releases one wins and the others get 409.
 */
export async function releaseRevision(id: number, input: ReleaseInput): Promise<RevisionDetail> {
  const actor = await authorize("reviewRevisions");
  // The electronic signature: the lead's own password again, counted on the sign-in limits and audited.
  await requireOwnPassword(actor, input.password, "revision-release");
  const ip = await requestIp();
  await db().transaction(async (tx) => {
    const rev = await lockRevision(tx, id);
    if (rev.status !== "submitted") throw conflict(rev, "submitted", "released");
    if (rev.uploadedBy === actor.id) throw new RequestError(403, "You uploaded this revision: another lead must release it.");
    const [analysis] = await tx
      .select({ state: revisionAnalyses.state, counts: sql<{ rule: string; severity: string; count: number; listed: number }[] | null>`${revisionAnalyses.result}->'findingCounts'` })
      .from(revisionAnalyses)
      .where(eq(revisionAnalyses.revisionId, id));
    if (analysis?.state !== "done") {
      throw new RequestError(409, `The analysis is ${analysis?.state ?? "missing"}; a revision is released only on a finished analysis.`);
    }
    const unlisted = (analysis.counts ?? []).filter((c) => c.severity === "error" && c.count > c.listed);
    if (unlisted.length > 0) {
      throw new RequestError(422, `Too many error findings to waive one by one (${unlisted.map((c) => `${c.rule}: ${c.count}`).join(", ")}); fix the program.`);
    }
    const errors = await tx
      .select({ rule: revisionFindings.rule, line: revisionFindings.line, message: revisionFindings.message })
      .from(revisionFindings)
      .where(and(eq(revisionFindings.revisionId, id), eq(revisionFindings.severity, "error")));
    const waivers = matchWaivers(errors, input.waivers);

    const [previous] = await tx
      .select({ id: revisions.id, number: revisions.number })
      .from(revisions)
      .where(and(eq(revisions.programId, rev.programId), eq(revisions.status, "released")))
      .for("update");
    if (previous) {
      await tx.update(revisions).set({ status: "superseded", supersededAt: sql`now()`, supersededById: id }).where(eq(revisions.id, previous.id));
    }
    await tx.update(revisions).set({ status: "released", decidedAt: sql`now()`, decidedBy: actor.id }).where(eq(revisions.id, id));
    await tx.update(programs).set({ releasedRevisionId: id, updatedAt: sql`now()` }).where(eq(programs.id, rev.programId));
    for (const w of waivers) {
      await sign(tx, actor, rev, "waived", w.reason, w.finding);
      await recordEvent({ actor, action: "revision.waive", objectType: "revision", objectId: id, details: { programId: rev.programId, number: rev.number, finding: w.finding, reason: w.reason }, ip }, tx);
    }
    await sign(tx, actor, rev, "released", input.comment);
    await recordEvent(
      {
        actor,
        action: "revision.release",
        objectType: "revision",
        objectId: id,
        details: { programId: rev.programId, number: rev.number, sha256: rev.sha256, comment: input.comment, waivers: waivers.length, superseded: previous?.number ?? null },
        ip,
      },
      tx,
    );
    await queueMail(tx, {
      kind: "revision.released",
      to: await uploaderEmail(tx, rev.uploadedBy),
      revisionId: id,
      subject: `Released: ${label(rev)} (${rev.programTitle})`,
      body: [
        `${actor.name} released ${label(rev)} (${rev.programTitle}).`,
        `\nComment: ${input.comment}\n`,
        waivers.length > 0 ? `Waived error findings: ${waivers.length}\n` : "",
        previous ? `It supersedes revision ${previous.number}.\n` : "",
        `SHA-256 signed: ${rev.sha256}`,
        link(rev),
      ].join("\n"),
    });
  });
  return (await getRevision(id))!;
}

/** Each error finding needs exactly one waiver naming its rule and line; nothing else may be waived. */
function matchWaivers(errors: { rule: string; line: number; message: string }[], waivers: WaiverInput[]) {
  const key = (x: { rule: string; line: number }) => `${x.rule}@${x.line}`;
  const byKey = new Map(waivers.map((w) => [key(w), w]));
  const missing = errors.filter((e) => !byKey.has(key(e)));
  const known = new Set(errors.map(key));
  const stray = waivers.filter((w) => !known.has(key(w)));
  if (missing.length > 0 || stray.length > 0 || byKey.size !== waivers.length) {
    const issues: string[] = [
      ...missing.map((e) => `Error finding ${e.rule} on line ${e.line} needs a waiver with a reason.`),
      ...stray.map((w) => `There is no error finding ${w.rule} on line ${w.line} to waive.`),
      ...(byKey.size !== waivers.length ? ["A finding is waived twice."] : []),
    ];
    throw new RequestError(
      422,
      missing.length > 0 ? "Error findings block the release unless each is waived with a reason." : "Some waivers do not match an error finding.",
      { fieldErrors: { waivers: issues }, missing: missing.map((e) => ({ rule: e.rule, line: e.line, message: e.message })) },
    );
  }
  return errors.map((e) => ({ finding: { rule: e.rule, line: e.line, message: e.message }, reason: byKey.get(key(e))!.reason }));
}

/** A lead rejects a submitted revision with a comment; the uploader gets a mail. */
export async function rejectRevision(id: number, comment: string): Promise<RevisionDetail> {
  const actor = await authorize("reviewRevisions");
  const ip = await requestIp();
  await db().transaction(async (tx) => {
    const rev = await lockRevision(tx, id);
    if (rev.status !== "submitted") throw conflict(rev, "submitted", "rejected");
    await tx.update(revisions).set({ status: "rejected", decidedAt: sql`now()`, decidedBy: actor.id }).where(eq(revisions.id, id));
    await sign(tx, actor, rev, "rejected", comment);
    await recordEvent({ actor, action: "revision.reject", objectType: "revision", objectId: id, details: { programId: rev.programId, number: rev.number, sha256: rev.sha256, comment }, ip }, tx);
    await queueMail(tx, {
      kind: "revision.rejected",
      to: await uploaderEmail(tx, rev.uploadedBy),
      revisionId: id,
      subject: `Not released: ${label(rev)} (${rev.programTitle})`,
      body: [`${actor.name} rejected ${label(rev)} (${rev.programTitle}).`, `\nComment: ${comment}\n`, link(rev)].join("\n"),
    });
  });
  return (await getRevision(id))!;
}
