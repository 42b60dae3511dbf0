/**
 * The word-address format and program flow: line endings, comments, block delete, N and O words, upper and lower
 * case with spaces inside words ([NIST] 3.3), G28 through the intermediate point ([NIST] 3.5.8), G53 machine moves
 * ([NIST] 3.5.12), subprograms held in the same file (common practice: M98 P<n> L<repeats>, O<n> ... M99),
 * parameters and expressions that are reported and never misread, and the shape of the toolpath arrays.
 */
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeProgram } from "../../lib/gcode/index";
import { MotionKind, type Analysis, type AnalyzeOptions } from "../../lib/gcode/types";

const run = (lines: string[], options?: AnalyzeOptions, eol = "\n"): Analysis => analyzeProgram(lines.join(eol) + eol, options);
const rulesOn = (a: Analysis, line: number) => a.findings.filter((f) => f.line === line).map((f) => f.rule);
const head = ["G21 G17 G90 G94 G54", "T1 M6", "S1000 M3"];

describe("line format ([NIST] 3.3)", () => {
  const program = [...head, "G0 X0 Y0", "G43 H1 Z5", "G1 Z-1", "G1 X40 F100", "G0 Z5", "M30"];

  it("CR, LF and CRLF endings give the same lines and findings", () => {
    const lf = run(program, undefined, "\n");
    const crlf = run(program, undefined, "\r\n");
    const cr = run(program, undefined, "\r");
    for (const a of [lf, crlf, cr]) {
      expect(a.lineCount).toBe(9);
      // The G1 on line 6 has no feed in force.
      expect(rulesOn(a, 6)).toContain("feed-missing");
      expect(a.feedLength).toBeCloseTo(46, 9);
    }
  });

  it("a file without a final line ending still has its last line", () => {
    const a = analyzeProgram(program.join("\n"));
    expect(a.lineCount).toBe(9);
    expect(a.endLine).toBe(9);
  });

  it("reads lower case and spaces inside words: g 1 x 1 0 . 5 is G1 X10.5", () => {
    // [NIST] 3.3: spaces and tabs are allowed anywhere on a line and do not change its meaning; letters may be lower case.
    const a = run([...head, "G0 X0 Y0", "G43 H1 Z5", "g 1 x 1 0 . 5 f 1 0 0", "M30"]);
    expect(a.bounds.max.x).toBeCloseTo(10.5, 9);
    expect(a.feedLength).toBeCloseTo(10.5, 9);
  });

  it("skips ( ) comments inside a line and everything after ;", () => {
    const a = run([...head, "G0 X0 Y0", "G43 H1 Z5", "G1 X10 (THEN Y99) Y5 F100", "G1 X20 ; Y99", "M30"]);
    expect(a.bounds.max.y).toBeCloseTo(5, 9);
    expect(a.bounds.max.x).toBeCloseTo(20, 9);
  });

  it("reads N words, the program number and % tape marks", () => {
    const a = run(["%", "O1234 (PART)", "N10 G21 G17 G90 G94 G54", "N20 T1 M6", "N30 S1000 M3", "N40 G0 X7 Y0", "N50 G43 H1 Z5", "N60 M30", "%"]);
    expect(a.programNumber).toBe(1234);
    expect(a.bounds.max.x).toBeCloseTo(7, 9);
    expect(a.endLine).toBe(8);
    expect(a.findings.filter((f) => f.severity !== "info")).toEqual([]);
  });

  it("runs block-delete lines unless the blockDelete option is on", () => {
    const lines = [...head, "G0 X0 Y0", "G43 H1 Z5", "/G0 X100", "G0 X1", "M30"];
    expect(run(lines).bounds.max.x).toBeCloseTo(100, 9);
    expect(run(lines, { blockDelete: true }).bounds.max.x).toBeCloseTo(1, 9);
  });
});

describe("units and shifts", () => {
  it("a G20 after G21 converts what follows into the program's millimetres", () => {
    // [NIST] 3.5.7 (length units): G20 makes numbers inches. The program's units are the first G21 (types.ts);
    // derived: X1 inch = 25.4 mm, so the feeds run 0 -> 10 -> 25.4 mm, 25.4 mm in all.
    const a = run(["G21 G17 G90 G94 G54", "T1 M6", "S1000 M3", "G0 X0 Y0", "G43 H1 Z0", "G1 X10 F100", "G20 G1 X1", "G21", "M30"]);
    expect(a.units).toBe("mm");
    expect(a.bounds.max.x).toBeCloseTo(25.4, 6);
    expect(a.feedLength).toBeCloseTo(25.4, 6);
  });

  it("G52 X10 shifts the program: X0 is then part X10, and G52 X0 removes the shift", () => {
    // Common practice (G52 local coordinate shift): positions are relative to part zero (types.ts), so the
    // shifted X0 is part X10 and X5 part X15.
    const a = run([...head, "G0 X0 Y0", "G43 H1 Z5", "G52 X10", "G0 X0", "G0 X5", "G52 X0", "G0 X1", "M30"]);
    expect(a.bounds.min.x).toBeCloseTo(0, 9);
    expect(a.bounds.max.x).toBeCloseTo(15, 9);
    // Derived: 0 -> 10 -> 15 -> 1: 10 + 5 + 14 = 29 of rapids.
    expect(a.rapidLength).toBeCloseTo(29, 9);
  });
});

describe("parameters and expressions are reported, never misread", () => {
  it("G0 X#1 is not read as X1 and leaves X unknown", () => {
    const a = run([...head, "G0 X0 Y0", "G43 H1 Z5", "#1 = 100", "G0 X#1", "G0 Y3", "M30"]);
    expect(rulesOn(a, 6)).toContain("not-evaluated");
    expect(rulesOn(a, 7)).toContain("not-evaluated");
    expect(a.bounds.max.x).toBeCloseTo(0, 9);
    expect(a.bounds.max.y).toBeCloseTo(3, 9);
  });

  it("G1 X[1+2] is not read as X1, X2 or X3", () => {
    const a = run([...head, "G0 X0 Y0", "G43 H1 Z5", "G1 X[1+2] F100", "M30"]);
    expect(rulesOn(a, 6)).toContain("not-evaluated");
    expect(a.bounds.max.x).toBeCloseTo(0, 9);
    expect(a.feedLength).toBe(0);
  });
});

describe("G28 and G53 ([NIST] 3.5.8, 3.5.12)", () => {
  it("G28 X20 Y30 traverses to the intermediate point; the leg to home is reported apart", () => {
    const a = run([...head, "G0 X0 Y0", "G43 H1 Z10", "G28 X20 Y30", "M30"]);
    // The intermediate point (20, 30, 10) is a program point: in the bounds, and its leg is a rapid of
    // hypot(20, 30) = 36.0555. The leg to the home position is a machine move: counted apart, not in the bounds.
    expect(a.bounds.max.x).toBeCloseTo(20, 9);
    expect(a.bounds.max.y).toBeCloseTo(30, 9);
    expect(a.rapidLength).toBeCloseTo(Math.hypot(20, 30), 6);
    expect(a.machineMoves.count).toBe(1);
    expect(a.machineMoves.lines).toEqual([6]);
  });

  it("G91 G28 Z0: the intermediate point is where the tool is, so only the home leg moves", () => {
    const a = run([...head, "G0 X0 Y0", "G43 H1 Z10", "G91 G28 Z0", "G90", "M30"]);
    expect(a.rapidLength).toBeCloseTo(0, 9);
    expect(a.machineMoves.count).toBe(1);
    expect(a.bounds.max.z).toBeCloseTo(10, 9);
  });

  it("G30 works the same way through its intermediate point ([NIST] 3.5.8)", () => {
    const a = run([...head, "G0 X0 Y0", "G43 H1 Z10", "G30 X20 Y30", "M30"]);
    expect(a.bounds.max.x).toBeCloseTo(20, 9);
    expect(a.rapidLength).toBeCloseTo(Math.hypot(20, 30), 6);
    expect(a.machineMoves.lines).toEqual([6]);
  });

  it("G53 G0 Z0 is a machine move: not in the program bounds", () => {
    const a = run([...head, "G0 X0 Y0", "G43 H1 Z10", "G53 G0 Z0", "M30"]);
    expect(a.machineMoves.count).toBe(1);
    expect(a.machineMoves.lines).toEqual([6]);
    expect(a.bounds.max.z).toBeCloseTo(10, 9);
  });

  it("G53 with cutter compensation on is an error ([NIST] 3.5.12)", () => {
    const a = run([...head, "G0 X-10 Y-10", "G43 H1 Z10", "G41 D1 G1 X0 Y0 F100", "G53 G0 Z0", "G40", "M30"]);
    expect(a.findings.some((f) => f.line === 7 && f.severity === "error")).toBe(true);
  });

  it("G53 needs G0 or G1 in strict-ngc ([NIST] 3.5.12)", () => {
    const a = run([...head, "G0 X0 Y0", "G43 H1 Z10", "G53 G2 X10 Y0 I5", "M30"], { dialect: "strict-ngc" });
    expect(a.findings.some((f) => f.line === 6 && f.severity === "error")).toBe(true);
  });
});

describe("subprograms in the same file (common practice: M98 P<n> L<repeats> ... O<n> ... M99)", () => {
  const lines = [
    ...head,
    "G0 X0 Y0",
    "G43 H1 Z5",
    "M98 P100 L3",
    "G0 Z5",
    "M30",
    "O100 (SLOT)",
    "G1 Z-1 F100",
    "G1 X10",
    "G0 Z5",
    "G0 X0",
    "M99",
  ];

  it("runs the body once per repeat", () => {
    const a = run(lines);
    // Derived: each pass feeds 6 (Z5 -> Z-1) + 10 along X = 16; three passes 48.
    expect(a.feedLength).toBeCloseTo(48, 9);
    expect(a.endLine).toBe(8);
    expect(a.findings.filter((f) => f.severity !== "info")).toEqual([]);
  });

  it("draws the body's moves with the body's own line numbers, once per pass", () => {
    const a = run(lines);
    const t = a.toolpath;
    // Line 11 is the body's "G1 X10".
    let feedsOnLine11 = 0;
    for (let i = 0; i < t.segmentCount; i++) if (t.line[i] === 11 && t.kind[i] === MotionKind.Feed) feedsOnLine11++;
    expect(feedsOnLine11).toBe(3);
  });
});

describe("the toolpath arrays", () => {
  const a = analyzeProgram(readFileSync(join(__dirname, "..", "fixtures", "two-vise-by-tool.nc")));
  const t = a.toolpath;

  it("are typed arrays of the stated lengths", () => {
    expect(t.positions).toBeInstanceOf(Float32Array);
    expect(t.line).toBeInstanceOf(Uint32Array);
    expect(t.kind).toBeInstanceOf(Uint8Array);
    expect(t.tool).toBeInstanceOf(Uint16Array);
    expect(t.offset).toBeInstanceOf(Uint8Array);
    expect(t.segmentCount).toBeGreaterThan(100);
    expect(t.positions.length).toBe((t.segmentCount + 1) * 3);
    for (const arr of [t.line, t.kind, t.tool, t.offset]) expect(arr.length).toBe(t.segmentCount);
  });

  it("point every segment at a real line, a known kind, a listed tool and a listed offset", () => {
    const kinds = new Set<number>(Object.values(MotionKind));
    for (let i = 0; i < t.segmentCount; i++) {
      expect(t.line[i]).toBeGreaterThanOrEqual(1);
      expect(t.line[i]).toBeLessThanOrEqual(a.lineCount);
      expect(kinds.has(t.kind[i]!)).toBe(true);
      expect(t.tool[i]! < a.tools.length || t.tool[i] === 0xffff).toBe(true);
      expect(t.offset[i]!).toBeLessThan(a.workOffsets.length);
    }
  });

  it("split the figures consistently: per tool and per offset they add up to the program's", () => {
    const sum = (xs: number[]) => xs.reduce((s, x) => s + x, 0);
    expect(sum(a.tools.map((x) => x.feedLength))).toBeCloseTo(a.feedLength, 6);
    expect(sum(a.workOffsets.map((x) => x.feedLength))).toBeCloseTo(a.feedLength, 6);
    expect(sum(a.tools.map((x) => x.time.feedSeconds))).toBeCloseTo(a.time.feedSeconds, 6);
    expect(sum(a.workOffsets.map((x) => x.time.feedSeconds))).toBeCloseTo(a.time.feedSeconds, 6);
  });

  it("use the tool index and offset index of the motion: the drill's holes are under tool 3 in both offsets", () => {
    const drill = a.tools.findIndex((x) => x.number === 3);
    const offsetsOfDrillFeeds = new Set<string>();
    for (let i = 0; i < t.segmentCount; i++) {
      if (t.tool[i] === drill && t.kind[i] === MotionKind.CycleFeed) offsetsOfDrillFeeds.add(a.workOffsets[t.offset[i]!]!.code);
    }
    expect([...offsetsOfDrillFeeds].sort()).toEqual(["G54", "G55"]);
  });
});
