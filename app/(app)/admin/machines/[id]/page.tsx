import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { MachineForm } from "@/components/admin/machine-form";
import { Forbidden } from "@/components/ui/forbidden";
import { pageAccess } from "@/lib/auth/page-guard";
import { getMachine } from "@/lib/dal/machines";
import { updateMachineAction } from "../actions";

export const metadata: Metadata = { title: "Edit machine" };

export default async function EditMachinePage({ params }: { params: Promise<{ id: string }> }) {
  const { allowed } = await pageAccess("manageMachines");
  if (!allowed) return <Forbidden what="editing machines" />;
  const raw = (await params).id;
  if (!/^[1-9]\d{0,8}$/.test(raw)) notFound();
  const machine = await getMachine(Number(raw));
  if (!machine) notFound();
  const { updatedAt: _updatedAt, id, ...initial } = machine;
  return (
    <section className="max-w-4xl space-y-4 rounded-lg border border-rule bg-panel p-6">
      <h1 className="text-2xl font-semibold">Edit {machine.name}</h1>
      <MachineForm action={updateMachineAction.bind(null, id)} initial={initial} submitLabel="Save changes" />
    </section>
  );
}
