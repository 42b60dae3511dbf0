/**
 * Straight moves: the target of a move (absolute or incremental), the one definition of a cut that every cutting rule
 * shares, the program's start point, G28/G30 home moves and G53 machine moves.
 */
import { R } from "./rules";
import { trapezoidSeconds } from "./accounting";
import { Engine } from "./state";
import * as codes from "./codes";
import * as sums from "./bounds";

// imported constants copied into module constants (codes.ts says why)
const {
  AXIS_OF_LETTER, B_F, B_X, B_XYZ, B_Y, B_Z, G0, G1, G2, G3, G38_2, K_CYCLE_FEED, K_FEED, K_MACHINE, K_RAPID, L_X,
  L_Y, L_Z, NO_TOOL_IDX, fmt, offsetCode,
} = codes;
const { SSTRIDE, S_RAPID_S, S_TOTAL_S, addBox, growI32 } = sums;

declare module "./state" {
  interface Engine {
    target(mask: number): void;
    motionBlock(line: number, motion: number, maskIn: number): void;
    watchMove(line: number): void;
    startPoint(line: number): void;
    feedCheck(line: number): void;
    cutChecks(line: number): void;
    linear(line: number, kind: number): void;
    cutting(line: number): void;
    newStretch(oi: number): void;
    home(line: number, second: boolean): void;
    machineMove(line: number): void;
    machineLeg(line: number, mc: Float64Array, axes: number): void;
  }
}

const pp = Engine.prototype;

/**
 * Target of a move: programmed axes in part coordinates (absolute or incremental). An incremental axis from an
 * unknown position keeps its increment in `inc`, so the move's length is still known.
 */
pp.target = function (this: Engine, mask: number): void {
  const tgt = this.tgt;
  const lv = this.lv;
  const sc = this.sc;
  const pos = this.pos;
  const shift = this.shift;
  const inc = this.inc;
  if (this.absolute) {
    tgt[0] = mask & B_X ? lv[L_X]! * sc + shift[0]! : pos[0]!;
    tgt[1] = mask & B_Y ? lv[L_Y]! * sc + shift[1]! : pos[1]!;
    tgt[2] = mask & B_Z ? lv[L_Z]! * sc + shift[2]! : pos[2]!;
    inc[0] = inc[1] = inc[2] = 0;
  } else {
    inc[0] = mask & B_X ? lv[L_X]! * sc : 0;
    inc[1] = mask & B_Y ? lv[L_Y]! * sc : 0;
    inc[2] = mask & B_Z ? lv[L_Z]! * sc : 0;
    tgt[0] = pos[0]! + inc[0]!;
    tgt[1] = pos[1]! + inc[1]!;
    tgt[2] = pos[2]! + inc[2]!;
  }
};

pp.motionBlock = function (this: Engine, line: number, motion: number, maskIn: number): void {
  const mask = maskIn === 0 ? this.mask : maskIn;
  if (this.moveWatch) this.watchMove(line);
  if (motion === G0) {
    this.target(mask);
    this.linear(line, K_RAPID);
    return;
  }
  if (motion === G1 || motion === G38_2) {
    this.target(mask);
    this.feedCheck(line);
    this.linear(line, K_FEED);
    return;
  }
  if (motion === G2 || motion === G3) {
    this.feedCheck(line);
    this.arc(line, motion === G2, mask);
    return;
  }
  this.cycle(line, motion, mask);
};

/**
 * What only some moves need: the first move's checks, the first move after a tool change, moves under a transform.
 * Off (`moveWatch` false) for the ordinary moves of a program that has moved in G90.
 */
pp.watchMove = function (this: Engine, line: number): void {
  this.committed = true;
  if (!this.offSelected && !this.offsetSaid) {
    this.offsetSaid = true;
    this.say(R.offsetNotSet, "warning", line, `motion before any work offset was selected: it runs in the active offset (${offsetCode(this.offNum)} assumed)`);
  }
  if (!this.unitsDeclared && !this.unitsSaid) {
    this.unitsSaid = true;
    this.say(R.unitsMissing, "warning", line, `motion before any G20/G21: units assumed ${this.units}`);
  }
  if (this.firstMotion) this.startPoint(line);
  if (this.absolute) this.movedAbsolute = true;
  if (this.incSince !== 0) {
    if (!this.absolute) {
      this.say(R.incrementalLeftOn, "warning", line,
        `G91 incremental, left on since before the tool change on line ${this.incSince}, is in force: this move runs incremental`);
    }
    this.incSince = 0;
  }
  if (this.xform !== 0) this.markNotEvaluated(line);
  this.moveWatch = this.xform !== 0 || !this.movedAbsolute;
};

/**
 * The program's first move. A program in G91 from its start never says where it starts: its moves are measured
 * from that start point, which becomes 0 on the axes it leaves unset, so its lengths, time and shape are known.
 */
pp.startPoint = function (this: Engine, line: number): void {
  this.firstMotion = false;
  const pos = this.pos;
  if (this.absolute || pos[0] === pos[0] || pos[1] === pos[1]) return;
  let rel = 0;
  for (let i = 0; i < 3; i++) {
    if (pos[i] !== pos[i]) {
      pos[i] = 0;
      rel |= 1 << i;
    }
  }
  this.relAxes = rel;
  const text = "the program moves in G91 from a start point it never sets: positions are measured from that point";
  this.say(R.assumption, "info", line, text);
  this.lateAssumptions.push(`${text} (line ${line})`);
};

pp.feedCheck = function (this: Engine, line: number): void {
  if (this.inverseTime ? !(this.mask & B_F) : !(this.feed > 0)) {
    if (this.inverseTime) {
      this.say(R.feedMissing, "error", line, "G93 inverse time: every feed move needs its own F word");
    } else if (!this.feedMissingSaid) {
      this.feedMissingSaid = true;
      this.say(R.feedMissing, "error", line, "feed move with no feed rate in force");
    }
  }
};

/** The checks every cut shares (the definition of a cut is in `linear`). */
pp.cutChecks = function (this: Engine, line: number): void {
  if (this.toolIdx === NO_TOOL_IDX && !this.toolSaid) {
    this.toolSaid = true;
    this.say(R.toolNotLoaded, "warning", line,
      this.selectedT >= 0 ? `cutting with T${this.selectedT} selected but never loaded by M6` : "cutting with no tool loaded");
  }
  if ((this.spindleDir === 5 || this.spindle === 0) && !this.spindleSaid) {
    this.spindleSaid = true;
    if (this.spindleControlled) {
      this.say(R.spindleOffCut, "error", line, this.spindleDir === 5 ? "cutting with the spindle stopped" : "cutting with the spindle at S0");
    } else if (!this.manualSpindleSaid) {
      // the program cannot tell whether a spindle switched by hand is turning: said once, as information
      this.manualSpindleSaid = true;
      this.say(R.spindleOffCut, "info", line, "the spindle of this machine is switched by hand: the program cannot show that it turns while cutting");
    }
  }
  if (this.toolIdx !== NO_TOOL_IDX && !this.lengthSinceChange && !this.lengthSaid) {
    this.lengthSaid = true;
    this.say(R.lengthOffsetMissing, "error", line, `cutting with T${this.tools[this.toolIdx]!.number} with no tool length offset (G43/G44) since the tool change`);
  }
};

/** Accounts a straight move from the current position to `tgt` and makes it the current position. */
pp.linear = function (this: Engine, line: number, kind: number): void {
  // coordinates travel in typed arrays, not as arguments: double arguments would be boxed on every call
  const pos = this.pos;
  const tgt = this.tgt;
  const sx = pos[0]!, sy = pos[1]!, sz = pos[2]!;
  const x = tgt[0]!, y = tgt[1]!, z = tgt[2]!;
  if (kind === K_RAPID && (this.relAxes & 4) === 0) {
    // a rapid that moves X/Y while below safe Z, or that ends below it
    const lim = this.safeZ - 1e-9;
    const endsBelow = z < lim;
    if (endsBelow || (sz < lim && ((x === x && x !== sx) || (y === y && y !== sy)))) {
      this.say(R.rapidBelowSafeZ, "warning", line,
        endsBelow ? `rapid ends at Z${fmt(z)}, below safe Z ${fmt(this.safeZ)}` : `rapid in X/Y at Z${fmt(sz)}, below safe Z ${fmt(this.safeZ)}`);
    }
  }
  let dx = x - sx, dy = y - sy, dz = z - sz;
  // an unknown end: an incremental axis still has its increment, an absolute one from nowhere counts nothing
  if (dx !== dx) dx = this.inc[0]!;
  if (dy !== dy) dy = this.inc[1]!;
  if (dz !== dz) dz = this.inc[2]!;
  const len = Math.sqrt(dx * dx + dy * dy + dz * dz);
  this.mlen = len;
  // A cut is a feed move that starts or ends at or below safe Z; one that stays above it is positioning. An
  // unknown Z is below unless the tool is at its home height (program start, after M6 or a Z home move).
  let cut = false;
  if (kind === K_FEED || kind === K_CYCLE_FEED) {
    const lim = this.safeZ + 1e-9;
    cut = (sz === sz ? sz < lim : !this.zHome) || (z === z ? z < lim : !this.zHome);
  }
  this.cutNow = cut;
  if (cut) this.cutting(line);
  else if (this.approach === 0 && !(dz > 0 && dx === 0 && dy === 0)) this.approach = line;
  this.account(line, kind);
  if (cut && !this.lastCut) this.cutStart();
  this.lastCut = cut;
  // point(), without its stretch switch: account() has just made the stretch current
  addBox(this.cB, 0, tgt, cut);
  if (this.machine !== undefined && this.originSource.size > 0) this.travel(tgt);
  if (len > 0 || sx !== sx || sy !== sy || sz !== sz) this.seg(line, kind, tgt);
  pos[0] = x;
  pos[1] = y;
  pos[2] = z;
  if (z === z) this.zHome = false;
};

/** A cutting move: the checks, and the count of cutting blocks of the current tool under the current offset. */
pp.cutting = function (this: Engine, line: number): void {
  this.cutChecks(line);
  const oi = this.offIdx < 0 ? this.curOff() : this.offIdx;
  if (this.toolIdx !== this.lastRunTool || oi !== this.lastRunOff) this.newRun(this.toolIdx, oi);
  if (this.cutBlock !== this.blocks) {
    this.cutBlock = this.blocks;
    if (!this.lastCut && this.stretchBlock !== this.blocks) this.newStretch(oi);
    this.runBlocks++;
  }
};

/** Where a stretch of cutting starts: its tool, offset, approach line and how many cutting blocks came before. */
pp.newStretch = function (this: Engine, oi: number): void {
  this.stretchBlock = this.blocks;
  const i = this.stretchN * 3;
  if (i + 3 > this.stretches.length) {
    if (this.stretchN >= 1_000_000) return;
    this.stretches = growI32(this.stretches, i + 3);
  }
  const s = this.stretches;
  s[i] = this.toolIdx * 256 + oi;
  s[i + 1] = this.approach === 0 ? this.line : this.approach;
  s[i + 2] = this.runBase + this.runBlocks;
  this.stretchN++;
};

pp.home = function (this: Engine, line: number, second: boolean): void {
  const mask = this.mask;
  this.committed = true;
  if (this.comp !== 40) this.say(R.compInvalid, "error", line, `${second ? "G30" : "G28"} with cutter compensation on`);
  if (mask & B_XYZ) {
    this.target(mask);
    // G91 G28 Z0: the intermediate point is where the tool is, so there is no first leg at all
    const inc = this.inc;
    if (this.absolute || inc[0] !== 0 || inc[1] !== 0 || inc[2] !== 0) this.linear(line, K_RAPID);
  }
  // final leg: the named axes (all, when none is named) go to the home position, machine 0
  const all = (mask & B_XYZ) === 0;
  const t = this.tmp;
  for (let i = 0; i < 3; i++) t[i] = all || mask & (1 << AXIS_OF_LETTER[i]!) ? 0 : NaN;
  this.machineLeg(line, t, all ? 7 : ((mask >> L_X) & 7));
  if (all || mask & B_Z) this.zHome = true;
};

pp.machineMove = function (this: Engine, line: number): void {
  const mask = this.mask;
  this.committed = true;
  if (this.comp !== 40) this.say(R.compInvalid, "error", line, "G53 with cutter compensation on");
  // [NIST] 3.5.12: G53 needs G0 or G1 in force; in the common dialect G53 moves at rapid whatever the mode
  if (!this.common && this.motion !== G0 && this.motion !== G1) {
    this.say(R.wordInvalid, "error", line, "G53 needs G0 or G1 in force");
  }
  const t = this.tmp;
  const s = this.sc;
  for (let i = 0; i < 3; i++) {
    const L = AXIS_OF_LETTER[i]!;
    t[i] = mask & (1 << L) ? this.lv[L]! * s : NaN;
  }
  this.machineLeg(line, t, (mask >> L_X) & 7);
  const m = this.machine;
  if (mask & B_Z) {
    const z = t[2]!;
    const top = m ? m.travel.z.max * this.mScale : 0;
    const range = m ? (m.travel.z.max - m.travel.z.min) * this.mScale : 0;
    this.zHome = z >= top - 0.1 * range - 1e-9;
  }
  if (m) {
    const tr = m.travel;
    const s2 = this.mScale;
    const lo = [tr.x.min, tr.y.min, tr.z.min];
    const hi = [tr.x.max, tr.y.max, tr.z.max];
    for (let i = 0; i < 3; i++) {
      const v = t[i]!;
      if (v === v && (v < lo[i]! * s2 - 1e-6 || v > hi[i]! * s2 + 1e-6)) {
        this.say(R.overTravel, "error", line, `G53 move to machine ${"XYZ"[i]}${fmt(v)} is outside the travel`);
        break;
      }
    }
  }
};

/**
 * A move to machine coordinates `mc` (NaN = axis not moved); `axes` bit i set when axis i moves. Its time counts
 * to the program and the tool, not to a work offset; it is drawn once the program uses an offset.
 */
pp.machineLeg = function (this: Engine, line: number, mc: Float64Array, axes: number): void {
  const o = this.origins.get(this.offNum);
  const pos = this.pos;
  this.machineCount++;
  this.counts.machine++;
  this.lastCut = false;
  if (this.approach === 0 && axes !== 4) this.approach = line;
  if (this.machineLines.length < 1000) this.machineLines.push(line);
  addBox(this.mB, 0, mc, false);
  const nx = axes & 1 ? mc[0]! - this.org(this.offNum, 0) : pos[0]!;
  const ny = axes & 2 ? mc[1]! - this.org(this.offNum, 1) : pos[1]!;
  const nz = axes & 4 ? mc[2]! - this.org(this.offNum, 2) : pos[2]!;
  if (o) {
    const dx = nx - pos[0]!, dy = ny - pos[1]!, dz = nz - pos[2]!;
    const len = Math.sqrt((dx === dx ? dx * dx : 0) + (dy === dy ? dy * dy : 0) + (dz === dz ? dz * dz : 0));
    this.t0 = this.t1 = this.clock;
    if (len > 0) {
      this.machineLen += len;
      const t = (len / this.rapidRate) * 60;
      const total = trapezoidSeconds(len, this.rapidRate / 60, this.accel);
      const tb = this.toolSlot * SSTRIDE;
      this.gS[S_RAPID_S]! += t;
      this.gS[S_TOTAL_S]! += total;
      this.tS[tb + S_RAPID_S]! += t;
      this.tS[tb + S_TOTAL_S]! += total;
      this.clock += total;
      this.t1 = this.clock;
    }
    if (this.offIdx >= 0) {
      const e = this.tgt;
      e[0] = nx;
      e[1] = ny;
      e[2] = nz;
      this.seg(line, K_MACHINE, e);
    }
  }
  pos[0] = nx;
  pos[1] = ny;
  pos[2] = nz;
};
