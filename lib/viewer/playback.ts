/**
 * Playback on the time estimate: which segment runs at time t, where the tool is, and what a pause before a
 * segment is. Binary searches over the time columns; nothing proportional to the path's length per call.
 */
import { MotionKind, NO_TOOL } from "@/lib/gcode/types";
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

/** First segment whose motion ends at or after t (segmentCount when t is past the last end). */
export function segmentEndingAfter(time: Float32Array, n: number, t: number): number {
  let lo = 0, hi = n;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (time[mid]! < t) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** Where the tool is at time t (seconds from the program's start). */
export function locate(path: ViewerPath, t: number): PlayState {
  const n = path.segmentCount;
  const p = path.positions;
  if (n === 0) return { segment: 0, phase: "end", x: NaN, y: NaN, z: NaN, pause: null };
  const i = segmentEndingAfter(path.time, n, t);
  if (i >= n) {
    const v = n * 3;
    return { segment: n, phase: "end", x: p[v]!, y: p[v + 1]!, z: p[v + 2]!, pause: null };
  }
  const s = path.startTime[i]!;
  const e = path.time[i]!;
  const v = i * 3;
  if (t < s) {
    const phase: PlayPhase = i === 0 && t <= 0 ? "start" : "pause";
    return { segment: i, phase, x: p[v]!, y: p[v + 1]!, z: p[v + 2]!, pause: phase === "pause" ? pauseKind(path, i) : null };
  }
  // a Jump takes no time: the tool is already at its end
  const f = path.kind[i] === MotionKind.Jump || e <= s ? 1 : Math.min(1, Math.max(0, (t - s) / (e - s)));
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
export function pauseKind(path: ViewerPath, i: number): "tool-change" | "dwell-or-other" {
  const t = path.tool[i]!;
  if (i === 0) return t !== NO_TOOL ? "tool-change" : "dwell-or-other";
  return t !== path.tool[i - 1] && t !== NO_TOOL ? "tool-change" : "dwell-or-other";
}

/** The time at which segment i starts (for stepping and for selecting a line). */
export const segmentStart = (path: ViewerPath, i: number) => (i <= 0 ? 0 : i >= path.segmentCount ? path.time[path.segmentCount - 1] ?? 0 : path.startTime[i]!);

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
