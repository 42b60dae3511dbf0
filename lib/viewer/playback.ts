/**
 * Playback on the time estimate: which segment runs at time t, where the tool is, and what a pause before a
 * segment is. Binary searches over the time columns; nothing proportional to the path's length per call.
 */
import { MotionKind, NO_TOOL } from "../gcode/types";
import { lowerBound } from "./search";
import type { ViewerPath } from "./types";

export type PlayPhase = "start" | "moving" | "pause" | "end";

export interface PlayState {
  /** The segment running (or about to run, in a pause); segmentCount at the end. */
  segment: number;
  phase: PlayPhase;
  /** Tool tip position, part coordinates. */
  x: number;
  y: number;
  z: number;
  /** Why the machine waits (phase "pause"). */
  pause: "tool-change" | "dwell-or-other" | null;
}

/** What playback reads of a path: the end times, and per segment its start, kind and tool. */
export interface Timeline {
  segmentCount: number;
  positions: Float32Array;
  /** End of each segment's motion, seconds. */
  time: Float32Array;
  start(i: number): number;
  kind(i: number): number;
  /** Tool index, NO_TOOL for none. */
  tool(i: number): number;
}

/** A Timeline over the full columns. */
export function timelineOf(path: ViewerPath): Timeline {
  return {
    segmentCount: path.segmentCount,
    positions: path.positions,
    time: path.time,
    start: (i) => path.startTime[i]!,
    kind: (i) => path.kind[i]!,
    tool: (i) => path.tool[i]!,
  };
}

/**
 * The starts that differ from the previous segment's end (pauses: tool changes, dwells, moves not drawn) as a
 * sparse list, so the page need not keep a start time per segment.
 */
export function pausesOf(path: Pick<ViewerPath, "segmentCount" | "time" | "startTime">): { at: Uint32Array; start: Float32Array } {
  const at: number[] = [];
  const start: number[] = [];
  for (let i = 0; i < path.segmentCount; i++) {
    const prev = i > 0 ? path.time[i - 1]! : 0;
    if (path.startTime[i] !== prev) {
      at.push(i);
      start.push(path.startTime[i]!);
    }
  }
  return { at: Uint32Array.from(at), start: Float32Array.from(start) };
}

/**
 * A Timeline from the page's compact columns: end times, the sparse pauses and the per-vertex bytes of
 * render-buffers.ts (kind, tool byte) of the vertex each segment ends at.
 */
export function compactTimeline(
  positions: Float32Array,
  time: Float32Array,
  pauses: { at: Uint32Array; start: Float32Array },
  vattr: Uint8Array,
): Timeline {
  const n = time.length;
  return {
    segmentCount: n,
    positions,
    time,
    start(i) {
      const k = lowerBound(pauses.at, i);
      if (k < pauses.at.length && pauses.at[k] === i) return pauses.start[k]!;
      return i > 0 ? time[i - 1]! : 0;
    },
    kind: (i) => vattr[(i + 1) * 4]!,
    tool: (i) => {
      const b = vattr[(i + 1) * 4 + 1]!;
      return b === 255 ? NO_TOOL : b;
    },
  };
}

/** First segment whose motion ends at or after t (segmentCount when t is past the last end). */
export function segmentEndingAfter(time: Float32Array, n: number, t: number): number {
  return lowerBound(time, t, n);
}

/** Where the tool is at time t (seconds from the program's start). */
export function locate(tl: Timeline, t: number): PlayState {
  const n = tl.segmentCount;
  const p = tl.positions;
  if (n === 0) return { segment: 0, phase: "end", x: NaN, y: NaN, z: NaN, pause: null };
  const i = segmentEndingAfter(tl.time, n, t);
  if (i >= n) {
    const v = n * 3;
    return { segment: n, phase: "end", x: p[v]!, y: p[v + 1]!, z: p[v + 2]!, pause: null };
  }
  const s = tl.start(i);
  const e = tl.time[i]!;
  const v = i * 3;
  if (t < s) {
    const phase: PlayPhase = i === 0 && t <= 0 ? "start" : "pause";
    return { segment: i, phase, x: p[v]!, y: p[v + 1]!, z: p[v + 2]!, pause: phase === "pause" ? pauseKind(tl, i) : null };
  }
  // a Jump takes no time: the tool is already at its end
  const f = tl.kind(i) === MotionKind.Jump || e <= s ? 1 : Math.min(1, Math.max(0, (t - s) / (e - s)));
  return {
    segment: i,
    phase: "moving",
    x: p[v]! + (p[v + 3]! - p[v]!) * f,
    y: p[v + 1]! + (p[v + 4]! - p[v + 1]!) * f,
    z: p[v + 2]! + (p[v + 5]! - p[v + 2]!) * f,
    pause: null,
  };
}

/**
 * A pause before segment i is a tool change when the tool differs from the segment before (or, for the first
 * segment, when a tool is loaded at all: the program changed to it first); otherwise a dwell or moves not drawn.
 */
export function pauseKind(tl: Timeline, i: number): "tool-change" | "dwell-or-other" {
  const t = tl.tool(i);
  if (i === 0) return t !== NO_TOOL ? "tool-change" : "dwell-or-other";
  return t !== tl.tool(i - 1) && t !== NO_TOOL ? "tool-change" : "dwell-or-other";
}

/** The time at which segment i's motion starts (for stepping and for moving the tool to a line). */
export const segmentStart = (tl: Timeline, i: number) => (i <= 0 ? tl.start(0) : i >= tl.segmentCount ? (tl.time[tl.segmentCount - 1] ?? 0) : tl.start(i));

/**
 * How many pairs of an index (segment pairs `va, vb` of vertex numbers, sorted) have run completely before
 * segment `seg` starts: a pair is done when its end vertex `vb` is at most `seg`. For drawRange.
 */
export function pairsDone(index: Uint32Array, pairCount: number, seg: number): number {
  let lo = 0, hi = pairCount;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (index[mid * 2 + 1]! <= seg) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** h:mm:ss (or m:ss under an hour), rounded down to the second, as the playback shows it. */
export function formatClock(seconds: number): string {
  const s = Math.max(0, Math.floor(seconds + 1e-6));
  const h = Math.floor(s / 3600);
  const m = Math.floor((s % 3600) / 60);
  const ss = String(s % 60).padStart(2, "0");
  return h > 0 ? `${h}:${String(m).padStart(2, "0")}:${ss}` : `${m}:${ss}`;
}
