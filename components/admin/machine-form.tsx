"use client";

import { useActionState } from "react";
import { CheckboxField, FormMessage, SelectField, SubmitButton, TextArea, TextField } from "@/components/ui/form";
import { initialFormState, type FormState } from "@/lib/form-state";

type MachineValues = Record<string, string | number | boolean | null>;
type Action = (prev: FormState, fd: FormData) => Promise<FormState>;

const NUMBER_FIELDS: { name: string; label: string; hint?: string; step?: string }[] = [
  { name: "travelXMin", label: "X travel min" },
  { name: "travelXMax", label: "X travel max" },
  { name: "travelYMin", label: "Y travel min" },
  { name: "travelYMax", label: "Y travel max" },
  { name: "travelZMin", label: "Z travel min" },
  { name: "travelZMax", label: "Z travel max" },
  { name: "rapidRate", label: "Rapid rate (per min)" },
  { name: "maxFeed", label: "Max cutting feed (per min)" },
  { name: "maxSpindle", label: "Max spindle speed (rpm)", step: "1" },
  { name: "acceleration", label: "Acceleration (per s²)" },
  { name: "toolChangeSeconds", label: "Tool change time (s)" },
  { name: "safeZ", label: "Default safe Z above part zero" },
  { name: "workOffsetCount", label: "Work offsets on the control", step: "1", hint: "6 means G54 to G59" },
];

/** Create and edit share one form; travel is in machine coordinates and the machine's units. */
export function MachineForm({ action, initial, submitLabel }: { action: Action; initial?: MachineValues; submitLabel: string }) {
  const [state, formAction] = useActionState(action, initialFormState);
  const value = (name: string): string => {
    const v = state.values?.[name] ?? initial?.[name];
    return v === undefined || v === null || typeof v === "boolean" ? "" : String(v);
  };
  const checked = (name: string, fallback: boolean): boolean =>
    state.values ? state.values[name] === "on" : typeof initial?.[name] === "boolean" ? (initial[name] as boolean) : fallback;
  const errors = state.fieldErrors;
  // The key resets uncontrolled inputs to what the server handed back after each submit.
  return (
    <form action={formAction} noValidate className="space-y-5" key={JSON.stringify(state.values ?? {})}>
      <div className="grid gap-4 sm:grid-cols-2">
        <TextField label="Name" name="name" defaultValue={value("name")} errors={errors} required />
        <SelectField label="Units" name="units" defaultValue={value("units") || "mm"} errors={errors}>
          <option value="mm">mm</option>
          <option value="inch">inch</option>
        </SelectField>
      </div>
      <TextArea label="Notes" name="notes" rows={2} defaultValue={value("notes")} errors={errors} />
      <fieldset className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
        <legend className="mb-2 text-sm font-semibold text-ink-soft">Limits and timing</legend>
        {NUMBER_FIELDS.map((f) => (
          <TextField
            key={f.name}
            label={f.label}
            name={f.name}
            inputMode="decimal"
            defaultValue={value(f.name)}
            errors={errors}
            hint={f.hint}
          />
        ))}
      </fieldset>
      <fieldset className="grid gap-4 sm:grid-cols-2">
        <legend className="mb-2 text-sm font-semibold text-ink-soft">How the control reads programs</legend>
        <SelectField
          label="Dialect"
          name="dialect"
          defaultValue={value("dialect") || "common"}
          errors={errors}
          aria-describedby="dialect-hint dialect-error"
        >
          <option value="common">Common industrial (most posts)</option>
          <option value="strict-ngc">Strict RS274/NGC</option>
        </SelectField>
        <TextField
          label="Arc radius tolerance"
          name="arcTolerance"
          inputMode="decimal"
          defaultValue={value("arcTolerance")}
          errors={errors}
          hint="Machine units. Blank: the dialect's default (common 0.02 mm / 0.001 in, strict 0.002 mm / 0.0002 in)."
        />
        <p id="dialect-hint" className="text-sm text-ink-soft sm:col-span-2">
          Strict reads every program as the NIST RS274/NGC interpreter does; common accepts what posts for
          industrial controls write (G80 beside G0, G91.1, full circles from I/J, rounded arcs).
        </p>
      </fieldset>
      <fieldset className="space-y-1">
        <legend className="mb-2 text-sm font-semibold text-ink-soft">How the machine works</legend>
        <CheckboxField label="Tools are changed by hand" name="manualToolChange" defaultChecked={checked("manualToolChange", false)} errors={errors} />
        <CheckboxField
          label="The program controls the spindle (M3/M4/M5)"
          name="spindleProgramControlled"
          defaultChecked={checked("spindleProgramControlled", true)}
          errors={errors}
        />
        <CheckboxField label="Tool length offset H must equal the tool number" name="hMustEqualT" defaultChecked={checked("hMustEqualT", true)} errors={errors} />
      </fieldset>
      <FormMessage state={state} />
      <SubmitButton>{submitLabel}</SubmitButton>
    </form>
  );
}
