import Link from "next/link";
import type { Role } from "@/db/schema";
import { can } from "@/lib/auth/roles";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { signOutAction } from "@/app/(app)/actions";
import { NavLinks } from "./nav-links";

export function AppHeader({ user }: { user: { name: string; role: Role } }) {
  const links = [
    { href: "/", label: "Overview", show: true },
    { href: "/programs", label: "Programs", show: can(user.role, "readPrograms") },
    { href: "/machines", label: "Machines", show: can(user.role, "readMachines") },
    { href: "/runs", label: "Runs", show: can(user.role, "readRuns") },
    { href: "/admin/users", label: "Users", show: can(user.role, "manageUsers") },
    { href: "/audit", label: "Audit record", show: can(user.role, "readAudit") },
    { href: "/admin/outbox", label: "Mail outbox", show: can(user.role, "readOutbox") },
  ];
  return (
    <header className="border-b border-rule bg-ink text-white">
      <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-3">
        <Link href="/" className="text-lg font-bold tracking-tight">
          Cycle<span className="text-sky-300">gate</span>
        </Link>
        <NavLinks links={links.filter((l) => l.show).map(({ href, label }) => ({ href, label }))} />
        <div className="flex items-center gap-3 text-sm">
          <Link href="/account" className="hover:underline" data-testid="current-user">
            {user.name}
          </Link>
          <span className="rounded bg-white/15 px-2 py-0.5 text-xs uppercase tracking-wide">{ROLE_LABELS[user.role]}</span>
          <form action={signOutAction}>
            <button type="submit" className="min-h-10 rounded border border-white/30 px-3 py-1.5 hover:bg-white/10">
              Sign out
            </button>
          </form>
        </div>
      </div>
    </header>
  );
}
