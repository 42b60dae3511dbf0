import Link from "next/link";
import { CheckCaution } from "@/components/ui/check-caution";
import { RunTable } from "@/components/runs/run-table";
import { Panel, ReleasedByMachine, RevisionRows } from "@/components/vault/overview-panels";
import { requirePageUser } from "@/lib/auth/page-guard";
import { can, ROLE_LABELS } from "@/lib/auth/roles";
import { listMachines } from "@/lib/dal/machines";
import { listOutbox } from "@/lib/dal/outbox";
import { countRevisions, listMyOpenRevisions, listReleasedByMachine, listRevisionsAwaitingReview } from "@/lib/dal/pages-overview";
import { listRuns } from "@/lib/dal/runs";

/** What each role needs first: a programmer their open work, a lead the review queue, an operator what may run. */
export default async function OverviewPage() {
  const user = await requirePageUser();
  const role = user.role;
  const [mine, waiting, released, counts, outbox, machines, runs] = await Promise.all([
    role === "programmer" ? listMyOpenRevisions() : null,
    role === "lead" || role === "admin" || role === "programmer" ? listRevisionsAwaitingReview() : null,
    role === "operator" || role === "admin" || role === "lead" ? listReleasedByMachine() : null,
    role === "admin" ? countRevisions() : null,
    can(role, "readOutbox") ? listOutbox({ page: 1 }) : null,
    listMachines(),
    role === "lead" || role === "admin" ? listRuns({ page: 1, pageSize: 8 }) : null,
  ]);
  const ownWaiting = waiting?.filter((r) => r.uploadedBy.id === user.id) ?? [];
  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-2xl font-semibold">Good to see you, {user.name}</h1>
          <p className="text-ink-soft">Signed in as {ROLE_LABELS[role].toLowerCase()}.</p>
        </div>
        <div className="flex gap-2">
          <Link href="/programs" className="rounded-md border border-rule bg-panel px-4 py-2 text-sm font-semibold hover:bg-paper">
            All programs
          </Link>
          {can(role, "writePrograms") && (
            <Link href="/programs/new" className="rounded-md bg-brand px-4 py-2 text-sm font-semibold text-white hover:bg-brand-strong">
              New program
            </Link>
          )}
        </div>
      </div>
      <CheckCaution />

      {counts && (
        <section aria-label="The shop at a glance" className="grid grid-cols-2 gap-3 sm:grid-cols-4 lg:grid-cols-8" data-testid="at-a-glance">
          {[
            ["Programs", counts.programs, "/programs"],
            ["Drafts", counts.byStatus.draft, "/programs?status=draft"],
            ["Waiting for review", counts.byStatus.submitted, "/programs?status=submitted"],
            ["Released", counts.byStatus.released, "/programs?status=released"],
            ["Rejected", counts.byStatus.rejected, "/programs?status=rejected"],
            ["Checks waiting", counts.checksWaiting, null],
            ["Checks failed", counts.checksFailed, null],
            ["Mail not sent", outbox ? outbox.counts.pending + outbox.counts.sending + outbox.counts.failed : 0, "/admin/outbox"],
          ].map(([label, n, href]) => {
            const body = (
              <>
                <span className="block text-2xl font-semibold tabular-nums">{n as number}</span>
                <span className="text-xs uppercase tracking-wide text-ink-soft">{label as string}</span>
              </>
            );
            return href ? (
              <Link key={label as string} href={href as string} className="rounded-lg border border-rule bg-panel p-3 hover:border-brand">
                {body}
              </Link>
            ) : (
              <div key={label as string} className="rounded-lg border border-rule bg-panel p-3">
                {body}
              </div>
            );
          })}
        </section>
      )}

      {mine && (
        <Panel title="Your drafts and rejected revisions" action={{ href: "/programs", label: "All programs" }} testId="my-open">
          <RevisionRows revisions={mine} empty="Nothing open: every revision you uploaded is submitted or decided." />
        </Panel>
      )}
      {role === "programmer" && waiting && (
        <Panel title="Yours waiting for a lead" testId="my-waiting">
          <RevisionRows revisions={ownWaiting} empty="None of yours is waiting for review." show="submitted" />
        </Panel>
      )}
      {waiting && role !== "programmer" && (
        <Panel title="Waiting for review" testId="awaiting-review">
          <RevisionRows revisions={waiting} empty="Nothing is waiting for review." show="submitted" />
        </Panel>
      )}
      {released && (
        <Panel title="Released programs by machine" action={{ href: "/programs?status=released", label: "As a list" }} testId="released-by-machine">
          <ReleasedByMachine groups={released} runCheck={can(role, "signOffRuns")} />
        </Panel>
      )}
      {runs && (
        <Panel title="Latest runs at the machines" action={{ href: "/runs", label: "The record of runs" }} testId="latest-runs">
          {runs.runs.length === 0 ? <p className="text-sm text-ink-soft">No run is signed off yet.</p> : <RunTable runs={runs.runs} view="overview" testId="latest-runs-table" />}
        </Panel>
      )}

      <Panel title="Machines" action={{ href: "/machines", label: "All machines" }}>
        {machines.length === 0 ? (
          <p className="text-ink-soft">No machines yet.</p>
        ) : (
          <ul className="grid gap-3 sm:grid-cols-2">
            {machines.map((m) => (
              <li key={m.id} className="rounded-md border border-rule p-3">
                <Link href={`/machines/${m.id}`} className="font-medium text-brand hover:underline">
                  {m.name}
                </Link>
                <p className="text-sm text-ink-soft">
                  {m.manualToolChange ? "Manual tool changes" : "Tool changer"} · {m.units} · {m.workOffsetCount} work offsets
                </p>
              </li>
            ))}
          </ul>
        )}
      </Panel>
    </div>
  );
}
