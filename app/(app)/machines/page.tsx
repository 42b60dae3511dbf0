import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/lib/auth/page-guard";
import { can } from "@/lib/auth/roles";
import { listMachines } from "@/lib/dal/machines";

export const metadata: Metadata = { title: "Machines" };

const fmt = (n: number) => n.toLocaleString("en", { maximumFractionDigits: 3 });

export default async function MachinesPage() {
  const user = await requirePagePermission("readMachines");
  const machines = await listMachines();
  const editable = can(user.role, "manageMachines");
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <h1 className="text-2xl font-semibold">Machines</h1>
        {editable && (
          <Link href="/admin/machines/new" className="rounded-md bg-brand px-4 py-2 text-sm font-semibold text-white hover:bg-brand-strong">
            Add machine
          </Link>
        )}
      </div>
      <div className="overflow-x-auto rounded-lg border border-rule bg-panel">
        <table className="w-full text-left text-sm">
          <thead className="border-b border-rule bg-paper text-xs uppercase tracking-wide text-ink-soft">
            <tr>
              <th className="px-3 py-2">Name</th>
              <th className="px-3 py-2">Units</th>
              <th className="px-3 py-2">Travel X / Y / Z</th>
              <th className="px-3 py-2">Rapid</th>
              <th className="px-3 py-2">Max feed</th>
              <th className="px-3 py-2">Spindle max</th>
              <th className="px-3 py-2">Tool change</th>
              <th className="px-3 py-2">Safe Z</th>
              <th className="px-3 py-2">Work offsets</th>
              {editable && <th className="px-3 py-2"><span className="sr-only">Edit</span></th>}
            </tr>
          </thead>
          <tbody>
            {machines.map((m) => (
              <tr key={m.id} className="border-b border-rule last:border-0">
                <td className="px-3 py-2 font-medium">
                  <Link href={`/machines/${m.id}`} className="text-brand hover:underline">{m.name}</Link>
                  {m.notes && <p className="font-normal text-ink-soft">{m.notes}</p>}
                </td>
                <td className="px-3 py-2">{m.units}</td>
                <td className="px-3 py-2 whitespace-nowrap tabular-nums">
                  {fmt(m.travelXMin)}…{fmt(m.travelXMax)} / {fmt(m.travelYMin)}…{fmt(m.travelYMax)} / {fmt(m.travelZMin)}…{fmt(m.travelZMax)}
                </td>
                <td className="px-3 py-2">{fmt(m.rapidRate)}/min</td>
                <td className="px-3 py-2">{fmt(m.maxFeed)}/min</td>
                <td className="px-3 py-2">{fmt(m.maxSpindle)} rpm{m.spindleProgramControlled ? "" : " (manual)"}</td>
                <td className="px-3 py-2">{m.manualToolChange ? "manual" : "changer"}, {fmt(m.toolChangeSeconds)} s</td>
                <td className="px-3 py-2 tabular-nums">{fmt(m.safeZ)}</td>
                <td className="px-3 py-2">
                  <Link href={`/machines/${m.id}`} className="text-brand hover:underline">Values set</Link>
                </td>
                {editable && (
                  <td className="px-3 py-2">
                    <Link href={`/admin/machines/${m.id}`} className="text-brand hover:underline">Edit</Link>
                  </td>
                )}
              </tr>
            ))}
          </tbody>
        </table>
        {machines.length === 0 && <p className="p-4 text-ink-soft">No machines yet.</p>}
      </div>
    </div>
  );
}
