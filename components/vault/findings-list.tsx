"use client";

import type { RevisionFindingRow } from "@/lib/dal/revisions";
import type { Severity } from "@/lib/gcode/types";
import { useRevisionWorkspace } from "./revision-workspace";

const GROUPS: { severity: Severity; title: string; tone: string; mark: string }[] = [
  { severity: "error", title: "Errors", tone: "border-bad/40 text-bad", mark: "bg-bad" },
  { severity: "warning", title: "Warnings", tone: "border-warn/40 text-warn", mark: "bg-warn" },
  { severity: "info", title: "Notes", tone: "border-info/40 text-info", mark: "bg-info" },
];

/**
 * The server's findings grouped by severity, each with its line: a click shows that line in the code pane.
 * `counts` tells how many each rule found in all, when more were found than listed.
 */
export function FindingsList({
  findings,
  counts,
}: {
  findings: RevisionFindingRow[];
  counts: { rule: string; severity: Severity; count: number; listed: number }[];
}) {
  const { selection, selectLine } = useRevisionWorkspace();
  if (findings.length === 0) {
    return (
      <p className="rounded-md border border-ok/40 bg-ok/10 px-3 py-2 text-sm text-ok" data-testid="no-findings">
        No findings: the checks found nothing to report. A dry run is still the last word.
      </p>
    );
  }
  const unlisted = counts.filter((c) => c.count > c.listed);
  return (
    <div className="space-y-3" data-testid="findings">
      {GROUPS.map((g) => {
        const list = findings.filter((f) => f.severity === g.severity);
        if (list.length === 0) return null;
        const total = counts.filter((c) => c.severity === g.severity).reduce((n, c) => n + c.count, 0) || list.length;
        return (
          <details key={g.severity} open={g.severity !== "info"} className={`rounded-lg border bg-panel ${g.tone}`} data-severity={g.severity}>
            <summary className="cursor-pointer px-3 py-2 font-semibold">
              {g.title} <span className="tabular-nums">({total})</span>
            </summary>
            <ul className="max-h-72 overflow-y-auto border-t border-rule text-sm text-ink">
              {list.map((f) => {
                const selected = selection?.line === f.line && f.line > 0;
                return (
                  <li key={f.id} className={`border-b border-rule/60 last:border-0 ${selected ? "bg-warn/15" : ""}`}>
                    <button
                      type="button"
                      disabled={f.line < 1}
                      onClick={() => selectLine(f.line, "finding")}
                      className="flex w-full gap-3 px-3 py-2 text-left hover:bg-paper disabled:cursor-default"
                      data-finding-line={f.line}
                      data-rule={f.rule}
                    >
                      <span aria-hidden className={`mt-1.5 size-2 shrink-0 rounded-full ${g.mark}`} />
                      <span className="w-20 shrink-0 font-mono text-xs tabular-nums text-brand">{f.line > 0 ? `line ${f.line}` : "program"}</span>
                      <span className="min-w-0">
                        <span className="font-medium">{f.message}</span>
                        {f.hint && <span className="block text-ink-soft">{f.hint}</span>}
                        <code className="text-xs text-ink-soft">{f.rule}</code>
                      </span>
                    </button>
                  </li>
                );
              })}
            </ul>
          </details>
        );
      })}
      {unlisted.length > 0 && (
        <p className="text-sm text-ink-soft">
          Not all are listed:{" "}
          {unlisted.map((c) => `${c.rule} found ${c.count} times (${c.listed} listed)`).join("; ")}.
        </p>
      )}
    </div>
  );
}
