import type { Toolpath } from "./types";
import { MotionKind } from "./types";

/** A stretch of cutting under one tool and one work offset: toolpath segments [startSeg, endSeg). */
export interface CutRun {
  tool: number;
  offset: number;
  startSeg: number;
  endSeg: number;
  /** Cutting blocks (lines run) in the run. */
  blocks: number;
}

/** A part whose toolpath for a tool differs from the first part's. */
export interface FixtureDifference {
  tool: number;
  refOffset: number;
  offset: number;
  line: number;
  reason: string;
}

// copied from the import once: a loader may turn each use of an imported binding into a getter call
const K_FEED: number = MotionKind.Feed, K_ARC: number = MotionKind.Arc, K_CYCLE_FEED: number = MotionKind.CycleFeed;

/**
 * The next cutting segment of one (tool, offset) pair over its runs, or -1. `st` holds the cursor: [run index,
 * segment index]. A plain function over typed arrays, so the walk over every segment allocates nothing.
 */
function nextCut(
  kind: Uint8Array, toolOf: Uint16Array, offsetOf: Uint8Array, count: number,
  runs: CutRun[], tool: number, offset: number, st: Int32Array,
): number {
  let r = st[0]!;
  let i = st[1]!;
  const nr = runs.length;
  while (r < nr) {
    const run = runs[r]!;
    if (run.tool === tool && run.offset === offset) {
      if (i < run.startSeg) i = run.startSeg;
      const end = run.endSeg < 0 ? count : run.endSeg;
      while (i < end) {
        const s = i++;
        const k = kind[s]!;
        if ((k === K_FEED || k === K_ARC || k === K_CYCLE_FEED) && toolOf[s] === tool && offsetOf[s] === offset) {
          st[0] = r;
          st[1] = i;
          return s;
        }
      }
    }
    r++;
  }
  st[0] = r;
  st[1] = i;
  return -1;
}

/**
 * Walks the cutting segments of `tool` under `ref` and under `off` side by side. Returns 0 when they agree, 1 when
 * the counts differ (res = [moves under ref, moves under off, first extra segment under off or -1, last compared
 * segment under off or -1]), 2 when a move differs (res = [move number, segment under ref, segment under off]).
 * Small and allocation-free so that it is optimised quickly; the messages are built by the caller.
 */
function walkPair(tp: Toolpath, runs: CutRun[], tool: number, ref: number, off: number, tol: number, res: Int32Array): number {
  const kind = tp.kind, toolOf = tp.tool, offsetOf = tp.offset, count = tp.segmentCount, pos = tp.positions;
  const ca0 = new Int32Array(2);
  const cb0 = new Int32Array(2);
  let na = 0;
  let lastB = -1;
  for (;;) {
    const sa = nextCut(kind, toolOf, offsetOf, count, runs, tool, ref, ca0);
    const sb = nextCut(kind, toolOf, offsetOf, count, runs, tool, off, cb0);
    if (sa < 0 && sb < 0) return 0;
    if (sa < 0 || sb < 0) {
      let ca = na + (sa < 0 ? 0 : 1);
      let cb = na + (sb < 0 ? 0 : 1);
      while (sa >= 0 && nextCut(kind, toolOf, offsetOf, count, runs, tool, ref, ca0) >= 0) ca++;
      while (sb >= 0 && nextCut(kind, toolOf, offsetOf, count, runs, tool, off, cb0) >= 0) cb++;
      res[0] = ca;
      res[1] = cb;
      res[2] = sb;
      res[3] = lastB;
      return 1;
    }
    na++;
    lastB = sb;
    const va = (sa + 1) * 3;
    const vb = (sb + 1) * 3;
    const dx = Math.abs(pos[va]! - pos[vb]!);
    const dy = Math.abs(pos[va + 1]! - pos[vb + 1]!);
    const dz = Math.abs(pos[va + 2]! - pos[vb + 2]!);
    if (dx > tol || dy > tol || dz > tol || kind[sa] !== kind[sb]) {
      res[0] = na;
      res[1] = sa;
      res[2] = sb;
      return 2;
    }
  }
}

/** The offsets each tool cuts under, in the order of its first cut under each. */
export function offsetsByTool(runs: CutRun[]): Map<number, number[]> {
  const out = new Map<number, number[]>();
  for (const r of runs) {
    let l = out.get(r.tool);
    if (!l) out.set(r.tool, (l = []));
    if (!l.includes(r.offset)) l.push(r.offset);
  }
  return out;
}

/**
 * Parts per cycle as the program shows them: when more than half of the tools that cut repeat the same work
 * (the same cutting moves, end points within `tol` in part coordinates) under two or more offsets, the most offsets
 * one tool repeats its work under; else 1. A second-side or flipped-part program, whose offsets hold different
 * operations, gives 1.
 */
export function findParts(tp: Toolpath, runs: CutRun[], tol: number): number {
  const byTool = offsetsByTool(runs);
  const res = new Int32Array(4);
  let repeating = 0;
  let most = 1;
  for (const [tool, offs] of byTool) {
    let same = 1;
    for (let k = 1; k < offs.length; k++) if (walkPair(tp, runs, tool, offs[0]!, offs[k]!, tol, res) === 0) same++;
    if (same >= 2) {
      repeating++;
      if (same > most) most = same;
    }
  }
  return repeating * 2 > byTool.size ? most : 1;
}

/** A tool whose parts do not run under the part offsets. */
export interface PartOffsetProblem {
  tool: number;
  /** "stray": it cuts under an offset that is not a part offset; "missing": a part offset it never cuts under. */
  kind: "stray" | "missing";
  /** The offset it cuts under instead (stray: that offset; missing: the offset its extra part runs under). */
  offset: number;
  /** The part offset concerned (missing), or the part offsets it lacks (first one; stray), or -1. */
  partOffset: number;
  /** Where that part of the tool's work starts (its approach line). */
  line: number;
}

/**
 * Checks each tool's cutting against the part offsets: the `parts` offsets most tools cut under. A tool that cuts
 * under another offset (G56 typed for G55) is "stray" at its first cut there; a tool that cuts under fewer part
 * offsets (its offset line lost, so the next part runs under the previous offset again) is "missing" at the
 * line where that part's work starts, found by splitting its cutting blocks under that offset into equal parts.
 * `stretches` holds per cut stretch: tool * 256 + offset, approach line, cutting blocks of that tool and offset
 * before it.
 */
export function checkPartOffsets(runs: CutRun[], parts: number, stretches: Int32Array, stretchN: number): PartOffsetProblem[] {
  const users = new Map<number, number>();
  const order: number[] = [];
  const byTool = offsetsByTool(runs);
  for (const offs of byTool.values()) {
    for (const o of offs) {
      if (!users.has(o)) order.push(o);
      users.set(o, (users.get(o) ?? 0) + 1);
    }
  }
  const firstUse = new Map<number, number>();
  for (const r of runs) if (!firstUse.has(r.offset)) firstUse.set(r.offset, firstUse.size);
  order.sort((a, b) => users.get(b)! - users.get(a)! || firstUse.get(a)! - firstUse.get(b)!);
  const partOffsets = order.slice(0, parts);
  if (partOffsets.length < 2) return [];
  partOffsets.sort((a, b) => firstUse.get(a)! - firstUse.get(b)!);
  const blocks = new Map<number, number>();
  for (const r of runs) blocks.set(r.tool * 256 + r.offset, (blocks.get(r.tool * 256 + r.offset) ?? 0) + r.blocks);
  const stretchAt = (tool: number, offset: number, before: number): number => {
    let first = 0;
    const key = tool * 256 + offset;
    for (let i = 0; i < stretchN; i++) {
      const s = i * 3;
      if (stretches[s] !== key) continue;
      if (first === 0) first = stretches[s + 1]!;
      if (stretches[s + 2]! >= before) return stretches[s + 1]!;
    }
    return first;
  };
  const out: PartOffsetProblem[] = [];
  for (const [tool, offs] of byTool) {
    const lacking = partOffsets.filter((o) => !offs.includes(o));
    const stray = offs.filter((o) => !partOffsets.includes(o));
    for (const o of stray) {
      out.push({ tool, kind: "stray", offset: o, partOffset: lacking[0] ?? -1, line: stretchAt(tool, o, 0) });
    }
    if (stray.length > 0 || lacking.length === 0) continue;
    // the lost offsets' parts ran under the part offset where this tool cut the most
    let q = -1;
    let most = -1;
    for (const o of offs) {
      const n = blocks.get(tool * 256 + o) ?? 0;
      if (n > most) {
        most = n;
        q = o;
      }
    }
    const copies = lacking.length + 1;
    const perPart = Math.floor(most / copies);
    for (let k = 1; k < copies; k++) {
      out.push({ tool, kind: "missing", offset: q, partOffset: lacking[k - 1]!, line: stretchAt(tool, q, perPart * k) });
    }
  }
  return out;
}

/**
 * For each tool, compares the cutting toolpath under each later work offset with the first offset's: same number of
 * cutting segments, same end points in part coordinates within `tol`. Returns the first difference per (tool, offset).
 */
export function compareFixtures(tp: Toolpath, runs: CutRun[], tol: number): FixtureDifference[] {
  const out: FixtureDifference[] = [];
  const offsetsOfTool = offsetsByTool(runs);
  const pos = tp.positions;
  const res = new Int32Array(4);
  for (const [tool, offs] of offsetsOfTool) {
    if (offs.length < 2) continue;
    const ref = offs[0]!;
    for (let k = 1; k < offs.length; k++) {
      const off = offs[k]!;
      const what = walkPair(tp, runs, tool, ref, off, tol, res);
      if (what === 1) {
        const [ca, cb, firstExtra, lastB] = res as unknown as [number, number, number, number];
        const line = firstExtra >= 0 ? tp.line[firstExtra]! : lastB >= 0 ? tp.line[lastB]! : 0;
        out.push({ tool, refOffset: ref, offset: off, line, reason: `${cb} cutting moves instead of ${ca}` });
      } else if (what === 2) {
        const [na, sa, sb] = res as unknown as [number, number, number];
        const va = (sa + 1) * 3;
        const vb = (sb + 1) * 3;
        out.push({
          tool, refOffset: ref, offset: off, line: tp.line[sb]!,
          reason: `move ${na} ends at ${fmt(pos[vb]!)}, ${fmt(pos[vb + 1]!)}, ${fmt(pos[vb + 2]!)} instead of ${fmt(pos[va]!)}, ${fmt(pos[va + 1]!)}, ${fmt(pos[va + 2]!)} (line ${tp.line[sa]!})`,
        });
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
