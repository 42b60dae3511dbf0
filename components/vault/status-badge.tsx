import type { AnalysisState, RevisionStatus } from "@/db/schema";

const STATUS: Record<RevisionStatus, { label: string; className: string }> = {
  draft: { label: "Draft", className: "border-ink-soft/40 bg-paper text-ink-soft" },
  submitted: { label: "Waiting for review", className: "border-info/40 bg-info/10 text-info" },
  released: { label: "Released", className: "border-ok/50 bg-ok/10 text-ok" },
  rejected: { label: "Rejected", className: "border-bad/40 bg-bad/10 text-bad" },
  superseded: { label: "Superseded", className: "border-rule bg-paper text-ink-soft line-through decoration-1" },
};

/** A revision's place in the review workflow. */
export function StatusBadge({ status }: { status: RevisionStatus }) {
  const s = STATUS[status];
  return (
    <span data-status={status} className={`inline-flex items-center rounded border px-2 py-0.5 text-xs font-semibold whitespace-nowrap ${s.className}`}>
      {s.label}
    </span>
  );
}

export const STATUS_LABELS: Record<RevisionStatus, string> = Object.fromEntries(
  Object.entries(STATUS).map(([k, v]) => [k, v.label]),
) as Record<RevisionStatus, string>;

const ANALYSIS: Record<AnalysisState, { label: string; className: string }> = {
  queued: { label: "Check queued", className: "text-ink-soft" },
  running: { label: "Checking…", className: "text-info" },
  done: { label: "Checked", className: "text-ok" },
  failed: { label: "Check failed", className: "text-bad" },
};

/** Where the server's analysis of a revision stands. */
export function AnalysisBadge({ state }: { state: AnalysisState | null | undefined }) {
  const s = state ? ANALYSIS[state] : { label: "Not checked", className: "text-ink-soft" };
  return (
    <span data-analysis={state ?? "none"} className={`text-xs font-medium whitespace-nowrap ${s.className}`}>
      {s.label}
    </span>
  );
}

/** Error and warning counts, side by side; "—" until the analysis is done. */
export function FindingCounts({ errors, warnings }: { errors: number | null | undefined; warnings: number | null | undefined }) {
  if (errors === null || errors === undefined) return <span className="text-ink-soft">—</span>;
  return (
    <span className="inline-flex gap-2 whitespace-nowrap tabular-nums">
      <span className={errors > 0 ? "font-semibold text-bad" : "text-ink-soft"}>
        {errors} error{errors === 1 ? "" : "s"}
      </span>
      <span className={(warnings ?? 0) > 0 ? "text-warn" : "text-ink-soft"}>
        {warnings ?? 0} warning{warnings === 1 ? "" : "s"}
      </span>
    </span>
  );
}
