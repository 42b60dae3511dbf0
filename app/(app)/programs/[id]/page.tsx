import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { CheckCaution } from "@/components/ui/check-caution";
import { EmptyState } from "@/components/ui/empty-state";
import { RunTable } from "@/components/runs/run-table";
import { ComparePicker } from "@/components/vault/compare-picker";
import { formatNumber } from "@/components/vault/format";
import { ProgramEvents, SignatureHistory } from "@/components/vault/program-history";
import { EditProgramForm } from "@/components/vault/program-forms";
import { RefreshWhenChecked } from "@/components/vault/refresh-when-checked";
import { RevisionList } from "@/components/vault/revision-list";
import { UploadPanel } from "@/components/vault/upload-panel";
import { requirePagePermission } from "@/lib/auth/page-guard";
import { can } from "@/lib/auth/roles";
import { getMachine, listMachines } from "@/lib/dal/machines";
import { listProgramSignatures } from "@/lib/dal/pages-program";
import { getProgram, listProgramEvents } from "@/lib/dal/programs";
import { listRuns } from "@/lib/dal/runs";
import { env } from "@/lib/env";
import { toMachineProfile } from "@/lib/machine-profile";
import { pageId } from "@/lib/page-params";
import { updateProgramAction } from "../actions";

type Props = { params: Promise<{ id: string }> };

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const id = pageId((await params).id);
  return { title: id ? `Program ${id}` : "Program" };
}

export default async function ProgramPage({ params }: Props) {
  const user = await requirePagePermission("readPrograms");
  const id = pageId((await params).id);
  if (!id) notFound();
  const program = await getProgram(id);
  if (!program) notFound();
  const writer = can(user.role, "writePrograms");
  const [events, signatures, machine, machines, runs] = await Promise.all([
    listProgramEvents(id, 100),
    listProgramSignatures(program.revisions),
    getMachine(program.machine.id),
    writer ? listMachines() : Promise.resolve([]),
    listRuns({ programId: id, page: 1, pageSize: 10 }),
  ]);
  const released = program.revisions.find((r) => r.id === program.releasedRevisionId);
  const pending = program.revisions.filter((r) => r.analysis && (r.analysis.state === "queued" || r.analysis.state === "running")).map((r) => r.id);

  return (
    <div className="space-y-6">
      <div>
        <p className="text-sm">
          <Link href="/programs" className="text-brand hover:underline">Programs</Link> / {program.programNumber}
        </p>
        <div className="mt-1 flex flex-wrap items-baseline gap-x-4 gap-y-1">
          <h1 className="text-2xl font-semibold">
            {program.programNumber} <span className="font-normal text-ink-soft">{program.title}</span>
          </h1>
          {released ? (
            <>
              <Link href={`/revisions/${released.id}`} className="rounded-md bg-ok px-3 py-1 text-sm font-semibold text-white">
                Released: revision {released.number}
              </Link>
              <Link href={`/revisions/${released.id}/run`} className="rounded-md border border-ok px-3 py-1 text-sm font-semibold text-ok hover:bg-ok/10" data-testid="check-before-cycle-start">
                Check before cycle start
              </Link>
            </>
          ) : (
            <span className="rounded-md border border-rule px-3 py-1 text-sm text-ink-soft">Nothing released yet</span>
          )}
        </div>
        <dl className="mt-3 grid gap-x-6 gap-y-1 text-sm sm:grid-cols-2 lg:grid-cols-4">
          <div>
            <dt className="text-ink-soft">Part</dt>
            <dd>
              <strong>{program.part.number}</strong> {program.part.name}
              {program.part.customer && <span className="text-ink-soft"> · {program.part.customer}</span>}
              {program.part.material && <span className="text-ink-soft"> · {program.part.material}</span>}
            </dd>
          </div>
          <div>
            <dt className="text-ink-soft">Machine</dt>
            <dd>
              <Link href={`/machines/${program.machine.id}`} className="text-brand hover:underline">{program.machine.name}</Link>
              <span className="text-ink-soft"> ({program.machine.units})</span>
            </dd>
          </div>
          <div>
            <dt className="text-ink-soft">Setup · parts per cycle</dt>
            <dd>
              {program.operation || "—"} · <span className="tabular-nums">{program.partsPerCycle}</span>
            </dd>
          </div>
          <div>
            <dt className="text-ink-soft">Safe Z</dt>
            <dd className="tabular-nums">
              {program.safeZ === null ? `${formatNumber(program.machine.safeZ)} (the machine's)` : formatNumber(program.safeZ)}
            </dd>
          </div>
        </dl>
      </div>

      <CheckCaution />
      <RefreshWhenChecked revisionIds={pending} />

      {writer && machine && (
        <section className="space-y-3 rounded-lg border border-rule bg-panel p-5" aria-labelledby="upload">
          <h2 id="upload" className="text-lg font-semibold">Upload a new revision</h2>
          <UploadPanel
            programId={program.id}
            machine={toMachineProfile(machine)}
            safeZ={program.safeZ}
            partsPerCycle={program.partsPerCycle}
            maxBytes={env().uploadMaxBytes}
          />
        </section>
      )}

      <section className="space-y-3" aria-labelledby="revisions">
        <div className="flex flex-wrap items-end justify-between gap-3">
          <h2 id="revisions" className="text-lg font-semibold">Revisions</h2>
          <ComparePicker revisions={program.revisions.map((r) => ({ id: r.id, number: r.number, label: `Revision ${r.number} (${r.status})` }))} />
        </div>
        {program.revisions.length === 0 ? (
          <EmptyState title="No revisions yet.">{writer ? "Drop the first one in the upload area above." : "A programmer uploads the first one."}</EmptyState>
        ) : (
          <RevisionList revisions={program.revisions} releasedId={program.releasedRevisionId} />
        )}
      </section>

      <section className="space-y-3" aria-labelledby="runs">
        <div className="flex flex-wrap items-end justify-between gap-3">
          <h2 id="runs" className="text-lg font-semibold">Runs at the machine</h2>
          {runs.total > 0 && (
            <Link href={`/runs?programId=${program.id}`} className="text-sm text-brand hover:underline">
              {runs.total > runs.runs.length ? `All ${runs.total} runs` : "In the record of runs"}
            </Link>
          )}
        </div>
        {runs.runs.length === 0 ? (
          <EmptyState title="No run is signed off yet." testId="program-runs-empty">
            {released ? "The operator signs off each run on the released revision's check before cycle start." : "A revision has to be released before it may run."}
          </EmptyState>
        ) : (
          <RunTable runs={runs.runs} view="program" testId="program-runs" />
        )}
      </section>

      <div className="grid gap-6 lg:grid-cols-2">
        <section className="space-y-3 rounded-lg border border-rule bg-panel p-5" aria-labelledby="history">
          <h2 id="history" className="text-lg font-semibold">Status history and signatures</h2>
          <SignatureHistory signatures={signatures} />
        </section>
        <section className="space-y-3 rounded-lg border border-rule bg-panel p-5" aria-labelledby="events">
          <h2 id="events" className="text-lg font-semibold">Audit events</h2>
          <ProgramEvents events={events} />
        </section>
      </div>

      {writer && (
        <section className="space-y-3 rounded-lg border border-rule bg-panel p-5" aria-labelledby="settings">
          <h2 id="settings" className="text-lg font-semibold">Program settings</h2>
          <EditProgramForm
            action={updateProgramAction.bind(null, program.id)}
            machines={machines.map((m) => ({ id: m.id, label: m.name }))}
            initial={{
              title: program.title,
              operation: program.operation,
              machineId: program.machine.id,
              partsPerCycle: program.partsPerCycle,
              safeZ: program.safeZ,
            }}
          />
        </section>
      )}
    </div>
  );
}
