"use client";

import { useActionState } from "react";
import { FormMessage, SubmitButton, TextField } from "@/components/ui/form";
import { initialFormState } from "@/lib/form-state";
import { changePasswordAction } from "./actions";

export function PasswordForm({ email }: { email: string }) {
  const [state, action] = useActionState(changePasswordAction, initialFormState);
  return (
    <form action={action} noValidate className="space-y-4">
      {/* Tells a password manager whose password this is. */}
      <input type="email" name="username" autoComplete="username" value={email} readOnly hidden />
      <TextField label="Current password" name="currentPassword" type="password" autoComplete="current-password" errors={state.fieldErrors} />
      <TextField label="New password" name="newPassword" type="password" autoComplete="new-password" hint="At least 12 characters." errors={state.fieldErrors} />
      <TextField label="Repeat new password" name="confirmPassword" type="password" autoComplete="new-password" errors={state.fieldErrors} />
      <FormMessage state={state} />
      <SubmitButton>Change password</SubmitButton>
    </form>
  );
}
