"use client";

import { useActionState, useEffect, useState } from "react";
import { FormMessage, SelectField, SubmitButton, TextArea, TextField } from "@/components/ui/form";
import { initialFormState, type FormState } from "@/lib/form-state";

type Action = (prev: FormState, fd: FormData) => Promise<FormState>;

export interface Choice {
  id: number;
  label: string;
}

/** A new part: number, name, customer, material, notes. */
export function NewPartForm({ action, onAdded }: { action: Action; onAdded?: (partId: string) => void }) {
  const [state, formAction] = useActionState(action, initialFormState);
  const ok = state.status === 201;
  const added = ok ? state.values?.partId : undefined;
  useEffect(() => {
    if (added) onAdded?.(added);
  }, [added, onAdded, state]);
  const value = (name: string) => (ok ? "" : (state.values?.[name] ?? ""));
  const errors = state.fieldErrors;
  return (
    <form action={formAction} noValidate className="space-y-3" key={JSON.stringify(state)}>
      <div className="grid gap-3 sm:grid-cols-2">
        <TextField label="Part number" name="number" defaultValue={value("number")} errors={errors} placeholder="FH-2207" />
        <TextField label="Name" name="name" defaultValue={value("name")} errors={errors} />
        <TextField label="Customer" name="customer" defaultValue={value("customer")} errors={errors} />
        <TextField label="Material" name="material" defaultValue={value("material")} errors={errors} />
      </div>
      <TextArea label="Notes" name="notes" rows={2} defaultValue={value("notes")} errors={errors} />
      <FormMessage state={state} />
      <SubmitButton variant="plain">Add part</SubmitButton>
    </form>
  );
}

/** A new program on a part and a machine; `selectedPartId` is the part just added, if any. */
export function NewProgramForm({
  action,
  parts,
  machines,
  selectedPartId,
}: {
  action: Action;
  parts: Choice[];
  machines: Choice[];
  selectedPartId?: string;
}) {
  const [state, formAction] = useActionState(action, initialFormState);
  const value = (name: string) => state.values?.[name] ?? "";
  const errors = state.fieldErrors;
  return (
    <form action={formAction} noValidate className="space-y-3" key={`${JSON.stringify(state.values ?? {})}|${selectedPartId ?? ""}`}>
      <div className="grid gap-3 sm:grid-cols-2">
        <TextField label="Program number" name="programNumber" defaultValue={value("programNumber")} errors={errors} placeholder="O1001" hint="Unique on its machine." />
        <TextField label="Title" name="title" defaultValue={value("title")} errors={errors} placeholder="Bracket, first side" />
        <SelectField label="Part" name="partId" defaultValue={value("partId") || selectedPartId || ""} errors={errors}>
          <option value="">Pick a part…</option>
          {parts.map((p) => (
            <option key={p.id} value={p.id}>
              {p.label}
            </option>
          ))}
        </SelectField>
        <SelectField label="Machine" name="machineId" defaultValue={value("machineId")} errors={errors}>
          <option value="">Pick a machine…</option>
          {machines.map((m) => (
            <option key={m.id} value={m.id}>
              {m.label}
            </option>
          ))}
        </SelectField>
        <TextField label="Setup or operation" name="operation" defaultValue={value("operation")} errors={errors} placeholder="Op 10, vise" />
        <TextField label="Parts per cycle" name="partsPerCycle" inputMode="numeric" defaultValue={value("partsPerCycle") || "1"} errors={errors} hint="Parts cut under successive work offsets in one run." />
        <TextField label="Safe Z above part zero" name="safeZ" inputMode="decimal" defaultValue={value("safeZ")} errors={errors} hint="Blank: the machine's safe Z." />
      </div>
      <FormMessage state={state} />
      <SubmitButton>Create program</SubmitButton>
    </form>
  );
}

/** The new-program page: the program form and, beside it, a part form whose new part is picked in the first. */
export function NewProgramPanels({
  createProgram,
  createPart,
  parts,
  machines,
}: {
  createProgram: Action;
  createPart: Action;
  parts: Choice[];
  machines: Choice[];
}) {
  const [partId, setPartId] = useState<string | undefined>();
  return (
    <div className="grid gap-4 lg:grid-cols-[3fr_2fr]">
      <section className="space-y-3 rounded-lg border border-rule bg-panel p-6" aria-labelledby="new-program">
        <h1 id="new-program" className="text-2xl font-semibold">New program</h1>
        <p className="text-sm text-ink-soft">After creating it, upload its first revision on the program&apos;s page.</p>
        {machines.length === 0 ? (
          <p role="alert" className="text-bad">There are no machines yet; an admin adds them first.</p>
        ) : (
          <NewProgramForm action={createProgram} parts={parts} machines={machines} selectedPartId={partId} />
        )}
      </section>
      <section className="space-y-3 rounded-lg border border-rule bg-panel p-6" aria-labelledby="new-part">
        <h2 id="new-part" className="text-lg font-semibold">Part not in the list?</h2>
        <NewPartForm action={createPart} onAdded={setPartId} />
      </section>
    </div>
  );
}

/** What a programmer may change on a program; a change of machine, safe Z or parts per cycle re-checks every revision. */
export function EditProgramForm({
  action,
  machines,
  initial,
}: {
  action: Action;
  machines: Choice[];
  initial: { title: string; operation: string; machineId: number; partsPerCycle: number; safeZ: number | null };
}) {
  const [state, formAction] = useActionState(action, initialFormState);
  const value = (name: keyof typeof initial) => {
    const v = state.values?.[name] ?? initial[name];
    return v === null ? "" : String(v);
  };
  const errors = state.fieldErrors;
  return (
    <form action={formAction} noValidate className="space-y-3" key={JSON.stringify(state.values ?? initial)}>
      <div className="grid gap-3 sm:grid-cols-2">
        <TextField label="Title" name="title" defaultValue={value("title")} errors={errors} />
        <TextField label="Setup or operation" name="operation" defaultValue={value("operation")} errors={errors} />
        <SelectField label="Machine" name="machineId" defaultValue={value("machineId")} errors={errors}>
          {machines.map((m) => (
            <option key={m.id} value={m.id}>
              {m.label}
            </option>
          ))}
        </SelectField>
        <TextField label="Parts per cycle" name="partsPerCycle" inputMode="numeric" defaultValue={value("partsPerCycle")} errors={errors} />
        <TextField label="Safe Z above part zero" name="safeZ" inputMode="decimal" defaultValue={value("safeZ")} errors={errors} hint="Blank: the machine's safe Z." />
      </div>
      <p className="text-xs text-ink-soft">Changing the machine, safe Z or parts per cycle checks every revision again, released ones too.</p>
      <FormMessage state={state} />
      <SubmitButton>Save changes</SubmitButton>
    </form>
  );
}
