import type { Metadata } from "next";
import { Forbidden } from "@/components/ui/forbidden";
import { getCurrentUser } from "@/lib/auth/session";

export const metadata: Metadata = { title: "Not for your role" };

/** Shown, with status 403, when a page calls requirePagePermission for a role that lacks it. */
export default async function SignedInForbidden() {
  const user = await getCurrentUser();
  return <Forbidden role={user?.role} />;
}
