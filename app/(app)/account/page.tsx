import type { Metadata } from "next";
import { requirePageUser } from "@/lib/auth/page-guard";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { PasswordForm } from "./password-form";

export const metadata: Metadata = { title: "Your account" };

export default async function AccountPage() {
  const user = await requirePageUser();
  return (
    <section className="max-w-lg space-y-4 rounded-lg border border-rule bg-panel p-6">
      <h1 className="text-2xl font-semibold">Your account</h1>
      <p className="text-ink-soft">
        {user.email} · {ROLE_LABELS[user.role]}
      </p>
      <h2 className="text-lg font-semibold">Change password</h2>
      <p className="text-sm text-ink-soft">Changing it signs you out everywhere, this device included.</p>
      <PasswordForm email={user.email} />
    </section>
  );
}
