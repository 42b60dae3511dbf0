import Link from "next/link";
import { CheckCaution } from "@/components/ui/check-caution";
import { requirePageUser } from "@/lib/auth/page-guard";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { listMachines } from "@/lib/dal/machines";

export default async function OverviewPage() {
  const user = await requirePageUser();
  const machines = await listMachines();
  return (
    <div className="space-y-6">
      <div>
        <h1 className="text-2xl font-semibold">Good to see you, {user.name}</h1>
        <p className="text-ink-soft">Signed in as {ROLE_LABELS[user.role].toLowerCase()}.</p>
      </div>
      <CheckCaution />
      <section className="rounded-lg border border-rule bg-panel p-5">
        <div className="mb-3 flex items-center justify-between">
          <h2 className="text-lg font-semibold">Machines</h2>
          <Link href="/machines" className="text-sm text-brand hover:underline">
            All machines
          </Link>
        </div>
        {machines.length === 0 ? (
          <p className="text-ink-soft">No machines yet.</p>
        ) : (
          <ul className="grid gap-3 sm:grid-cols-2">
            {machines.map((m) => (
              <li key={m.id} className="rounded-md border border-rule p-3">
                <p className="font-medium">{m.name}</p>
                <p className="text-sm text-ink-soft">
                  {m.manualToolChange ? "Manual tool changes" : "Tool changer"} · {m.units} · {m.workOffsetCount} work offsets
                </p>
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}
