/**
 * The two dialects (lib/gcode/README.md "Dialects"): "common", the word-address dialect posts write for industrial
 * controls (the default), and "strict-ngc", the [NIST] RS274/NGC interpreter's. Each difference is checked both
 * ways. Where no published source is at hand the check says "common practice"; "from memory" marks a value
 * recalled rather than read.
 */
import { describe, expect, it } from "vitest";
import { analyzeProgram } from "../../lib/gcode/index";
import { MotionKind, type Analysis, type AnalyzeOptions, type Dialect } from "../../lib/gcode/types";
import { testMachine } from "./profiles";

const run = (lines: string[], options?: AnalyzeOptions): Analysis => analyzeProgram(lines.join("\n") + "\n", options);
const both = (lines: string[], options?: AnalyzeOptions): Record<Dialect, Analysis> => ({
  common: run(lines, options),
  "strict-ngc": run(lines, { ...options, dialect: "strict-ngc" }),
});
const rulesOn = (a: Analysis, line: number) => a.findings.filter((f) => f.line === line).map((f) => f.rule);
const errors = (a: Analysis) => a.findings.filter((f) => f.severity === "error");
const kindsOn = (a: Analysis, line: number) => [...a.toolpath.line.keys()].filter((i) => a.toolpath.line[i] === line).map((i) => a.toolpath.kind[i]);
const head = ["G21 G17 G90 G94", "T1 M6", "S1000 M3", "G54 G0 X0 Y0", "G43 H1 Z25"];

const machine = testMachine({ maxSpindle: 10000, travel: { x: { min: -500, max: 0 }, y: { min: -400, max: 0 }, z: { min: -400, max: 0 } } });

describe("which dialect runs", () => {
  it("is common by default, the profile's when it names one, the option's above both", () => {
    expect(run(head).dialect).toBe("common");
    expect(run(head, { machine: { ...machine, dialect: "strict-ngc" } }).dialect).toBe("strict-ngc");
    expect(run(head, { machine: { ...machine, dialect: "strict-ngc" }, dialect: "common" }).dialect).toBe("common");
  });
});

describe("G80 cancels a cycle and is no motion mode of its own (common practice)", () => {
  for (const line of ["G0 G80", "G80 G0", "G0 G17 G40 G49 G80 G90"]) {
    it(`"${line}" is fine in common; a modal conflict in strict-ngc ([NIST] 3.4: G0 and G80 are both group 1)`, () => {
      const { common, "strict-ngc": strict } = both([line, ...head, "M30"]);
      expect(rulesOn(common, 1)).toEqual([]);
      expect(rulesOn(strict, 1)).toContain("modal-conflict");
    });
  }

  it("the safe-start line is not skipped: its G90 and G17 are in force", () => {
    const a = run(["G21 G91", "G0 G17 G40 G49 G80 G90", "G54 G0 X10 Y5 Z25", "M30"]);
    expect(a.bounds.max.x).toBe(10);
    expect(a.findings.filter((f) => f.rule === "incremental-left-on")).toEqual([]);
  });

  it("a bare Z after G80 moves in the mode from before the cycle: G0 here, G1 there", () => {
    const cycle = ["G98 G81 X10 Y10 Z-5 R2 F100", "G80"];
    const rapid = run([...head, ...cycle, "Z40", "M30"]);
    expect(kindsOn(rapid, 8)).toEqual([MotionKind.Rapid]);
    const feed = run([...head, "G1 Z20 F500", ...cycle, "Z40", "M30"]);
    expect(kindsOn(feed, 9)).toEqual([MotionKind.Feed]);
    // [NIST] 3.5.15: after G80 there is no motion mode, so the bare Z is an error there.
    expect(errors(run([...head, ...cycle, "Z40", "M30"], { dialect: "strict-ngc" })).map((f) => f.line)).toEqual([8]);
  });
});

describe("G90.1 / G91.1 arc centre mode (common practice)", () => {
  it("G91.1 (the default) reads I/J from the start point; G90.1 as the centre's own coordinates", () => {
    // From (10, 0): G91.1 I-5 is the centre (5, 0); G90.1 I5 J0 is the same centre. A half circle to (0, 0):
    // [GEO] length 5*pi either way.
    const inc = run([...head, "G91.1", "G0 X10 Y0", "G1 Z-1 F100", "G2 X0 Y0 I-5 J0", "M30"]);
    const abs = run([...head, "G90.1", "G0 X10 Y0", "G1 Z-1 F100", "G2 X0 Y0 I5 J0", "M30"]);
    for (const a of [inc, abs]) {
      expect(a.feedLength).toBeCloseTo(26 + 5 * Math.PI, 9);
      expect(a.findings.filter((f) => f.severity !== "info")).toEqual([]);
    }
  });

  it("strict-ngc does not know them ([NIST] 3.4 table 4 has no G90.1 or G91.1)", () => {
    expect(rulesOn(run([...head, "G91.1", "M30"], { dialect: "strict-ngc" }), 6)).toContain("unknown-code");
  });
});

describe("a canned cycle with no R word ever given", () => {
  const lines = [...head, "G0 Z5", "G99 G81 X10 Y10 Z-3 F100", "X20", "G80", "M30"];

  it("common: a warning; the cycle starts from and returns to the initial level, under G99 too (common practice)", () => {
    const a = run(lines);
    const found = a.findings.filter((f) => f.rule === "cycle-invalid");
    expect(found.map((f) => [f.line, f.severity])).toEqual([[7, "warning"]]);
    expect(errors(a)).toEqual([]);
    // Derived: both holes feed from the initial level Z5 to Z-3: 2 x 8 = 16.
    expect(a.feedLength).toBeCloseTo(16, 9);
  });

  it("strict-ngc: an error, the cycle does not run ([NIST] 3.5.16: R is needed)", () => {
    const a = run(lines, { dialect: "strict-ngc" });
    expect(a.findings.find((f) => f.rule === "cycle-invalid")?.severity).toBe("error");
    expect(a.feedLength).toBe(0);
  });

  it("G98 returns to the initial level where the cycle started, even after G99 holes (common practice; [NIST] 3.5.20 returns to the Z the block started at)", () => {
    const prog = [...head, "G99 G81 X10 Y10 Z-3 R2 F100", "G98 X20", "G80", "M30"];
    const endZ = (a: Analysis) => a.toolpath.positions[a.toolpath.positions.length - 1];
    expect(endZ(run(prog))).toBe(25);
    expect(endZ(run(prog, { dialect: "strict-ngc" }))).toBe(2);
  });
});

describe("arc tolerance", () => {
  // From (0,0) with I5 the centre is (5,0), start radius 5; the end radius is X - 5.
  const arc = (units: "G21" | "G20", x: string, options?: AnalyzeOptions) =>
    rulesOn(run([`${units} G17 G90 G94 G54`, "G0 X0 Y0 Z0", `G3 X${x} Y0 I5 F10`, "M2"], options), 3);

  it("common: 0.02 mm / 0.001 in, about 7x the worst rounding of a 3-decimal post (README \"Arc tolerance\"; from memory, controls' own limits are set in tens of microns)", () => {
    // [GEO] rounding every number to h moves start and end radius apart by at most about 4*h*sqrt(2):
    // h = 0.0005 mm gives 0.0028 mm, over [NIST]'s 0.002 mm; h = 0.00005 in gives 0.00028 in, over 0.0002 in.
    expect(arc("G21", "10.019")).not.toContain("arc-radius-mismatch");
    expect(arc("G21", "10.021")).toContain("arc-radius-mismatch");
    expect(arc("G20", "10.0009")).not.toContain("arc-radius-mismatch");
    expect(arc("G20", "10.0011")).toContain("arc-radius-mismatch");
  });

  it("strict-ngc keeps [NIST]'s 0.002 mm / 0.0002 in ([NIST-SRC] TOLERANCE_MM / TOLERANCE_INCH)", () => {
    const strict = { dialect: "strict-ngc" } as const;
    expect(arc("G21", "10.003", strict)).toContain("arc-radius-mismatch");
    expect(arc("G21", "10.0015", strict)).not.toContain("arc-radius-mismatch");
  });

  it("a profile or the option sets it: 0.05 mm on the machine lets 0.03 pass; the option in program units wins", () => {
    expect(arc("G21", "10.03", { machine: { ...machine, arcTolerance: 0.05 } })).not.toContain("arc-radius-mismatch");
    // An inch machine's 0.002 in is 0.0508 mm.
    expect(arc("G21", "10.05", { machine: { ...machine, units: "inch", arcTolerance: 0.002 } })).not.toContain("arc-radius-mismatch");
    expect(arc("G21", "10.03", { machine: { ...machine, arcTolerance: 0.05 }, arcTolerance: 0.01 })).toContain("arc-radius-mismatch");
    expect(run(["G21"], { arcTolerance: 0.01 }).arcTolerance).toBe(0.01);
  });

  it("the same limit decides an R shorter than half the chord: a rounded half circle, or an error", () => {
    // From (0,0) to (10,0): half the chord is 5. R4.99 is 0.01 short (inside 0.02); R4.97 is 0.03 short.
    const r = (R: string, options?: AnalyzeOptions) => run(["G21 G17 G90 G94 G54", "G0 X0 Y0 Z0", `G2 X10 Y0 R${R} F10`, "M2"], options);
    const arcRules = (a: Analysis) => rulesOn(a, 3).filter((x) => x.startsWith("arc-"));
    const rounded = r("4.99");
    expect(arcRules(rounded)).toEqual([]);
    // [GEO] read as the half circle through both ends: radius 5, length 5*pi, top at Y5.
    expect(rounded.feedLength).toBeCloseTo(5 * Math.PI, 9);
    expect(rounded.bounds.max.y).toBeCloseTo(5, 9);
    expect(arcRules(r("4.97"))).toContain("arc-invalid");
    // [NIST] 3.5.3.1: strict-ngc allows no shortfall at all.
    expect(arcRules(r("4.999", { dialect: "strict-ngc" }))).toContain("arc-invalid");
  });
});

describe("a G2/G3 with a centre and no end point in the plane", () => {
  it("common: a full circle back to the start (common practice)", () => {
    const { common, "strict-ngc": strict } = both(["G21 G17 G90 G94 G54", "G0 X10 Y0 Z0", "G2 I-5 F100", "M30"]);
    // [GEO] 2*pi*5; bounds X[0,10] Y[-5,5].
    expect(common.feedLength).toBeCloseTo(10 * Math.PI, 9);
    expect(common.cuttingBounds.min.x).toBeCloseTo(0, 9);
    expect(common.cuttingBounds.max.y).toBeCloseTo(5, 9);
    expect(rulesOn(common, 3).filter((x) => x.startsWith("arc-"))).toEqual([]);
    // [NIST] 3.5.3.2: "it is an error if X and Y are both omitted".
    expect(rulesOn(strict, 3)).toContain("arc-invalid");
  });

  it("common: a helix when Z is given, and the modal G2 takes a line of I/J alone", () => {
    const a = run(["G21 G17 G90 G94 G54", "G0 X10 Y0 Z0", "G3 Z-2 I-5 F100", "I-5", "M30"]);
    // [GEO] hypot(10*pi, 2) + 10*pi.
    expect(a.feedLength).toBeCloseTo(Math.hypot(10 * Math.PI, 2) + 10 * Math.PI, 9);
  });
});

describe("G28 and G53 with a motion code on the line", () => {
  it('"G0 G91 G28 Z0" and "G91 G28 Z0" are fine in common: the home move takes the axis words (common practice)', () => {
    for (const line of ["G0 G91 G28 Z0", "G91 G28 Z0"]) {
      const a = run([...head, line, "G90", "M30"]);
      expect(rulesOn(a, 6), line).toEqual([]);
      expect(a.machineMoves.lines).toEqual([6]);
    }
    // [NIST] 3.4: a group 1 and a group 0 code that both use axis words is an error.
    expect(rulesOn(run([...head, "G0 G91 G28 Z0", "G90", "M30"], { dialect: "strict-ngc" }), 6)).toContain("modal-conflict");
  });

  it("G53 moves at rapid whatever motion mode is in force (common practice); [NIST] 3.5.12 needs G0 or G1", () => {
    const prog = [...head, "G1 Z20 F500", "G2 X0 Y10 J5", "G53 Z0", "M30"];
    expect(rulesOn(run(prog), 8)).toEqual([]);
    expect(rulesOn(run(prog, { dialect: "strict-ngc" }), 8)).toContain("word-invalid");
  });
});

describe("M98 with a repeat count of zero", () => {
  const prog = [...head, "M98 P100 L0", "M30", "O100", "G1 Z-5 F100", "M99"];
  it("common: calls the subprogram no times, and says nothing (common practice)", () => {
    const a = run(prog);
    expect(a.findings.filter((f) => f.severity !== "info")).toEqual([]);
    expect(a.feedLength).toBe(0);
    expect(run([...head, "M98 P100 K0", "M30", "O100", "G1 Z-5 F100", "M99"]).findings.filter((f) => f.severity !== "info")).toEqual([]);
  });
  it("strict-ngc: an error, as before", () => {
    expect(rulesOn(run(prog, { dialect: "strict-ngc" }), 6)).toContain("subprogram-invalid");
  });
});

describe("codes only the common dialect knows (common practice)", () => {
  it("G9 (exact stop for one block), G69/G15/G50.1 (cancels) are fine", () => {
    const a = run(["G21 G17 G40 G49 G80 G90 G69 G15 G50.1", ...head.slice(1), "G9 G1 X10 Z-1 F100", "M30"]);
    expect(a.findings.filter((f) => f.severity !== "info")).toEqual([]);
  });

  it("G68 rotation is known but not applied: the lines under it are not evaluated, and the summary says so", () => {
    const a = run([...head, "G68 X0 Y0 R45", "G1 X10 Z-1 F100", "G69", "G1 X20", "M30"]);
    expect(rulesOn(a, 6)).toContain("not-evaluated");
    expect(a.coverage.lines).toEqual([6, 7]);
    expect(a.coverage.evaluatedShare).toBeLessThan(1);
  });

  it("G74 reverse tapping needs M4 and feeds in and out; G76 fine boring rapids out", () => {
    const tap = run([...head.slice(0, 2), "S300 M4", ...head.slice(3), "G99 G74 X10 Y10 Z-10 R2 F375", "G80", "M30"]);
    expect(tap.findings.filter((f) => f.severity !== "info")).toEqual([]);
    // Derived: 12 in and 12 out.
    expect(tap.feedLength).toBeCloseTo(24, 9);
    expect(rulesOn(run([...head, "G99 G74 X10 Y10 Z-10 R2 F375", "G80", "M30"]), 6)).toContain("cycle-invalid");
    const bore = run([...head, "G98 G76 X10 Y10 Z-10 R2 Q0.1 F100", "G80", "M30"]);
    expect(bore.feedLength).toBeCloseTo(12, 9);
  });
});
