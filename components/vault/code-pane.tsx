"use client";

import { useQuery } from "@tanstack/react-query";
import { useVirtualizer } from "@tanstack/react-virtual";
import { useEffect, useRef, useState } from "react";
import { LineIndex } from "@/lib/line-index";
import { useRevisionWorkspace } from "./revision-workspace";

/** Row height in px; fixed so the virtual list needs no measuring. */
const ROW = 20;
/**
 * Lines per page of the pane. Browsers cap an element's height (about 17 million px in some), so a file of
 * millions of lines is shown in pages of half a million; selecting a line opens its page.
 */
export const CODE_PAGE_LINES = 500_000;

/** The revision's exact bytes, fetched once from the file route and indexed lazily. */
function useRevisionLines(revisionId: number, lineCount: number) {
  return useQuery({
    queryKey: ["revision-bytes", revisionId],
    queryFn: async ({ signal }) => {
      const res = await fetch(`/api/revisions/${revisionId}/file`, { signal });
      if (!res.ok) throw new Error(`the server answered ${res.status}`);
      return new LineIndex(new Uint8Array(await res.arrayBuffer()), lineCount);
    },
    staleTime: Infinity,
    gcTime: 60_000,
    retry: 1,
    structuralSharing: false,
  });
}

/**
 * The program text with line numbers, virtualised: only the rows in view (and a few around them) exist in the
 * page, so a million-line file scrolls like a short one. A selected line (from a finding, a table or the 3D view)
 * is scrolled to the middle and marked.
 */
export function CodePane({ className = "" }: { className?: string }) {
  const { revisionId, lineCount, selection, selectLine } = useRevisionWorkspace();
  const { data: index, error, isPending, refetch } = useRevisionLines(revisionId, lineCount);
  const scrollRef = useRef<HTMLDivElement>(null);
  const [pageStart, setPageStart] = useState(0);
  const [goto, setGoto] = useState("");

  const count = Math.max(0, Math.min(CODE_PAGE_LINES, lineCount - pageStart));
  const virtualizer = useVirtualizer({
    count,
    getScrollElement: () => scrollRef.current,
    estimateSize: () => ROW,
    overscan: 40,
  });

  // A new selection from elsewhere opens its page, then scrolls its line to the middle (once the bytes are in).
  const seq = selection?.seq;
  useEffect(() => {
    if (!selection || selection.source === "code") return;
    setPageStart(Math.floor((selection.line - 1) / CODE_PAGE_LINES) * CODE_PAGE_LINES);
  }, [seq]);
  useEffect(() => {
    if (!selection || !index || selection.source === "code") return;
    const i = selection.line - 1 - pageStart;
    if (i >= 0 && i < count) virtualizer.scrollToIndex(i, { align: "center" });
  }, [seq, index, pageStart, count]);

  const digits = String(lineCount).length;
  const pages = Math.ceil(lineCount / CODE_PAGE_LINES);

  return (
    <section aria-label="Program code" className={`flex min-h-0 flex-col rounded-lg border border-rule bg-panel ${className}`} data-testid="code-pane">
      <div className="flex flex-wrap items-center gap-2 border-b border-rule px-3 py-2 text-sm">
        <h3 className="font-semibold">Code</h3>
        <span className="text-ink-soft tabular-nums">{lineCount.toLocaleString("en")} lines</span>
        {selection && (
          <span className="text-ink-soft" data-testid="code-selected">
            · line <span className="tabular-nums">{selection.line}</span> selected
          </span>
        )}
        <form
          className="ml-auto flex items-center gap-1"
          onSubmit={(e) => {
            e.preventDefault();
            selectLine(Number(goto), "goto");
          }}
        >
          <label htmlFor="goto-line" className="text-ink-soft">
            Go to line
          </label>
          <input
            id="goto-line"
            value={goto}
            onChange={(e) => setGoto(e.target.value.replace(/\D/g, ""))}
            inputMode="numeric"
            className="w-24 rounded border border-rule px-2 py-1 tabular-nums"
          />
          <button type="submit" className="rounded border border-rule px-2 py-1 hover:bg-paper">
            Go
          </button>
        </form>
      </div>
      {pages > 1 && (
        <div className="flex items-center gap-2 border-b border-rule px-3 py-1.5 text-xs">
          <span className="text-ink-soft">
            Lines {(pageStart + 1).toLocaleString("en")}–{(pageStart + count).toLocaleString("en")}
          </span>
          <button type="button" disabled={pageStart === 0} onClick={() => setPageStart(pageStart - CODE_PAGE_LINES)} className="rounded border border-rule px-2 py-0.5 disabled:opacity-50">
            Earlier lines
          </button>
          <button
            type="button"
            disabled={pageStart + CODE_PAGE_LINES >= lineCount}
            onClick={() => setPageStart(pageStart + CODE_PAGE_LINES)}
            className="rounded border border-rule px-2 py-0.5 disabled:opacity-50"
          >
            Later lines
          </button>
        </div>
      )}
      {isPending ? (
        <p role="status" className="p-4 text-sm text-ink-soft">
          Loading the code…
        </p>
      ) : error ? (
        <div role="alert" className="p-4 text-sm text-bad">
          The code could not be loaded ({error.message}).{" "}
          <button type="button" onClick={() => refetch()} className="underline">
            Try again
          </button>
        </div>
      ) : (
        <div
          ref={scrollRef}
          tabIndex={0}
          aria-label="Program text; use the arrow keys to scroll"
          className="relative min-h-0 flex-1 overflow-auto font-mono text-[13px] leading-5"
          data-testid="code-scroll"
        >
          <div style={{ height: virtualizer.getTotalSize(), position: "relative", minWidth: "100%" }}>
            {virtualizer.getVirtualItems().map((item) => {
              const line = pageStart + item.index + 1;
              const selected = selection?.line === line;
              return (
                <div
                  key={item.key}
                  data-line={line}
                  data-selected={selected || undefined}
                  aria-current={selected ? "true" : undefined}
                  onClick={() => selectLine(line, "code")}
                  className={`absolute left-0 flex w-max min-w-full cursor-text whitespace-pre ${selected ? "bg-warn/25" : "hover:bg-paper"}`}
                  style={{ height: ROW, transform: `translateY(${item.start}px)` }}
                >
                  <span
                    className={`sticky left-0 shrink-0 select-none border-r border-rule pr-2 text-right tabular-nums ${selected ? "bg-warn/40 font-semibold text-ink" : "bg-paper text-ink-soft"}`}
                    style={{ width: `${digits + 2}ch` }}
                  >
                    {line}
                  </span>
                  <span className="pl-3 pr-4">{index.line(line - 1)}</span>
                </div>
              );
            })}
          </div>
        </div>
      )}
    </section>
  );
}
