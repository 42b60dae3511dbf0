/**
 * The toolpath columns (layout in README "Toolpath layout"): segments and vertices go into small plain chunks; a
 * program that outgrows one appends full chunks to a resizable column per field, and the end moves each column into an
 * exactly sized array.
 */
import type { Toolpath } from "./types";
import { R } from "./rules";
import { ToolpathColumn } from "./toolpath";
import { Engine } from "./state";
import * as codes from "./codes";

/** The arrays of a finished path (the time columns only with the option segmentTimes). */
export type PathArrays = Pick<Toolpath, "positions" | "line" | "kind" | "tool" | "offset" | "time" | "startTime">;

// imported constants copied into module constants (codes.ts says why)
const { CHUNK_MAX, K_JUMP } = codes;

declare module "./state" {
  interface Engine {
    seg(line: number, kind: number, e: Float64Array): void;
    vertex(x: number, y: number, z: number): void;
    push(line: number, kind: number, e: Float64Array): void;
    fullVertexChunk(): number;
    fullSegmentChunk(): number;
    flushSegments(): void;
    takePath(): PathArrays;
  }
}

const pp = Engine.prototype;

pp.seg = function (this: Engine, line: number, kind: number, e: Float64Array): void {
  if (!this.wantPath || this.tpFull) return;
  const x = e[0]!, y = e[1]!, z = e[2]!;
  if (x !== x || y !== y || z !== z) return;
  const pos = this.pos;
  const sx = pos[0]!, sy = pos[1]!, sz = pos[2]!;
  const startKnown = sx === sx && sy === sy && sz === sz;
  if (this.tpV === 0) {
    if (!startKnown) {
      this.vertex(x, y, z);
      return;
    }
    this.vertex(sx, sy, sz);
  } else if (!startKnown || sx !== this.lvx || sy !== this.lvy || sz !== this.lvz) {
    this.push(line, K_JUMP, startKnown ? pos : e);
    if (!startKnown) return;
  }
  this.push(line, kind, e);
};

pp.vertex = function (this: Engine, x: number, y: number, z: number): void {
  let v = this.cV;
  if (v === this.capV) v = this.fullVertexChunk();
  const o = v * 3;
  const cp = this.cPos;
  cp[o] = x;
  cp[o + 1] = y;
  cp[o + 2] = z;
  this.cV = v + 1;
  this.tpV++;
  this.lvx = x;
  this.lvy = y;
  this.lvz = z;
};

pp.push = function (this: Engine, line: number, kind: number, e: Float64Array): void {
  const i = this.tpN;
  if (i >= this.tpLimit) {
    this.tpFull = true;
    this.say(R.toolpathTruncated, "warning", line, `toolpath truncated at ${i} segments`);
    return;
  }
  let j = this.cN;
  if (j === this.capS) j = this.fullSegmentChunk();
  this.cLine[j] = line;
  this.cKind[j] = kind;
  this.cTool[j] = this.toolIdx;
  this.cOff[j] = this.offIdx < 0 ? this.curOff() : this.offIdx;
  if (this.wantTime) {
    // a Jump takes no time: it sits at the start of the motion it leads to
    this.cT0[j] = this.t0;
    this.cT1[j] = kind === K_JUMP ? this.t0 : this.t1;
  }
  this.cN = j + 1;
  this.tpN = i + 1;
  this.vertex(e[0]!, e[1]!, e[2]!);
};

/** Makes room in a full vertex chunk; returns the next free index in it. */
pp.fullVertexChunk = function (this: Engine): number {
  if (this.capV < CHUNK_MAX) {
    this.capV = Math.min(CHUNK_MAX, this.capV * 4);
    const p = new Float32Array(this.capV * 3);
    p.set(this.cPos);
    this.cPos = p;
    return this.cV;
  }
  if (!this.colPos) this.colPos = new ToolpathColumn(Float32Array, (this.tpLimit + 1) * 3);
  this.colPos.append(this.cPos, this.cV * 3);
  this.cV = 0;
  return 0;
};

/** Makes room in a full segment chunk; returns the next free index in it. */
pp.fullSegmentChunk = function (this: Engine): number {
  if (this.capS < CHUNK_MAX) {
    const cap = (this.capS = Math.min(CHUNK_MAX, this.capS * 4));
    const ln = new Uint32Array(cap);
    ln.set(this.cLine);
    this.cLine = ln;
    const k = new Uint8Array(cap);
    k.set(this.cKind);
    this.cKind = k;
    const t = new Uint16Array(cap);
    t.set(this.cTool);
    this.cTool = t;
    const o = new Uint8Array(cap);
    o.set(this.cOff);
    this.cOff = o;
    if (this.wantTime) {
      const t0 = new Float32Array(cap);
      t0.set(this.cT0);
      this.cT0 = t0;
      const t1 = new Float32Array(cap);
      t1.set(this.cT1);
      this.cT1 = t1;
    }
    return this.cN;
  }
  if (!this.colLine) {
    const lim = this.tpLimit;
    this.colLine = new ToolpathColumn(Uint32Array, lim);
    this.colKind = new ToolpathColumn(Uint8Array, lim);
    this.colTool = new ToolpathColumn(Uint16Array, lim);
    this.colOff = new ToolpathColumn(Uint8Array, lim);
    if (this.wantTime) {
      this.colT0 = new ToolpathColumn(Float32Array, lim);
      this.colT1 = new ToolpathColumn(Float32Array, lim);
    }
  }
  this.flushSegments();
  return 0;
};

pp.flushSegments = function (this: Engine): void {
  const j = this.cN;
  this.colLine!.append(this.cLine, j);
  this.colKind!.append(this.cKind, j);
  this.colTool!.append(this.cTool, j);
  this.colOff!.append(this.cOff, j);
  if (this.colT0) {
    this.colT0.append(this.cT0, j);
    this.colT1!.append(this.cT1, j);
  }
  this.cN = 0;
};

/** The toolpath arrays at the end of the run, each exactly as long as its data. */
pp.takePath = function (this: Engine): PathArrays {
  const n = this.tpN;
  if (n === 0) {
    // a lone start vertex is not a path: no segments, no vertices
    const empty: PathArrays = { positions: new Float32Array(0), line: new Uint32Array(0), kind: new Uint8Array(0), tool: new Uint16Array(0), offset: new Uint8Array(0) };
    if (this.wantTime) {
      empty.startTime = new Float32Array(0);
      empty.time = new Float32Array(0);
    }
    return empty;
  }
  let positions: Float32Array<ArrayBuffer>;
  if (this.colPos) {
    this.colPos.append(this.cPos, this.cV * 3);
    positions = this.colPos.take();
  } else positions = this.cPos.slice(0, this.cV * 3);
  this.cPos = new Float32Array(0);
  if (this.colLine) {
    this.flushSegments();
    this.cLine = new Uint32Array(0);
    this.cKind = new Uint8Array(0);
    this.cTool = new Uint16Array(0);
    this.cOff = new Uint8Array(0);
    const kind = this.colKind!.take();
    const offset = this.colOff!.take();
    const tool = this.colTool!.take();
    const line = this.colLine.take();
    const out: PathArrays = { positions, line, kind, tool, offset };
    if (this.colT0) {
      out.startTime = this.colT0.take();
      out.time = this.colT1!.take();
      this.cT0 = this.cT1 = new Float32Array(0);
    }
    return out;
  }
  const j = this.cN;
  const out: PathArrays = { positions, line: this.cLine.slice(0, j), kind: this.cKind.slice(0, j), tool: this.cTool.slice(0, j), offset: this.cOff.slice(0, j) };
  if (this.wantTime) {
    out.startTime = this.cT0.slice(0, j);
    out.time = this.cT1.slice(0, j);
  }
  return out;
};
