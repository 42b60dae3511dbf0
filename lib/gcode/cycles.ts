/**
 * Canned cycles ([NIST] 3.5.16, 3.5.20; G73, G74, G76 and G81-G89): sticky R, Z, Q and P, repeats, the initial
 * level, G98/G99 retracts, pecks, and the rapids to the R plane and between holes checked as rapids.
 */
import { R } from "./rules";
import { Engine } from "./state";
import * as codes from "./codes";

// imported constants copied into module constants (codes.ts says why)
const {
  B_K, B_L, B_P, B_Q, B_R, G73, G74, G76, G81, G82, G83, G84, G86, G87, G88, G89, K_CYCLE_FEED, K_CYCLE_RAPID, L_K,
  L_L, L_P, L_Q, L_R, L_X, L_Y, L_Z, fmt, fmtCode,
} = codes;

declare module "./state" {
  interface Engine {
    cycle(line: number, motion: number, mask: number): void;
    cycMove(line: number, kind: number, a: number, b: number, c: number): void;
  }
}

const pp = Engine.prototype;

pp.cycle = function (this: Engine, line: number, motion: number, mask: number): void {
  const lv = this.lv;
  const sc = this.sc;
  const pos = this.pos;
  this.counts.cycles++;
  if (this.comp !== 40) this.say(R.compInvalid, "error", line, "canned cycle with cutter compensation on");
  this.feedCheck(line);
  let ia: number, ib: number, ic: number, la: number, lb: number, lc: number;
  if (this.plane === 17) {
    ia = 0; ib = 1; ic = 2; la = L_X; lb = L_Y; lc = L_Z;
  } else if (this.plane === 18) {
    ia = 2; ib = 0; ic = 1; la = L_Z; lb = L_X; lc = L_Y;
  } else {
    ia = 1; ib = 2; ic = 0; la = L_Y; lb = L_Z; lc = L_X;
  }
  const m = mask;
  let reps = 1;
  if (m & B_L) {
    const l = lv[L_L]!;
    if (!(l >= 1) || l !== Math.floor(l)) {
      this.say(R.cycleInvalid, "error", line, `L${fmt(l)}: the repeat count must be a positive integer`);
      this.markNotEvaluated(line);
      return;
    }
    reps = Math.min(l, 100000);
  } else if (m & B_K && motion !== G87) {
    const k = lv[L_K]!;
    if (k >= 1 && k === Math.floor(k)) reps = Math.min(k, 100000);
  }
  const oldC = pos[ic]!;
  if (!(m & B_R) && this.cycR !== this.cycR && this.common && oldC === oldC) {
    // common dialect: no R ever given: the cycle starts from and returns to the initial level
    this.cycR = this.absolute ? oldC : 0;
    this.say(R.cycleInvalid, "warning", line,
      `canned cycle with no R plane: it starts from and retracts to the initial level ${fmt(oldC / sc)}, under G98 and G99 alike`);
  }
  // R and Z: sticky; in G91, R is relative to the current position and Z to R
  let rr: number, zz: number;
  if (this.absolute) {
    if (m & B_R) this.cycR = lv[L_R]! * sc + this.shift[ic]!;
    if (m & (1 << lc)) this.cycZ = lv[lc]! * sc + this.shift[ic]!;
    rr = this.cycR;
    zz = this.cycZ;
  } else {
    if (m & B_R) this.cycR = lv[L_R]! * sc;
    if (m & (1 << lc)) this.cycZ = lv[lc]! * sc;
    rr = oldC + this.cycR;
    zz = rr + this.cycZ;
  }
  if (rr !== rr || zz !== zz) {
    if (this.cycR !== this.cycR || this.cycZ !== this.cycZ) {
      this.say(R.cycleInvalid, "error", line, this.cycR !== this.cycR ? "canned cycle with no R plane" : "canned cycle with no bottom (Z)");
    } else {
      this.say(R.arcStartUnknown, "warning", line, "incremental canned cycle from an unknown position");
    }
    this.skipBlock(line);
    return;
  }
  if (rr < zz) {
    this.say(R.cycleRBelowZ, "error", line, `R plane ${fmt(rr / sc)} is below the bottom ${fmt(zz / sc)}`);
    this.markNotEvaluated(line);
    return;
  }
  if (m & B_Q) this.cycQ = lv[L_Q]! * sc;
  if (m & B_P) this.cycP = lv[L_P]!;
  const peck = motion === G73 || motion === G83;
  if (peck && !(this.cycQ > 0)) {
    this.say(R.cycleInvalid, "error", line, `${fmtCode(motion)} needs a positive Q peck depth`);
    this.markNotEvaluated(line);
    return;
  }
  if (this.inverseTime) {
    this.say(R.cycleInvalid, "error", line, "canned cycle in G93 inverse time mode");
  }
  if (motion === G84 && this.spindleDir !== 3) {
    this.say(R.cycleInvalid, "error", line, "G84 tapping needs the spindle turning clockwise (M3)");
  }
  if (motion === G74 && this.spindleDir !== 4) {
    this.say(R.cycleInvalid, "error", line, "G74 reverse tapping needs the spindle turning counterclockwise (M4)");
  }
  // G98 returns to the Z the block started at ([NIST] 3.5.20); the common dialect's to the initial level, the Z
  // where the cycle started, even after G99 holes
  if (this.cycInit !== this.cycInit) this.cycInit = oldC;
  const old = this.common ? this.cycInit : oldC;
  const clear = this.retractOld ? (old > rr ? old : rr) : rr;
  this.cycA = ia;
  this.cycB = ib;
  this.cycC = ic;
  // preliminary: up to R if below it
  if (oldC < rr || oldC !== oldC) {
    this.cycMove(line, K_CYCLE_RAPID, pos[ia]!, pos[ib]!, rr);
  }
  // the moves to the R plane and between holes are rapids: reported when they run below safe Z
  let lowSaid = ic !== 2 || (this.relAxes & 4) !== 0;
  const lim = this.safeZ - 1e-9;
  // peck back-off 0.010 in / 0.254 mm ([NIST-SRC])
  const backoff = this.units === "inch" ? 0.01 : 0.254;
  for (let rep = 0; rep < reps; rep++) {
    let a = pos[ia]!, b = pos[ib]!;
    if (this.absolute) {
      if (m & (1 << la)) a = lv[la]! * sc + this.shift[ia]!;
      if (m & (1 << lb)) b = lv[lb]! * sc + this.shift[ib]!;
    } else {
      if (m & (1 << la)) a += lv[la]! * sc;
      if (m & (1 << lb)) b += lv[lb]! * sc;
    }
    if (!lowSaid && pos[ic]! < lim && (a !== pos[ia] || b !== pos[ib])) {
      lowSaid = true;
      this.say(R.rapidBelowSafeZ, "warning", line, `rapid between holes at the R plane Z${fmt(pos[ic]!)}, below safe Z ${fmt(this.safeZ)}`);
    }
    this.cycMove(line, K_CYCLE_RAPID, a, b, pos[ic]!);
    if (pos[ic] !== rr) {
      if (!lowSaid && rr < lim) {
        lowSaid = true;
        this.say(R.rapidBelowSafeZ, "warning", line, `rapid down to the cycle's R plane Z${fmt(rr)}, below safe Z ${fmt(this.safeZ)}`);
      }
      this.cycMove(line, K_CYCLE_RAPID, a, b, rr);
    }
    if (peck) {
      const q = this.cycQ;
      for (let d = rr - q; d > zz; d -= q) {
        this.cycMove(line, K_CYCLE_FEED, a, b, d);
        if (motion === G83) {
          this.cycMove(line, K_CYCLE_RAPID, a, b, rr);
          this.cycMove(line, K_CYCLE_RAPID, a, b, d + backoff);
        } else {
          this.cycMove(line, K_CYCLE_RAPID, a, b, d + backoff);
        }
      }
      this.cycMove(line, K_CYCLE_FEED, a, b, zz);
      this.cycMove(line, K_CYCLE_RAPID, a, b, clear);
    } else if (motion === G81 || motion === G82 || motion === G86 || motion === G87 || motion === G88 || motion === G76) {
      this.cycMove(line, K_CYCLE_FEED, a, b, zz);
      if ((motion === G82 || motion === G86 || motion === G88) && this.cycP > 0) this.addDwell(this.cycP);
      this.cycMove(line, K_CYCLE_RAPID, a, b, clear);
    } else {
      // G74 G84 G85 G89: feed in, feed out to R
      this.cycMove(line, K_CYCLE_FEED, a, b, zz);
      if (motion === G89 && this.cycP > 0) this.addDwell(this.cycP);
      this.cycMove(line, K_CYCLE_FEED, a, b, rr);
      if (clear > rr) this.cycMove(line, K_CYCLE_RAPID, a, b, clear);
    }
  }
};

/** One cycle leg to (a, b, c) in the cycle's plane axes. */
pp.cycMove = function (this: Engine, line: number, kind: number, a: number, b: number, c: number): void {
  const t = this.tgt;
  t[this.cycA] = a;
  t[this.cycB] = b;
  t[this.cycC] = c;
  const inc = this.inc;
  inc[0] = inc[1] = inc[2] = 0;
  this.linear(line, kind);
};
