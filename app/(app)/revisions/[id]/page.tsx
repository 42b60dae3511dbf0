import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { CheckCaution } from "@/components/ui/check-caution";
import { EmptyState } from "@/components/ui/empty-state";
import { BoundsList, OffsetTable, ToolTable, type StoredResult } from "@/components/vault/analysis-tables";
import { CodePane } from "@/components/vault/code-pane";
import { FindingsList } from "@/components/vault/findings-list";
import { formatBytes, formatDuration, formatWhen, plural } from "@/components/vault/format";
import { SignatureHistory } from "@/components/vault/program-history";
import { RefreshWhenChecked } from "@/components/vault/refresh-when-checked";
import { RevisionWorkspace } from "@/components/vault/revision-workspace";
import { AnalysisBadge, StatusBadge } from "@/components/vault/status-badge";
import { TimeChart } from "@/components/vault/time-chart";
import { WorkflowPanel } from "@/components/vault/workflow-panel";
import { RevisionBackplot } from "@/components/viewer/revision-backplot";
import { requirePagePermission } from "@/lib/auth/page-guard";
import { can as roleCan } from "@/lib/auth/roles";
import { programRevisions } from "@/lib/dal/programs";
import { getRevision, type RevisionDetail } from "@/lib/dal/revisions";
import { listWorkOffsets } from "@/lib/dal/work-offsets";
import { pageId } from "@/lib/page-params";
import { flattenSearch, type SearchParams } from "@/lib/search-params";
import { deleteDraftAction, rejectRevisionAction, releaseRevisionAction, submitRevisionAction } from "../actions";

type Props = { params: Promise<{ id: string }>; searchParams: Promise<SearchParams> };

/** The engine's tool order of a multi-part program, in words. */
const TOOL_ORDER: Record<string, string> = {
  "by-tool": "by tool, all parts",
  "by-part": "part after part",
  single: "one part",
  mixed: "mixed",
};

const DONE: Record<string, string> = {
  submitted: "Submitted for review: the leads got a mail.",
  released: "Released: your signature is bound to this revision's SHA-256, and the programmer got a mail.",
  rejected: "Rejected: the programmer got a mail with your comment.",
};

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const id = pageId((await params).id);
  return { title: id ? `Revision ${id}` : "Revision" };
}

/** Why a lead who may review cannot release this one right now. */
function releaseBlocked(rev: RevisionDetail, userId: number, role: Parameters<typeof roleCan>[0]): string | null {
  if (!roleCan(role, "reviewRevisions") || rev.status !== "submitted" || rev.can.release) return null;
  if (rev.uploadedBy.id === userId) return "You uploaded this revision: another lead must release it.";
  if (rev.analysis?.state !== "done") return "The server's check is not done yet; a revision is released only on a finished check.";
  return null;
}

export default async function RevisionPage({ params, searchParams }: Props) {
  const user = await requirePagePermission("readPrograms");
  const id = pageId((await params).id);
  if (!id) notFound();
  const rev = await getRevision(id, { withResult: true });
  if (!rev) notFound();
  const [siblings, machineOffsets] = await Promise.all([programRevisions(rev.programId), listWorkOffsets(rev.program.machine.id)]);
  const a = rev.analysis;
  const doneNote = DONE[flattenSearch(await searchParams).done ?? ""];
  const result = a?.state === "done" ? (rev.result as StoredResult | null) : null;
  const checking = a?.state === "queued" || a?.state === "running";
  const previous = siblings.find((s) => s.number < rev.number);
  const errorFindings = rev.findings.filter((f) => f.severity === "error").map((f) => ({ rule: f.rule, line: f.line, message: f.message }));
  const unlistedErrors = rev.findingCounts.filter((c) => c.severity === "error").reduce((n, c) => n + Math.max(0, c.count - c.listed), 0);

  return (
    <RevisionWorkspace revisionId={rev.id} lineCount={rev.lineCount}>
      <div className="space-y-6">
        <div>
          <p className="text-sm">
            <Link href="/programs" className="text-brand hover:underline">Programs</Link> /{" "}
            <Link href={`/programs/${rev.program.id}`} className="text-brand hover:underline">
              {rev.program.programNumber}
            </Link>{" "}
            / Revision {rev.number}
          </p>
          <div className="mt-1 flex flex-wrap items-center gap-x-4 gap-y-2">
            <h1 className="text-2xl font-semibold">
              {rev.program.programNumber} revision {rev.number}
            </h1>
            <StatusBadge status={rev.status} />
            <AnalysisBadge state={a?.state} />
            <span className="ml-auto flex flex-wrap gap-2 text-sm">
              {rev.status === "released" && <Link href={`/revisions/${rev.id}/run`} className="rounded-md border-2 border-ok bg-panel px-3 py-2 font-semibold text-ok hover:bg-ok/10" data-testid="check-before-cycle-start">Check before cycle start</Link>}
              {previous && (
                <Link href={`/revisions/${previous.id}/compare/${rev.id}`} className="rounded-md border border-rule bg-panel px-3 py-2 hover:bg-paper">
                  Compare with revision {previous.number}
                </Link>
              )}
              <a href={`/api/revisions/${rev.id}/file`} download className="rounded-md bg-brand px-3 py-2 font-semibold text-white hover:bg-brand-strong" data-testid="download">
                Download the exact file
              </a>
            </span>
          </div>
          <p className="mt-1 text-sm text-ink-soft">
            {rev.program.title} · {rev.program.part.number} {rev.program.part.name} · {rev.program.machine.name}
          </p>
          <p className="mt-1 text-sm text-ink-soft">
            {rev.fileName} · {formatBytes(rev.size)} · uploaded by {rev.uploadedBy.name} on <span className="tabular-nums">{formatWhen(rev.createdAt)}</span>
            {rev.note && <> · “{rev.note}”</>}
          </p>
          <p className="mt-1 text-xs text-ink-soft">
            SHA-256 <code className="font-mono break-all" data-testid="revision-sha256">{rev.sha256}</code>
          </p>
          {rev.status === "superseded" && rev.program.releasedRevisionId && (
            <p className="mt-2 rounded-md bg-warn/10 px-3 py-2 text-sm text-warn">
              Superseded. <Link href={`/revisions/${rev.program.releasedRevisionId}`} className="font-semibold underline">Open the released revision</Link>.
            </p>
          )}
        </div>

        {doneNote && (
          <p role="status" className="rounded-md bg-ok/10 px-3 py-2 text-sm text-ok" data-testid="done-note">
            {doneNote}
          </p>
        )}
        <CheckCaution />
        {checking && <RefreshWhenChecked revisionIds={[rev.id]} />}
        {a?.state === "failed" && (
          <p role="alert" className="rounded-md bg-bad/10 px-3 py-2 text-sm text-bad">
            The server&apos;s check failed after {a.attempts} attempts: {a.error ?? "no reason given"}.
          </p>
        )}

        <WorkflowPanel
          number={rev.number}
          status={rev.status}
          sha256={rev.sha256}
          can={rev.can}
          releaseBlocked={releaseBlocked(rev, user.id, user.role)}
          errorFindings={errorFindings}
          unlistedErrors={unlistedErrors}
          actions={{
            submit: submitRevisionAction.bind(null, rev.id),
            release: releaseRevisionAction.bind(null, rev.id),
            reject: rejectRevisionAction.bind(null, rev.id),
            remove: deleteDraftAction.bind(null, rev.id),
          }}
        />

        <section aria-labelledby="summary" className="space-y-3">
          <h2 id="summary" className="text-lg font-semibold">Summary</h2>
          {a?.state === "done" ? (
            <dl className="grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-6" data-testid="revision-summary">
              {(
                [
                  ["Units", a.units ?? "—", false],
                  ["Work offsets", a.workOffsets.join(", ") || "none", false],
                  ["Tools", `${a.toolCount ?? 0} (${plural(a.toolChangeCount ?? 0, "change")})`, true],
                  ["Order", a.toolOrder ? TOOL_ORDER[a.toolOrder] ?? a.toolOrder : "—", false],
                  ["Run time (estimate)", formatDuration(a.totalSeconds), true],
                  ["Cutting · rapid", `${formatDuration(a.feedSeconds)} · ${formatDuration(a.rapidSeconds)}`, true],
                ] as const
              ).map(([k, v, numeric]) => (
                <div key={k} className="rounded-lg border border-rule bg-panel p-3">
                  <dt className="text-xs uppercase tracking-wide text-ink-soft">{k}</dt>
                  <dd className={`mt-1 font-semibold ${numeric ? "tabular-nums" : ""}`}>{v}</dd>
                </div>
              ))}
            </dl>
          ) : (
            <EmptyState title="The summary appears when the server's check is done." />
          )}
          {result && <BoundsList result={result} />}
        </section>

        <section aria-labelledby="findings" className="space-y-3">
          <h2 id="findings" className="text-lg font-semibold">
            Findings{" "}
            {a?.state === "done" && (
              <span className="text-base font-normal text-ink-soft">
                {plural(a.errorCount ?? 0, "error")}, {plural(a.warningCount ?? 0, "warning")}, {plural(a.infoCount ?? 0, "note")}
              </span>
            )}
          </h2>
          {a?.state === "done" ? (
            <FindingsList findings={rev.findings} counts={rev.findingCounts} />
          ) : (
            <p className="text-sm text-ink-soft">Findings appear when the server&apos;s check is done.</p>
          )}
        </section>

        <section aria-label="Code and 3D view" className="grid gap-4 lg:grid-cols-2" data-testid="revision-workspace">
          <CodePane className="h-[36rem]" />
          <RevisionBackplot revisionId={rev.id} className="h-[36rem]" />
        </section>

        {result && (
          <>
            <section aria-labelledby="tools" className="space-y-3">
              <h2 id="tools" className="text-lg font-semibold">Tools</h2>
              <ToolTable result={result} />
            </section>
            <section aria-labelledby="offsets" className="space-y-3">
              <h2 id="offsets" className="text-lg font-semibold">Work offsets</h2>
              <OffsetTable result={result} machineOffsets={machineOffsets.offsets} />
            </section>
            <section aria-labelledby="time" className="grid gap-6 rounded-lg border border-rule bg-panel p-5 lg:grid-cols-2">
              <h2 id="time" className="text-lg font-semibold lg:col-span-2">Where the time goes</h2>
              <TimeChart title="Per tool" testId="time-per-tool" bars={result.tools.map((t) => ({ label: `T${t.number}`, seconds: t.time.totalSeconds }))} />
              <TimeChart title="Per work offset" testId="time-per-offset" bars={result.workOffsets.map((o) => ({ label: o.code, seconds: o.time.totalSeconds }))} />
            </section>
          </>
        )}

        <section aria-labelledby="signatures" className="space-y-3 rounded-lg border border-rule bg-panel p-5">
          <h2 id="signatures" className="text-lg font-semibold">Signatures</h2>
          <SignatureHistory signatures={rev.signatures} />
        </section>
      </div>
    </RevisionWorkspace>
  );
}
