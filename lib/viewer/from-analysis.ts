import type { Analysis } from "../gcode/types";
import { anchorLines } from "./anchors";
import type { ViewerMeta, ViewerPath } from "./types";

/** The viewer's path and summary from an analysis made with `segmentTimes: true` (its arrays are used, not copied). */
export function viewerDataFromAnalysis(a: Analysis): { path: ViewerPath; meta: ViewerMeta } {
  const tp = a.toolpath;
  if (!tp.time || !tp.startTime) throw new Error("the analysis has no segment times (option segmentTimes)");
  const path: ViewerPath = {
    segmentCount: tp.segmentCount,
    positions: tp.positions,
    line: tp.line,
    kind: tp.kind,
    tool: tp.tool,
    offset: tp.offset,
    time: tp.time,
    startTime: tp.startTime,
  };
  const anchors = anchorLines(tp, a.findings.map((f) => f.line));
  const meta: ViewerMeta = {
    engineVersion: a.version,
    units: a.units,
    lineCount: a.lineCount,
    chordTolerance: tp.chordTolerance,
    safeZ: a.safeZ,
    totalSeconds: a.time.totalSeconds,
    bounds: a.bounds,
    tools: a.tools.map((t) => ({ number: t.number, description: t.description })),
    workOffsets: a.workOffsets.map((o) => ({ code: o.code, origin: o.origin })),
    findings: a.findings.map((f, i) => ({
      rule: f.rule,
      severity: f.severity,
      line: f.line,
      message: f.message,
      hint: f.hint,
      segment: anchors.segment[i]!,
      atEnd: anchors.atEnd[i] === 1,
    })),
    truncated: a.findingCounts.some((c) => c.rule === "toolpath-truncated"),
  };
  return { path, meta };
}
