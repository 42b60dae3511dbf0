import type { Metadata } from "next";
import { CreateUserForm } from "@/components/admin/user-forms";
import { requirePagePermission } from "@/lib/auth/page-guard";
import { createUserAction } from "../actions";

export const metadata: Metadata = { title: "Add user" };

export default async function NewUserPage() {
  await requirePagePermission("manageUsers");
  return (
    <section className="max-w-lg space-y-4 rounded-lg border border-rule bg-panel p-6">
      <h1 className="text-2xl font-semibold">Add user</h1>
      <CreateUserForm action={createUserAction} />
    </section>
  );
}
