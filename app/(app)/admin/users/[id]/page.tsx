import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { DisableUserForm, EditUserForm, ResetPasswordForm } from "@/components/admin/user-forms";
import { requirePagePermission } from "@/lib/auth/page-guard";
import { positiveIdFromText } from "@/lib/validation";
import { getUser } from "@/lib/dal/users";
import { resetPasswordAction, setUserDisabledAction, updateUserAction } from "../actions";

export const metadata: Metadata = { title: "User" };

export default async function UserPage({ params }: { params: Promise<{ id: string }> }) {
  const me = await requirePagePermission("manageUsers");
  const id = positiveIdFromText((await params).id);
  if (id === null) notFound();
  const user = await getUser(id);
  if (!user) notFound();
  const self = user.id === me.id;
  return (
    <div className="grid max-w-4xl gap-6 md:grid-cols-2">
      <section className="space-y-4 rounded-lg border border-rule bg-panel p-6 md:col-span-2">
        <h1 className="text-2xl font-semibold">{user.name}</h1>
        <p className="text-ink-soft">
          {user.email} · {user.disabled ? "disabled" : "active"} · since {user.createdAt.slice(0, 10)}
        </p>
      </section>
      <section className="space-y-4 rounded-lg border border-rule bg-panel p-6">
        <h2 className="text-lg font-semibold">Name and role</h2>
        <EditUserForm action={updateUserAction.bind(null, user.id)} initial={{ displayName: user.name, role: user.role }} />
      </section>
      <section className="space-y-4 rounded-lg border border-rule bg-panel p-6">
        <h2 className="text-lg font-semibold">Password</h2>
        <ResetPasswordForm action={resetPasswordAction.bind(null, user.id)} />
      </section>
      {!self && (
        <section className="space-y-3 rounded-lg border border-rule bg-panel p-6">
          <h2 className="text-lg font-semibold">Access</h2>
          <p className="text-sm text-ink-soft">Disabling ends every session of this user at once.</p>
          <DisableUserForm action={setUserDisabledAction.bind(null, user.id)} disabled={user.disabled} />
        </section>
      )}
    </div>
  );
}
