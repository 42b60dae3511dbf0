"use client";

import type { AnalysisState } from "@/db/schema";
import { useRevisionWorkspace } from "./revision-workspace";

/** What the revision page hands the 3D view. */
export interface BackplotSlotProps {
  revisionId: number;
  /** Program units of the analysis (null until the server's check is done). */
  units: "mm" | "inch" | null;
  analysisState: AnalysisState | null;
  className?: string;
}

/**
 * The place of the 3D backplot on the revision page, beside the code pane and as tall as it.
 *
 * For the viewer that replaces this placeholder (components/viewer): render a client-only canvas here (next/dynamic
 * with ssr:false from a "use client" file). The toolpath is not stored on the server; build it in the browser from
 * the exact bytes (`GET /api/revisions/{id}/file`, cached by TanStack Query under ["revision-bytes", id] as a
 * LineIndex whose `bytes` are the file) with analyzeProgram in a Web Worker. Share the selected line through
 * useRevisionWorkspace(): read `selection.line` to mark that line's moves, and call `selectLine(line, "backplot")`
 * when a move is picked, so the code pane scrolls to it.
 */
export function BackplotSlot({ revisionId, units, analysisState, className = "" }: BackplotSlotProps) {
  const { selection } = useRevisionWorkspace();
  return (
    <section
      aria-label="3D backplot"
      data-testid="backplot-slot"
      data-revision={revisionId}
      className={`flex min-h-0 flex-col rounded-lg border border-dashed border-ink-soft/40 bg-[linear-gradient(135deg,var(--color-paper)_25%,transparent_25%,transparent_50%,var(--color-paper)_50%,var(--color-paper)_75%,transparent_75%)] bg-[length:24px_24px] ${className}`}
    >
      <div className="border-b border-rule bg-panel/90 px-3 py-2 text-sm">
        <h3 className="font-semibold">3D backplot</h3>
      </div>
      <div className="flex flex-1 flex-col items-center justify-center gap-2 p-6 text-center">
        <p className="font-medium">The 3D view of this revision&apos;s toolpath comes here.</p>
        <p className="max-w-sm text-sm text-ink-soft">
          Until then, check the moves in the code, the tool table and the findings; units {units ?? "not known yet"}, server check{" "}
          {analysisState ?? "not started"}.
        </p>
        {selection && <p className="text-sm text-ink-soft">Line {selection.line} is selected in the code.</p>}
      </div>
    </section>
  );
}
