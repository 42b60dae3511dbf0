"use server";

import { redirect } from "next/navigation";
import { z } from "zod";
import { formString } from "@/lib/actions";
import type { FormState } from "@/lib/form-state";
import { signIn } from "@/lib/auth/sign-in";
import { safeRedirectPath } from "@/lib/safe-redirect";
import { signInSchema } from "@/lib/validation";

export async function signInAction(_prev: FormState, fd: FormData): Promise<FormState> {
  const parsed = signInSchema.safeParse({ email: fd.get("email"), password: fd.get("password") });
  const email = formString(fd, "email") ?? "";
  if (!parsed.success) {
    return {
      status: 422,
      message: "Check your e-mail and password.",
      fieldErrors: z.flattenError(parsed.error).fieldErrors as Record<string, string[]>,
      values: { email },
    };
  }
  let result;
  try {
    result = await signIn(parsed.data.email, parsed.data.password);
  } catch (e) {
    console.error("sign-in failed unexpectedly:", e);
    return { status: 500, message: "Sign-in is not available right now. Try again shortly.", values: { email } };
  }
  if (!result.ok) return { status: result.status, message: result.message, values: { email } };
  redirect(safeRedirectPath(fd.get("next")));
}
