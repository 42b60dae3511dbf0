"use server";

import { redirect } from "next/navigation";
import { runAction, type FormState } from "@/lib/actions";
import { changeOwnPassword } from "@/lib/dal/users";
import { requireUser } from "@/lib/auth/session";
import { passwordChangeSchema } from "@/lib/validation";

export async function changePasswordAction(_prev: FormState, fd: FormData): Promise<FormState> {
  const state = await runAction(fd, async () => {
    await requireUser();
    const input = passwordChangeSchema.parse({
      currentPassword: fd.get("currentPassword") ?? "",
      newPassword: fd.get("newPassword") ?? "",
      confirmPassword: fd.get("confirmPassword") ?? "",
    });
    await changeOwnPassword(input.currentPassword, input.newPassword);
    return { status: 200 };
  });
  if (state.status !== 200) return state;
  redirect("/sign-in?changed=1");
}
