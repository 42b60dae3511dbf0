/**
 * Accounting of each move: lengths, the time model (programmed feed, rapid rate, and a trapezoidal profile per move
 * [KIN]), bounds, the feed and speed ranges while cutting, and the cutting runs and stretches the multi-part checks
 * read. A move adds into one "stretch" accumulator (the current tool under the current offset), folded into the
 * program, tool and offset sums when either changes.
 */
import { R } from "./rules";
import { Engine } from "./state";
import * as codes from "./codes";
import * as sums from "./bounds";

// imported constants copied into module constants (codes.ts says why)
const { B_F, K_ARC, K_CYCLE_RAPID, K_FEED, K_RAPID, NO_TOOL_IDX, fmt, offsetCode } = codes;
const {
  BSTRIDE, SSTRIDE, S_DWELL_S, S_FEED_LEN, S_FEED_S, S_RAPID_LEN, S_RAPID_S, S_TC_S, S_TOTAL_S, addBox, initBox,
  mergeBox,
} = sums;

/** Trapezoidal move time [KIN]: top speed v (units/s), acceleration a (units/s^2). */
export function trapezoidSeconds(len: number, v: number, a: number): number {
  if (!(len > 0) || !(v > 0)) return 0;
  if (!(a > 0) || !Number.isFinite(a)) return len / v;
  return len >= (v * v) / a ? len / v + v / a : 2 * Math.sqrt(len / a);
}

declare module "./state" {
  interface Engine {
    addSeconds(slot: number, sec: number): void;
    addDwell(sec: number): void;
    stretch(): number;
    fold(oi: number): void;
    account(line: number, kind: number): void;
    cutRanges(ti: number, fr: number): void;
    newRun(ti: number, oi: number): void;
    cutStart(): void;
    point(p: Float64Array, cut: boolean): void;
    travel(p: Float64Array): void;
  }
}

const pp = Engine.prototype;

/**
 * Adds `sec` to one time slot and to the total, for the program, the current tool and (dwells only) the offset
 * in use: a tool change belongs to no part, and a dwell before any offset is in use creates none.
 */
pp.addSeconds = function (this: Engine, slot: number, sec: number): void {
  this.gS[slot]! += sec;
  this.gS[S_TOTAL_S]! += sec;
  this.clock += sec;
  this.tS[this.toolSlot * SSTRIDE + slot]! += sec;
  this.tS[this.toolSlot * SSTRIDE + S_TOTAL_S]! += sec;
  const oi = this.offIdx;
  if (slot === S_TC_S || oi < 0) return;
  this.oS[oi * SSTRIDE + slot]! += sec;
  this.oS[oi * SSTRIDE + S_TOTAL_S]! += sec;
};

pp.addDwell = function (this: Engine, sec: number): void {
  this.addSeconds(S_DWELL_S, sec);
};

/** Index of the current offset, with the stretch accumulators switched to the current tool and offset. */
pp.stretch = function (this: Engine): number {
  const oi = this.offIdx < 0 ? this.curOff() : this.offIdx;
  if (this.toolSlot !== this.curSlot || oi !== this.curOi) this.fold(oi);
  return oi;
};

/** Adds the stretch into the program, tool and offset accumulators and starts a new one for slot/offset `oi`. */
pp.fold = function (this: Engine, oi: number): void {
  const slot = this.curSlot;
  if (slot >= 0) {
    const cs = this.cS;
    const gs = this.gS, ts = this.tS, os = this.oS;
    const tb = slot * SSTRIDE, ob = this.curOi * SSTRIDE;
    for (let k = 0; k < SSTRIDE; k++) {
      const v = cs[k]!;
      gs[k]! += v;
      ts[tb + k]! += v;
      os[ob + k]! += v;
      cs[k] = 0;
    }
    const cb = this.cB;
    mergeBox(this.gB, 0, cb);
    mergeBox(this.tB, slot * BSTRIDE, cb);
    mergeBox(this.oB, this.curOi * BSTRIDE, cb);
    initBox(cb, 0);
  }
  this.curSlot = this.toolSlot;
  this.curOi = oi;
};

/** Lengths, times and counts of one move of length `mlen`. */
pp.account = function (this: Engine, line: number, kind: number): void {
  const len = this.mlen;
  const acc = this.accel;
  const rapid = kind === K_RAPID || kind === K_CYCLE_RAPID;
  const oi = this.stretch();
  const cs = this.cS;
  let t: number;
  let total: number;
  if (rapid) {
    t = (len / this.rapidRate) * 60;
    const v = this.rapidRate / 60;
    total = len > 0 ? (len >= (v * v) / acc ? len / v + v / acc : 2 * Math.sqrt(len / acc)) : 0;
    this.rapidLen += len;
    cs[S_RAPID_LEN]! += len;
    cs[S_RAPID_S]! += t;
  } else {
    let v: number; // units/min
    if (this.inverseTime) {
      const f = this.mask & B_F ? this.feedRaw : NaN;
      t = f > 0 ? 60 / f : 0;
      v = t > 0 ? (len / t) * 60 : 0;
    } else {
      v = this.feed;
      t = v > 0 ? (len / v) * 60 : 0;
    }
    const vs = (v < this.maxFeed ? v : this.maxFeed) / 60;
    // trapezoidal profile [KIN]; a triangle when the move is too short to reach the feed
    total = vs > 0 && len > 0 ? (len >= (vs * vs) / acc ? len / vs + vs / acc : 2 * Math.sqrt(len / acc)) : 0;
    this.feedLen += len;
    cs[S_FEED_LEN]! += len;
    cs[S_FEED_S]! += t;
    if (this.cutNow) {
      const ti = this.toolIdx;
      const fr = this.inverseTime ? this.feedRaw : this.feed;
      // the ranges only change when the feed, the speed or the tool does (NaN always takes the long way)
      if (fr !== this.rangeFeed || this.spindle !== this.rangeSpin || ti !== this.rangeTool) this.cutRanges(ti, fr);
    }
  }
  cs[S_TOTAL_S]! += total;
  // the motion's place on the clock, for the segments it writes
  this.t0 = this.clock;
  this.clock += total;
  this.t1 = this.clock;
  // first/last lines; the lists only change when the tool or the offset does
  const o = this.offsets[oi]!;
  o.last = line;
  if (this.toolIdx !== NO_TOOL_IDX) this.tools[this.toolIdx]!.lastLine = line;
  if (this.toolIdx !== this.accTool || oi !== this.accOff) {
    this.accTool = this.toolIdx;
    this.accOff = oi;
    if (o.firstMotion === null) o.firstMotion = line;
    if (this.toolIdx !== NO_TOOL_IDX) {
      const tl = this.tools[this.toolIdx]!;
      if (!tl.offsets.includes(oi)) tl.offsets.push(oi);
      if (!o.tools.includes(tl.number)) o.tools.push(tl.number);
    }
  }
  if (kind === K_RAPID) this.counts.rapid++;
  else if (kind === K_FEED) this.counts.feed++;
  else if (kind === K_ARC) this.counts.arc++;
};

/** Feed and spindle ranges while cutting, per tool and for the program. */
pp.cutRanges = function (this: Engine, ti: number, fr: number): void {
  const s = this.spindle;
  this.rangeFeed = fr;
  this.rangeSpin = s;
  this.rangeTool = ti;
  if (ti !== NO_TOOL_IDX) {
    if (fr === fr) {
      if (fr < this.tFeedMin[ti]!) this.tFeedMin[ti] = fr;
      if (fr > this.tFeedMax[ti]!) this.tFeedMax[ti] = fr;
    }
    if (s === s) {
      if (s < this.tSpinMin[ti]!) this.tSpinMin[ti] = s;
      if (s > this.tSpinMax[ti]!) this.tSpinMax[ti] = s;
    }
  }
  if (s === s) {
    if (s < this.spinMin) this.spinMin = s;
    if (s > this.spinMax) this.spinMax = s;
  }
};

/** A new cutting run: the cutting tool or the offset changed. */
pp.newRun = function (this: Engine, ti: number, oi: number): void {
  const prev = this.runs[this.runs.length - 1];
  if (prev) {
    prev.endSeg = this.tpN;
    prev.blocks = this.runBlocks;
    const k = this.lastRunTool * 256 + this.lastRunOff;
    this.blocksOf.set(k, (this.blocksOf.get(k) ?? 0) + this.runBlocks);
  }
  this.lastRunTool = ti;
  this.lastRunOff = oi;
  this.runBase = this.blocksOf.get(ti * 256 + oi) ?? 0;
  this.runBlocks = 0;
  if (this.runs.length < 100000) this.runs.push({ tool: ti, offset: oi, startSeg: this.tpN, endSeg: -1, blocks: 0 });
};

/** The start of a cutting stretch belongs to the cutting bounds (it is already in the overall ones). */
pp.cutStart = function (this: Engine): void {
  this.stretch();
  addBox(this.cB, 6, this.pos, false);
  this.approach = 0;
};

/** Adds an end point (or arc extreme) to the program bounds; NaN axes are skipped by the comparisons. */
pp.point = function (this: Engine, p: Float64Array, cut: boolean): void {
  this.stretch();
  addBox(this.cB, 0, p, cut);
  if (this.machine !== undefined && this.originSource.size > 0) this.travel(p);
};

pp.travel = function (this: Engine, p: Float64Array): void {
  if (this.relAxes !== 0) return;
  const x = p[0]!, y = p[1]!, z = p[2]!;
  const o = this.origins.get(this.offNum);
  const m = this.machine;
  if (!o || !m) return;
  const s = this.mScale;
  const tr = m.travel;
  const eps = 1e-6;
  const mx = x + o[0]!, my = y + o[1]!, mz = z + o[2]!;
  let bits = 0;
  if (mx < tr.x.min * s - eps) bits |= 1;
  if (mx > tr.x.max * s + eps) bits |= 2;
  if (my < tr.y.min * s - eps) bits |= 4;
  if (my > tr.y.max * s + eps) bits |= 8;
  if (mz < tr.z.min * s - eps) bits |= 16;
  if (mz > tr.z.max * s + eps) bits |= 32;
  const fresh = bits & ~this.overTravelSaid;
  if (fresh) {
    this.overTravelSaid |= bits;
    const names = ["X-", "X+", "Y-", "Y+", "Z-", "Z+"].filter((_, i) => fresh & (1 << i)).join(", ");
    this.say(R.overTravel, "error", this.line,
      `move to machine X${fmt(mx)} Y${fmt(my)} Z${fmt(mz)} is outside the travel (${names}) under ${offsetCode(this.offNum)}`);
  }
};
