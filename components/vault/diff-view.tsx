"use client";

import { useVirtualizer } from "@tanstack/react-virtual";
import { useMemo, useRef } from "react";
import type { DiffHunk, DiffLine } from "@/lib/compare/line-diff";

const ROW = 20;

type Row = { kind: "hunk"; hunk: DiffHunk } | { kind: "line"; line: DiffLine };

const TONE: Record<DiffLine["kind"], string> = {
  context: "",
  removed: "bg-bad/10",
  added: "bg-ok/10",
};
const MARK: Record<DiffLine["kind"], string> = { context: " ", removed: "−", added: "+" };

/**
 * The changed hunks of a line diff, unified, with the old and the new line number of each line. Virtualised: a diff
 * of thousands of lines keeps only the rows in view in the page.
 */
export function DiffView({ hunks, aLabel, bLabel }: { hunks: DiffHunk[]; aLabel: string; bLabel: string }) {
  const rows = useMemo<Row[]>(() => hunks.flatMap((h) => [{ kind: "hunk", hunk: h } as Row, ...h.lines.map((line) => ({ kind: "line", line }) as Row)]), [hunks]);
  const scrollRef = useRef<HTMLDivElement>(null);
  const v = useVirtualizer({ count: rows.length, getScrollElement: () => scrollRef.current, estimateSize: () => ROW, overscan: 30 });
  const digits = Math.max(3, ...hunks.map((h) => String(Math.max(h.aStart + h.aCount, h.bStart + h.bCount)).length));
  const height = Math.min(36 * 16, rows.length * ROW + 2);
  return (
    <div className="rounded-lg border border-rule bg-panel" data-testid="line-diff">
      <div className="flex gap-4 border-b border-rule px-3 py-2 text-xs text-ink-soft">
        <span>
          <span className="font-mono text-bad">−</span> only in {aLabel}
        </span>
        <span>
          <span className="font-mono text-ok">+</span> only in {bLabel}
        </span>
        <span>Columns: line in {aLabel}, line in {bLabel}</span>
      </div>
      <div ref={scrollRef} tabIndex={0} aria-label="Changed lines" className="relative overflow-auto font-mono text-[13px] leading-5" style={{ height }}>
        <div style={{ height: v.getTotalSize(), position: "relative", minWidth: "100%" }}>
          {v.getVirtualItems().map((item) => {
            const row = rows[item.index]!;
            const style = { height: ROW, transform: `translateY(${item.start}px)` };
            if (row.kind === "hunk") {
              const h = row.hunk;
              return (
                <div key={item.key} style={style} className="absolute left-0 w-max min-w-full bg-info/10 px-3 text-info">
                  Lines {h.aStart}–{h.aStart + Math.max(0, h.aCount - 1)} of {aLabel} · {h.bStart}–{h.bStart + Math.max(0, h.bCount - 1)} of {bLabel}
                </div>
              );
            }
            const l = row.line;
            return (
              <div key={item.key} style={style} data-kind={l.kind} data-a={l.a ?? ""} data-b={l.b ?? ""} className={`absolute left-0 flex w-max min-w-full whitespace-pre ${TONE[l.kind]}`}>
                <span className="sticky left-0 flex shrink-0 select-none bg-paper text-right tabular-nums text-ink-soft">
                  <span className="pr-2" style={{ width: `${digits + 1}ch` }}>{l.a ?? ""}</span>
                  <span className="border-r border-rule pr-2" style={{ width: `${digits + 1}ch` }}>{l.b ?? ""}</span>
                </span>
                <span className={`w-5 shrink-0 text-center ${l.kind === "removed" ? "text-bad" : l.kind === "added" ? "text-ok" : "text-ink-soft"}`}>{MARK[l.kind]}</span>
                <span className="pr-4">{l.text}</span>
              </div>
            );
          })}
        </div>
      </div>
    </div>
  );
}
