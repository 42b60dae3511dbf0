import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/lib/auth/page-guard";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { listUsers } from "@/lib/dal/users";

export const metadata: Metadata = { title: "Users" };

export default async function UsersPage() {
  await requirePagePermission("manageUsers");
  const users = await listUsers();
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <h1 className="text-2xl font-semibold">Users</h1>
        <Link href="/admin/users/new" className="rounded-md bg-brand px-4 py-2 text-sm font-semibold text-white hover:bg-brand-strong">
          Add user
        </Link>
      </div>
      <div className="overflow-x-auto rounded-lg border border-rule bg-panel">
        <table className="w-full text-left text-sm">
          <thead className="border-b border-rule bg-paper text-xs uppercase tracking-wide text-ink-soft">
            <tr>
              <th className="px-3 py-2">Name</th>
              <th className="px-3 py-2">Email</th>
              <th className="px-3 py-2">Role</th>
              <th className="px-3 py-2">State</th>
            </tr>
          </thead>
          <tbody>
            {users.map((u) => (
              <tr key={u.id} className="border-b border-rule last:border-0">
                <td className="px-3 py-2">
                  <Link href={`/admin/users/${u.id}`} className="font-medium text-brand hover:underline">
                    {u.name}
                  </Link>
                </td>
                <td className="px-3 py-2">{u.email}</td>
                <td className="px-3 py-2">{ROLE_LABELS[u.role]}</td>
                <td className="px-3 py-2">{u.disabled ? <span className="text-bad">disabled</span> : "active"}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
