import "server-only";
import { headers } from "next/headers";
import { forbidden, redirect } from "next/navigation";
import { safeRedirectPath } from "@/lib/safe-redirect";
import { can, type Permission } from "./roles";
import { getCurrentUser, recordRefusal, type CurrentUser } from "./session";

/** For pages: the signed-in user, or a redirect to sign-in that comes back here afterwards. */
export async function requirePageUser(): Promise<CurrentUser> {
  const user = await getCurrentUser();
  if (!user) {
    const path = safeRedirectPath((await headers()).get("x-cyclegate-path"));
    redirect(`/sign-in?next=${encodeURIComponent(path)}`);
  }
  return user;
}

/**
 * For pages: the signed-in user holding `permission`. Otherwise the refusal is audited and the
 * page answers 403 with app/(app)/forbidden.tsx. Call it first in the page, before anything that
 * streams: a loading.tsx or <Suspense> above the call starts the answer with 200.
 */
export async function requirePagePermission(permission: Permission): Promise<CurrentUser> {
  const user = await requirePageUser();
  if (!can(user.role, permission)) {
    await recordRefusal(user, permission);
    forbidden();
  }
  return user;
}
