"use client";

import { useActionState } from "react";
import { FormMessage, SelectField, SubmitButton, TextField } from "@/components/ui/form";
import { initialFormState, type FormState } from "@/lib/form-state";

type Action = (prev: FormState, fd: FormData) => Promise<FormState>;

const ROLE_OPTIONS = [
  { value: "operator", label: "Operator" },
  { value: "programmer", label: "Programmer" },
  { value: "lead", label: "Lead" },
  { value: "admin", label: "Admin" },
];

function RoleSelect({ defaultValue, errors }: { defaultValue?: string; errors?: Record<string, string[]> }) {
  return (
    <SelectField label="Role" name="role" defaultValue={defaultValue ?? ""} errors={errors}>
      <option value="" disabled>
        Pick a role
      </option>
      {ROLE_OPTIONS.map((r) => (
        <option key={r.value} value={r.value}>
          {r.label}
        </option>
      ))}
    </SelectField>
  );
}

export function CreateUserForm({ action }: { action: Action }) {
  const [state, formAction] = useActionState(action, initialFormState);
  const v = state.values ?? {};
  return (
    <form action={formAction} noValidate className="space-y-4" key={JSON.stringify(v)}>
      <TextField label="Email" name="email" type="email" defaultValue={v.email ?? ""} errors={state.fieldErrors} />
      <TextField label="Display name" name="displayName" defaultValue={v.displayName ?? ""} errors={state.fieldErrors} />
      <RoleSelect defaultValue={v.role} errors={state.fieldErrors} />
      <TextField
        label="First password"
        name="password"
        type="password"
        autoComplete="new-password"
        hint="At least 12 characters. Hand it over in person."
        errors={state.fieldErrors}
      />
      <FormMessage state={state} />
      <SubmitButton>Create user</SubmitButton>
    </form>
  );
}

export function EditUserForm({ action, initial }: { action: Action; initial: { displayName: string; role: string } }) {
  const [state, formAction] = useActionState(action, initialFormState);
  const v = state.values ?? initial;
  return (
    <form action={formAction} noValidate className="space-y-4" key={JSON.stringify(state.values ?? {})}>
      <TextField label="Display name" name="displayName" defaultValue={v.displayName ?? ""} errors={state.fieldErrors} />
      <RoleSelect defaultValue={v.role} errors={state.fieldErrors} />
      <FormMessage state={state} />
      <SubmitButton>Save</SubmitButton>
    </form>
  );
}

export function DisableUserForm({ action, disabled }: { action: Action; disabled: boolean }) {
  const [state, formAction] = useActionState(action, initialFormState);
  return (
    <form action={formAction} className="space-y-3">
      <input type="hidden" name="disabled" value={disabled ? "false" : "true"} />
      <FormMessage state={state} />
      <SubmitButton variant={disabled ? "plain" : "danger"}>{disabled ? "Enable user" : "Disable user"}</SubmitButton>
    </form>
  );
}

export function ResetPasswordForm({ action }: { action: Action }) {
  const [state, formAction] = useActionState(action, initialFormState);
  return (
    <form action={formAction} noValidate className="space-y-4">
      <TextField label="New password" name="password" type="password" autoComplete="new-password" errors={state.fieldErrors} />
      <TextField label="Repeat new password" name="confirmPassword" type="password" autoComplete="new-password" errors={state.fieldErrors} />
      <FormMessage state={state} />
      <SubmitButton variant="plain">Reset password</SubmitButton>
    </form>
  );
}
