/**
 * Findings: counting and listing them (at most `cap` per rule, all counted), the coverage of lines not evaluated,
 * and the checks that can only run at the end of the program.
 */
import type { Severity, Toolpath } from "./types";
import { HINTS, R } from "./rules";
import { RULE_IDS } from "./types";
import { checkPartOffsets, compareFixtures } from "./parts";
import { Engine } from "./state";
import * as codes from "./codes";

// imported constants copied into module constants (codes.ts says why)
const { SKIP_CONTROL, SKIP_M99_BODY, SKIP_NONE, offsetCode } = codes;

declare module "./state" {
  interface Engine {
    want(rule: number, sev: Severity): boolean;
    add(rule: number, sev: Severity, line: number, message: string, hint?: string): void;
    say(rule: number, sev: Severity, line: number, message: string, hint?: string): void;
    markNotEvaluated(line: number): void;
    finish(lines: number): void;
  }
}

const pp = Engine.prototype;

/** Counts a finding; true when it should also be listed. */
pp.want = function (this: Engine, rule: number, sev: Severity): boolean {
  const s = sev === "error" ? 3 : sev === "warning" ? 2 : 1;
  if (s > this.fSev[rule]!) this.fSev[rule] = s;
  return this.fCount[rule]!++ < this.cap;
};

pp.add = function (this: Engine, rule: number, sev: Severity, line: number, message: string, hint?: string): void {
  const id = RULE_IDS[rule]!;
  this.findings.push({ rule: id, severity: sev, line, message, hint: hint ?? HINTS[id] });
};

pp.say = function (this: Engine, rule: number, sev: Severity, line: number, message: string, hint?: string): void {
  if (this.want(rule, sev)) this.add(rule, sev, line, message, hint);
};

/** Marks a code line the engine did not evaluate (counted once however often it runs). */
pp.markNotEvaluated = function (this: Engine, line: number): void {
  let bits = this.neBits;
  if (bits === null) bits = this.neBits = new Uint8Array((this.n >>> 3) + 2);
  const i = line >>> 3;
  const m = 1 << (line & 7);
  if (i < bits.length && !(bits[i]! & m)) {
    bits[i] = bits[i]! | m;
    this.neCount++;
  }
};

pp.finish = function (this: Engine, lines: number): void {
  this.lineCount = lines;
  this.fold(-1);
  if (this.stack.length > 0) {
    this.say(R.subprogramInvalid, "error", this.stack[this.stack.length - 1]!.callLine, "subprogram ends without M99");
  }
  if (this.skipKind === SKIP_CONTROL) {
    this.endControl(lines);
  } else if (this.skipKind !== SKIP_NONE && !this.ended && this.pendN > 0) {
    // a body the main flow ran into never ends: what it swallowed was never evaluated
    const name = this.skipKey >= 0 ? `O${this.skipKey}` : "o<name>";
    this.say(R.notEvaluated, "warning", this.skipLine0,
      `${name} starts a subprogram body that never ends (no ${this.skipKind === SKIP_M99_BODY ? "M99" : "endsub"}): the ${this.pendN} lines after it are not evaluated`);
    for (let i = 0; i < this.pendN; i++) this.markNotEvaluated(this.pend[i]!);
  }
  // stopped at the execution limit, the end of the program was never reached: nothing to say about it
  if (!this.ended && !this.stopped) {
    if (this.sawBlock) {
      if (!this.absolute) this.say(R.incrementalLeftOn, "warning", this.lastMainLine, "G91 incremental is in force at the end of the file");
      if (this.comp !== 40) this.say(R.compLeftOn, "warning", this.lastMainLine, "cutter compensation is still on at the end of the file");
    }
    this.say(R.programEndMissing, "warning", this.lastMainLine, "the program has no M2/M30 end");
  }
  const prev = this.runs[this.runs.length - 1];
  if (prev && prev.endSeg < 0) {
    prev.endSeg = this.tpN;
    prev.blocks = this.runBlocks;
  }
  this.listAssumptions();
  for (const a of this.lateAssumptions) this.assumptions.push(a);
};

/** fixture-mismatch: the part offsets each tool cuts under, then each tool's parts compared with its first. */
export function fixtureFindings(e: Engine, toolpath: Toolpath, parts: number, tol: number): void {
  const code = (oi: number): string => offsetCode(e.offsets[oi]?.num ?? 1);
  for (const p of checkPartOffsets(e.runs, parts, e.stretches, e.stretchN)) {
    const t = e.tools[p.tool];
    const name = t ? `T${t.number}` : "cutting with no tool";
    if (p.kind === "stray") {
      e.say(R.fixtureMismatch, "warning", p.line,
        `${name} cuts under ${code(p.offset)}, which is not one of the offsets the other tools cut their parts under${p.partOffset >= 0 ? ` (${code(p.partOffset)} typed as ${code(p.offset)}?)` : ""}`);
    } else {
      e.say(R.fixtureMismatch, "warning", p.line,
        `${name} never cuts under ${code(p.partOffset)}: its part there runs under ${code(p.offset)} again, from this line (is the ${code(p.partOffset)} line missing?)`);
    }
  }
  for (const m of compareFixtures(toolpath, e.runs, tol)) {
    const t = e.tools[m.tool];
    const o1 = e.offsets[m.refOffset];
    const o2 = e.offsets[m.offset];
    if (!t || !o1 || !o2) continue;
    e.say(R.fixtureMismatch, "warning", m.line,
      `T${t.number} cuts differently under ${offsetCode(o2.num)} than under ${offsetCode(o1.num)}: ${m.reason}`);
  }
}
