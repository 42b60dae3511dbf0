import "server-only";
import { headers } from "next/headers";
import { redirect } from "next/navigation";
import { can, type Permission } from "./roles";
import { getCurrentUser, type CurrentUser } from "./session";

/** For pages: the signed-in user, or a redirect to sign-in that comes back here afterwards. */
export async function requirePageUser(): Promise<CurrentUser> {
  const user = await getCurrentUser();
  if (!user) {
    const path = (await headers()).get("x-cyclegate-path") ?? "/";
    redirect(`/sign-in?next=${encodeURIComponent(path)}`);
  }
  return user;
}

/** For pages: the user and whether they hold `permission` (the page shows a refusal when not). */
export async function pageAccess(permission: Permission): Promise<{ user: CurrentUser; allowed: boolean }> {
  const user = await requirePageUser();
  return { user, allowed: can(user.role, permission) };
}
