"use client";

import { useActionState } from "react";
import { FormMessage, SubmitButton, TextField } from "@/components/ui/form";
import { initialFormState } from "@/lib/form-state";
import { signInAction } from "./actions";

export function SignInForm({ next }: { next: string }) {
  const [state, action] = useActionState(signInAction, initialFormState);
  return (
    <form action={action} className="space-y-4" noValidate>
      <input type="hidden" name="next" value={next} />
      <TextField
        label="Email"
        name="email"
        type="email"
        autoComplete="username"
        required
        defaultValue={state.values?.email ?? ""}
        errors={state.fieldErrors}
      />
      <TextField label="Password" name="password" type="password" autoComplete="current-password" required errors={state.fieldErrors} />
      <FormMessage state={state} />
      <SubmitButton>Sign in</SubmitButton>
    </form>
  );
}
