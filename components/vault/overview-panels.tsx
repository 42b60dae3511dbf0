import Link from "next/link";
import type { OverviewRevision, ReleasedProgram } from "@/lib/dal/pages-overview";
import { formatWhen } from "./format";
import { AnalysisBadge, FindingCounts, StatusBadge } from "./status-badge";

export function Panel({ title, action, children, testId }: { title: string; action?: { href: string; label: string }; children: React.ReactNode; testId?: string }) {
  return (
    <section className="rounded-lg border border-rule bg-panel p-5" data-testid={testId}>
      <div className="mb-3 flex items-center justify-between gap-3">
        <h2 className="text-lg font-semibold">{title}</h2>
        {action && (
          <Link href={action.href} className="text-sm text-brand hover:underline">
            {action.label}
          </Link>
        )}
      </div>
      {children}
    </section>
  );
}

/** Revisions with their program, status, check and when; `empty` when there are none. */
export function RevisionRows({ revisions, empty, show = "uploaded" }: { revisions: OverviewRevision[]; empty: string; show?: "uploaded" | "submitted" }) {
  if (revisions.length === 0) return <p className="text-sm text-ink-soft">{empty}</p>;
  return (
    <ul className="divide-y divide-rule">
      {revisions.map((r) => (
        <li key={r.id} className="flex flex-wrap items-center gap-x-3 gap-y-1 py-2 text-sm">
          <Link href={`/revisions/${r.id}`} className="font-semibold text-brand hover:underline">
            {r.program.programNumber} rev {r.number}
          </Link>
          <span className="text-ink-soft">{r.program.title}</span>
          <StatusBadge status={r.status} />
          <AnalysisBadge state={r.analysis?.state} />
          <FindingCounts errors={r.analysis?.errorCount} warnings={r.analysis?.warningCount} />
          <span className="ml-auto text-ink-soft">
            {show === "submitted" ? `by ${r.uploadedBy.name}, waiting since ` : `${r.program.machineName} · `}
            <span className="tabular-nums">{formatWhen(show === "submitted" ? r.submittedAt : r.createdAt)}</span>
          </span>
        </li>
      ))}
    </ul>
  );
}

/**
 * For each machine, the released revision of each of its programs; with `runCheck`, each has a button to its check
 * before cycle start (for the people who sign off runs).
 */
export function ReleasedByMachine({ groups, runCheck = false }: { groups: { machine: { id: number; name: string }; programs: ReleasedProgram[] }[]; runCheck?: boolean }) {
  if (groups.length === 0) return <p className="text-sm text-ink-soft">Nothing is released yet: no program may run.</p>;
  return (
    <div className="grid gap-4 md:grid-cols-2">
      {groups.map((g) => (
        <div key={g.machine.id} className="rounded-md border border-rule p-3" data-machine={g.machine.name}>
          <h3 className="mb-2 font-semibold">
            <Link href={`/machines/${g.machine.id}`} className="hover:underline">
              {g.machine.name}
            </Link>
          </h3>
          <ul className={runCheck ? "divide-y divide-rule text-sm" : "space-y-1 text-sm"}>
            {g.programs.map((p) => {
              const name = (
                <Link href={`/revisions/${p.revisionId}`} className="font-semibold text-ok hover:underline">
                  {p.programNumber} rev {p.revisionNumber}
                </Link>
              );
              const released = <span className={`text-xs text-ink-soft tabular-nums ${runCheck ? "block" : "ml-auto"}`}>released {formatWhen(p.releasedAt)}</span>;
              return runCheck ? (
                <li key={p.programId} className="flex items-center gap-3 py-2" data-program={p.programNumber}>
                  <div className="min-w-0 flex-1">
                    {name}
                    <span className="block text-ink-soft">{p.title}</span>
                    {released}
                  </div>
                  <Link
                    href={`/revisions/${p.revisionId}/run`}
                    className="inline-flex min-h-12 shrink-0 items-center rounded-md bg-brand px-4 font-semibold text-white hover:bg-brand-strong"
                    data-testid="check-before-cycle-start"
                  >
                    Check before cycle start
                  </Link>
                </li>
              ) : (
                <li key={p.programId} className="flex flex-wrap items-baseline gap-x-2" data-program={p.programNumber}>
                  {name}
                  <span className="text-ink-soft">{p.title}</span>
                  {released}
                </li>
              );
            })}
          </ul>
        </div>
      ))}
    </div>
  );
}
