"use client";

import { useActionState } from "react";
import { CheckboxField, FieldError, FormMessage, SubmitButton, TextArea, TextField } from "@/components/ui/form";
import { initialFormState, type FormState } from "@/lib/form-state";
import type { RevisionStatus } from "@/db/schema";
import { LineLink } from "./revision-workspace";

type Action = (prev: FormState, fd: FormData) => Promise<FormState>;

export interface ErrorFinding {
  rule: string;
  line: number;
  message: string;
}

export interface WorkflowProps {
  number: number;
  status: RevisionStatus;
  sha256: string;
  can: { submit: boolean; release: boolean; reject: boolean; delete: boolean };
  /** Why a lead cannot release right now, when they otherwise could review. */
  releaseBlocked: string | null;
  errorFindings: ErrorFinding[];
  /** Error findings beyond the listed ones (then the release is refused: too many to waive). */
  unlistedErrors: number;
  actions: { submit: Action; release: Action; reject: Action; remove: Action };
}

function SubmitForm({ action, number }: { action: Action; number: number }) {
  const [state, formAction] = useActionState(action, initialFormState);
  return (
    <form action={formAction} noValidate className="space-y-3" aria-label="Submit for review">
      <TextArea label="Comment for the lead (optional)" name="comment" rows={2} defaultValue={state.values?.comment ?? ""} errors={state.fieldErrors} />
      <FormMessage state={state} />
      <SubmitButton>Submit revision {number} for review</SubmitButton>
    </form>
  );
}

function ReleaseForm({ action, number, sha256, errorFindings, unlistedErrors }: { action: Action; number: number; sha256: string; errorFindings: ErrorFinding[]; unlistedErrors: number }) {
  const [state, formAction] = useActionState(action, initialFormState);
  const errors = state.fieldErrors;
  return (
    <form action={formAction} noValidate className="space-y-4" aria-label="Release" key={state.status === 200 ? "done" : "open"}>
      {errorFindings.length > 0 && (
        <fieldset className="space-y-3 rounded-md border border-bad/40 p-3">
          <legend className="px-1 text-sm font-semibold text-bad">
            {errorFindings.length === 1
              ? "1 error finding blocks the release unless it is waived with a reason"
              : `${errorFindings.length} error findings block the release unless each is waived with a reason`}
          </legend>
          {unlistedErrors > 0 && (
            <p className="text-sm text-bad">There are {unlistedErrors} more error findings than listed: too many to waive one by one; fix the program.</p>
          )}
          {errorFindings.map((f, i) => (
            <div key={`${f.rule}@${f.line}`} className="space-y-1" data-waiver={`${f.rule}@${f.line}`}>
              <p className="text-sm">
                <LineLink line={f.line} source="finding">
                  line {f.line}
                </LineLink>{" "}
                <code className="text-xs">{f.rule}</code>: {f.message}
              </p>
              <input type="hidden" name={`waiverRule.${i}`} value={f.rule} />
              <input type="hidden" name={`waiverLine.${i}`} value={f.line} />
              <TextArea label="Reason to waive it" name={`waiverReason.${i}`} rows={2} defaultValue={state.values?.[`waiverReason.${i}`] ?? ""} errors={errors} />
            </div>
          ))}
          <FieldError name="waivers" errors={errors} />
        </fieldset>
      )}
      <TextArea label="Release comment" name="comment" rows={2} defaultValue={state.values?.comment ?? ""} errors={errors} placeholder="What you checked before releasing" />
      <TextField label="Your password, to sign" name="password" type="password" autoComplete="current-password" errors={errors} />
      <p className="text-xs text-ink-soft">
        Signing records your name, the time and the meaning “released”, bound to SHA-256 <code className="break-all">{sha256}</code>. It supersedes the program&apos;s
        released revision.
      </p>
      <FormMessage state={state} />
      <SubmitButton>Sign and release revision {number}</SubmitButton>
    </form>
  );
}

function RejectForm({ action, number }: { action: Action; number: number }) {
  const [state, formAction] = useActionState(action, initialFormState);
  return (
    <form action={formAction} noValidate className="space-y-3" aria-label="Reject">
      <TextArea label="Why it is rejected" name="rejectComment" rows={2} defaultValue={state.values?.rejectComment ?? ""} errors={state.fieldErrors} />
      <FormMessage state={state} />
      <SubmitButton variant="danger">Reject revision {number}</SubmitButton>
    </form>
  );
}

function DeleteForm({ action, number }: { action: Action; number: number }) {
  const [state, formAction] = useActionState(action, initialFormState);
  return (
    <form action={formAction} noValidate className="space-y-3" aria-label="Delete draft">
      <CheckboxField label={`Yes, delete draft revision ${number} (its number is not reused)`} name="confirm" errors={state.fieldErrors} />
      <FormMessage state={state} />
      <SubmitButton variant="danger">Delete draft</SubmitButton>
    </form>
  );
}

const STATUS_TEXT: Record<RevisionStatus, string> = {
  draft: "A draft: its programmer submits it for review when it is ready.",
  submitted: "Waiting for a lead to release or reject it.",
  released: "Released: this is the revision to run.",
  rejected: "Rejected: the programmer uploads a corrected revision.",
  superseded: "Superseded by a newer released revision: do not run it.",
};

/** What the signed-in person may do with this revision now, and why not when they cannot. */
export function WorkflowPanel(p: WorkflowProps) {
  const { can } = p;
  const any = can.submit || can.release || can.reject || can.delete;
  if (!any && !p.releaseBlocked) {
    return (
      <p className="rounded-lg border border-rule bg-panel px-5 py-3 text-sm" data-testid="workflow">
        <strong className="font-semibold">Review:</strong> {STATUS_TEXT[p.status]}
      </p>
    );
  }
  return (
    <section aria-labelledby="workflow" className="space-y-4 rounded-lg border border-rule bg-panel p-5" data-testid="workflow">
      <div>
        <h2 id="workflow" className="text-lg font-semibold">Review</h2>
        <p className="text-sm text-ink-soft">{STATUS_TEXT[p.status]}</p>
        {p.releaseBlocked && <p className="mt-1 text-sm text-warn">{p.releaseBlocked}</p>}
      </div>
      {can.submit && <SubmitForm action={p.actions.submit} number={p.number} />}
      {(can.release || can.reject) && (
        <div className="grid gap-6 lg:grid-cols-[3fr_2fr]">
          {can.release ? (
            <div className="space-y-2">
              <h3 className="font-semibold">Release</h3>
              <ReleaseForm action={p.actions.release} number={p.number} sha256={p.sha256} errorFindings={p.errorFindings} unlistedErrors={p.unlistedErrors} />
            </div>
          ) : (
            <div />
          )}
          {can.reject && (
            <div className="space-y-2">
              <h3 className="font-semibold">Reject</h3>
              <RejectForm action={p.actions.reject} number={p.number} />
            </div>
          )}
        </div>
      )}
      {can.delete && (
        <details className="rounded-md border border-rule p-3">
          <summary className="cursor-pointer text-sm font-semibold">Delete this draft</summary>
          <div className="mt-3">
            <DeleteForm action={p.actions.remove} number={p.number} />
          </div>
        </details>
      )}
    </section>
  );
}
