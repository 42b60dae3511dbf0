/**
 * What changed in the checks between two analysed revisions: tools added, removed or changed, work offsets,
 * bounds, time, and findings new and resolved. Findings are matched on rule and message (line numbers move when
 * lines are added above them), counting repeats.
 */
import type { Bounds, Finding, StopSummary, ToolSummary, Units } from "../gcode/types";

/** The fields of a stored analysis the diff reads (a subset of the engine's Analysis). */
export interface ComparableAnalysis {
  units: Units;
  lineCount: number;
  tools: Pick<ToolSummary, "number" | "description" | "lengthOffsets" | "diameterOffsets" | "loads" | "lowestZ" | "time" | "spindle" | "feed">[];
  workOffsets: { code: string; time: { totalSeconds: number } }[];
  toolOrder: string;
  toolChangeCount: number;
  bounds: Bounds;
  cuttingBounds: Bounds;
  time: { totalSeconds: number; feedSeconds: number; rapidSeconds: number; dwellSeconds: number; toolChangeSeconds: number };
  findings: Pick<Finding, "rule" | "severity" | "line" | "message">[];
  stops?: Pick<StopSummary, "programStops" | "optionalStops">;
}

export interface Change<T> {
  from: T;
  to: T;
}

export interface ToolChangeEntry {
  number: number;
  changes: Record<string, Change<unknown>>;
}

export interface AnalysisDiff {
  units: Change<Units> | null;
  tools: { added: number[]; removed: number[]; changed: ToolChangeEntry[] };
  offsets: { added: string[]; removed: string[]; order: Change<string[]> | null };
  toolOrder: Change<string> | null;
  toolChangeCount: Change<number> | null;
  bounds: { all: Change<Bounds> | null; cutting: Change<Bounds> | null };
  time: Record<"totalSeconds" | "feedSeconds" | "rapidSeconds" | "dwellSeconds" | "toolChangeSeconds", Change<number> & { delta: number }>;
  findings: { new: AnalysisDiffFinding[]; resolved: AnalysisDiffFinding[]; unchanged: number };
}

export type AnalysisDiffFinding = Pick<Finding, "rule" | "severity" | "line" | "message">;

const same = (x: unknown, y: unknown) => JSON.stringify(x) === JSON.stringify(y);
const change = <T>(from: T, to: T): Change<T> | null => (same(from, to) ? null : { from, to });
/** Times are estimates: differences under 0.05 s are noise. */
const round = (n: number) => Math.round(n * 100) / 100;

export function analysisDiff(a: ComparableAnalysis, b: ComparableAnalysis): AnalysisDiff {
  const aTools = new Map(a.tools.map((t) => [t.number, t]));
  const bTools = new Map(b.tools.map((t) => [t.number, t]));
  const changed: ToolChangeEntry[] = [];
  for (const [n, tb] of bTools) {
    const ta = aTools.get(n);
    if (!ta) continue;
    const changes: Record<string, Change<unknown>> = {};
    const fields = {
      description: [ta.description, tb.description],
      lengthOffsets: [ta.lengthOffsets, tb.lengthOffsets],
      diameterOffsets: [ta.diameterOffsets, tb.diameterOffsets],
      loads: [ta.loads, tb.loads],
      lowestZ: [ta.lowestZ, tb.lowestZ],
      spindle: [ta.spindle, tb.spindle],
      feed: [ta.feed, tb.feed],
      totalSeconds: [round(ta.time.totalSeconds), round(tb.time.totalSeconds)],
    } as const;
    for (const [k, [x, y]] of Object.entries(fields)) {
      const c = change<unknown>(x, y);
      if (c) changes[k] = c;
    }
    if (Object.keys(changes).length > 0) changed.push({ number: n, changes });
  }
  const aCodes = a.workOffsets.map((o) => o.code);
  const bCodes = b.workOffsets.map((o) => o.code);

  const key = (f: AnalysisDiffFinding) => `${f.rule}\u0000${f.message}`;
  const pool = new Map<string, AnalysisDiffFinding[]>();
  for (const f of a.findings) {
    const list = pool.get(key(f));
    if (list) list.push(f);
    else pool.set(key(f), [f]);
  }
  const fresh: AnalysisDiffFinding[] = [];
  let unchanged = 0;
  for (const f of b.findings) {
    const list = pool.get(key(f));
    if (list && list.length > 0) {
      list.shift();
      unchanged++;
    } else fresh.push(pick(f));
  }
  const resolved = [...pool.values()].flat().map(pick);

  const t = (k: keyof AnalysisDiff["time"]) => ({ from: a.time[k], to: b.time[k], delta: b.time[k] - a.time[k] });
  return {
    units: change(a.units, b.units),
    tools: {
      added: [...bTools.keys()].filter((n) => !aTools.has(n)),
      removed: [...aTools.keys()].filter((n) => !bTools.has(n)),
      changed,
    },
    offsets: {
      added: bCodes.filter((c) => !aCodes.includes(c)),
      removed: aCodes.filter((c) => !bCodes.includes(c)),
      order: change(aCodes, bCodes),
    },
    toolOrder: change(a.toolOrder, b.toolOrder),
    toolChangeCount: change(a.toolChangeCount, b.toolChangeCount),
    bounds: { all: change(a.bounds, b.bounds), cutting: change(a.cuttingBounds, b.cuttingBounds) },
    time: {
      totalSeconds: t("totalSeconds"),
      feedSeconds: t("feedSeconds"),
      rapidSeconds: t("rapidSeconds"),
      dwellSeconds: t("dwellSeconds"),
      toolChangeSeconds: t("toolChangeSeconds"),
    },
    findings: { new: fresh, resolved, unchanged },
  };
}

const pick = (f: AnalysisDiffFinding): AnalysisDiffFinding => ({ rule: f.rule, severity: f.severity, line: f.line, message: f.message });
