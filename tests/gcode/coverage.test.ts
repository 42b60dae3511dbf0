/**
 * Never skip code silently, never execute what was not understood (issue 9, part 2). The rules are common practice
 * of how controls treat a program (a control refuses a line it cannot read; a byte-order mark is no block); the
 * [NIST] word format (3.3) is named where it decides.
 */
import { describe, expect, it } from "vitest";
import { analyzeProgram } from "../../lib/gcode/index";
import type { Analysis, AnalyzeOptions } from "../../lib/gcode/types";
import { testInchMachine } from "./profiles";

const run = (lines: string[], options?: AnalyzeOptions): Analysis => analyzeProgram(lines.join("\n") + "\n", options);
const on = (a: Analysis, line: number) => a.findings.filter((f) => f.line === line).map((f) => `${f.severity} ${f.rule}`);
const notInfo = (a: Analysis) => a.findings.filter((f) => f.severity !== "info").map((f) => `${f.line} ${f.rule}: ${f.message}`);
const head = ["G21 G17 G90 G94", "T1 M6", "S1000 M3", "G54 G0 X0 Y0", "G43 H1 Z25"];

describe("a byte-order mark", () => {
  it("is not a block: the first line's % and code read as they would without it", () => {
    const text = ["%", "O1234", ...head, "G1 Z-1 F100", "M30", "%"].join("\n");
    const bom = analyzeProgram(Uint8Array.from([0xef, 0xbb, 0xbf, ...new TextEncoder().encode(text)]));
    const plain = analyzeProgram(text);
    expect(notInfo(bom)).toEqual([]);
    expect(bom.programNumber).toBe(1234);
    expect(bom.lineCount).toBe(plain.lineCount);
    expect(bom.feedLength).toBe(plain.feedLength);
  });
});

describe("o-word subroutines and control blocks", () => {
  it("o<n> sub ... endsub bodies are skipped where they stand and run where called", () => {
    const a = run(["o100 sub", "G1 Z-2 F100", "G1 X10", "G0 Z25", "o100 endsub", ...head, "o100 call", "o100 call", "M30"]);
    // Derived: the first call feeds 27 (Z25 -> Z-2) + 10 along X; the second 27 down, already at X10.
    expect(a.feedLength).toBeCloseTo(64, 9);
    expect(notInfo(a)).toEqual([]);
    expect(a.coverage.evaluatedShare).toBe(1);
  });

  it("named subroutines o<name> sub / call too, and the rest of the file is never dropped", () => {
    const a = run([...head, "o<slot> call", "G0 X50", "M30", "o<slot> sub", "G1 Z-1 F100", "G1 X10", "G0 Z25", "o<slot> endsub"]);
    expect(a.feedLength).toBeCloseTo(36, 9);
    expect(a.bounds.max.x).toBe(50);
    expect(notInfo(a)).toEqual([]);
  });

  it("an if block is not evaluated: one finding on its first line with the count, its lines in the coverage", () => {
    const a = run([...head, "O10 if [#5 GT 0]", "G1 Z-1 F100", "G1 X40", "O10 endif", "G0 Y5", "M30"]);
    const f = a.findings.find((x) => x.rule === "not-evaluated")!;
    expect(f.line).toBe(6);
    expect(f.message).toMatch(/4 lines \(6 to 9\)/);
    expect(a.coverage.lines).toEqual([6, 7, 8, 9]);
    expect(a.coverage.notEvaluatedLines).toBe(4);
    // X was named in the block: unknown after it, so the next move has no X; Y is known.
    expect(a.bounds.max.x).toBe(0);
    expect(a.bounds.max.y).toBe(5);
  });

  it("while and repeat blocks likewise; a block that never ends is reported up to the end of the file", () => {
    expect(run([...head, "O1 while [#1 LT 3]", "G1 X1", "O1 endwhile", "M30"]).coverage.notEvaluatedLines).toBe(3);
    expect(run([...head, "O2 repeat [4]", "G91 G1 X1", "O2 endrepeat", "G90", "M30"]).coverage.notEvaluatedLines).toBe(3);
    const open = run([...head, "O3 if [#1 EQ 1]", "G1 X1", "M30"]);
    expect(open.findings.find((x) => x.rule === "not-evaluated")?.line).toBe(6);
    expect(open.coverage.lines).toEqual([6, 7, 8]);
  });

  it("an O-label body with no M99 in the middle of the program: the lines it swallowed are reported, not dropped", () => {
    const a = run([...head, "G1 Z-1 F100", "O2000", "G1 X50", "G0 Z25", "M30"]);
    const f = a.findings.find((x) => x.rule === "not-evaluated")!;
    expect(f.line).toBe(7);
    expect(f.message).toMatch(/3 lines/);
    expect(a.coverage.lines).toEqual([8, 9, 10]);
  });
});

describe("codes the dialect does not know", () => {
  it("an unknown G code's axis words are not run as a move; the position becomes unknown and the finding says so", () => {
    const a = run([...head, "G0 Z2", "G12.1 X20 Y20 I5 F100", "G1 X30 Y0", "M30"]);
    const f = a.findings.find((x) => x.rule === "unknown-code")!;
    expect(f.line).toBe(7);
    expect(f.message).toMatch(/not run as a move.*X, Y .*unknown/);
    // X20 Y20 never reached; the next move starts from an unknown X/Y, so its length is not counted.
    expect(a.bounds.max.y).toBe(0);
    expect(a.coverage.lines).toEqual([7]);
  });

  it("an unknown M code alone is a machine function: information in common, a warning in strict-ngc", () => {
    expect(on(run([...head, "M50", "M30"]), 6)).toEqual(["info unknown-code"]);
    expect(on(run([...head, "M50", "M30"], { dialect: "strict-ngc" }), 6)).toEqual(["warning unknown-code"]);
    const withAxes = run([...head, "M50 X10", "M30"]);
    expect(on(withAxes, 6)).toEqual(["warning unknown-code"]);
    expect(withAxes.bounds.max.x).toBe(0);
  });
});

describe("words that cannot stand where they are: errors on their line, and the line is not run", () => {
  const cases: Array<[string, string, RegExp]> = [
    ["a letter followed by a letter (GOO: the letter O for zero)", "GOO X10", /"GOO".*letter O/],
    ["an address with no value", "G1 X__ F100", /address X has no value/],
    ["a number with no letter", "G1 X10 .. Y5", /belongs to no word/],
    ["plain text outside a comment", "BLOCKS SKIPPED HERE", /"BLOCKS" is not a word/],
    ["I/J/K on a line whose motion is not an arc", "G1 X10 I5 F100", /I on a line whose motion is G1/],
    ["R on a rapid", "G0 X10 R2", /R on a line whose motion is G0/],
  ];
  for (const [what, line, message] of cases) {
    it(what, () => {
      const a = run([...head, line, "M30"]);
      const f = a.findings.filter((x) => x.line === 6);
      expect(f.map((x) => `${x.severity} ${x.rule}`)).toEqual(["error word-invalid"]);
      expect(f[0]!.message).toMatch(message);
      expect(a.bounds.max.x).toBe(0);
      expect(a.coverage.lines).toEqual([6]);
    });
  }

  it("only real macro syntax is not-evaluated: #, [ ], and keywords such as GOTO", () => {
    for (const line of ["#1 = 5", "G0 X[1+2]", "GOTO 10", "IF [#1 GT 2] GOTO 5"]) {
      expect(on(run([...head, line, "M30"]), 6), line).toEqual(["warning not-evaluated"]);
    }
  });

  it("numbers written with spaces inside them are still one number ([NIST] 3.3.1)", () => {
    expect(run([...head, "G1 X 1 0 . 5 F100", "M30"]).bounds.max.x).toBeCloseTo(10.5, 9);
  });
});

describe("incremental moves from a position the program never set", () => {
  it("a program in G91 from its first line has its lengths, time and shape, measured from its start point", () => {
    const a = run(["G21 G91 G17 G94 G54", "T1 M6", "G43 H1", "S1000 M3", "G1 Z-2 F100", "X30", "Y20", "X-30", "Y-20", "G0 Z2", "M30"]);
    // Derived: 2 + 30 + 20 + 30 + 20 of feed, 2 of rapid; the path from (0,0,0): X[0,30] Y[0,20] Z[-2,0].
    expect(a.feedLength).toBeCloseTo(102, 9);
    expect(a.rapidLength).toBeCloseTo(2, 9);
    expect(a.time.feedSeconds).toBeCloseTo(61.2, 9);
    expect(a.bounds).toEqual({ min: { x: 0, y: 0, z: -2 }, max: { x: 30, y: 20, z: 0 } });
    expect(a.toolpath.segmentCount).toBe(6);
    expect(a.findings.filter((f) => f.rule === "assumption" && f.line === 5)).toHaveLength(1);
    expect(notInfo(a)).toEqual([]);
  });

  it("an incremental move after a line that made X unknown still counts its length", () => {
    const a = run([...head, "G1 Z-1 F100", "G1 X#3", "G91 G1 X10 Y10", "G90", "M30"]);
    // 26 down, then hypot(10, 10) although X is unknown.
    expect(a.feedLength).toBeCloseTo(26 + Math.hypot(10, 10), 9);
  });

  it("an incremental arc from an unknown start has its length, not its drawing", () => {
    const a = run([...head, "G1 Z-1 F100", "G1 X#3", "G91 G2 X10 Y0 I5 J0", "G90", "M30"]);
    expect(a.feedLength).toBeCloseTo(26 + 5 * Math.PI, 9);
    expect(a.findings.find((f) => f.rule === "arc-start-unknown")?.line).toBe(8);
  });
});

describe("units come from what executes", () => {
  const inchMachine = testInchMachine({ maxSpindle: 10000 });
  it("a G20 inside a subprogram that is never called does not set the program's units", () => {
    const a = run(["G17 G90 G94 G54", "G0 X1 Y1 Z1", "M30", "O100", "G20", "M99"], { machine: { ...inchMachine, units: "mm" } });
    expect(a.units).toBe("mm");
    expect(a.unitsDeclared).toBe(false);
  });

  it("the first G20/G21 that runs before any move decides, and the machine's settings follow it", () => {
    const a = run(["G21 G17 G90 G94 G54", "G0 X25.4 Y0 Z0", "M30"], { machine: inchMachine });
    expect(a.units).toBe("mm");
    expect(a.bounds.max.x).toBe(25.4);
    // The inch machine's safe Z 0.1 in is 2.54 mm.
    expect(a.safeZ).toBeCloseTo(2.54, 9);
  });

  it("after a move, a G20 only converts what follows; the report stays in the units the program moved in", () => {
    const a = run(["G17 G90 G94 G54", "G0 X10 Y0 Z0", "G20", "G0 X1", "M30"]);
    expect(a.units).toBe("mm");
    expect(a.bounds.max.x).toBeCloseTo(25.4, 9);
  });
});

describe("workOffsets lists what the program selects or moves in", () => {
  it("not the default G54 when G55 is selected first, even after a Z home move and a tool change", () => {
    const a = run(["G21 G17 G90 G94", "G91 G28 Z0", "G90", "T1 M6", "S1000 M3", "G55 G0 X0 Y0", "G43 H1 Z25", "G1 Z-1 F100", "M30"]);
    expect(a.workOffsets.map((w) => w.code)).toEqual(["G55"]);
  });

  it("a move before any selection runs in G54 and lists it", () => {
    const a = run(["G21 G17 G90 G94", "G0 X0 Y0 Z5", "G55 G0 X1", "M30"]);
    expect(a.workOffsets.map((w) => w.code)).toEqual(["G54", "G55"]);
  });
});

describe("the summary says when the analysis is partial", () => {
  it("coverage counts each physical line once, however often a subprogram runs it", () => {
    const a = run([...head, "M98 P100 L3", "M30", "O100", "G1 X#1 F100", "M99"]);
    expect(a.findings.filter((f) => f.rule === "not-evaluated")).toHaveLength(3);
    expect(a.coverage).toEqual({ codeLines: 10, notEvaluatedLines: 1, evaluatedShare: 0.9, lines: [9] });
  });

  it("a program read whole has share 1 and no lines", () => {
    expect(run([...head, "M30"]).coverage).toEqual({ codeLines: 6, notEvaluatedLines: 0, evaluatedShare: 1, lines: [] });
  });
});
