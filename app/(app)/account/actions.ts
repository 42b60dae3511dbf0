"use server";

import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { runAction, type FormState } from "@/lib/actions";
import { changeOwnPassword } from "@/lib/dal/users";
import { authorize, requireUser } from "@/lib/auth/session";
import { createToken, revokeToken } from "@/lib/dal/tokens";
import { tokenCreateSchema } from "@/lib/vault-validation";
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

/** A token action's state: the new token itself is in it once, right after creating it. */
export interface TokenFormState extends FormState {
  token?: string;
}

/** Creates a personal API token for pushes from a CAM post-processor (programmers). */
export async function createTokenAction(_prev: TokenFormState, fd: FormData): Promise<TokenFormState> {
  let token: string | undefined;
  const state = await runAction(fd, async () => {
    await authorize("manageOwnTokens");
    const { name } = tokenCreateSchema.parse({ name: fd.get("name") ?? "" });
    const created = await createToken(name);
    token = created.token;
    revalidatePath("/account");
    return { status: 201, message: `Token “${created.name}” created. Copy it now: it is not shown again.` };
  });
  return token ? { ...state, token } : state;
}

/** Revokes one of the caller's tokens; pushes with it get 401 from now on. */
export async function revokeTokenAction(id: number, _prev: TokenFormState, fd: FormData): Promise<TokenFormState> {
  return runAction(fd, async () => {
    await authorize("manageOwnTokens");
    const t = await revokeToken(id);
    revalidatePath("/account");
    return { status: 200, message: `Token “${t.name}” revoked.` };
  });
}
