import type { Metadata } from "next";
import Link from "next/link";
import { NewProgramPanels } from "@/components/vault/program-forms";
import { requirePagePermission } from "@/lib/auth/page-guard";
import { listMachines } from "@/lib/dal/machines";
import { listParts } from "@/lib/dal/parts";
import { createPartAction, createProgramAction } from "../actions";

export const metadata: Metadata = { title: "New program" };

export default async function NewProgramPage() {
  await requirePagePermission("writePrograms");
  const [parts, machines] = await Promise.all([listParts(), listMachines()]);
  return (
    <div className="space-y-4">
      <p className="text-sm">
        <Link href="/programs" className="text-brand hover:underline">Programs</Link> / New program
      </p>
      <NewProgramPanels
        createProgram={createProgramAction}
        createPart={createPartAction}
        parts={parts.map((p) => ({ id: p.id, label: `${p.number} · ${p.name}` }))}
        machines={machines.map((m) => ({ id: m.id, label: m.name }))}
      />
    </div>
  );
}
