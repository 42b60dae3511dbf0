"use server";

import { redirect } from "next/navigation";
import { signOut } from "@/lib/auth/sign-in";

export async function signOutAction(): Promise<void> {
  await signOut();
  redirect("/sign-in");
}
