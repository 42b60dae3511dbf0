import type { Metadata } from "next";
import { MachineForm } from "@/components/admin/machine-form";
import { requirePagePermission } from "@/lib/auth/page-guard";
import { createMachineAction } from "../actions";

export const metadata: Metadata = { title: "Add machine" };

export default async function NewMachinePage() {
  await requirePagePermission("manageMachines");
  return (
    <section className="max-w-4xl space-y-4 rounded-lg border border-rule bg-panel p-6">
      <h1 className="text-2xl font-semibold">Add machine</h1>
      <MachineForm action={createMachineAction} submitLabel="Add machine" />
    </section>
  );
}
