/**
 * The layout of the sums and boxes the run accumulates, per program, per tool slot and per work offset: plain
 * Float64Arrays with a fixed stride, so that a move adds into a few slots and nothing is allocated per move.
 */
import type { Bounds, TimeBreakdown } from "./types";

/** Sum slots, SSTRIDE apart: lengths, the times of the time model, the machine-aware total. */
export const S_FEED_LEN = 0, S_RAPID_LEN = 1, S_FEED_S = 2, S_RAPID_S = 3, S_DWELL_S = 4, S_TC_S = 5, S_TOTAL_S = 6;
export const SSTRIDE = 8;
/** A box: min xyz, max xyz of all motion, then min xyz, max xyz of cutting. */
export const BSTRIDE = 12;

export function newBounds(n: number): Float64Array<ArrayBuffer> {
  const b = new Float64Array(n * BSTRIDE);
  for (let i = 0; i < n; i++) initBox(b, i * BSTRIDE);
  return b;
}
export function initBox(b: Float64Array, o: number): void {
  for (let k = 0; k < BSTRIDE; k += 6) {
    b[o + k] = b[o + k + 1] = b[o + k + 2] = Infinity;
    b[o + k + 3] = b[o + k + 4] = b[o + k + 5] = -Infinity;
  }
}
export function grow64(a: Float64Array<ArrayBuffer>, need: number, fill: (b: Float64Array<ArrayBuffer>, from: number) => void): Float64Array<ArrayBuffer> {
  if (need <= a.length) return a;
  let n = a.length * 2;
  while (n < need) n *= 2;
  const b = new Float64Array(n);
  b.set(a);
  fill(b, a.length);
  return b;
}
export function growI32(a: Int32Array<ArrayBuffer>, need: number): Int32Array<ArrayBuffer> {
  if (need <= a.length) return a;
  let n = Math.max(16, a.length * 2);
  while (n < need) n *= 2;
  const b = new Int32Array(n);
  b.set(a);
  return b;
}
/** Widens box `o` of `b` (all and cutting halves) by box 0 of `c`. */
export function mergeBox(b: Float64Array, o: number, c: Float64Array): void {
  for (let k = 0; k < BSTRIDE; k += 6) {
    for (let i = 0; i < 3; i++) {
      if (c[k + i]! < b[o + k + i]!) b[o + k + i] = c[k + i]!;
      if (c[k + i + 3]! > b[o + k + i + 3]!) b[o + k + i + 3] = c[k + i + 3]!;
    }
  }
}
/** Widens box `o` by the point `p` (NaN axes are skipped by the comparisons), its cutting half too when `cut`. */
export function addBox(b: Float64Array, o: number, p: Float64Array, cut: boolean): void {
  const x = p[0]!, y = p[1]!, z = p[2]!;
  if (x < b[o]!) b[o] = x;
  if (y < b[o + 1]!) b[o + 1] = y;
  if (z < b[o + 2]!) b[o + 2] = z;
  if (x > b[o + 3]!) b[o + 3] = x;
  if (y > b[o + 4]!) b[o + 4] = y;
  if (z > b[o + 5]!) b[o + 5] = z;
  if (cut) {
    if (x < b[o + 6]!) b[o + 6] = x;
    if (y < b[o + 7]!) b[o + 7] = y;
    if (z < b[o + 8]!) b[o + 8] = z;
    if (x > b[o + 9]!) b[o + 9] = x;
    if (y > b[o + 10]!) b[o + 10] = y;
    if (z > b[o + 11]!) b[o + 11] = z;
  }
}
/** A box as Bounds (null per axis without data). */
export function boxOut(b: Float64Array, o: number): Bounds {
  const v = (i: number, lo: boolean): number | null => {
    const x = b[o + i]!;
    return lo ? (x === Infinity ? null : x) : x === -Infinity ? null : x;
  };
  return {
    min: { x: v(0, true), y: v(1, true), z: v(2, true) },
    max: { x: v(3, false), y: v(4, false), z: v(5, false) },
  };
}
/** The sums at `o` as a TimeBreakdown. */
export function timeOut(s: Float64Array, o: number): TimeBreakdown {
  return {
    feedSeconds: s[o + S_FEED_S]!,
    rapidSeconds: s[o + S_RAPID_S]!,
    dwellSeconds: s[o + S_DWELL_S]!,
    toolChangeSeconds: s[o + S_TC_S]!,
    totalSeconds: s[o + S_TOTAL_S]!,
  };
}
/** A min/max pair, or null when nothing was seen. */
export function range(min: number, max: number): { min: number; max: number } | null {
  return min <= max ? { min, max } : null;
}
