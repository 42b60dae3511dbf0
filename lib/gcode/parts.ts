import type { Toolpath } from "./types";
import { MotionKind } from "./types";

/** A stretch of cutting under one tool and one work offset: toolpath segments [startSeg, endSeg). */
export interface CutRun {
  tool: number;
  offset: number;
  startSeg: number;
  endSeg: number;
}

/** A part whose toolpath for a tool differs from the first part's. */
export interface FixtureDifference {
  tool: number;
  refOffset: number;
  offset: number;
  line: number;
  reason: string;
}

function isCut(kind: number): boolean {
  return kind === MotionKind.Feed || kind === MotionKind.Arc || kind === MotionKind.CycleFeed;
}

/** Iterates the cutting segments of one (tool, offset) pair over its runs. */
class CutCursor {
  private r = 0;
  private i: number;
  constructor(
    private readonly tp: Toolpath,
    private readonly runs: CutRun[],
    private readonly tool: number,
    private readonly offset: number,
  ) {
    this.i = -1;
    this.skipToRun();
  }
  private skipToRun(): void {
    while (this.r < this.runs.length) {
      const run = this.runs[this.r]!;
      if (run.tool === this.tool && run.offset === this.offset) {
        if (this.i < run.startSeg) this.i = run.startSeg;
        return;
      }
      this.r++;
    }
  }
  /** Next cutting segment index, or -1. */
  next(): number {
    const tp = this.tp;
    while (this.r < this.runs.length) {
      const run = this.runs[this.r]!;
      const end = run.endSeg < 0 ? tp.segmentCount : run.endSeg;
      while (this.i < end) {
        const s = this.i++;
        if (isCut(tp.kind[s]!) && tp.tool[s] === this.tool && tp.offset[s] === this.offset) return s;
      }
      this.r++;
      this.skipToRun();
    }
    return -1;
  }
}

/**
 * For each tool, compares the cutting toolpath under each later work offset with the first offset's: same number of
 * cutting segments, same end points in part coordinates within `tol`. Returns the first difference per (tool, offset).
 */
export function compareFixtures(tp: Toolpath, runs: CutRun[], tol: number): FixtureDifference[] {
  const out: FixtureDifference[] = [];
  const offsetsOfTool = new Map<number, number[]>();
  for (const r of runs) {
    let l = offsetsOfTool.get(r.tool);
    if (!l) offsetsOfTool.set(r.tool, (l = []));
    if (!l.includes(r.offset)) l.push(r.offset);
  }
  const pos = tp.positions;
  for (const [tool, offs] of offsetsOfTool) {
    if (offs.length < 2) continue;
    const ref = offs[0]!;
    for (let k = 1; k < offs.length; k++) {
      const off = offs[k]!;
      const a = new CutCursor(tp, runs, tool, ref);
      const b = new CutCursor(tp, runs, tool, off);
      let na = 0;
      let lastB = -1;
      for (;;) {
        const sa = a.next();
        const sb = b.next();
        if (sa < 0 && sb < 0) break;
        if (sa < 0 || sb < 0) {
          let ca = na + (sa < 0 ? 0 : 1);
          let cb = na + (sb < 0 ? 0 : 1);
          while (sa >= 0 && a.next() >= 0) ca++;
          let firstExtra = sb;
          while (sb >= 0 && b.next() >= 0) cb++;
          const line = firstExtra >= 0 ? tp.line[firstExtra]! : lastB >= 0 ? tp.line[lastB]! : 0;
          out.push({ tool, refOffset: ref, offset: off, line, reason: `${cb} cutting moves instead of ${ca}` });
          break;
        }
        na++;
        lastB = sb;
        const va = (sa + 1) * 3;
        const vb = (sb + 1) * 3;
        const dx = Math.abs(pos[va]! - pos[vb]!);
        const dy = Math.abs(pos[va + 1]! - pos[vb + 1]!);
        const dz = Math.abs(pos[va + 2]! - pos[vb + 2]!);
        if (dx > tol || dy > tol || dz > tol || tp.kind[sa] !== tp.kind[sb]) {
          out.push({
            tool, refOffset: ref, offset: off, line: tp.line[sb]!,
            reason: `move ${na} ends at ${fmt(pos[vb]!)}, ${fmt(pos[vb + 1]!)}, ${fmt(pos[vb + 2]!)} instead of ${fmt(pos[va]!)}, ${fmt(pos[va + 1]!)}, ${fmt(pos[va + 2]!)} (line ${tp.line[sa]!})`,
          });
          break;
        }
      }
    }
  }
  return out;
}

function fmt(x: number): string {
  return String(Math.round(x * 10000) / 10000);
}

/**
 * Order of a multi-part program from its cutting runs: "by-tool" when each tool is loaded at most once and cuts
 * under every offset in one stretch; "by-part" when each offset is cut in one stretch with the same tool sequence;
 * "single" with fewer than two parts or offsets; else "mixed". A one-tool program over several offsets is "by-tool".
 */
export function classifyToolOrder(
  runs: CutRun[], loads: number[], parts: number,
): "by-tool" | "by-part" | "single" | "mixed" {
  const offsets: number[] = [];
  for (const r of runs) if (!offsets.includes(r.offset)) offsets.push(r.offset);
  if (parts < 2 || offsets.length < 2) return "single";
  // collapse consecutive duplicates
  const seq: CutRun[] = [];
  for (const r of runs) {
    const p = seq[seq.length - 1];
    if (!p || p.tool !== r.tool || p.offset !== r.offset) seq.push(r);
  }
  const contiguous = (key: (r: CutRun) => number): boolean => {
    const done = new Set<number>();
    let cur = -1;
    for (const r of seq) {
      const k = key(r);
      if (k !== cur) {
        if (done.has(k)) return false;
        if (cur !== -1) done.add(cur);
        cur = k;
      }
    }
    return true;
  };
  let byTool = contiguous((r) => r.tool) && loads.every((n) => n <= 1);
  if (byTool) {
    const offsByTool = new Map<number, Set<number>>();
    for (const r of seq) {
      let s = offsByTool.get(r.tool);
      if (!s) offsByTool.set(r.tool, (s = new Set()));
      s.add(r.offset);
    }
    for (const s of offsByTool.values()) if (s.size !== offsets.length) byTool = false;
  }
  if (byTool) return "by-tool";
  if (contiguous((r) => r.offset)) {
    const toolsOf = new Map<number, number[]>();
    for (const r of seq) {
      let l = toolsOf.get(r.offset);
      if (!l) toolsOf.set(r.offset, (l = []));
      l.push(r.tool);
    }
    const lists = [...toolsOf.values()].map((l) => l.join(","));
    if (lists.every((l) => l === lists[0])) return "by-part";
  }
  return "mixed";
}
