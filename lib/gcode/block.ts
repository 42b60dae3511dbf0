/**
 * One block: the words that cannot stand where they are, the modal groups of its G and M codes, and their execution
 * in the order of [NIST] table 8 (feed mode, F, S, T, M6, spindle, dwell, plane, units, compensation, length offset,
 * work offset, distance mode, return mode, G28/G30/G10/G92, motion, stop), with the common dialect's differences.
 */
import { R } from "./rules";
import { Engine } from "./state";
import * as codes from "./codes";

// imported constants copied into module constants (codes.ts says why)
const {
  AXIS_OF_LETTER, B_AXES, B_F, B_IJK, B_IJKR, B_K, B_KNOWN, B_N, B_O, B_P, B_R, B_S, B_T, B_Z, F_BADCHAR, F_BADCODE,
  F_BADCOMMENT, F_BADWORD, F_BLOCKDEL, F_CODE, F_EXPR, F_KEYWORD, F_KWEXPR, F_OVERFLOW, F_PERCENT, F_TEXT, G10, G15,
  G17, G20, G28, G30, G4, G50, G50_1, G52, G53, G69, G80, G90, G90_1, G92, G92_1, G92_2, G92_3, G93, G98, GG_ARCMODE,
  GG_CANCEL, GG_COMP, GG_DIST, GG_FEEDMODE, GG_LENGTH, GG_MACRO, GG_MOTION, GG_NONMODAL, GG_OFFSET, GG_PLANE,
  GG_RETURN, GG_UNITS, L_P, MM_PER_INCH, M_GROUP, NIST_LINE_LENGTH, fmt, fmtCode, isArc, isCycle, isTransform,
  letters,
} = codes;

declare module "./state" {
  interface Engine {
    isCodeLine(): boolean;
    hasM(code: number): boolean;
    exec(): void;
    skipBlock(line: number): void;
    notEvaluated(line: number): void;
    wordError(line: number, flags: number): void;
    full(line: number): void;
    notEvaluatedAxes(): void;
  }
}

const pp = Engine.prototype;

pp.isCodeLine = function (this: Engine): boolean {
  return this.mask !== 0 || this.gN !== 0 || this.mN !== 0 || (this.flags & F_CODE) !== 0;
};

pp.hasM = function (this: Engine, code: number): boolean {
  for (let i = 0; i < this.mN; i++) if (this.mc[i] === code) return true;
  return false;
};

pp.exec = function (this: Engine): void {
  const line = this.line;
  const len = this.le - this.ls;
  if (len > NIST_LINE_LENGTH && this.want(R.lineTooLong, "warning")) {
    this.add(R.lineTooLong, "warning", line, `line is ${len} characters long (more than ${NIST_LINE_LENGTH})`);
  }
  let flags = this.flags;
  const mask = this.mask;
  if (flags & F_BLOCKDEL && this.opt.blockDelete) return;
  if (flags & F_PERCENT) {
    if (mask === 0 && this.gN === 0 && this.mN === 0) {
      if (this.sawBlock || this.percentSeen > 0) {
        // the second % ends the tape ([NIST] 3.3.2); what follows is read only for subprogram bodies
        this.percentSeen++;
        if (this.sawBlock) {
          this.tail = true;
        }
      } else this.percentSeen++;
      return;
    }
    flags &= ~F_PERCENT;
    flags |= F_BADCHAR;
  }
  if (this.cs >= 0) this.comment();
  if (mask === 0 && this.gN === 0 && this.mN === 0 && (flags & ~(F_BLOCKDEL | F_BADCOMMENT)) === 0) {
    if (this.pendingDescTool >= 0 && this.cs < 0 && this.line > this.pendingDescLine + 1) this.pendingDescTool = -1;
    if (flags & F_BADCOMMENT) this.say(R.wordInvalid, "warning", line, "line has a comment without its closing parenthesis");
    return;
  }
  if (this.pendingDescTool >= 0 && this.line > this.pendingDescLine) this.pendingDescTool = -1;
  if (mask & B_O) {
    this.oLine(line);
    return;
  }
  this.sawBlock = true;
  if (this.stack.length === 0) this.lastMainLine = line;
  if (++this.blocks > this.blockLimit) {
    this.say(R.executionLimit, "error", line, `more than ${this.blockLimit} blocks executed: analysis stopped`);
    this.stack.length = 0;
    this.stopped = true;
    this.tail = true;
    this.markNotEvaluated(line);
    return;
  }
  if (flags & (F_EXPR | F_KEYWORD)) {
    this.notEvaluated(line);
    return;
  }
  if (flags & (F_TEXT | F_KWEXPR | F_BADWORD | F_BADCHAR)) {
    this.wordError(line, flags);
    return;
  }
  if (flags & (F_BADCOMMENT | F_OVERFLOW)) {
    this.say(R.wordInvalid, "warning", line, `line has ${flags & F_BADCOMMENT ? "a comment without its closing parenthesis" : "too many words"}`);
  }
  if (this.dup !== 0) {
    this.say(R.modalConflict, "error", line, `letter ${letters(this.dup)} appears twice on the line: the line is not run`);
    this.skipBlock(line);
    return;
  }
  // fast path: only axis words (and F/S/N) with the modal motion in force
  if (this.gN === 0 && this.mN === 0 && (mask & ~(B_AXES | B_F | B_S | B_N)) === 0 && !(flags & F_BADCODE)) {
    if (mask & B_F) this.setFeed(line);
    if (mask & B_S) this.setSpindle(line);
    if (mask & B_AXES) {
      if (this.motion === G80) {
        this.say(R.modalConflict, "error", line, "axis words with no motion mode in force (G80)");
        this.skipBlock(line);
      } else this.motionBlock(line, this.motion, 0);
    }
    return;
  }
  this.full(line);
};

/** A line the engine does not run: what it names becomes unknown, and it counts as not evaluated. */
pp.skipBlock = function (this: Engine, line: number): void {
  this.notEvaluatedAxes();
  this.markNotEvaluated(line);
};

pp.notEvaluated = function (this: Engine, line: number): void {
  this.say(R.notEvaluated, "warning", line, "macro variables or expressions are not evaluated: the line is skipped");
  // the control would move the axes this line names: their positions are now unknown
  this.skipBlock(line);
};

/** A word that cannot stand where it does: the control would refuse the line, so it is not run. */
pp.wordError = function (this: Engine, line: number, flags: number): void {
  const b = this.b;
  let s = this.bad;
  let e = s;
  while (e < this.le && e - s < 24 && b[e] !== 32 && b[e] !== 9 && b[e] !== 40 && b[e] !== 59) e++;
  if (e === s) e = s + 1;
  const text = s >= 0 ? this.decoder.decode(b.subarray(s, e)) : "";
  let what: string;
  if (flags & F_TEXT) {
    let zero = e > s + 1;
    for (let i = s + 1; i < e; i++) if ((b[i]! | 32) !== 111) zero = false;
    what = `"${text}" is not a word: a letter must be followed by its number${zero ? " (the letter O typed for a zero?)" : ""}`;
  } else if (flags & F_BADWORD) {
    what = `address ${String.fromCharCode(b[s]! & ~32)} has no value`;
  } else if (flags & F_BADCHAR) {
    what = `"${text}" belongs to no word (a number needs its letter; text belongs in a comment)`;
  } else {
    what = "a macro keyword outside an expression";
  }
  this.say(R.wordInvalid, "error", line, `${what}: the control would refuse the line, and it is not run`);
  this.skipBlock(line);
};

pp.full = function (this: Engine, line: number): void {
  const gc = this.gc;
  const mc = this.mc;
  const lv = this.lv;
  const gg = this.gGroup;
  const gWord = this.gWord;
  const common = this.common;
  let mask = this.mask;
  // modal groups on this line
  let gSeen = 0;
  let g0Axis = -1; // group-0 code that uses axis words
  let g0Other = 0; // group 0 codes present: 1=G4 2=G53 4=G92.1 8=G92.2 16=G92.3 32=G69/G50/G50.1/G15
  let unknownG = -1;
  for (let i = 0; i < this.gN; i++) {
    const code = gc[i]!;
    const grp = code >= 0 ? gg[code]! : -1;
    if (grp < 0) {
      if (unknownG === -1) unknownG = i;
      continue;
    }
    if (grp === GG_MACRO) {
      this.say(R.notEvaluated, "warning", line, `macro call ${fmtCode(code)} is not evaluated: the line is skipped`);
      this.skipBlock(line);
      return;
    }
    if (grp === GG_NONMODAL) {
      if (code === G4) g0Other |= 1;
      else if (code === G53) g0Other |= 2;
      else if (code === G92_1 || code === G92_2 || code === G92_3) g0Other |= code === G92_1 ? 4 : code === G92_2 ? 8 : 16;
      else if (code === G69 || code === G50 || code === G50_1 || code === G15) g0Other |= 32;
      else if (code === G10 || code === G28 || code === G30 || code === G92 || code === G52 || isTransform(code)) {
        if (g0Axis >= 0) {
          this.say(R.modalConflict, "error", line, `${fmtCode(g0Axis)} and ${fmtCode(code)} both use the axis words`);
          this.skipBlock(line);
          return;
        }
        g0Axis = code;
      }
      continue;
    }
    const gb = 1 << grp;
    if (gSeen & gb) {
      this.say(R.modalConflict, "error", line, `${fmtCode(gWord[grp]!)} and ${fmtCode(code)} are in the same modal group`);
      this.skipBlock(line);
      return;
    }
    gSeen |= gb;
    gWord[grp] = code;
  }
  const motionCode = gSeen & (1 << GG_MOTION) ? gWord[GG_MOTION]! : -1;
  // letters the dialect does not use; on a line with an unknown G code they are that code's own
  if (mask & ~B_KNOWN && unknownG < 0) {
    this.say(R.unknownCode, "warning", line, `letter ${letters(mask & ~B_KNOWN)} is not used by this dialect`);
  }
  let mSeen = 0;
  let stop = -1, toolChange = false, spin = -1;
  let coolant = -1;
  let unknownM = -1;
  for (let i = 0; i < this.mN; i++) {
    const code = mc[i]!;
    const grp = code >= 0 ? M_GROUP[code]! : -1;
    if (grp < 0) {
      if (unknownM === -1) unknownM = i;
      continue;
    }
    const gb = 1 << grp;
    if (mSeen & gb && !(grp === 8 && coolant !== 9 && code !== 9)) {
      this.say(R.modalConflict, "error", line, `two M codes of the same modal group on the line (M${code})`);
      this.skipBlock(line);
      return;
    }
    mSeen |= gb;
    if (grp === 4) stop = code;
    else if (grp === 6) toolChange = true;
    else if (grp === 7) spin = code;
    else if (grp === 8) coolant = code;
  }
  // a group-1 code and a group-0 code that both use axis words: an error in [NIST] 3.4; the common dialect lets
  // the group-0 code take them and the motion code only set the mode (G0 G91 G28 Z0)
  if (g0Axis >= 0 && motionCode >= 0 && mask & B_AXES && !common) {
    this.say(R.modalConflict, "error", line, `${fmtCode(motionCode)} and ${fmtCode(g0Axis)} both use the axis words`);
    this.skipBlock(line);
    return;
  }
  // codes the dialect does not know: what they would do is not known, so their axis words are not run
  let holdMotion = false;
  if (unknownG >= 0) {
    const code = gc[unknownG]!;
    const shown = code >= 0 ? fmtCode(code) : `G${fmt((-1 - code) / 1000)}`;
    holdMotion = (mask & B_AXES) !== 0;
    this.say(R.unknownCode, "warning", line, holdMotion
      ? `unknown code ${shown}: the line's axis words are not run as a move, so ${letters(mask & B_AXES)} ${(mask & B_AXES & ((mask & B_AXES) - 1)) !== 0 ? "are" : "is"} unknown from here`
      : `unknown code ${shown} is not evaluated`);
    this.markNotEvaluated(line);
  }
  if (unknownM >= 0) {
    const code = mc[unknownM]!;
    const shown = code >= 0 ? `M${code}` : "an M code that is not a whole number from 0 to 99";
    if (mask & B_AXES) {
      holdMotion = true;
      this.say(R.unknownCode, "warning", line, `unknown code ${shown}: the line's axis words are not run as a move, and their positions are unknown from here`);
      this.markNotEvaluated(line);
    } else if (common && code >= 0) {
      this.say(R.unknownCode, "info", line, `${shown} is a machine function this dialect does not know: not checked`);
    } else this.say(R.unknownCode, "warning", line, `unknown code ${shown}`);
  }
  const cancel = (gSeen & (1 << GG_CANCEL)) !== 0;
  // the motion this line runs in: what decides whether I/J/K/R belong on it
  const effMotion = motionCode >= 0 ? motionCode : cancel && isCycle(this.motion) ? this.motionBeforeCycle : this.motion;
  if (unknownG < 0 && mask & B_IJKR && g0Axis !== G10 && !isTransform(g0Axis) && !isArc(effMotion) && !isCycle(effMotion) && !(stop === 98 && (mask & B_IJKR) === B_K)) {
    this.say(R.wordInvalid, "error", line,
      `${letters(mask & B_IJKR)} on a line whose motion is ${effMotion === G80 ? "none" : fmtCode(effMotion)}: only arcs and canned cycles take I, J, K and R, so the line is not run`);
    this.skipBlock(line);
    return;
  }
  // ---- order of execution ([NIST] table 8) ----
  if (gSeen & (1 << GG_FEEDMODE)) {
    this.inverseTime = gWord[GG_FEEDMODE] === G93;
    if (this.inverseTime) this.feedRaw = NaN;
  }
  if (mask & B_F) this.setFeed(line);
  if (mask & B_S) this.setSpindle(line);
  if (mask & B_T) this.selectTool(line);
  if (toolChange) this.changeTool(line);
  if (spin >= 0) {
    if (spin === 3 || spin === 4 || spin === 5) {
      if (spin !== this.spindleDir) this.spindleSaid = false;
      this.spindleDir = spin;
    }
  }
  if (g0Other & 1) this.dwell(line, lv[L_P]!, (mask & B_P) !== 0);
  if (gSeen & (1 << GG_PLANE)) {
    const plane = gWord[GG_PLANE]!;
    if (this.comp !== 40 && plane !== G17) this.say(R.compInvalid, "error", line, "plane changed with cutter compensation on");
    this.plane = plane / 10;
  }
  if (gSeen & (1 << GG_UNITS)) {
    const inch = gWord[GG_UNITS] === G20;
    // the report units are those of the first G20/G21 that runs, when nothing has moved before it
    if (!this.unitsDeclared && !this.committed && inch !== (this.units === "inch")) this.applyUnits(inch ? "inch" : "mm");
    this.unitsDeclared = true;
    if (this.comp !== 40 && inch !== this.progInch) this.say(R.compInvalid, "error", line, "units changed with cutter compensation on");
    this.progInch = inch;
    this.sc = inch === (this.units === "inch") ? 1 : inch ? MM_PER_INCH : 1 / MM_PER_INCH;
  }
  if (gSeen & (1 << GG_COMP)) this.setComp(line, gWord[GG_COMP]!, mask);
  if (gSeen & (1 << GG_LENGTH)) this.setLength(line, gWord[GG_LENGTH]!, mask);
  if (gSeen & (1 << GG_OFFSET)) this.selectOffset(line, gWord[GG_OFFSET]!);
  if (gSeen & (1 << GG_DIST)) {
    this.absolute = gWord[GG_DIST] === G90;
    this.incSince = 0;
  }
  if (gSeen & (1 << GG_ARCMODE)) this.arcAbsolute = gWord[GG_ARCMODE] === G90_1;
  if (gSeen & (1 << GG_RETURN)) this.retractOld = gWord[GG_RETURN] === G98;
  if (g0Other & 32) this.xform = 0;
  if (g0Other & (4 | 8 | 16)) {
    if (g0Other & 16) this.shift92.set(this.saved92);
    else {
      this.saved92.set(this.shift92);
      this.shift92.fill(0);
    }
    this.updateShift();
  }
  let axesUsed = false;
  if (g0Axis >= 0) {
    axesUsed = true;
    if (g0Axis === G10) this.g10(line);
    else if (g0Axis === G28 || g0Axis === G30) this.home(line, g0Axis === G30);
    else if (g0Axis === G92 || g0Axis === G52) this.setShift(line, g0Axis === G52);
    else this.transform(line, g0Axis);
  }
  if (cancel) {
    // common dialect: G80 ends the cycle; the motion mode from before it is in force again
    if (isCycle(this.motion)) this.motion = this.motionBeforeCycle;
    this.cycR = this.cycZ = NaN;
  }
  if (motionCode >= 0) {
    if (motionCode === G80) {
      this.motion = G80;
      this.cycR = this.cycZ = NaN;
      if (mask & B_AXES && !axesUsed) {
        this.say(R.modalConflict, "error", line, "axis words on a G80 line: G80 cancels motion");
        this.skipBlock(line);
        mask &= ~B_AXES;
      }
    } else {
      if (isCycle(motionCode) && motionCode !== this.motion) {
        // a new cycle: sticky values reset
        this.cycQ = NaN;
        if (!isCycle(this.motion)) {
          this.motionBeforeCycle = this.motion;
          this.cycInit = NaN;
        }
      }
      this.motion = motionCode;
    }
  }
  if (holdMotion) {
    if (!axesUsed) this.notEvaluatedAxes();
  } else if (!axesUsed && mask & B_AXES) {
    if (g0Other & 2) this.machineMove(line);
    else if (this.motion === G80) {
      this.say(R.modalConflict, "error", line, "axis words with no motion mode in force (G80)");
      this.skipBlock(line);
    } else this.motionBlock(line, this.motion, mask);
  } else if (g0Other & 2 && !axesUsed) {
    this.say(R.wordInvalid, "warning", line, "G53 without axis words");
  } else if (!axesUsed && isArc(this.motion) && (motionCode >= 0 || mask & B_IJKR)) {
    if (common && mask & B_IJK && !(mask & B_R)) {
      // common dialect: an arc with a centre and no end point in the plane is a full circle
      this.motionBlock(line, this.motion, mask);
    } else {
      this.say(R.arcInvalid, "error", line, `${fmtCode(this.motion)} with no end point in the plane`);
      this.markNotEvaluated(line);
    }
  }
  if (stop >= 0) this.stopCode(line, stop);
};

pp.notEvaluatedAxes = function (this: Engine): void {
  const mask = this.mask;
  for (let i = 0; i < 3; i++) if (mask & (1 << AXIS_OF_LETTER[i]!)) this.pos[i] = NaN;
  if (mask & B_Z) this.zHome = false;
};
