/**
 * The toolpath route's binary layout ("CGTP", version 1): the engine's toolpath columns with their times, made
 * small for the wire. Every column is stored as integer steps, each value the difference from the one before
 * (positions and times change little from one row to the next), zigzag-mapped to unsigned (small negatives become
 * small numbers) and split into byte planes (all low bytes, then all second bytes...), so a general-purpose
 * compressor finds long runs: on the 1,000,000-line bench program it is about 1 byte per segment under brotli
 * against 4 for the gzipped program text. Little-endian throughout.
 *
 * | offset | size | field |
 * |---|---|---|
 * | 0 | 4 | magic "CGTP" |
 * | 4 | 2 | format version (1) |
 * | 6 | 2 | flags (0) |
 * | 8 | 4 | segment count n (vertices: n + 1, none when n = 0) |
 * | 12 | 4 | m, bytes of the summary JSON |
 * | 16 | 8 | position step q, program units (float64): the chord tolerance / 10 (coarser only past 536 m) |
 * | 24 | 8 | time step, seconds (float64): 0.001 |
 * | 32 | m, padded to 4 | summary (ViewerMeta) as UTF-8 JSON |
 * | ... | 4 planes x vertices, each | x, y, z: round(value / q), delta from the previous vertex (the first from 0) |
 * | ... | 4 planes x n | line: delta from the previous segment's line |
 * | ... | n | kind (MotionKind) |
 * | ... | 2 planes x n | tool index (not delta-coded; 65535 = no tool) |
 * | ... | n | work offset index |
 * | ... | 4 planes x n | end time: round(time / step), delta from the previous segment's end |
 * | ... | 4 planes x n | pause: round(startTime / step) less the previous segment's rounded end (the first: from 0) |
 *
 * Decoded positions are within q/2 of the engine's Float32 values (exact for points written with at most as many
 * decimals as q has), times within half a millisecond; lines, kinds, tools and offsets are exact.
 */
import type { ViewerMeta, ViewerPath } from "./types";

export const TOOLPATH_FORMAT_VERSION = 1;
export const TOOLPATH_MEDIA_TYPE = "application/vnd.cyclegate.toolpath";
const MAGIC = 0x50544743; // "CGTP" little-endian
const HEADER = 32;
export const TIME_STEP = 0.001;

/** Steps stay within +-2^29, so a step from one vertex to the next fits 31 bits. */
const MAX_STEPS = 2 ** 29;

/**
 * The position step: ten steps per chord tolerance (0.001 mm by default), coarser only when a coordinate is so far
 * out (over 536 m at 0.001 mm) that the steps would not fit.
 */
export function positionStep(chordTolerance: number, positions: Float32Array): number {
  let far = 0;
  for (let i = 0; i < positions.length; i++) {
    const v = Math.abs(positions[i]!);
    if (v > far) far = v;
  }
  return Math.max(chordTolerance / 10, far / MAX_STEPS);
}

const zig = (v: number) => ((v << 1) ^ (v >> 31)) >>> 0;

/** Writes `count` 32-bit values into 4 planes at `o`. */
function planes4(out: Uint8Array, o: number, count: number, value: (i: number) => number): number {
  const p1 = o + count, p2 = p1 + count, p3 = p2 + count;
  for (let i = 0; i < count; i++) {
    const v = value(i);
    out[o + i] = v & 255;
    out[p1 + i] = (v >>> 8) & 255;
    out[p2 + i] = (v >>> 16) & 255;
    out[p3 + i] = v >>> 24;
  }
  return o + 4 * count;
}

const pad4 = (n: number) => (n + 3) & ~3;

/** Encodes a path and its summary in the CGTP layout (uncompressed; the route compresses it). */
export function encodeToolpath(path: ViewerPath, meta: ViewerMeta): Uint8Array {
  const n = path.segmentCount;
  const nv = n === 0 ? 0 : n + 1;
  const metaBytes = new TextEncoder().encode(JSON.stringify(meta));
  const start = HEADER + pad4(metaBytes.length);
  const size = start + nv * 12 + n * (4 + 1 + 2 + 1 + 4 + 4);
  const out = new Uint8Array(size);
  const dv = new DataView(out.buffer);
  const q = positionStep(meta.chordTolerance, path.positions);
  dv.setUint32(0, MAGIC, true);
  dv.setUint16(4, TOOLPATH_FORMAT_VERSION, true);
  dv.setUint16(6, 0, true);
  dv.setUint32(8, n, true);
  dv.setUint32(12, metaBytes.length, true);
  dv.setFloat64(16, q, true);
  dv.setFloat64(24, TIME_STEP, true);
  out.set(metaBytes, HEADER);
  let o = start;
  const p = path.positions;
  for (let axis = 0; axis < 3; axis++) {
    let prev = 0;
    o = planes4(out, o, nv, (i) => {
      const s = Math.round(p[i * 3 + axis]! / q);
      const d = s - prev;
      prev = s;
      return zig(d);
    });
  }
  let prevLine = 0;
  o = planes4(out, o, n, (i) => {
    const l = path.line[i]!;
    const d = l - prevLine;
    prevLine = l;
    return zig(d);
  });
  out.set(path.kind.subarray(0, n), o);
  o += n;
  for (let i = 0; i < n; i++) {
    const t = path.tool[i]!;
    out[o + i] = t & 255;
    out[o + n + i] = t >>> 8;
  }
  o += 2 * n;
  out.set(path.offset.subarray(0, n), o);
  o += n;
  const ends = new Float64Array(n);
  let prevEnd = 0;
  o = planes4(out, o, n, (i) => {
    const e = Math.round(path.time[i]! / TIME_STEP);
    ends[i] = e;
    const d = e - prevEnd;
    prevEnd = e;
    return zig(d);
  });
  o = planes4(out, o, n, (i) => zig(Math.round(path.startTime[i]! / TIME_STEP) - (i > 0 ? ends[i - 1]! : 0)));
  if (o !== size) throw new Error("toolpath encoding size mismatch");
  return out;
}

/** A CGTP answer that cannot be read. */
export class ToolpathFormatError extends Error {}

/** Decodes the CGTP layout; throws ToolpathFormatError on anything malformed. */
export function decodeToolpath(bytes: Uint8Array): { path: ViewerPath; meta: ViewerMeta } {
  if (bytes.length < HEADER) throw new ToolpathFormatError("toolpath answer too short");
  const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (dv.getUint32(0, true) !== MAGIC) throw new ToolpathFormatError("not a toolpath answer");
  const version = dv.getUint16(4, true);
  if (version !== TOOLPATH_FORMAT_VERSION) throw new ToolpathFormatError(`toolpath format ${version} is not known here`);
  const n = dv.getUint32(8, true);
  const m = dv.getUint32(12, true);
  const q = dv.getFloat64(16, true);
  const ts = dv.getFloat64(24, true);
  const nv = n === 0 ? 0 : n + 1;
  const start = HEADER + pad4(m);
  if (bytes.length !== start + nv * 12 + n * 16 || !(q > 0) || !(ts > 0)) throw new ToolpathFormatError("toolpath answer has the wrong size");
  const meta = JSON.parse(new TextDecoder().decode(bytes.subarray(HEADER, HEADER + m))) as ViewerMeta;
  const b = bytes;
  let o = start;
  // plain loops (this runs over millions of rows): value i of a 4-plane block at o is its bytes at o+i, o+n+i, ...
  const positions = new Float32Array(nv * 3);
  for (let axis = 0; axis < 3; axis++) {
    const p1 = o + nv, p2 = p1 + nv, p3 = p2 + nv;
    let s = 0;
    for (let i = 0; i < nv; i++) {
      const u = (b[o + i]! | (b[p1 + i]! << 8) | (b[p2 + i]! << 16) | (b[p3 + i]! << 24)) >>> 0;
      s += (u >>> 1) ^ -(u & 1);
      positions[i * 3 + axis] = s * q;
    }
    o += 4 * nv;
  }
  const line = new Uint32Array(n);
  {
    const p1 = o + n, p2 = p1 + n, p3 = p2 + n;
    let l = 0;
    for (let i = 0; i < n; i++) {
      const u = (b[o + i]! | (b[p1 + i]! << 8) | (b[p2 + i]! << 16) | (b[p3 + i]! << 24)) >>> 0;
      l += (u >>> 1) ^ -(u & 1);
      line[i] = l;
    }
    o += 4 * n;
  }
  const kind = b.slice(o, o + n);
  o += n;
  const tool = new Uint16Array(n);
  for (let i = 0; i < n; i++) tool[i] = b[o + i]! | (b[o + n + i]! << 8);
  o += 2 * n;
  const offset = b.slice(o, o + n);
  o += n;
  const time = new Float32Array(n);
  const startTime = new Float32Array(n);
  {
    const e1 = o + n, e2 = e1 + n, e3 = e2 + n;
    const s0 = o + 4 * n, s1 = s0 + n, s2 = s1 + n, s3 = s2 + n;
    let e = 0;
    for (let i = 0; i < n; i++) {
      const pu = (b[s0 + i]! | (b[s1 + i]! << 8) | (b[s2 + i]! << 16) | (b[s3 + i]! << 24)) >>> 0;
      startTime[i] = (e + ((pu >>> 1) ^ -(pu & 1))) * ts;
      const eu = (b[o + i]! | (b[e1 + i]! << 8) | (b[e2 + i]! << 16) | (b[e3 + i]! << 24)) >>> 0;
      e += (eu >>> 1) ^ -(eu & 1);
      time[i] = e * ts;
    }
  }
  return { path: { segmentCount: n, positions, line, kind, tool, offset, time, startTime }, meta };
}
