"use server";

import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { z } from "zod";
import { actionId, formString as str, runAction, type FormState } from "@/lib/actions";
import { authorize } from "@/lib/auth/session";
import { createUser, updateUser } from "@/lib/dal/users";
import { displayNameSchema, newPasswordSchema, roleSchema, userCreateSchema } from "@/lib/validation";

export async function createUserAction(_prev: FormState, fd: FormData): Promise<FormState> {
  let id: number | undefined;
  const state = await runAction(fd, async () => {
    await authorize("manageUsers");
    const input = userCreateSchema.parse({
      email: str(fd, "email") ?? "",
      displayName: str(fd, "displayName") ?? "",
      role: str(fd, "role"),
      password: str(fd, "password") ?? "",
    });
    id = (await createUser(input)).id;
    return { status: 201, message: "User created." };
  });
  if (state.status !== 201) return state;
  revalidatePath("/admin/users");
  redirect(`/admin/users/${id}?created=1`);
}

const profileSchema = z.object({ displayName: displayNameSchema, role: roleSchema });

export async function updateUserAction(id: unknown, _prev: FormState, fd: FormData): Promise<FormState> {
  return runAction(fd, async () => {
    await authorize("manageUsers");
    const userId = actionId(id);
    const input = profileSchema.parse({ displayName: str(fd, "displayName") ?? "", role: str(fd, "role") });
    await updateUser(userId, input);
    revalidatePath("/admin/users");
    return { status: 200, message: "Saved." };
  });
}

export async function setUserDisabledAction(id: unknown, _prev: FormState, fd: FormData): Promise<FormState> {
  return runAction(fd, async () => {
    await authorize("manageUsers");
    const userId = actionId(id);
    const disabled = z.enum(["true", "false"], { error: "Say whether to disable." }).parse(str(fd, "disabled")) === "true";
    await updateUser(userId, { disabled });
    revalidatePath("/admin/users");
    return { status: 200, message: disabled ? "User disabled; their sessions ended." : "User enabled." };
  });
}

const resetSchema = z
  .object({ password: newPasswordSchema, confirmPassword: z.string() })
  .refine((v) => v.password === v.confirmPassword, { path: ["confirmPassword"], message: "The two passwords differ." });

export async function resetPasswordAction(id: unknown, _prev: FormState, fd: FormData): Promise<FormState> {
  return runAction(fd, async () => {
    await authorize("manageUsers");
    const userId = actionId(id);
    const { password } = resetSchema.parse({ password: str(fd, "password") ?? "", confirmPassword: str(fd, "confirmPassword") ?? "" });
    await updateUser(userId, { password });
    return { status: 200, message: "Password reset; the user's sessions ended." };
  });
}
