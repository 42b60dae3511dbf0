import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { MachineForm } from "@/components/admin/machine-form";
import { requirePagePermission } from "@/lib/auth/page-guard";
import { positiveIdFromText } from "@/lib/validation";
import { getMachine } from "@/lib/dal/machines";
import { updateMachineAction } from "../actions";

export const metadata: Metadata = { title: "Edit machine" };

export default async function EditMachinePage({ params }: { params: Promise<{ id: string }> }) {
  await requirePagePermission("manageMachines");
  const id = positiveIdFromText((await params).id);
  if (id === null) notFound();
  const machine = await getMachine(id);
  if (!machine) notFound();
  const { updatedAt: _updatedAt, id: _id, ...initial } = machine;
  return (
    <section className="max-w-4xl space-y-4 rounded-lg border border-rule bg-panel p-6">
      <h1 className="text-2xl font-semibold">Edit {machine.name}</h1>
      <MachineForm action={updateMachineAction.bind(null, id)} initial={initial} submitLabel="Save changes" />
    </section>
  );
}
