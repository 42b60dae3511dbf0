/**
 * Plain modal settings of a block: feed rate, spindle speed, cutter compensation, dwell, and the coordinate transforms
 * the common dialect knows but does not apply.
 */
import { R } from "./rules";
import { Engine } from "./state";
import * as codes from "./codes";

// imported constants copied into module constants (codes.ts says why)
const { B_D, G40, L_D, L_F, L_S, NO_TOOL_IDX, fmt, fmtCode } = codes;

declare module "./state" {
  interface Engine {
    setFeed(line: number): void;
    setSpindle(line: number): void;
    setComp(line: number, comp: number, mask: number): void;
    dwell(line: number, p: number, given: boolean): void;
    transform(line: number, code: number): void;
  }
}

const pp = Engine.prototype;

pp.setFeed = function (this: Engine, line: number): void {
  const f = this.lv[L_F]!;
  if (f < 0) {
    this.say(R.wordInvalid, "error", line, `negative feed F${fmt(f)}`);
    return;
  }
  this.feedRaw = f;
  this.feed = f * this.sc;
  if (f > 0) this.feedMissingSaid = false;
  if (!this.inverseTime && this.feed > this.maxFeed * (1 + 1e-9)) {
    this.say(R.feedOverLimit, "warning", line, `feed F${fmt(f)} is above the machine's limit of ${fmt(this.maxFeed / this.sc)}`);
  }
};

pp.setSpindle = function (this: Engine, line: number): void {
  const s = this.lv[L_S]!;
  if (s < 0) {
    this.say(R.spindleInvalid, "error", line, `negative spindle speed S${fmt(s)}`);
    return;
  }
  if (s !== this.spindle) this.spindleSaid = false;
  this.spindle = s;
  if (s > this.maxSpindle) {
    this.say(R.spindleOverLimit, "warning", line, `spindle speed S${fmt(s)} is above the machine's limit of ${fmt(this.maxSpindle)} rpm`);
  }
};

pp.setComp = function (this: Engine, line: number, comp: number, mask: number): void {
  if (comp === G40) {
    this.comp = 40;
    return;
  }
  if (this.plane !== 17) this.say(R.compInvalid, "error", line, "cutter compensation is only allowed in the XY plane (G17)");
  if (this.comp !== 40) this.say(R.compInvalid, "error", line, `${fmtCode(comp)} while cutter compensation is already on`);
  if (mask & B_D) {
    const d = this.lv[L_D]!;
    if (d < 0 || d !== Math.floor(d)) this.say(R.compInvalid, "error", line, `D${fmt(d)} is not a valid offset number`);
    this.compD = d;
    if (this.toolIdx !== NO_TOOL_IDX) {
      const arr = this.tools[this.toolIdx]!.d;
      if (!arr.includes(d)) arr.push(d);
    }
  } else if (Number.isNaN(this.compD)) {
    this.say(R.compInvalid, "warning", line, `${fmtCode(comp)} without a D word`);
  }
  this.comp = comp / 10;
};

pp.dwell = function (this: Engine, line: number, p: number, given: boolean): void {
  if (!given || !(p >= 0)) {
    this.say(R.dwellInvalid, "error", line, given ? `negative dwell P${fmt(p)}` : "G4 without a P word");
    return;
  }
  this.addDwell(p);
};

/** Common dialect: rotation, scaling, mirror and polar coordinates are known but not applied. */
pp.transform = function (this: Engine, line: number, code: number): void {
  this.xform = code;
  this.moveWatch = true;
  this.say(R.notEvaluated, "warning", line,
    `${fmtCode(code)} transforms the coordinates and the engine does not apply it: the moves until its cancel are analysed as written, not as the machine runs them`);
  this.markNotEvaluated(line);
};
