"use server";

import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { runAction, type FormState } from "@/lib/actions";
import { RequestError } from "@/lib/auth/errors";
import { authorize } from "@/lib/auth/session";
import { deleteDraft, getRevision } from "@/lib/dal/revisions";
import { rejectRevision, releaseRevision, submitRevision } from "@/lib/dal/workflow";
import { rejectSchema, releaseSchema, submitSchema } from "@/lib/vault-validation";

const text = (fd: FormData, name: string) => {
  const v = fd.get(name);
  return typeof v === "string" ? v : "";
};

const refresh = (id: number, programId?: number) => {
  revalidatePath(`/revisions/${id}`);
  if (programId) revalidatePath(`/programs/${programId}`);
  revalidatePath("/programs");
};

/** A programmer submits a draft for review (comment optional). */
export async function submitRevisionAction(id: number, _prev: FormState, fd: FormData): Promise<FormState> {
  const state = await runAction(fd, async () => {
    await authorize("writePrograms");
    const { comment } = submitSchema.parse({ comment: text(fd, "comment") });
    const rev = await submitRevision(id, comment);
    refresh(id, rev.programId);
    return { status: 200 };
  });
  return done(state, id, "submitted");
}

/** After a step the form that made it is gone (the revision moved on): the page says what happened instead. */
function done(state: FormState, id: number, what: "submitted" | "released" | "rejected"): FormState {
  if (state.status !== 200) return state;
  redirect(`/revisions/${id}?done=${what}`);
}

/**
 * The waivers a release form carries: for each error finding i, `waiverRule.i`, `waiverLine.i` and
 * `waiverReason.i`. A blank reason is refused here, next to its finding.
 */
function waiversFrom(fd: FormData) {
  const waivers: { rule: string; line: number; reason: string }[] = [];
  const fieldErrors: Record<string, string[]> = {};
  for (const [key, value] of fd.entries()) {
    const m = /^waiverRule\.(\d{1,4})$/.exec(key);
    if (!m || typeof value !== "string") continue;
    const i = m[1]!;
    const reason = text(fd, `waiverReason.${i}`).trim();
    if (!reason) fieldErrors[`waiverReason.${i}`] = ["Give the reason this finding may be waived."];
    waivers.push({ rule: value, line: Number(text(fd, `waiverLine.${i}`)), reason });
  }
  return { waivers, fieldErrors };
}

/** A lead releases a submitted revision: password again, a comment, and a waiver reason for each error finding. */
export async function releaseRevisionAction(id: number, _prev: FormState, fd: FormData): Promise<FormState> {
  const state = await runAction(fd, async () => {
    await authorize("reviewRevisions");
    const { waivers, fieldErrors } = waiversFrom(fd);
    const parsed = releaseSchema.safeParse({ password: text(fd, "password"), comment: text(fd, "comment"), waivers });
    if (!parsed.success) {
      for (const issue of parsed.error.issues) {
        const field = String(issue.path[0] ?? "");
        if (field !== "waivers") (fieldErrors[field] ??= []).push(issue.message);
      }
    }
    if (Object.keys(fieldErrors).length > 0 || !parsed.success) {
      throw new RequestError(422, "Some fields need attention; nothing was signed.", { fieldErrors });
    }
    const rev = await releaseRevision(id, parsed.data);
    refresh(id, rev.programId);
    return { status: 200 };
  });
  return done(state, id, "released");
}

/** A lead rejects a submitted revision with a comment. */
export async function rejectRevisionAction(id: number, _prev: FormState, fd: FormData): Promise<FormState> {
  const state = await runAction(fd, async () => {
    await authorize("reviewRevisions");
    const parsed = rejectSchema.safeParse({ comment: text(fd, "rejectComment") });
    if (!parsed.success) {
      throw new RequestError(422, "Say why it is rejected.", { fieldErrors: { rejectComment: parsed.error.issues.map((i) => i.message) } });
    }
    const rev = await rejectRevision(id, parsed.data.comment);
    refresh(id, rev.programId);
    return { status: 200 };
  });
  return done(state, id, "rejected");
}

/** Deletes a draft (its uploader or an admin), then shows its program. */
export async function deleteDraftAction(id: number, _prev: FormState, fd: FormData): Promise<FormState> {
  let programId: number | undefined;
  const state = await runAction(fd, async () => {
    await authorize("deleteDrafts");
    if (text(fd, "confirm") !== "on") {
      return { status: 422, message: "Tick the box to confirm.", fieldErrors: { confirm: ["Tick the box to confirm."] } };
    }
    const rev = await getRevision(id);
    if (!rev) return { status: 404, message: "No such revision." };
    programId = rev.programId;
    await deleteDraft(id);
    return { status: 200 };
  });
  if (state.status !== 200 || !programId) return state;
  revalidatePath(`/programs/${programId}`);
  revalidatePath("/programs");
  redirect(`/programs/${programId}?deleted=${id}`);
}
