/**
 * Tools and offsets: T selection, M6 tool changes, tool length offsets (G43/G44/G49), work offsets (G54..G59.3, G54.1
 * Pn) and their origins (options, G10 L2/L20), G92 and G52 shifts, and the tool descriptions posts write in comments.
 */
import { R } from "./rules";
import { Engine } from "./state";
import * as codes from "./codes";
import * as sums from "./bounds";

// imported constants copied into module constants (codes.ts says why)
const { AXIS_OF_LETTER, B_H, B_L, B_P, G49, G54_1, L_H, L_L, L_P, L_T, NO_TOOL_IDX, fmt, fmtCode } = codes;
const { BSTRIDE, SSTRIDE, S_TC_S, grow64, initBox } = sums;

/**
 * Tool description without the separators posts wrap it in ("|", "-", ":" standing alone or at a word's ends),
 * words kept in order: "| 10MM FLAT END MILL | H1 |" is "10MM FLAT END MILL H1"; "-3." and "3-FLUTE" stay.
 */
function cleanDescription(raw: string): string {
  const words: string[] = [];
  for (const w of raw.trim().split(/\s+/)) {
    let s = 0;
    let e = w.length;
    while (s < e && (w[s] === "|" || w[s] === ":" || (w[s] === "-" && !/[\d.]/.test(w[s + 1] ?? "")))) s++;
    while (e > s && (w[e - 1] === "|" || w[e - 1] === ":" || w[e - 1] === "-" || w[e - 1] === ",")) e--;
    if (e > s) words.push(w.slice(s, e).replace(/\|/g, " ").trim());
  }
  return words.filter((w) => w.length > 0).join(" ");
}

declare module "./state" {
  interface Engine {
    selectTool(line: number): void;
    toolEntry(t: number, line: number): number;
    changeTool(line: number): void;
    setLength(line: number, len: number, mask: number): void;
    selectOffset(line: number, code: number): void;
    offsetEntry(num: number): number;
    curOff(): number;
    org(num: number, i: number): number;
    updateShift(): void;
    setShift(line: number, local: boolean): void;
    g10(line: number): void;
    commentText(): string;
    comment(): void;
    setDesc(t: number, raw: string, line: number, prio: number): void;
  }
}

const pp = Engine.prototype;

pp.selectTool = function (this: Engine, line: number): void {
  const t = this.lv[L_T]!;
  if (t < 0 || t !== Math.floor(t) || t > 65534) {
    this.say(R.toolInvalid, "error", line, `T${fmt(t)} is not a valid tool number`);
    return;
  }
  this.selectedT = t;
  this.toolEntry(t, line);
  if (this.cs >= 0) this.setDesc(t, this.commentText(), line, 3);
  else {
    this.pendingDescTool = t;
    this.pendingDescLine = line;
  }
};

pp.toolEntry = function (this: Engine, t: number, line: number): number {
  let i = this.toolOfNumber.get(t);
  if (i === undefined) {
    i = this.tools.length;
    if (i >= NO_TOOL_IDX - 1) return NO_TOOL_IDX;
    this.tools.push({ number: t, firstLine: line, lastLine: line, loads: 0, h: [], d: [], offsets: [] });
    this.toolOfNumber.set(t, i);
    this.tFeedMin.push(Infinity);
    this.tFeedMax.push(-Infinity);
    this.tSpinMin.push(Infinity);
    this.tSpinMax.push(-Infinity);
    const slots = i + 2;
    this.tS = grow64(this.tS, slots * SSTRIDE, () => {});
    this.tB = grow64(this.tB, slots * BSTRIDE, (b, from) => {
      for (let o = from; o < b.length; o += BSTRIDE) initBox(b, o);
    });
  }
  return i;
};

pp.changeTool = function (this: Engine, line: number): void {
  const prev = this.toolIdx === NO_TOOL_IDX ? null : this.tools[this.toolIdx]!.number;
  if (this.selectedT < 0) {
    this.say(R.toolInvalid, "error", line, "M6 with no tool selected (no T word before it)");
  }
  if (this.pos[2]! < this.safeZ - 1e-9 && !this.zHome) {
    this.say(R.toolChangeLow, "error", line, `tool change at Z${fmt(this.pos[2]!)}, below safe Z ${fmt(this.safeZ)}`);
  }
  // G91 left on across the change by a program that moves in G90: reported at the first move after the change,
  // if G90 does not come first (a program in G91 from its start means it)
  this.incSince = this.absolute || !this.movedAbsolute ? 0 : line;
  if (this.incSince !== 0) this.moveWatch = true;
  if (this.comp !== 40) this.say(R.compInvalid, "error", line, "tool change with cutter compensation on");
  this.changeCount++;
  if (this.changes.length < 10000) this.changes.push({ line, tool: this.selectedT < 0 ? null : this.selectedT, previous: prev });
  if (this.selectedT >= 0) {
    const i = this.toolEntry(this.selectedT, line);
    this.toolIdx = i;
    this.toolSlot = i === NO_TOOL_IDX ? 0 : i + 1;
    if (i !== NO_TOOL_IDX) {
      const t = this.tools[i]!;
      t.loads++;
      t.lastLine = line;
    }
  }
  this.lengthSinceChange = false;
  this.lengthSaid = false;
  this.toolSaid = false;
  this.lastCut = false;
  // [NIST] 3.6.3: the spindle is stopped when the change is complete
  this.spindleDir = 5;
  this.spindleSaid = false;
  this.overTravelSaid = 0;
  // the change leaves Z at the tool change position, above the work (common practice)
  this.zHome = true;
  this.addSeconds(S_TC_S, this.tcSeconds);
};

pp.setLength = function (this: Engine, line: number, len: number, mask: number): void {
  if (len === G49) {
    this.lengthMode = 49;
    this.lengthSinceChange = false;
    return;
  }
  let h = this.lengthH;
  if (mask & B_H) {
    h = this.lv[L_H]!;
    if (h < 0 || h !== Math.floor(h)) {
      this.say(R.wordInvalid, "error", line, `H${fmt(h)} is not a valid offset number`);
      return;
    }
  } else if (this.toolIdx !== NO_TOOL_IDX && Number.isNaN(h)) {
    h = this.tools[this.toolIdx]!.number;
  }
  this.lengthMode = len / 10;
  this.lengthH = h;
  this.lengthSinceChange = true;
  if (this.toolIdx !== NO_TOOL_IDX) {
    const t = this.tools[this.toolIdx]!;
    if (!Number.isNaN(h) && !t.h.includes(h)) t.h.push(h);
    if (this.hMustEqualT && h !== t.number) {
      this.say(R.lengthOffsetMismatch, "error", line, `tool length offset H${fmt(h)} with tool T${t.number} in the spindle`);
    }
  }
};

pp.selectOffset = function (this: Engine, line: number, code: number): void {
  let num: number;
  if (code === G54_1) {
    const p = this.lv[L_P]!;
    if (!(this.mask & B_P) || p < 1 || p !== Math.floor(p)) {
      this.say(R.offsetInvalid, "error", line, "G54.1 needs P with a positive integer");
      return;
    }
    if (this.machine && p > this.workOffsetCount - 6) {
      this.say(R.offsetInvalid, "error", line, `G54.1 P${p}: the control has ${Math.max(0, this.workOffsetCount - 6)} extended offsets`);
    }
    num = 100 + p;
  } else if (code >= 540 && code <= 590 && code % 10 === 0) {
    num = code / 10 - 53;
    if (this.machine && num > this.workOffsetCount) {
      this.say(R.offsetInvalid, "error", line, `${fmtCode(code)}: the control has ${this.workOffsetCount} work offsets`);
    }
  } else {
    num = 6 + (code - 590);
    if (this.machine && this.workOffsetCount < 7) {
      this.say(R.offsetInvalid, "warning", line, `${fmtCode(code)}: the control has ${this.workOffsetCount} work offsets`);
    }
  }
  if (this.comp !== 40) this.say(R.compInvalid, "error", line, "work offset changed with cutter compensation on");
  this.offSelected = true;
  if (this.approach === 0) this.approach = line;
  if (num !== this.offNum) {
    for (let i = 0; i < 3; i++) {
      const machinePos = this.pos[i]! + this.org(this.offNum, i);
      this.pos[i] = machinePos - this.org(num, i);
    }
    this.offNum = num;
    this.overTravelSaid = 0;
    this.lastCut = false;
  }
  this.offIdx = this.offsetEntry(num);
  const e = this.offsets[this.offIdx];
  if (e && e.firstLine === null) e.firstLine = line;
};

pp.offsetEntry = function (this: Engine, num: number): number {
  let i = this.offIdxOfNum.get(num);
  if (i === undefined) {
    i = this.offsets.length;
    if (i >= 255) return 254;
    this.offsets.push({ num, firstLine: null, firstMotion: null, last: null, tools: [] });
    this.offIdxOfNum.set(num, i);
    this.oS = grow64(this.oS, (i + 1) * SSTRIDE, () => {});
    this.oB = grow64(this.oB, (i + 1) * BSTRIDE, (b, from) => {
      for (let o = from; o < b.length; o += BSTRIDE) initBox(b, o);
    });
  }
  return i;
};

pp.curOff = function (this: Engine): number {
  if (this.offIdx < 0) this.offIdx = this.offsetEntry(this.offNum);
  return this.offIdx;
};

/** Machine coordinate of part zero of system `num` on axis i; NaN when unknown. */
pp.org = function (this: Engine, num: number, i: number): number {
  const o = this.origins.get(num);
  return o ? o[i]! : NaN;
};

pp.updateShift = function (this: Engine): void {
  for (let i = 0; i < 3; i++) this.shift[i] = this.shift52[i]! + this.shift92[i]!;
};

pp.setShift = function (this: Engine, line: number, local: boolean): void {
  const mask = this.mask;
  if (this.comp !== 40 && !local) this.say(R.compInvalid, "error", line, "G92 with cutter compensation on");
  this.say(R.coordinateShift, "info", line, local ? "G52 local coordinate shift" : "G92 coordinate shift");
  this.committed = true;
  for (let i = 0; i < 3; i++) {
    if (!(mask & (1 << AXIS_OF_LETTER[i]!))) continue;
    const v = this.lv[AXIS_OF_LETTER[i]!]! * this.sc;
    if (local) this.shift52[i] = v;
    // G92: the current point gets the given program coordinate ([NIST] 3.5.18); part coordinates stay
    else this.shift92[i] = this.pos[i]! - this.shift52[i]! - v;
  }
  this.updateShift();
};

pp.g10 = function (this: Engine, line: number): void {
  const lv = this.lv;
  const mask = this.mask;
  const l = lv[L_L]!;
  if (!(mask & B_L) || (l !== 2 && l !== 20)) {
    if (mask & B_L && (l === 1 || l === 10 || l === 11 || l === 12)) {
      this.say(R.notEvaluated, "info", line, `G10 L${l} writes the tool table: not evaluated`);
    } else this.say(R.unknownCode, "warning", line, "G10 needs L2 or L20 for work offsets");
    return;
  }
  const p = lv[L_P]!;
  if (!(mask & B_P) || p < 1 || p > 9 || p !== Math.floor(p)) {
    this.say(R.offsetInvalid, "error", line, `G10 L${l}: P must be an integer from 1 to 9`);
    return;
  }
  const num = p;
  const cur = this.origins.get(num);
  const o = cur ? Float64Array.from(cur) : new Float64Array([NaN, NaN, NaN]);
  for (let i = 0; i < 3; i++) {
    if (!(mask & (1 << AXIS_OF_LETTER[i]!))) continue;
    const v = lv[AXIS_OF_LETTER[i]!]! * this.sc;
    if (l === 2) o[i] = v;
    // L20: the current point gets the given coordinate in system P
    else o[i] = this.pos[i]! + this.org(this.offNum, i) - this.shift[i]! - v;
  }
  if (num === this.offNum) {
    for (let i = 0; i < 3; i++) {
      const machinePos = this.pos[i]! + this.org(num, i);
      this.pos[i] = machinePos - o[i]!;
    }
  }
  this.origins.set(num, o);
  this.originSource.set(num, "program");
  this.committed = true;
};

pp.commentText = function (this: Engine): string {
  return this.decoder.decode(this.b.subarray(this.cs, this.ce)).trim();
};

pp.comment = function (this: Engine): void {
  const b = this.b;
  let s = this.cs;
  while (s < this.ce && (b[s] === 32 || b[s] === 9)) s++;
  // header list "(T1 D=10. ... FLAT END MILL)"
  if (s + 1 < this.ce && (b[s]! | 32) === 116 && b[s + 1]! >= 48 && b[s + 1]! <= 57) {
    let q = s + 1;
    let t = 0;
    while (q < this.ce && b[q]! >= 48 && b[q]! <= 57) t = t * 10 + b[q++]! - 48;
    if (q === this.ce || b[q] === 32 || b[q] === 9 || b[q] === 45 || b[q] === 58 || b[q] === 61 || b[q] === 44 || b[q] === 124) {
      this.setDesc(t, this.commentText(), this.line, 1);
    }
  }
  if (this.pendingDescTool >= 0 && this.line === this.pendingDescLine + 1 && this.mask === 0 && this.gN === 0 && this.mN === 0) {
    this.setDesc(this.pendingDescTool, this.commentText(), this.line, 2);
    this.pendingDescTool = -1;
  }
};

pp.setDesc = function (this: Engine, t: number, raw: string, line: number, prio: number): void {
  let text = raw.trim();
  const m = /^T\s*(\d+)\b[\s\-:=,|]*/i.exec(text);
  if (m && Number(m[1]) === t) text = text.slice(m[0].length).trim();
  text = cleanDescription(text);
  if (!text) return;
  const cur = this.descs.get(t);
  if (!cur || prio > cur.prio) this.descs.set(t, { text, line, prio });
};
