/**
 * Program flow: lines that start with an O word (the program number, subprogram labels, o-word sub, call, return and
 * control blocks), what is skipped and why (bodies not called, control blocks whose condition is not evaluated, lines
 * after the end), subprogram calls and returns, program stops and the end.
 */
import { R } from "./rules";
import { Engine } from "./state";
import * as codes from "./codes";
import * as sums from "./bounds";

// imported constants copied into module constants (codes.ts says why)
const {
  AXIS_OF_LETTER, B_K, B_L, B_N, B_O, B_P, B_Z, F_PERCENT, F_TEXT, G1, KW_CALL, KW_DO, KW_ENDIF, KW_ENDREPEAT,
  KW_ENDSUB, KW_ENDWHILE, KW_IF, KW_REPEAT, KW_RETURN, KW_SUB, KW_WHILE, L_K, L_L, L_O, L_P, SKIP_CONTROL,
  SKIP_M99_BODY, SKIP_NONE, SKIP_SUB_BODY, fmt, keywordAt, nameKey,
} = codes;
const { growI32 } = sums;

declare module "./state" {
  interface Engine {
    tailLine(): void;
    startBody(kind: number): void;
    startControl(end: number): void;
    skipLine(): void;
    endControl(lastLine: number): void;
    oLine(line: number): void;
    stopCode(line: number, code: number): void;
    endProgram(line: number, reset: boolean): void;
    findLabels(): Map<number, { pos: number; line: number }>;
    callSub(line: number): void;
    callSubAt(line: number, key: number, reps: number, name: string): void;
    nextLineStart(): number;
    returnFromSub(): void;
  }
}

const pp = Engine.prototype;

pp.tailLine = function (this: Engine): void {
  if (this.mask & B_O && (this.kw === 0 || this.kw === KW_SUB)) {
    this.startBody(this.kw === KW_SUB ? SKIP_SUB_BODY : SKIP_M99_BODY);
    return;
  }
  if (this.stopped) {
    if (this.isCodeLine()) this.markNotEvaluated(this.line);
    return;
  }
  if (this.ended && ((this.mask & ~B_N) !== 0 || this.gN > 0 || this.mN > 0) && !(this.flags & F_PERCENT)) {
    this.say(R.codeAfterEnd, "warning", this.line, "code after the end of the program never runs");
  }
};

/** Starts skipping a subprogram body (until M99, or its `O<n> endsub`) that the main flow reaches. */
pp.startBody = function (this: Engine, kind: number): void {
  this.skipKind = kind;
  this.skipKey = this.lv[L_O]!;
  this.skipLine0 = this.line;
  this.pendN = 0;
  this.tail = false;
};

/** Starts skipping an o-word control block (if, while, do, repeat): its condition is not evaluated. */
pp.startControl = function (this: Engine, end: number): void {
  this.skipKind = SKIP_CONTROL;
  this.skipKey = this.lv[L_O]!;
  this.skipEnd = end;
  this.skipLine0 = this.line;
  this.skipCount = 1;
  this.skipAxes = 0;
  this.markNotEvaluated(this.line);
};

pp.skipLine = function (this: Engine): void {
  const kind = this.skipKind;
  const o = (this.mask & B_O) !== 0;
  if (kind === SKIP_CONTROL) {
    const code = this.isCodeLine();
    if (code) {
      this.skipCount++;
      this.skipAxes |= this.mask;
      this.markNotEvaluated(this.line);
      if (this.stack.length === 0) this.lastMainLine = this.line;
    }
    if (o && this.kw === this.skipEnd && this.lv[L_O] === this.skipKey) {
      this.skipKind = SKIP_NONE;
      this.endControl(this.line);
    }
    return;
  }
  const done = kind === SKIP_M99_BODY ? this.hasM(99) : o && this.kw === KW_ENDSUB && this.lv[L_O] === this.skipKey;
  if (done) {
    this.skipKind = SKIP_NONE;
    this.pendN = 0;
    if (this.ended) this.tail = true;
  } else if (!this.ended && this.isCodeLine()) {
    // a body in the main flow: if it never ends, the lines it swallowed were main program lines
    this.pend = growI32(this.pend, this.pendN + 1);
    this.pend[this.pendN++] = this.line;
  }
};

pp.endControl = function (this: Engine, lastLine: number): void {
  const what = this.skipEnd === KW_ENDIF ? "if" : this.skipEnd === KW_ENDREPEAT ? "repeat" : this.skipEnd === KW_WHILE ? "do" : "while";
  const name = this.skipKey >= 0 ? `O${this.skipKey}` : "o<name>";
  this.say(R.notEvaluated, "warning", this.skipLine0,
    `${name} ${what} block: its condition is not evaluated, so its ${this.skipCount} lines (${this.skipLine0} to ${lastLine}) are not either`);
  // the control would move the axes the block names: their positions are now unknown
  for (let i = 0; i < 3; i++) if (this.skipAxes & (1 << AXIS_OF_LETTER[i]!)) this.pos[i] = NaN;
  if (this.skipAxes & B_Z) this.zHome = false;
};

/** Lines that start with an O word: program number, subprogram labels and o-word control. */
pp.oLine = function (this: Engine, line: number): void {
  const kw = this.kw;
  const key = this.lv[L_O]!;
  if (this.flags & F_TEXT) this.wordError(line, F_TEXT);
  if (kw === 0 || kw === KW_SUB) {
    if (this.stack.length > 0) {
      this.say(R.subprogramInvalid, "error", line, "a subprogram runs into the next O label without M99");
      this.returnFromSub();
      return;
    }
    if (kw === 0 && !this.sawBlock && this.programNumber === null && key >= 0) {
      this.programNumber = key;
      return;
    }
    // a subprogram body in the main flow: not executed unless called
    this.startBody(kw === KW_SUB ? SKIP_SUB_BODY : SKIP_M99_BODY);
    return;
  }
  this.sawBlock = true;
  if (this.stack.length === 0) this.lastMainLine = line;
  if (kw === KW_ENDSUB || kw === KW_RETURN) {
    if (this.stack.length > 0) this.returnFromSub();
    else this.say(R.subprogramInvalid, "error", line, `o-word ${kw === KW_ENDSUB ? "endsub" : "return"} outside a subprogram call`);
    return;
  }
  if (kw === KW_CALL) {
    if (++this.blocks > this.blockLimit) {
      this.say(R.executionLimit, "error", line, `more than ${this.blockLimit} blocks executed: analysis stopped`);
      this.stack.length = 0;
      this.stopped = true;
      this.tail = true;
      return;
    }
    this.callSubAt(line, key, 1, key >= 0 ? `O${key}` : "the named subroutine");
    return;
  }
  if (kw === KW_IF || kw === KW_WHILE || kw === KW_DO || kw === KW_REPEAT) {
    this.startControl(kw === KW_IF ? KW_ENDIF : kw === KW_WHILE ? KW_ENDWHILE : kw === KW_DO ? KW_WHILE : KW_ENDREPEAT);
    return;
  }
  this.say(R.notEvaluated, "warning", line, "o-word control line is not evaluated");
  this.markNotEvaluated(line);
};

pp.stopCode = function (this: Engine, line: number, code: number): void {
  if (code === 0 || code === 1 || code === 60) {
    if (code === 1) this.stops.optionalStops++;
    else this.stops.programStops++;
    if (this.stops.lines.length < 1000) this.stops.lines.push(line);
    return;
  }
  if (code === 98) {
    this.callSub(line);
    return;
  }
  if (code === 99) {
    if (this.stack.length > 0) {
      this.returnFromSub();
      return;
    }
    this.endProgram(line, false);
    return;
  }
  this.endProgram(line, true);
};

pp.endProgram = function (this: Engine, line: number, reset: boolean): void {
  if (!reset && !this.absolute) this.say(R.incrementalLeftOn, "warning", line, "G91 incremental is in force at the end of the program");
  if (this.comp !== 40) this.say(R.compLeftOn, "warning", line, "cutter compensation is still on at the end of the program");
  this.ended = true;
  this.endLine = line;
  this.stack.length = 0;
  this.tail = true;
  if (reset) {
    // [NIST] 3.6.1: M2/M30 reset these modes
    this.offNum = 1;
    this.offIdx = -1;
    this.plane = 17;
    this.absolute = true;
    this.inverseTime = false;
    this.comp = 40;
    this.spindleDir = 5;
    this.motion = G1;
  }
};

/**
 * Subprogram labels of the file: `O<n>` lines (bodies that end with M99) and `O<n> sub` / `o<name> sub` lines
 * (bodies that end with `endsub`), each mapped to the start of the line after it. First label wins.
 */
pp.findLabels = function (this: Engine): Map<number, { pos: number; line: number }> {
  const map = new Map<number, { pos: number; line: number }>();
  const b = this.b;
  const n = this.n;
  let p = 0;
  let line = 1;
  while (p < n) {
    let q = p;
    while (q < n && (b[q] === 32 || b[q] === 9)) q++;
    if (q < n && (b[q]! | 32) === 111) {
      q++;
      while (q < n && (b[q] === 32 || b[q] === 9)) q++;
      let key = NaN;
      if (b[q] === 60) {
        const s = q + 1;
        while (q < n && b[q] !== 62 && b[q] !== 10 && b[q] !== 13) q++;
        if (b[q] === 62) {
          key = nameKey(b, s, q);
          q++;
        }
      } else {
        let v = 0;
        let digits = 0;
        while (q < n && b[q]! >= 48 && b[q]! <= 57 && digits < 12) {
          v = v * 10 + b[q]! - 48;
          q++;
          digits++;
        }
        if (digits > 0) key = v;
      }
      // the keyword after the label, if any: only "sub" (or none, for a numbered label) starts a body
      while (q < n && (b[q] === 32 || b[q] === 9)) q++;
      let e = q;
      while (e < n && (b[e]! | 32) >= 97 && (b[e]! | 32) <= 122) e++;
      const kw = e > q ? keywordAt(b, q, e) : 0;
      const body = e > q ? kw === KW_SUB : key >= 0;
      if (key === key && body && !map.has(key)) {
        let end = q;
        while (end < n && b[end] !== 10 && b[end] !== 13) end++;
        if (end < n && b[end] === 13) end++;
        if (end < n && b[end] === 10) end++;
        map.set(key, { pos: end, line: line + 1 });
      }
    }
    while (p < n && b[p] !== 10 && b[p] !== 13) p++;
    if (p < n && b[p] === 13) p++;
    if (p < n && b[p] === 10 && b[p - 1] !== 10) p++;
    else if (p < n && b[p] === 10) p++;
    line++;
  }
  return map;
};

/** M98 P<n> [L<k> | K<k>]. */
pp.callSub = function (this: Engine, line: number): void {
  const lv = this.lv;
  const mask = this.mask;
  if (!(mask & B_P)) {
    this.say(R.subprogramInvalid, "error", line, "M98 without P (the program number)");
    return;
  }
  let prog = lv[L_P]!;
  let reps = 1;
  if (mask & B_L) reps = lv[L_L]!;
  else if (mask & B_K) reps = lv[L_K]!;
  else if (prog >= 100000) {
    // P with more than four digits: leading digits repeat the four-digit program (common practice)
    reps = Math.floor(prog / 10000);
    prog = prog % 10000;
  }
  // common dialect: L0 (K0) calls the subprogram no times
  if (reps === 0 && this.common) return;
  if (!(reps >= 1) || reps !== Math.floor(reps)) {
    this.say(R.subprogramInvalid, "error", line, `repeat count ${fmt(reps)} is not a positive integer`);
    return;
  }
  this.callSubAt(line, prog, reps, `O${prog}`);
};

pp.callSubAt = function (this: Engine, line: number, key: number, reps: number, name: string): void {
  if (this.labels === null) this.labels = this.findLabels();
  const target = this.labels.get(key);
  if (!target) {
    this.say(R.subprogramMissing, "error", line, `subprogram ${name} is not in the file`);
    return;
  }
  if (this.stack.length >= 8) {
    this.say(R.subprogramInvalid, "error", line, "subprogram calls nested more than 8 deep");
    return;
  }
  const next = this.nextLineStart();
  this.stack.push({ retPos: next, retLine: line, bodyPos: target.pos, bodyLine: target.line, left: reps, callLine: line });
  this.jump = target.pos;
  this.jumpLine = target.line - 1;
};

pp.nextLineStart = function (this: Engine): number {
  const b = this.b;
  let p = this.le;
  if (p < this.n && b[p] === 13) p++;
  if (p < this.n && b[p] === 10) p++;
  return p;
};

pp.returnFromSub = function (this: Engine): void {
  const f = this.stack[this.stack.length - 1]!;
  f.left--;
  if (f.left > 0) {
    this.jump = f.bodyPos;
    this.jumpLine = f.bodyLine - 1;
    return;
  }
  this.stack.pop();
  this.jump = f.retPos;
  this.jumpLine = f.retLine;
};
