import { MotionKind } from "../gcode/types";
import { indexOfSorted, lowerBound } from "./search";

/**
 * Where each of `lines` sits on the path, for markers: the end of the first drawn segment of that line (where a move
 * ends, e.g. the bottom of a rapid that dives), else the start of the first segment written after a higher line
 * (where the tool is when a line without motion runs: a tool change, a spindle word), else the path's last vertex.
 * One pass over the segments plus a sort of the lines; segment -1 when the path is empty.
 */
export function anchorLines(
  path: { segmentCount: number; line: Uint32Array; kind: Uint8Array },
  lines: readonly number[],
): { segment: Int32Array; atEnd: Uint8Array } {
  const k = lines.length;
  const segment = new Int32Array(k).fill(-1);
  const atEnd = new Uint8Array(k);
  const n = path.segmentCount;
  if (n === 0 || k === 0) return { segment, atEnd };
  const uniq = Array.from(new Set(lines)).sort((a, b) => a - b);
  const own = new Int32Array(uniq.length).fill(-1);
  const after = new Int32Array(uniq.length).fill(-1);
  let next = 0; // uniq[0..next) have their "after" segment
  const jump = MotionKind.Jump;
  for (let i = 0; i < n; i++) {
    const l = path.line[i]!;
    while (next < uniq.length && uniq[next]! < l) after[next++] = i;
    if (path.kind[i] === jump) continue;
    const u = indexOfSorted(uniq, l);
    if (u >= 0 && own[u] === -1) own[u] = i;
  }
  for (let j = 0; j < k; j++) {
    const L = lines[j]!;
    if (L < 1) continue; // the whole program
    const u = lowerBound(uniq, L);
    if (own[u]! >= 0) {
      segment[j] = own[u]!;
      atEnd[j] = 1;
    } else if (after[u]! >= 0) {
      segment[j] = after[u]!;
    } else {
      segment[j] = n - 1;
      atEnd[j] = 1;
    }
  }
  return { segment, atEnd };
}
