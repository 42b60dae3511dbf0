"use client";

import { createContext, useCallback, useContext, useMemo, useState, type ReactNode } from "react";

/** Who asked for a line: a finding, the tool table, the go-to box, the code pane itself, or the 3D view. */
export type LineSource = "finding" | "table" | "goto" | "code" | "backplot";

export interface LineSelection {
  /** 1-based physical line of the revision's file. */
  line: number;
  source: LineSource;
  /** Bumped on every selection, so selecting the same line again scrolls to it again. */
  seq: number;
}

interface RevisionWorkspaceValue {
  revisionId: number;
  lineCount: number;
  selection: LineSelection | null;
  selectLine: (line: number, source: LineSource) => void;
}

const Ctx = createContext<RevisionWorkspaceValue | null>(null);

/**
 * What the parts of a revision page share: the selected line. A finding, a table row or the 3D view selects a
 * line; the code pane scrolls to it and marks it; the backplot can mark the moves of that line.
 */
export function RevisionWorkspace({ revisionId, lineCount, children }: { revisionId: number; lineCount: number; children: ReactNode }) {
  const [selection, setSelection] = useState<LineSelection | null>(null);
  const selectLine = useCallback(
    (line: number, source: LineSource) => {
      if (!Number.isInteger(line) || line < 1 || line > lineCount) return;
      setSelection((s) => ({ line, source, seq: (s?.seq ?? 0) + 1 }));
    },
    [lineCount],
  );
  const value = useMemo(() => ({ revisionId, lineCount, selection, selectLine }), [revisionId, lineCount, selection, selectLine]);
  return <Ctx.Provider value={value}>{children}</Ctx.Provider>;
}

/** The revision page's shared selection; throws outside <RevisionWorkspace>. */
export function useRevisionWorkspace(): RevisionWorkspaceValue {
  const v = useContext(Ctx);
  if (!v) throw new Error("useRevisionWorkspace outside <RevisionWorkspace>");
  return v;
}

/** A line number that selects its line in the code pane. */
export function LineLink({ line, source = "table", children }: { line: number; source?: LineSource; children?: ReactNode }) {
  const { selectLine } = useRevisionWorkspace();
  if (line < 1) return <span className="text-ink-soft">whole program</span>;
  return (
    <button
      type="button"
      onClick={() => selectLine(line, source)}
      className="font-mono text-brand tabular-nums underline decoration-dotted underline-offset-2 hover:decoration-solid"
      title={`Show line ${line} in the code`}
    >
      {children ?? line}
    </button>
  );
}
