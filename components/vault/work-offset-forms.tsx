"use client";

import { useActionState } from "react";
import { FormMessage, SubmitButton, TextField } from "@/components/ui/form";
import { initialFormState, type FormState } from "@/lib/form-state";

type Action = (prev: FormState, fd: FormData) => Promise<FormState>;

/** Sets one work offset's X, Y and Z (machine coordinates of part zero). */
export function SetWorkOffsetForm({ action, units }: { action: Action; units: string }) {
  const [state, formAction] = useActionState(action, initialFormState);
  const v = (n: string) => (state.status === 200 ? "" : (state.values?.[n] ?? ""));
  return (
    <form action={formAction} noValidate className="space-y-3" aria-label="Set a work offset" key={state.status === 200 ? state.message : "open"}>
      <div className="grid grid-cols-2 gap-3 sm:grid-cols-4">
        <TextField label="Offset" name="code" defaultValue={v("code")} placeholder="G54" errors={state.fieldErrors} />
        <TextField label={`X (${units})`} name="x" inputMode="decimal" defaultValue={v("x")} errors={state.fieldErrors} />
        <TextField label={`Y (${units})`} name="y" inputMode="decimal" defaultValue={v("y")} errors={state.fieldErrors} />
        <TextField label={`Z (${units})`} name="z" inputMode="decimal" defaultValue={v("z")} errors={state.fieldErrors} />
      </div>
      <FormMessage state={state} />
      <SubmitButton>Save offset</SubmitButton>
    </form>
  );
}

/** Clears one work offset. */
export function ClearWorkOffsetButton({ action, code }: { action: Action; code: string }) {
  const [state, formAction] = useActionState(action, initialFormState);
  return (
    <form action={formAction} className="inline">
      <input type="hidden" name="code" value={code} />
      <button type="submit" className="text-sm text-bad hover:underline" aria-label={`Clear ${code}`}>
        Clear
      </button>
      {state.status >= 400 && <span className="ml-2 text-sm text-bad">{state.message}</span>}
    </form>
  );
}
