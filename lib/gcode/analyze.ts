/**
 * The engine's entry point: one Engine runs over the program (scan.ts drives it), then the run's state becomes the
 * Analysis: parts per cycle, the fixture checks, the tool order, the per-tool and per-offset summaries, findings in
 * order, coverage.
 */
import type { AnalyzeOptions, Analysis, FindingCount, Toolpath, ToolSummary, WorkOffsetSummary } from "./types";
import { RULE_IDS } from "./types";
import { classifyToolOrder, findParts } from "./parts";
import { ENGINE_VERSION } from "./version";
import { offsetCode } from "./codes";
import { BSTRIDE, SSTRIDE, S_FEED_LEN, S_RAPID_LEN, boxOut, range, timeOut } from "./bounds";
import { Engine } from "./state";
import { fixtureFindings } from "./findings";
// the files that add the Engine's methods, by concern
import "./scan";
import "./block";
import "./flow";
import "./settings";
import "./modal";
import "./tools";
import "./motion";
import "./arcs";
import "./cycles";
import "./accounting";
import "./path-writer";

export { trapezoidSeconds } from "./accounting";

/**
 * Analyses an NC program: modal interpretation, work offsets, tools, bounds, time, findings and the toolpath.
 * Never throws on bad input; a string is encoded to UTF-8 bytes first.
 */
export function analyzeProgram(source: string | Uint8Array, options: AnalyzeOptions = {}): Analysis {
  const bytes = typeof source === "string" ? new TextEncoder().encode(source) : source;
  const e = new Engine(bytes, options);
  e.run();
  const toolpath: Toolpath = { segmentCount: e.tpN, ...e.takePath(), chordTolerance: e.tol };
  // parts: found from the program unless given, then the fixture checks and the tool order
  const cutOffsets = new Set<number>();
  for (const r of e.runs) cutOffsets.add(r.offset);
  const pathWhole = e.wantPath && !e.tpFull;
  const tol = e.units === "inch" ? 0.0001 : 0.001;
  const parts = options.parts ?? (pathWhole && cutOffsets.size >= 2 ? findParts(toolpath, e.runs, tol) : 1);
  const loads = e.tools.map((t) => t.loads);
  const toolOrder = classifyToolOrder(e.runs, loads, parts);
  if (pathWhole && cutOffsets.size >= 2 && parts >= 2) fixtureFindings(e, toolpath, parts, tol);
  const tools: ToolSummary[] = e.tools.map((t, i) => {
    const slot = (i + 1) * SSTRIDE;
    const bo = (i + 1) * BSTRIDE;
    const d = e.descs.get(t.number);
    const bounds = boxOut(e.tB, bo);
    return {
      number: t.number,
      description: d ? d.text : null,
      descriptionLine: d ? d.line : null,
      lengthOffsets: t.h,
      diameterOffsets: t.d,
      spindle: range(e.tSpinMin[i]!, e.tSpinMax[i]!),
      feed: range(e.tFeedMin[i]!, e.tFeedMax[i]!),
      feedLength: e.tS[slot + S_FEED_LEN]!,
      rapidLength: e.tS[slot + S_RAPID_LEN]!,
      time: timeOut(e.tS, slot),
      lowestZ: bounds.min.z,
      firstLine: t.firstLine,
      lastLine: t.lastLine,
      loads: t.loads,
      offsets: t.offsets.map((oi) => offsetCode(e.offsets[oi]!.num)),
      bounds,
      cuttingBounds: boxOut(e.tB, bo + 6),
    };
  });
  const workOffsets: WorkOffsetSummary[] = e.offsets.map((o, i) => {
    const origin = e.origins.get(o.num);
    const known = origin && origin.every((v) => Number.isFinite(v));
    return {
      code: offsetCode(o.num),
      number: o.num,
      firstLine: o.firstLine,
      firstMotionLine: o.firstMotion,
      lastLine: o.last,
      origin: known ? { x: origin[0]!, y: origin[1]!, z: origin[2]! } : null,
      originSource: known ? (e.originSource.get(o.num) ?? null) : null,
      bounds: boxOut(e.oB, i * BSTRIDE),
      cuttingBounds: boxOut(e.oB, i * BSTRIDE + 6),
      tools: o.tools,
      feedLength: e.oS[i * SSTRIDE + S_FEED_LEN]!,
      rapidLength: e.oS[i * SSTRIDE + S_RAPID_LEN]!,
      time: timeOut(e.oS, i * SSTRIDE),
    };
  });
  // findings: listed per rule in line order, rules in RULE_IDS order
  const order = new Map<string, number>(RULE_IDS.map((r, i) => [r, i]));
  const findings = e.findings.sort((a, b) => order.get(a.rule)! - order.get(b.rule)! || a.line - b.line);
  const findingCounts: FindingCount[] = [];
  for (let i = 0; i < RULE_IDS.length; i++) {
    const c = e.fCount[i]!;
    if (c === 0) continue;
    const s = e.fSev[i]!;
    findingCounts.push({ rule: RULE_IDS[i]!, severity: s === 3 ? "error" : s === 2 ? "warning" : "info", count: c, listed: Math.min(c, e.cap) });
  }
  let neLines: number[] = [];
  const bits = e.neBits;
  if (bits) {
    neLines = [];
    for (let i = 0; i < bits.length && neLines.length < 1000; i++) {
      const v = bits[i]!;
      if (v === 0) continue;
      for (let k = 0; k < 8; k++) if (v & (1 << k) && neLines.length < 1000) neLines.push(i * 8 + k);
    }
  }
  const notEvaluated = Math.min(e.neCount, e.codeLines);
  return {
    version: ENGINE_VERSION,
    dialect: e.dialect,
    arcTolerance: e.arcTolerance(e.units === "inch"),
    coverage: {
      codeLines: e.codeLines,
      notEvaluatedLines: notEvaluated,
      evaluatedShare: e.codeLines > 0 ? (e.codeLines - notEvaluated) / e.codeLines : 1,
      lines: neLines,
    },
    units: e.units,
    unitsDeclared: e.unitsDeclared,
    lineCount: e.lineCount,
    byteLength: bytes.length,
    blocksExecuted: e.blocks,
    programNumber: e.programNumber,
    endLine: e.endLine,
    workOffsets,
    tools,
    toolChanges: e.changes,
    toolChangeCount: e.changeCount,
    toolOrder,
    parts,
    bounds: boxOut(e.gB, 0),
    cuttingBounds: boxOut(e.gB, 6),
    machineMoves: { count: e.machineCount, lines: e.machineLines, bounds: boxOut(e.mB, 0), length: e.machineLen },
    feedLength: e.feedLen,
    rapidLength: e.rapidLen,
    time: timeOut(e.gS, 0),
    stops: e.stops,
    motionCounts: e.counts,
    spindle: range(e.spinMin, e.spinMax),
    safeZ: e.safeZ,
    findings,
    findingCounts,
    assumptions: e.assumptions,
    toolpath,
  };
}
