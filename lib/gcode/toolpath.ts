import type { Analysis, JsonAnalysis, JsonToolpath, Toolpath } from "./types";
import { MotionKind } from "./types";

/**
 * Writes the endpoints of segment i into `out` as [x0, y0, z0, x1, y1, z1] (part coordinates) and returns its
 * MotionKind. Segment i runs from vertex i to vertex i + 1.
 */
export function segmentEndpoints(tp: Toolpath, i: number, out: Float32Array | Float64Array | number[]): number {
  const p = tp.positions;
  const v = i * 3;
  out[0] = p[v]!;
  out[1] = p[v + 1]!;
  out[2] = p[v + 2]!;
  out[3] = p[v + 3]!;
  out[4] = p[v + 4]!;
  out[5] = p[v + 5]!;
  return tp.kind[i]!;
}

/** One segment as yielded by toolpathSegments (the same object is reused between steps). */
export interface SegmentView {
  index: number;
  kind: number;
  line: number;
  tool: number;
  offset: number;
  from: [number, number, number];
  to: [number, number, number];
}

/** Iterates the drawable segments (Jump segments are skipped). Reuses one object; copy what you keep. */
export function* toolpathSegments(tp: Toolpath): Generator<SegmentView> {
  const v: SegmentView = { index: 0, kind: 0, line: 0, tool: 0, offset: 0, from: [0, 0, 0], to: [0, 0, 0] };
  const p = tp.positions;
  for (let i = 0; i < tp.segmentCount; i++) {
    const k = tp.kind[i]!;
    if (k === MotionKind.Jump) continue;
    const o = i * 3;
    v.index = i;
    v.kind = k;
    v.line = tp.line[i]!;
    v.tool = tp.tool[i]!;
    v.offset = tp.offset[i]!;
    v.from[0] = p[o]!;
    v.from[1] = p[o + 1]!;
    v.from[2] = p[o + 2]!;
    v.to[0] = p[o + 3]!;
    v.to[1] = p[o + 4]!;
    v.to[2] = p[o + 5]!;
    yield v;
  }
}

/**
 * Pairs of vertices for a line-segments draw call (6 floats per drawable segment), optionally only of some kinds,
 * with each offset's origin added (machine space) when `origins[offset]` is given.
 */
export function toolpathLinePairs(
  tp: Toolpath,
  kinds?: readonly number[],
  origins?: readonly ({ x: number; y: number; z: number } | null)[],
): Float32Array {
  let n = 0;
  for (let i = 0; i < tp.segmentCount; i++) {
    const k = tp.kind[i]!;
    if (k !== MotionKind.Jump && (!kinds || kinds.includes(k))) n++;
  }
  const out = new Float32Array(n * 6);
  const p = tp.positions;
  let j = 0;
  for (let i = 0; i < tp.segmentCount; i++) {
    const k = tp.kind[i]!;
    if (k === MotionKind.Jump || (kinds && !kinds.includes(k))) continue;
    const o = origins?.[tp.offset[i]!] ?? null;
    const ox = o ? o.x : 0, oy = o ? o.y : 0, oz = o ? o.z : 0;
    const v = i * 3;
    out[j++] = p[v]! + ox;
    out[j++] = p[v + 1]! + oy;
    out[j++] = p[v + 2]! + oz;
    out[j++] = p[v + 3]! + ox;
    out[j++] = p[v + 4]! + oy;
    out[j++] = p[v + 5]! + oz;
  }
  return out;
}

type Column = Float32Array<ArrayBuffer> | Uint32Array<ArrayBuffer> | Uint16Array<ArrayBuffer> | Uint8Array<ArrayBuffer>;
interface ColumnType<T extends Column> {
  new (length: number): T;
  new (buffer: ArrayBuffer): T;
  readonly BYTES_PER_ELEMENT: number;
}
/** ES2024 resizable ArrayBuffer, typed here because the project's lib is ES2023. */
interface Resizable {
  readonly byteLength: number;
  resize(byteLength: number): void;
}
const ResizableBuffer = ArrayBuffer as unknown as new (byteLength: number, options: { maxByteLength: number }) => ArrayBuffer & Resizable;
const CAN_RESIZE = typeof (ArrayBuffer.prototype as Partial<Resizable>).resize === "function";
/** Elements moved per step when a column is handed over (small, so the move never holds two copies). */
const MOVE_STEP = 1 << 18;

/**
 * An append-only column of one toolpath field. It grows in place inside a resizable ArrayBuffer that reserves
 * address space for `maxLength` elements and commits memory only as it fills, so growing never copies and never
 * holds the old and the new array at once (doubling peaks at 3x the data, 1.5x growth at 2.5x). `take()` moves
 * the data into an ordinary array of exactly the final length, a step at a time from the end while the resizable
 * buffer shrinks, so the move too holds the data about once. Without resizable buffers it grows by 1.5x.
 * @internal used by the analysis loop, which writes into small plain chunks and appends them here.
 */
export class ToolpathColumn<T extends Column> {
  length = 0;
  private rab: (ArrayBuffer & Resizable) | null = null;
  private view: T;
  constructor(private readonly type: ColumnType<T>, private readonly maxLength: number) {
    if (CAN_RESIZE) {
      try {
        this.rab = new ResizableBuffer(0, { maxByteLength: maxLength * type.BYTES_PER_ELEMENT });
      } catch {
        this.rab = null; // address space refused: fall back to growing copies
      }
    }
    this.view = this.rab ? new type(this.rab) : new type(1024);
  }
  /** Appends the first `count` elements of `src`. */
  append(src: T, count: number): void {
    const need = this.length + count;
    if (need > this.maxLength) throw new Error("toolpath column over its limit");
    if (this.rab) this.rab.resize(need * this.type.BYTES_PER_ELEMENT); // the view tracks the length
    else if (need > this.view.length) {
      const grown = new this.type(Math.min(this.maxLength, Math.max(need, Math.ceil(this.view.length * 1.5))));
      grown.set(this.view.subarray(0, this.length));
      this.view = grown;
    }
    this.view.set(count === src.length ? src : src.subarray(0, count), this.length);
    this.length = need;
  }
  /** The data as an ordinary array of exactly `length` elements; the column is empty afterwards. */
  take(): T {
    const n = this.length;
    this.length = 0;
    const rab = this.rab;
    if (!rab) {
      const v = this.view;
      this.view = new this.type(0);
      return (n === v.length ? v : v.subarray(0, n)) as T;
    }
    const out = new this.type(n);
    const bpe = this.type.BYTES_PER_ELEMENT;
    for (let end = n; end > 0; ) {
      const start = end > MOVE_STEP ? end - MOVE_STEP : 0;
      out.set(this.view.subarray(start, end), start);
      rab.resize(start * bpe);
      end = start;
    }
    return out;
  }
}

const B64 = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
const B64_CODES = new Uint8Array(64);
for (let i = 0; i < 64; i++) B64_CODES[i] = B64.charCodeAt(i);
const B64_INV = new Int16Array(256).fill(-1);
for (let i = 0; i < 64; i++) B64_INV[B64.charCodeAt(i)] = i;

const LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

function bytesOf(a: ArrayBufferView, bytesPerElement: number): Uint8Array {
  const u = new Uint8Array(a.buffer, a.byteOffset, a.byteLength);
  if (LITTLE_ENDIAN || bytesPerElement === 1) return u;
  const c = new Uint8Array(u.length);
  for (let i = 0; i < u.length; i += bytesPerElement) for (let k = 0; k < bytesPerElement; k++) c[i + k] = u[i + bytesPerElement - 1 - k]!;
  return c;
}

/** Base64 (standard alphabet, padded) of bytes; no Buffer, so it runs in the browser too. */
export function bytesToBase64(u: Uint8Array): string {
  const n = u.length;
  const out = new Uint8Array(Math.ceil(n / 3) * 4);
  let j = 0;
  let i = 0;
  for (; i + 2 < n; i += 3) {
    const v = (u[i]! << 16) | (u[i + 1]! << 8) | u[i + 2]!;
    out[j++] = B64_CODES[v >> 18]!;
    out[j++] = B64_CODES[(v >> 12) & 63]!;
    out[j++] = B64_CODES[(v >> 6) & 63]!;
    out[j++] = B64_CODES[v & 63]!;
  }
  if (i < n) {
    const v = (u[i]! << 16) | ((i + 1 < n ? u[i + 1]! : 0) << 8);
    out[j++] = B64_CODES[v >> 18]!;
    out[j++] = B64_CODES[(v >> 12) & 63]!;
    out[j++] = i + 1 < n ? B64_CODES[(v >> 6) & 63]! : 61;
    out[j++] = 61;
  }
  return new TextDecoder("latin1").decode(out);
}

/** Decodes base64 made by bytesToBase64; throws on a malformed string. */
export function base64ToBytes(s: string): Uint8Array {
  let len = s.length;
  if (len % 4 !== 0) throw new Error("base64 length is not a multiple of 4");
  let pad = 0;
  if (len > 0 && s.charCodeAt(len - 1) === 61) pad++;
  if (len > 1 && s.charCodeAt(len - 2) === 61) pad++;
  const out = new Uint8Array((len / 4) * 3 - pad);
  let j = 0;
  len -= pad;
  for (let i = 0; i < len; i += 4) {
    const a = B64_INV[s.charCodeAt(i)]!;
    const b = B64_INV[s.charCodeAt(i + 1)]!;
    const c = i + 2 < len ? B64_INV[s.charCodeAt(i + 2)]! : 0;
    const d = i + 3 < len ? B64_INV[s.charCodeAt(i + 3)]! : 0;
    if ((a | b | c | d) < 0) throw new Error("invalid base64 character");
    const v = (a << 18) | (b << 12) | (c << 6) | d;
    if (j < out.length) out[j++] = v >> 16;
    if (j < out.length) out[j++] = (v >> 8) & 255;
    if (j < out.length) out[j++] = v & 255;
  }
  return out;
}

function typed<T>(bytes: Uint8Array, size: number, make: (buf: ArrayBuffer, n: number) => T): T {
  const copy = new Uint8Array(bytes.length);
  if (LITTLE_ENDIAN || size === 1) copy.set(bytes);
  else for (let i = 0; i < bytes.length; i += size) for (let k = 0; k < size; k++) copy[i + k] = bytes[i + size - 1 - k]!;
  return make(copy.buffer, bytes.length / size);
}

/** Toolpath -> JSON-safe form (typed arrays as base64 of little-endian bytes). */
export function serializeToolpath(tp: Toolpath): JsonToolpath {
  return {
    segmentCount: tp.segmentCount,
    chordTolerance: tp.chordTolerance,
    encoding: "base64-le",
    positions: bytesToBase64(bytesOf(tp.positions, 4)),
    line: bytesToBase64(bytesOf(tp.line, 4)),
    kind: bytesToBase64(tp.kind),
    tool: bytesToBase64(bytesOf(tp.tool, 2)),
    offset: bytesToBase64(tp.offset),
    ...(tp.time && tp.startTime && { time: bytesToBase64(bytesOf(tp.time, 4)), startTime: bytesToBase64(bytesOf(tp.startTime, 4)) }),
  };
}

/** JSON form -> Toolpath with typed arrays; throws when the arrays do not match segmentCount. */
export function deserializeToolpath(j: JsonToolpath): Toolpath {
  const n = j.segmentCount;
  const positions = typed(base64ToBytes(j.positions), 4, (b, k) => new Float32Array(b, 0, k));
  const line = typed(base64ToBytes(j.line), 4, (b, k) => new Uint32Array(b, 0, k));
  const kind = base64ToBytes(j.kind);
  const tool = typed(base64ToBytes(j.tool), 2, (b, k) => new Uint16Array(b, 0, k));
  const offset = base64ToBytes(j.offset);
  const vertices = n === 0 ? 0 : n + 1;
  if (line.length !== n || kind.length !== n || tool.length !== n || offset.length !== n || positions.length !== vertices * 3) {
    throw new Error("toolpath arrays do not match the segment count");
  }
  const tp: Toolpath = { segmentCount: n, positions, line, kind, tool, offset, chordTolerance: j.chordTolerance };
  if (j.time !== undefined && j.startTime !== undefined) {
    tp.time = typed(base64ToBytes(j.time), 4, (b, k) => new Float32Array(b, 0, k));
    tp.startTime = typed(base64ToBytes(j.startTime), 4, (b, k) => new Float32Array(b, 0, k));
    if (tp.time.length !== n || tp.startTime.length !== n) throw new Error("toolpath time columns do not match the segment count");
  }
  return tp;
}

/** Analysis -> JSON-safe object (for JSON.stringify, the database and `--json`). */
export function serializeAnalysis(a: Analysis): JsonAnalysis {
  return { ...a, toolpath: serializeToolpath(a.toolpath) };
}

/** JSON-safe object -> Analysis with a typed-array toolpath. */
export function deserializeAnalysis(j: JsonAnalysis): Analysis {
  return { ...j, toolpath: deserializeToolpath(j.toolpath) };
}
