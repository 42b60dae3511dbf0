/**
 * GPU-ready buffers from the path, built off the page's thread (the viewer's worker) and never per frame:
 *
 * - one position per vertex (the engine's own Float32 array, shared by every style);
 * - four bytes per vertex describing the segment that ends there (kind, tool, work offset): WebGL2 takes a flat
 *   attribute from a line's last vertex, so segment i is drawn with the bytes of vertex i + 1;
 * - per style (cutting moves, rapids) an index of vertex pairs of the segments shown (hidden tools, hidden
 *   offsets, rapids off and Jumps are simply not in it), in path order, so a playback reveals it with drawRange;
 * - the same as a coarse index for moving the view, about `coarseTarget` pairs: long runs of segments alike in
 *   kind, tool and offset are drawn through every k-th vertex, and of short runs every k-th segment is kept.
 */
import { MotionKind, NO_TOOL } from "../gcode/types";

export type Style = "cut" | "rapid";

/** A kind's style, or null for a Jump (never drawn). */
export function styleOf(kind: number): Style | null {
  switch (kind) {
    case MotionKind.Feed:
    case MotionKind.Arc:
    case MotionKind.CycleFeed:
      return "cut";
    case MotionKind.Rapid:
    case MotionKind.CycleRapid:
    case MotionKind.Machine:
      return "rapid";
    default:
      return null;
  }
}

/** The per-vertex byte for a tool index: 255 for no tool, indices past 254 share 254 (colour only). */
export const toolByte = (tool: number) => (tool === NO_TOOL ? 255 : Math.min(254, tool));

export function vertexAttributes(path: { segmentCount: number; kind: Uint8Array; tool: Uint16Array; offset: Uint8Array }): Uint8Array {
  const n = path.segmentCount;
  if (n === 0) return new Uint8Array(0);
  const out = new Uint8Array((n + 1) * 4);
  for (let i = 0; i < n; i++) {
    const o = (i + 1) * 4;
    out[o] = path.kind[i]!;
    out[o + 1] = toolByte(path.tool[i]!);
    out[o + 2] = path.offset[i]!;
  }
  out.set(out.subarray(4, 8), 0);
  return out;
}

export interface Visibility {
  /** Per tool byte (toolByte): 1 shown. */
  tools: Uint8Array;
  /** Per work offset index: 1 shown. */
  offsets: Uint8Array;
  rapids: boolean;
}

export interface StyleIndices {
  cut: Uint32Array;
  rapid: Uint32Array;
  cutCoarse: Uint32Array;
  rapidCoarse: Uint32Array;
  /** Segments shown (both styles). */
  shown: number;
  /** Vertices per coarse step. */
  step: number;
}

const CUT = 1, RAPID = 2;

/** Builds both styles' full and coarse indices for what is shown. */
export function buildIndices(
  path: { segmentCount: number; kind: Uint8Array; tool: Uint16Array; offset: Uint8Array },
  vis: Visibility,
  coarseTarget = 120_000,
): StyleIndices {
  const n = path.segmentCount;
  const cls = new Uint8Array(n); // 0 hidden, 1 cut, 2 rapid
  let nCut = 0, nRapid = 0;
  for (let i = 0; i < n; i++) {
    const s = styleOf(path.kind[i]!);
    if (s === null || !vis.tools[toolByte(path.tool[i]!)] || !vis.offsets[path.offset[i]!]) continue;
    if (s === "cut") {
      cls[i] = CUT;
      nCut++;
    } else if (vis.rapids) {
      cls[i] = RAPID;
      nRapid++;
    }
  }
  const cut = new Uint32Array(nCut * 2);
  const rapid = new Uint32Array(nRapid * 2);
  let jc = 0, jr = 0;
  for (let i = 0; i < n; i++) {
    const c = cls[i];
    if (c === CUT) {
      cut[jc++] = i;
      cut[jc++] = i + 1;
    } else if (c === RAPID) {
      rapid[jr++] = i;
      rapid[jr++] = i + 1;
    }
  }
  const shown = nCut + nRapid;
  const step = Math.max(1, Math.ceil(shown / coarseTarget));
  const coarse = (want: number): Uint32Array => {
    if (step === 1) return want === CUT ? cut : rapid;
    const out: number[] = [];
    let sampled = 0;
    let i = 0;
    while (i < n) {
      if (cls[i] !== want) {
        i++;
        continue;
      }
      // a run of segments alike in style, kind, tool and offset
      let end = i + 1;
      while (end < n && cls[end] === want && path.kind[end] === path.kind[i] && path.tool[end] === path.tool[i] && path.offset[end] === path.offset[i]) end++;
      if (end - i >= step) {
        // a long run (a contour, a surfacing pass): drawn through every step-th vertex
        for (let v = i; v < end; v += step) out.push(v, Math.min(v + step, end));
      } else {
        // short runs (drilling cycles alternate feed and rapid every move): every step-th of their segments
        for (let k = i; k < end; k++) if (sampled++ % step === 0) out.push(k, k + 1);
      }
      i = end;
    }
    return Uint32Array.from(out);
  };
  return { cut, rapid, cutCoarse: coarse(CUT), rapidCoarse: coarse(RAPID), shown, step };
}

/** Vertex pairs of the drawable segments of one line (at most `max` segments), for the highlight. */
export function segmentsOfLine(path: { segmentCount: number; line: Uint32Array; kind: Uint8Array }, line: number, max = 200_000): Uint32Array {
  const n = path.segmentCount;
  let count = 0;
  for (let i = 0; i < n; i++) if (path.line[i] === line && path.kind[i] !== MotionKind.Jump) count++;
  const out = new Uint32Array(Math.min(count, max) * 2);
  let j = 0;
  for (let i = 0; i < n && j < out.length; i++) {
    if (path.line[i] !== line || path.kind[i] === MotionKind.Jump) continue;
    out[j++] = i;
    out[j++] = i + 1;
  }
  return out;
}

/** Vertex pairs of the segments flagged in `flags` (the overlay's changed segments). */
export function flaggedPairs(flags: Uint8Array): Uint32Array {
  let count = 0;
  for (let i = 0; i < flags.length; i++) count += flags[i]!;
  const out = new Uint32Array(count * 2);
  let j = 0;
  for (let i = 0; i < flags.length; i++) {
    if (!flags[i]) continue;
    out[j++] = i;
    out[j++] = i + 1;
  }
  return out;
}

/** Pairs of every drawable segment (the overlay's faint other revision). */
export function drawablePairs(path: { segmentCount: number; kind: Uint8Array }): Uint32Array {
  const flags = new Uint8Array(path.segmentCount);
  for (let i = 0; i < path.segmentCount; i++) flags[i] = path.kind[i] === MotionKind.Jump ? 0 : 1;
  return flaggedPairs(flags);
}
