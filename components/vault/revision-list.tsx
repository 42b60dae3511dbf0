import Link from "next/link";
import type { RevisionSummary } from "@/lib/dal/views";
import { formatBytes, formatDuration, formatWhen, shortSha } from "./format";
import { AnalysisBadge, FindingCounts, StatusBadge } from "./status-badge";

/** A program's revisions, newest first, each with its check summary; the released one stands out. */
export function RevisionList({ revisions, releasedId }: { revisions: RevisionSummary[]; releasedId: number | null }) {
  return (
    <ol className="space-y-3" data-testid="revision-list">
      {revisions.map((r) => {
        const a = r.analysis;
        const released = r.id === releasedId;
        return (
          <li
            key={r.id}
            data-revision={r.number}
            data-status={r.status}
            className={`rounded-lg border bg-panel p-4 ${released ? "border-ok border-l-8" : "border-rule"}`}
          >
            <div className="flex flex-wrap items-center gap-x-3 gap-y-2">
              <Link href={`/revisions/${r.id}`} className="text-lg font-semibold text-brand hover:underline">
                Revision {r.number}
              </Link>
              <StatusBadge status={r.status} />
              {released && <span className="text-sm font-semibold text-ok">This is the revision to run</span>}
              <span className="text-sm text-ink-soft">
                {r.fileName} · {formatBytes(r.size)} · {r.lineCount.toLocaleString("en")} lines
              </span>
              <span className="ml-auto flex gap-2 text-sm">
                {released && (
                  <Link href={`/revisions/${r.id}/run`} className="rounded-md bg-ok px-3 py-1.5 font-semibold text-white hover:opacity-90">
                    Check before cycle start
                  </Link>
                )}
                <a href={`/api/revisions/${r.id}/file`} download className="rounded-md border border-rule px-3 py-1.5 hover:bg-paper">
                  Download
                </a>
              </span>
            </div>
            <p className="mt-1 text-sm text-ink-soft">
              Uploaded by {r.uploadedBy.name} on <span className="tabular-nums">{formatWhen(r.createdAt)}</span>
              {r.decidedBy && r.decidedAt && (
                <>
                  {" "}· {r.status === "rejected" ? "rejected" : "released"} by {r.decidedBy.name} on{" "}
                  <span className="tabular-nums">{formatWhen(r.decidedAt)}</span>
                </>
              )}
              {" "}· SHA-256 <code className="font-mono" title={r.sha256}>{shortSha(r.sha256)}…</code>
            </p>
            {r.note && <p className="mt-1 text-sm">“{r.note}”</p>}
            <dl className="mt-3 grid grid-cols-2 gap-x-4 gap-y-2 text-sm sm:grid-cols-3 lg:grid-cols-6">
              <div>
                <dt className="text-ink-soft">Server check</dt>
                <dd>
                  <AnalysisBadge state={a?.state} />
                  {a && !a.current && a.state === "done" && <span className="block text-xs text-ink-soft">older engine; re-check queued</span>}
                </dd>
              </div>
              <div>
                <dt className="text-ink-soft">Units</dt>
                <dd className="font-medium">{a?.units ?? "—"}</dd>
              </div>
              <div>
                <dt className="text-ink-soft">Work offsets</dt>
                <dd className="font-medium">{a && a.state === "done" ? a.workOffsets.join(", ") || "none" : "—"}</dd>
              </div>
              <div>
                <dt className="text-ink-soft">Tools</dt>
                <dd className="font-medium tabular-nums">
                  {a?.toolCount ?? "—"}
                  {a?.toolChangeCount ? <span className="font-normal text-ink-soft"> ({a.toolChangeCount} changes)</span> : null}
                </dd>
              </div>
              <div>
                <dt className="text-ink-soft">Run time</dt>
                <dd className="font-medium tabular-nums">{formatDuration(a?.totalSeconds)}</dd>
              </div>
              <div>
                <dt className="text-ink-soft">Findings</dt>
                <dd>
                  <FindingCounts errors={a?.errorCount} warnings={a?.warningCount} />
                </dd>
              </div>
            </dl>
            {a?.state === "failed" && a.error && <p className="mt-2 text-sm text-bad">The check failed: {a.error}</p>}
          </li>
        );
      })}
    </ol>
  );
}
