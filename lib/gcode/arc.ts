/**
 * Plane geometry of circular arcs [GEO], in a plane with first axis `a` and second axis `b` whose normal points
 * towards the viewer, so clockwise (G2) is a negative turn. Results go into a caller's Float64Array to avoid
 * allocation in the analysis loop.
 */

/** Layout of the `out` array filled by arcFromCenter / arcFromRadius. */
export const ARC_CA = 0; // centre, first axis
export const ARC_CB = 1; // centre, second axis
export const ARC_R = 2; // radius at the start
export const ARC_A0 = 3; // start angle (rad)
export const ARC_SWEEP = 4; // sweep, positive radians (direction given by cw)
export const ARC_REND = 5; // radius at the end (centre format)

const TWO_PI = Math.PI * 2;

function sweepOf(a0: number, a1: number, cw: boolean): number {
  let s = cw ? a0 - a1 : a1 - a0;
  while (s < 0) s += TWO_PI;
  while (s >= TWO_PI) s -= TWO_PI;
  // end == start (or within rounding of it) is a full circle ([NIST] 3.5.3.2)
  if (s <= 1e-12) s = TWO_PI;
  return s;
}

/**
 * Centre-format arc: centre = start + (ia, ib). Fills `out` (see ARC_*). Returns false when the start lies on the
 * centre (radius zero).
 */
export function arcFromCenter(
  sa: number, sb: number, ea: number, eb: number, ia: number, ib: number, cw: boolean, out: Float64Array,
): boolean {
  const ca = sa + ia;
  const cb = sb + ib;
  // Math.sqrt, not Math.hypot: hypot is several times slower in V8 (squares overflow only past 1e154)
  const r = Math.sqrt(ia * ia + ib * ib);
  const ea2 = ea - ca, eb2 = eb - cb;
  const rEnd = Math.sqrt(ea2 * ea2 + eb2 * eb2);
  out[ARC_CA] = ca;
  out[ARC_CB] = cb;
  out[ARC_R] = r;
  out[ARC_REND] = rEnd;
  if (!(r > 0)) return false;
  const a0 = Math.atan2(sb - cb, sa - ca);
  const a1 = Math.atan2(eb - cb, ea - ca);
  out[ARC_A0] = a0;
  out[ARC_SWEEP] = sweepOf(a0, a1, cw);
  return true;
}

/** Outcome of arcFromRadius. */
export const ARC_OK = 0;
export const ARC_SAME_POINT = 1;
export const ARC_RADIUS_TOO_SMALL = 2;

/**
 * Radius-format arc ([NIST] 3.5.3.1): R > 0 at most 180 degrees, R < 0 more than 180. Fills `out`; returns ARC_OK,
 * ARC_SAME_POINT (end = start) or ARC_RADIUS_TOO_SMALL (|R| shorter than half the chord). `slack` is how much
 * shorter than half the chord |R| may be and still be read as a rounded half circle (0: the [NIST] rule only).
 */
export function arcFromRadius(
  sa: number, sb: number, ea: number, eb: number, radius: number, cw: boolean, out: Float64Array, slack = 0,
): number {
  const dx = ea - sa;
  const dy = eb - sb;
  const chord = Math.sqrt(dx * dx + dy * dy);
  if (chord === 0) return ARC_SAME_POINT;
  const r = Math.abs(radius);
  const half = chord / 2;
  // the NIST interpreter accepts a half chord up to radius * (1 + 1e-12) and then treats it as exactly 180 degrees
  if (half / r > 1 + 1e-12 && half - r > slack) return ARC_RADIUS_TOO_SMALL;
  // a half chord longer than |R| (within the slack) is a half circle through both ends
  const h = half >= r ? 0 : Math.sqrt(r * r - half * half);
  // unit vector to the right of the chord direction
  const ux = dy / chord;
  const uy = -dx / chord;
  // clockwise with a short arc: centre on the right; flip for counterclockwise and for R < 0
  const side = (cw ? 1 : -1) * (radius < 0 ? -1 : 1);
  const ca = sa + dx / 2 + side * h * ux;
  const cb = sb + dy / 2 + side * h * uy;
  out[ARC_CA] = ca;
  out[ARC_CB] = cb;
  const rr = half > r ? half : r;
  out[ARC_R] = rr;
  out[ARC_REND] = rr;
  const a0 = Math.atan2(sb - cb, sa - ca);
  const a1 = Math.atan2(eb - cb, ea - ca);
  out[ARC_A0] = a0;
  let s = sweepOf(a0, a1, cw);
  if (s === TWO_PI) s = Math.PI; // exactly half the chord: the two ends are opposite
  out[ARC_SWEEP] = s;
  return ARC_OK;
}

/**
 * The axis-extreme points (0, 90, 180, 270 degrees) inside the sweep, written as (a, b) pairs into `pts`.
 * Returns how many points were written (0 to 4).
 */
export function arcExtremes(
  ca: number, cb: number, r: number, a0: number, sweep: number, cw: boolean, pts: Float64Array,
): number {
  // walk the sweep counterclockwise from its counterclockwise-most start
  let start = cw ? a0 - sweep : a0;
  start %= TWO_PI;
  if (start < 0) start += TWO_PI;
  let n = 0;
  for (let k = 0; k < 4; k++) {
    const theta = (k * Math.PI) / 2;
    let d = theta - start;
    if (d < 0) d += TWO_PI;
    if (d <= sweep + 1e-15) {
      pts[n * 2] = k === 0 ? ca + r : k === 2 ? ca - r : ca;
      pts[n * 2 + 1] = k === 1 ? cb + r : k === 3 ? cb - r : cb;
      n++;
    }
  }
  return n;
}

/** Arc length; helical when `dc` (travel along the plane normal) is not zero ([NIST-SRC] find_arc_length). */
export function arcLength(r: number, sweep: number, dc: number): number {
  const rs = r * sweep;
  return dc === 0 ? rs : Math.sqrt(rs * rs + dc * dc);
}

/** Number of chords so that no chord strays more than `tol` from an arc of radius r over `sweep` radians. */
export function chordCount(r: number, sweep: number, tol: number, maxChords: number): number {
  if (!(r > 0) || !(tol > 0)) return 1;
  if (tol >= r) return Math.max(1, Math.min(maxChords, Math.ceil(sweep / (Math.PI / 2))));
  const step = 2 * Math.acos(1 - tol / r);
  const n = Math.ceil(sweep / step - 1e-9);
  return n < 1 ? 1 : n > maxChords ? maxChords : n;
}
