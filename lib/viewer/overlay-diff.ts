/**
 * What changed between two revisions' toolpaths, for the overlay. A segment of one path is unchanged when the other
 * path has a segment with the same start and end point (each rounded to the tolerance, in part coordinates of the
 * same work offset code), the same direction, the same kind of motion (cut or rapid) and the same tool number;
 * matching counts multiplicity (a segment cut twice in one revision and once in the other leaves one changed).
 * Line numbers, feeds and the order of the segments play no part: a revision that renumbers its blocks or moves a
 * pocket's code elsewhere in the file changes nothing here, a pocket moved on the part changes all its segments,
 * and a contour cut the other way round changes too (the direction matters to the cut). Jumps are never changed.
 *
 * One pass over each path with an open-addressing hash table of typed arrays: no object per segment.
 */
import { MotionKind, NO_TOOL } from "../gcode/types";
import type { ViewerMeta, ViewerPath } from "./types";

export interface PathDiff {
  /** Per segment of `a`: 1 when it has no match in `b`. */
  aChanged: Uint8Array;
  bChanged: Uint8Array;
  aChangedCount: number;
  bChangedCount: number;
}

type Side = { path: ViewerPath; meta: Pick<ViewerMeta, "tools" | "workOffsets"> };

/** 0 never matches; cut 1, rapid 2, machine move 3. */
function motionClass(kind: number): number {
  switch (kind) {
    case MotionKind.Feed:
    case MotionKind.Arc:
    case MotionKind.CycleFeed:
      return 1;
    case MotionKind.Rapid:
    case MotionKind.CycleRapid:
      return 2;
    case MotionKind.Machine:
      return 3;
    default:
      return 0;
  }
}

export function diffPaths(a: Side, b: Side, tolerance: number): PathDiff {
  // shared ids for offset codes and tool numbers, so index differences between the two analyses do not count
  const codeId = new Map<string, number>();
  const offIds = (s: Side) => s.meta.workOffsets.map((o) => codeId.get(o.code) ?? (codeId.set(o.code, codeId.size), codeId.size - 1));
  const aOff = offIds(a), bOff = offIds(b);
  const toolNo = (s: Side) => Int32Array.from(s.meta.tools, (t) => t.number);
  const aTool = toolNo(a), bTool = toolNo(b);

  const q = 1 / tolerance;
  const key = new Int32Array(9); // the segment being placed or looked up
  const other = new Int32Array(9); // a segment of b already in the table
  const fill = (out: Int32Array, s: Side, offs: number[], tools: Int32Array, i: number): boolean => {
    const c = motionClass(s.path.kind[i]!);
    if (c === 0) return false;
    const p = s.path.positions;
    const v = i * 3;
    for (let k = 0; k < 6; k++) out[k] = Math.round(p[v + k]! * q);
    const t = s.path.tool[i]!;
    out[6] = c;
    out[7] = offs[s.path.offset[i]!] ?? -1;
    out[8] = t === NO_TOOL ? -1 : (tools[t] ?? -1);
    return true;
  };
  const hash = (): number => {
    let h = 0x811c9dc5;
    for (let k = 0; k < 9; k++) h = Math.imul(h ^ key[k]!, 0x01000193);
    return (h ^ (h >>> 15)) >>> 0;
  };
  /** Whether b's segment `seg` has the key in `key`. */
  const same = (seg: number): boolean => {
    fill(other, b, bOff, bTool, seg);
    for (let k = 0; k < 9; k++) if (other[k] !== key[k]) return false;
    return true;
  };

  // b's segments into the table: per slot, one of b's segments with that key (+1) and how many there are
  const nb = b.path.segmentCount;
  let size = 16;
  while (size < nb * 2) size <<= 1;
  const mask = size - 1;
  const slotSeg = new Int32Array(size);
  const slotCount = new Int32Array(size);
  /** The slot of the key in `key`: its own, or the empty one where it would go. */
  const slotOf = (): number => {
    let h = hash() & mask;
    for (;;) {
      const s = slotSeg[h]!;
      if (s === 0 || same(s - 1)) return h;
      h = (h + 1) & mask;
    }
  };
  for (let i = 0; i < nb; i++) {
    if (!fill(key, b, bOff, bTool, i)) continue;
    const h = slotOf();
    if (slotSeg[h] === 0) slotSeg[h] = i + 1;
    slotCount[h]!++;
  }
  // a's segments use up b's counts; a segment that finds none left has changed
  const na = a.path.segmentCount;
  const aChanged = new Uint8Array(na);
  let aChangedCount = 0;
  for (let i = 0; i < na; i++) {
    if (!fill(key, a, aOff, aTool, i)) continue;
    const h = slotOf();
    if (slotSeg[h] !== 0 && slotCount[h]! > 0) slotCount[h]!--;
    else {
      aChanged[i] = 1;
      aChangedCount++;
    }
  }
  // what is left of a key's count in b is unmatched: mark that many of b's segments with the key, from the end
  const bChanged = new Uint8Array(nb);
  let bChangedCount = 0;
  for (let i = nb - 1; i >= 0; i--) {
    if (!fill(key, b, bOff, bTool, i)) continue;
    const h = slotOf();
    if (slotCount[h]! > 0) {
      slotCount[h]!--;
      bChanged[i] = 1;
      bChangedCount++;
    }
  }
  return { aChanged, bChanged, aChangedCount, bChangedCount };
}
