/**
 * Findings a machinist would agree with (issue 9, part 3). These are facts of the trade, marked "common practice";
 * [NIST] is named where it decides (the M2/M30 reset, 3.6.1).
 */
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeProgram } from "../../lib/gcode/index";
import type { Analysis, AnalyzeOptions } from "../../lib/gcode/types";
import { testMachine } from "./profiles";

const run = (lines: string[], options?: AnalyzeOptions): Analysis => analyzeProgram(lines.join("\n") + "\n", options);
const rules = (a: Analysis, rule: string) => a.findings.filter((f) => f.rule === rule);
const linesOf = (a: Analysis, rule: string) => rules(a, rule).map((f) => f.line);
const posts = (name: string) => readFileSync(join(__dirname, "..", "fixtures", "posts", name), "utf8");

const machine = testMachine({ maxSpindle: 10000, toolChangeSeconds: 6 });

describe("one definition of a cut: a feed move that starts or ends at or below safe Z (common practice)", () => {
  const positioning = ["G21 G17 G90 G94", "T1 M6", "G54 G1 X-8 Y0 F5000", "G1 Z50 F5000", "G43 H1 Z25", "S1000 M3", "G1 Z2 F5000", "G1 Z-1 F300", "G1 X40 F900", "G1 Z25 F300", "G1 Z50 F5000", "M30"];

  it("G1 positioning above safe Z, before the G43 line and the M3, is no cut for any rule", () => {
    const a = run(positioning, { machine });
    for (const rule of ["length-offset-missing", "tool-not-loaded", "spindle-off-cut"]) expect(rules(a, rule), rule).toEqual([]);
  });

  it("the cutting bounds and the feed range hold the cuts only (the retract from Z-1 starts below safe Z: a cut)", () => {
    const a = run(positioning, { machine });
    // Cuts: Z2 -> Z-1 (its start is the cutting stretch's start), X-8 -> X40 at Z-1, Z-1 -> Z25 at F300.
    expect(a.cuttingBounds).toEqual({ min: { x: -8, y: 0, z: -1 }, max: { x: 40, y: 0, z: 25 } });
    expect(a.tools[0]!.feed).toEqual({ min: 300, max: 900 });
    // Every feed move still counts in the feed length: the first two start from nowhere (0); the G43 line moves in
    // the G1 in force, 50 -> 25; then 23 + 3 + 48 + 26 + 25.
    expect(a.feedLength).toBeCloseTo(25 + 23 + 3 + 48 + 26 + 25, 9);
  });

  it("the same G1 cutting below safe Z is reported by every rule that speaks of cutting", () => {
    const a = run(["G21 G17 G90 G94", "T1 M6", "G54 G0 X0 Y0", "G1 Z-1 F100", "M30"], { machine });
    expect(linesOf(a, "length-offset-missing")).toEqual([4]);
    expect(linesOf(a, "spindle-off-cut")).toEqual([4]);
  });

  it("an unknown Z is at home after M6 (no cut), and unknown below after a line that was not evaluated (a cut)", () => {
    const home = run(["G21 G17 G90 G94", "T1 M6", "G54 G1 X10 Y0 F500", "M30"], { machine });
    expect(rules(home, "spindle-off-cut")).toEqual([]);
    const lost = run(["G21 G17 G90 G94", "T1 M6", "S1000 M3", "G54 G0 X0 Y0", "G43 H1 Z25", "G0 Z#1", "G1 X10 F500", "M30"], { machine });
    expect(lost.cuttingBounds.max.x).toBe(10);
  });
});

describe("spindle-off-cut on a machine whose spindle is not under program control", () => {
  it("nothing but one info line per program, however many tools cut with the spindle 'off'", () => {
    const manual = { ...machine, spindleProgramControlled: false, manualToolChange: true };
    const prog = ["G21 G17 G90 G94", "T1 M6", "G54 G0 X0 Y0", "G43 H1 Z25", "G1 Z-1 F100", "G0 Z25", "T2 M6", "G43 H2 Z25", "G1 Z-1 F100", "G0 Z25", "M30"];
    const a = run(prog, { machine: manual });
    expect(rules(a, "spindle-off-cut").map((f) => f.severity)).toEqual(["info"]);
    expect(rules(run(prog, { machine }), "spindle-off-cut").map((f) => [f.line, f.severity])).toEqual([[5, "error"], [9, "error"]]);
  });
});

describe("incremental-left-on: a move that runs in G91 where absolute was meant", () => {
  const first = ["G21 G17 G90 G94", "T1 M6", "S1000 M3", "G54 G0 X0 Y0", "G43 H1 Z25", "G1 Z-1 F100", "G0 Z25"];
  it("not at the common G91 G28 Z0 followed by G90 before the next move", () => {
    const a = run([...first, "G91 G28 Z0", "G90", "T2 M6", "S1000 M3", "G0 X10 Y10", "G43 H2 Z25", "M30"]);
    expect(rules(a, "incremental-left-on")).toEqual([]);
  });
  it("nor when the G90 comes after the change but before the move", () => {
    const a = run([...first, "G91 G28 Z0", "T2 M6", "G90", "S1000 M3", "G0 X10 Y10", "G43 H2 Z25", "M30"]);
    expect(rules(a, "incremental-left-on")).toEqual([]);
  });
  it("at the first move after the tool change when G90 never came", () => {
    const a = run([...first, "G91 G28 Z0", "T2 M6", "S1000 M3", "G0 X10 Y10", "G90", "G43 H2 Z25", "M30"]);
    expect(linesOf(a, "incremental-left-on")).toEqual([11]);
  });
  it("never at M2/M30, which reset to G90 ([NIST] 3.6.1)", () => {
    const a = run([...first, "G91 G28 Z0", "M30"]);
    expect(rules(a, "incremental-left-on")).toEqual([]);
  });
  it("at the end of a file that has no M2/M30, on its last line", () => {
    const a = run([...first, "G91 G28 Z0"]);
    expect(linesOf(a, "incremental-left-on")).toEqual([8]);
  });
  it("never in a program that is in G91 from its start", () => {
    const a = run(["G21 G91 G17 G94 G54", "T1 M6", "G43 H1", "S1000 M3", "G1 Z-1 F100", "T2 M6", "G43 H2", "G1 X10", "M30"]);
    expect(rules(a, "incremental-left-on")).toEqual([]);
  });
});

describe("the move to a canned cycle's R plane is a rapid (common practice)", () => {
  const head = ["G21 G17 G90 G94", "T1 M6", "S1000 M3", "G54 G0 X0 Y0", "G43 H1 Z25"];
  it("an R above safe Z is fine, and the pecks' re-entries inside the hole are not low rapids", () => {
    const a = run([...head, "G99 G83 X10 Y10 Z-10 R2 Q2 F100", "X20", "G80", "M30"], { machine });
    expect(rules(a, "rapid-below-safe-z")).toEqual([]);
  });
  it("an R below safe Z is a warning on the cycle line, and under G99 so are the moves between holes at R", () => {
    // Line 6 rapids down to R-2; lines 7 and 8 move to their holes at R-2, where the G99 holes before them left
    // the tool (line 8's own G98 only decides where it retracts afterwards); after line 8's G98 retract to the
    // initial level, line 9 rapids down to R-2 again. No errors: a low rapid is a warning.
    const a = run([...head, "G99 G81 X10 Y10 Z-10 R-2 F100", "X20", "G98 X30", "X40", "G80", "M30"], { machine });
    expect(rules(a, "rapid-below-safe-z").map((f) => [f.line, f.severity])).toEqual([[6, "warning"], [7, "warning"], [8, "warning"], [9, "warning"]]);
    expect(a.findings.filter((f) => f.severity === "error")).toEqual([]);
  });
});

describe("multi-part programs", () => {
  it("the parts are found when the tools repeat the same work under each offset", () => {
    for (const name of ["16-two-vise-by-tool.nc", "17-two-vise-by-part.nc"]) expect(run([posts(name)]).parts, name).toBe(2);
  });

  it("a program whose offsets hold different operations is one part per cycle, with no fixture finding", () => {
    const a = run([posts("15-second-side-g55.nc")]);
    expect(a.parts).toBe(1);
    expect(a.toolOrder).toBe("single");
    expect(rules(a, "fixture-mismatch")).toEqual([]);
  });

  it("the caller's parts option decides when given: with parts 2 the second side is compared, and differs", () => {
    const a = run([posts("15-second-side-g55.nc")], { parts: 2 });
    expect(a.parts).toBe(2);
    expect(rules(a, "fixture-mismatch").length).toBeGreaterThan(0);
  });

  it("a hole drilled deeper on part 2 is a difference on its line", () => {
    const src = posts("16-two-vise-by-tool.nc").split("\n");
    const t3 = src.findIndex((l) => l === "T3 M6");
    const g55 = src.findIndex((l, i) => i > t3 && l === "G55");
    const g81 = src.findIndex((l, i) => i > g55 && l.includes("G81"));
    const a = run([src.map((l, i) => (i === g81 ? l.replace("Z-8.", "Z-9.") : l)).join("\n")]);
    expect(linesOf(a, "fixture-mismatch")).toEqual([g81 + 1]);
  });
});

describe("program-end-missing points at the main program's last line", () => {
  it("not at the % after it, nor inside the subprogram bodies that follow", () => {
    const a = run(["%", "G21 G17 G90 G94 G54", "G0 X0 Y0 Z25", "M98 P100", "G0 Z50", "O100", "G0 X10", "M99", "%"]);
    expect(linesOf(a, "program-end-missing")).toEqual([5]);
  });
});

describe("tool descriptions lose the separators posts wrap them in (common practice)", () => {
  const cases: Array<[string, string]> = [
    ["(T1 | 10MM FLAT END MILL | H1 |)", "10MM FLAT END MILL H1"],
    ["(T1 - D10 - 3-FLUTE - ZMIN=-3. -)", "D10 3-FLUTE ZMIN=-3."],
    ["(T1: SPOT DRILL 90DEG :)", "SPOT DRILL 90DEG"],
    ["(T1 | |)", ""],
  ];
  for (const [comment, want] of cases) {
    it(`${comment} -> "${want}"`, () => {
      const a = run([comment, "G21 G17 G90 G94", "T1 M6", "M30"]);
      expect(a.tools[0]!.description).toBe(want === "" ? null : want);
    });
  }
});

describe("time per work offset", () => {
  const byTool = run([posts("16-two-vise-by-tool.nc")], { machine });
  const byPart = run([posts("17-two-vise-by-part.nc")], { machine });

  it("two identical parts show the same cutting time; by part, the same total too", () => {
    for (const a of [byTool, byPart]) expect(a.workOffsets[1]!.time.feedSeconds).toBeCloseTo(a.workOffsets[0]!.time.feedSeconds, 9);
    expect(byPart.workOffsets[1]!.time.totalSeconds).toBeCloseTo(byPart.workOffsets[0]!.time.totalSeconds, 9);
  });

  it("tool changes are not charged to any offset; they are reported apart, in the program's time", () => {
    for (const a of [byTool, byPart]) {
      expect(a.workOffsets.map((w) => w.time.toolChangeSeconds)).toEqual([0, 0]);
      // The profile's 6 s per change: 3 changes by tool, 6 by part.
      expect(a.time.toolChangeSeconds).toBeCloseTo(6 * a.toolChangeCount, 9);
    }
  });

  it("the offsets' time plus tool changes and home moves is the program's", () => {
    for (const a of [byTool, byPart]) {
      const offsets = a.workOffsets.reduce((s, w) => s + w.time.totalSeconds, 0);
      expect(offsets + a.time.toolChangeSeconds).toBeLessThanOrEqual(a.time.totalSeconds + 1e-9);
      expect(a.tools.reduce((s, t) => s + t.time.totalSeconds, 0)).toBeCloseTo(a.time.totalSeconds, 9);
    }
  });
});
