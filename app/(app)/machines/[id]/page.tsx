import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { formatNumber, formatWhen } from "@/components/vault/format";
import { ClearWorkOffsetButton, SetWorkOffsetForm } from "@/components/vault/work-offset-forms";
import { requirePagePermission } from "@/lib/auth/page-guard";
import { can } from "@/lib/auth/roles";
import { getMachine } from "@/lib/dal/machines";
import { listWorkOffsets } from "@/lib/dal/work-offsets";
import { pageId } from "@/lib/page-params";
import { clearWorkOffsetAction, setWorkOffsetAction } from "../actions";

export const metadata: Metadata = { title: "Machine" };

export default async function MachinePage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePagePermission("readMachines");
  const id = pageId((await params).id);
  if (!id) notFound();
  const machine = await getMachine(id);
  if (!machine) notFound();
  const { offsets } = await listWorkOffsets(id);
  const setter = can(user.role, "setWorkOffsets");
  return (
    <div className="space-y-6">
      <div>
        <p className="text-sm">
          <Link href="/machines" className="text-brand hover:underline">Machines</Link> / {machine.name}
        </p>
        <h1 className="mt-1 text-2xl font-semibold">{machine.name}</h1>
        {machine.notes && <p className="text-ink-soft">{machine.notes}</p>}
        <p className="mt-1 text-sm text-ink-soft">
          {machine.units} · {machine.manualToolChange ? "tools changed by hand" : "tool changer"} · safe Z {formatNumber(machine.safeZ)} · {machine.workOffsetCount} work offsets on the control ·{" "}
          <Link href={`/programs?machine=${machine.id}`} className="text-brand hover:underline">its programs</Link>
        </p>
      </div>

      <section aria-labelledby="offsets" className="space-y-3 rounded-lg border border-rule bg-panel p-5">
        <h2 id="offsets" className="text-lg font-semibold">Work offsets set at the machine</h2>
        <p className="text-sm text-ink-soft">
          Where part zero of each work offset sits, in machine coordinates ({machine.units}), as last measured at the machine. Revision pages show for each
          offset a program calls whether it is recorded here.
        </p>
        {offsets.length === 0 ? (
          <p className="text-sm">No work offsets recorded for this machine yet.</p>
        ) : (
          <div className="overflow-x-auto">
            <table className="w-full text-left text-sm" data-testid="work-offsets">
              <thead className="border-b border-rule text-xs uppercase tracking-wide text-ink-soft">
                <tr>
                  <th className="py-2 pr-3">Offset</th>
                  <th className="py-2 pr-3">X</th>
                  <th className="py-2 pr-3">Y</th>
                  <th className="py-2 pr-3">Z</th>
                  <th className="py-2 pr-3">Set by</th>
                  <th className="py-2 pr-3">When</th>
                  {setter && <th className="py-2"><span className="sr-only">Clear</span></th>}
                </tr>
              </thead>
              <tbody>
                {offsets.map((o) => (
                  <tr key={o.code} className="border-b border-rule/60 last:border-0" data-offset={o.code}>
                    <td className="py-2 pr-3 font-semibold">{o.code}</td>
                    <td className="py-2 pr-3 tabular-nums">{formatNumber(o.x)}</td>
                    <td className="py-2 pr-3 tabular-nums">{formatNumber(o.y)}</td>
                    <td className="py-2 pr-3 tabular-nums">{formatNumber(o.z)}</td>
                    <td className="py-2 pr-3">{o.setBy?.name ?? "—"}</td>
                    <td className="py-2 pr-3 tabular-nums">{formatWhen(o.setAt)}</td>
                    {setter && (
                      <td className="py-2">
                        <ClearWorkOffsetButton action={clearWorkOffsetAction.bind(null, machine.id)} code={o.code} />
                      </td>
                    )}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
        {setter ? (
          <div className="border-t border-rule pt-4">
            <h3 className="mb-2 font-semibold">Record an offset</h3>
            <SetWorkOffsetForm action={setWorkOffsetAction.bind(null, machine.id)} units={machine.units} />
          </div>
        ) : (
          <p className="text-sm text-ink-soft">Operators, leads and admins record these values.</p>
        )}
      </section>
    </div>
  );
}
