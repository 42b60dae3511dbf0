/**
 * Worked examples and rules of the NIST RS274/NGC Interpreter, version 3 (NISTIR 6556, 2000), cited as [NIST]
 * with its section; constants of the NIST interpreter source as [NIST-SRC]. The report's text was read before
 * writing each check; derived values are re-derived beside them.
 */
import { describe, expect, it } from "vitest";
import { analyzeProgram } from "../../lib/gcode/index";
import { MotionKind, type AnalyzeOptions, type Analysis, type MachineProfile, type RuleId } from "../../lib/gcode/types";
import { testMachine } from "./profiles";

type P3 = [number, number, number];
interface Seg {
  line: number;
  kind: number;
  from: P3;
  to: P3;
}

/** [NIST] behaviour is the strict-ngc dialect's (lib/gcode/README.md "Dialects"): every check here runs in it. */
function run(lines: string[], options?: AnalyzeOptions): Analysis {
  return analyzeProgram(lines.join("\n") + "\n", { dialect: "strict-ngc", ...options });
}

/** Drawn segments of the toolpath (Jump links left out), optionally of one line. */
function segments(a: Analysis, line?: number): Seg[] {
  const t = a.toolpath;
  const p = t.positions;
  const out: Seg[] = [];
  for (let i = 0; i < t.segmentCount; i++) {
    const kind = t.kind[i]!;
    if (kind === MotionKind.Jump) continue;
    if (line !== undefined && t.line[i] !== line) continue;
    out.push({
      line: t.line[i]!,
      kind,
      from: [p[3 * i]!, p[3 * i + 1]!, p[3 * i + 2]!],
      to: [p[3 * i + 3]!, p[3 * i + 4]!, p[3 * i + 5]!],
    });
  }
  return out;
}

function len(s: Seg): number {
  return Math.hypot(s.to[0] - s.from[0], s.to[1] - s.from[1], s.to[2] - s.from[2]);
}

const isRapid = (k: number) => k === MotionKind.Rapid || k === MotionKind.CycleRapid;
const isFeed = (k: number) => k === MotionKind.Feed || k === MotionKind.CycleFeed || k === MotionKind.Arc;

/** The straight-move sequence of a line as [kind, end point], zero-length moves dropped (they carry no geometry). */
function moveSequence(a: Analysis, line: number): Array<["rapid" | "feed", P3]> {
  return segments(a, line)
    .filter((s) => len(s) > 1e-9)
    .map((s) => [isRapid(s.kind) ? "rapid" : "feed", s.to]);
}

function expectSequence(actual: Array<["rapid" | "feed", P3]>, expected: Array<["rapid" | "feed", P3]>) {
  expect(actual.map((m) => m[0])).toEqual(expected.map((m) => m[0]));
  expected.forEach(([, p], i) => {
    const q = actual[i]![1];
    for (let k = 0; k < 3; k++) expect(q[k]).toBeCloseTo(p[k]!, 4);
  });
}

function rulesOn(a: Analysis, line: number): RuleId[] {
  return a.findings.filter((f) => f.line === line).map((f) => f.rule);
}

function errorsOn(a: Analysis, line: number) {
  return a.findings.filter((f) => f.line === line && f.severity === "error");
}

const machine: MachineProfile = testMachine({
  travel: { x: { min: -100, max: 600 }, y: { min: -100, max: 400 }, z: { min: -500, max: 100 } },
});

describe("[NIST] 3.5.16 canned cycles, G81 worked examples", () => {
  it("example 1: G90 G81 G98 X4 Y5 Z1.5 R2.8 from (1,2,3)", () => {
    const a = run(["G20 G17 G90 G94 G54 F10", "G0 X1 Y2 Z3", "G90 G81 G98 X4 Y5 Z1.5 R2.8", "G80", "M2"]);
    // [NIST] 3.5.16.2 example 1: traverse XY to (4,5,3); traverse Z to (4,5,2.8); feed to (4,5,1.5); traverse to (4,5,3).
    expectSequence(moveSequence(a, 3), [
      ["rapid", [4, 5, 3]],
      ["rapid", [4, 5, 2.8]],
      ["feed", [4, 5, 1.5]],
      ["rapid", [4, 5, 3]],
    ]);
    // Derived: feed 2.8 - 1.5 = 1.3 in.
    expect(a.feedLength).toBeCloseTo(1.3, 6);
    expect(a.units).toBe("inch");
  });

  it("example 2: G91 G81 G98 X4 Y5 Z-0.6 R1.8 L3 from (1,2,3)", () => {
    const a = run(["G20 G17 G90 G94 G54 F10", "G0 X1 Y2 Z3", "G91 G81 G98 X4 Y5 Z-0.6 R1.8 L3", "G80", "G90", "M2"]);
    // [NIST] 3.5.16.2 example 2: clear Z 4.8 (=1.8+3), hole bottom 4.2 (=4.8-0.6); first a Z traverse to (1,2,4.8)
    // since old Z < clear Z; then three holes at (5,7), (9,12), (13,17): traverse XY, feed Z, traverse back to 4.8.
    expectSequence(moveSequence(a, 3), [
      ["rapid", [1, 2, 4.8]],
      ["rapid", [5, 7, 4.8]],
      ["feed", [5, 7, 4.2]],
      ["rapid", [5, 7, 4.8]],
      ["rapid", [9, 12, 4.8]],
      ["feed", [9, 12, 4.2]],
      ["rapid", [9, 12, 4.8]],
      ["rapid", [13, 17, 4.8]],
      ["feed", [13, 17, 4.2]],
      ["rapid", [13, 17, 4.8]],
    ]);
    // Derived: 3 holes x 0.6 = 1.8 in of feed.
    expect(a.feedLength).toBeCloseTo(1.8, 6);
  });

  it("R and Z are sticky on the following lines; L is not", () => {
    // [NIST] 3.5.16: "The R number is always sticky", Z is sticky in G17, "The L number is not sticky"; in absolute
    // mode "L > 1 means do the same cycle in the same place several times".
    const a = run(["G20 G17 G90 G94 G54 F10", "G0 X0 Y0 Z1", "G90 G99 G81 X1 Y0 Z-0.5 R0.5 L2", "X2", "G80", "M2"]);
    const l3 = moveSequence(a, 3).filter((m) => m[0] === "feed");
    expect(l3).toHaveLength(2);
    for (const m of l3) expect(m[1][0]).toBeCloseTo(1, 5);
    // Line 4: one hole only (L not sticky), with the sticky R 0.5 and Z -0.5.
    const l4 = moveSequence(a, 4);
    expect(l4.filter((m) => m[0] === "feed")).toHaveLength(1);
    expectSequence(l4, [
      ["rapid", [2, 0, 0.5]],
      ["feed", [2, 0, -0.5]],
      ["rapid", [2, 0, 0.5]],
    ]);
    // Derived: 3 holes x (0.5 - -0.5) = 3.0 in of feed.
    expect(a.feedLength).toBeCloseTo(3, 6);
  });

  it("G98 with the old Z below R: Z goes up to R first, and the retract is to R", () => {
    // [NIST] 3.5.16 preliminary motion: "if the current Z position is below the R position, the Z-axis is traversed
    // to the R position"; [NIST] 3.5.20: G98 retracts to the old Z unless it is lower than R, then to R.
    const a = run(["G20 G17 G90 G94 G54 F10", "G0 X0 Y0 Z0.2", "G98 G81 X1 Y0 Z-1 R0.5", "G80", "M2"]);
    expectSequence(moveSequence(a, 3), [
      ["rapid", [0, 0, 0.5]],
      ["rapid", [1, 0, 0.5]],
      ["feed", [1, 0, -1]],
      ["rapid", [1, 0, 0.5]],
    ]);
  });

  it("G99 retracts to R even when the old Z is higher", () => {
    // [NIST] 3.5.20: G99 retracts to the R position.
    const a = run(["G21 G17 G90 G94 G54 F100", "G0 X0 Y0 Z25", "G99 G81 X10 Y0 Z-5 R2", "G80", "M2"]);
    expectSequence(moveSequence(a, 3), [
      ["rapid", [10, 0, 25]],
      ["rapid", [10, 0, 2]],
      ["feed", [10, 0, -5]],
      ["rapid", [10, 0, 2]],
    ]);
  });

  it("an R plane below the hole bottom is reported (cycle-r-below-z)", () => {
    // [NIST] 3.5.16: "it is an error if the R number is less than the Z number".
    const a = run(["G21 G17 G90 G94 G54 F100", "G0 X0 Y0 Z25", "G81 X10 Y0 Z-5 R-6", "G80", "M2"]);
    expect(rulesOn(a, 3)).toContain("cycle-r-below-z");
    const ok = run(["G21 G17 G90 G94 G54 F100", "G0 X0 Y0 Z25", "G81 X10 Y0 Z-5 R-4", "G80", "M2"]);
    expect(rulesOn(ok, 3)).not.toContain("cycle-r-below-z");
  });

  it("L must be a positive integer", () => {
    // [NIST] 3.5.16: "it is an error if an L number is used that does not evaluate to a positive integer"; "L=0 is not allowed".
    // A tool, its length offset and the spindle are set so that the only possible error is the L word.
    const head = ["G21 G17 G90 G94 G54 F100", "T1 M6", "S1000 M3", "G0 X0 Y0", "G43 H1 Z25"];
    const a = run([...head, "G91 G81 X10 Y0 Z-5 R-20 L0", "G80", "G90", "M30"]);
    expect(errorsOn(a, 6).length).toBeGreaterThan(0);
    const b = run([...head, "G91 G81 X10 Y0 Z-5 R-20 L2", "G80", "G90", "M30"]);
    expect(errorsOn(b, 6)).toEqual([]);
  });

  it("G83 peck drilling, inch: the pecks, the 0.010 in back-off and 1.13 in of feed", () => {
    // [NIST] 3.5.16.4 G83 steps; [NIST-SRC] convert_cycle_g83: for depth = R - Q while depth > bottom: feed to depth,
    // traverse to R, traverse to depth + G83_RAPID_DELTA (0.010 in); then feed to bottom and traverse to clear Z.
    const a = run(["G20 G17 G90 G94 G54 F10", "G0 X0 Y0 Z1", "G90 G99 G83 X0 Y0 Z-1 R0.1 Q0.3", "G80", "M2"]);
    expectSequence(moveSequence(a, 3), [
      ["rapid", [0, 0, 0.1]],
      ["feed", [0, 0, -0.2]],
      ["rapid", [0, 0, 0.1]],
      ["rapid", [0, 0, -0.19]],
      ["feed", [0, 0, -0.5]],
      ["rapid", [0, 0, 0.1]],
      ["rapid", [0, 0, -0.49]],
      ["feed", [0, 0, -0.8]],
      ["rapid", [0, 0, 0.1]],
      ["rapid", [0, 0, -0.79]],
      ["feed", [0, 0, -1]],
      ["rapid", [0, 0, 0.1]],
    ]);
    // Derived: 0.3 + 0.31 + 0.31 + 0.21 = 1.13 in; at F10 that is 0.113 min = 6.78 s ([NIST] 2.1.2.5, no acceleration).
    expect(a.feedLength).toBeCloseTo(1.13, 6);
    expect(a.time.feedSeconds).toBeCloseTo(6.78, 4);
  });

  it("G83 peck drilling, metric: the back-off is 0.254 mm", () => {
    // [NIST-SRC]: rapid_delta = 0.010 in x 25.4 = 0.254 mm in millimetre units.
    // Derived from R2 Q4 Z-10: feeds 2 -> -2 (4), -1.746 -> -6 (4.254), -5.746 -> -10 (4.254); total 12.508 mm.
    const a = run(["G21 G17 G90 G94 G54 F100", "G0 X0 Y0 Z25", "G99 G83 X0 Y0 Z-10 R2 Q4", "G80", "M2"]);
    const reentries = moveSequence(a, 3)
      .filter((m) => m[0] === "rapid")
      .map((m) => m[1][2]);
    expect(reentries).toEqual(
      [2, 2, -1.746, 2, -5.746, 2].map((z) => expect.closeTo(z, 4)),
    );
    expect(a.feedLength).toBeCloseTo(12.508, 5);
  });

  it("G84 tapping: feeds in and out at F; reported feed and speed give the pitch (S = F x threads per unit)", () => {
    // [NIST] 3.5.16.5: G84 feeds to Z, reverses, and retracts at the current feed rate; "if the pitch is 2 threads per
    // millimeter ... F150 ... S300, since 150 x 2 = 300".
    const a = run(["G21 G17 G90 G94 G54", "T1 M6 (M6X0.5 TAP)", "S300 M3", "G0 X0 Y0", "G43 H1 Z25", "G99 G84 X0 Y0 Z-10 R2 F150", "G80", "G0 Z25", "M30"]);
    // Derived: 12 mm in + 12 mm out = 24 mm of feed.
    expect(a.feedLength).toBeCloseTo(24, 5);
    const tap = a.tools.find((t) => t.number === 1)!;
    expect(tap.feed).toEqual({ min: 150, max: 150 });
    expect(tap.spindle).toEqual({ min: 300, max: 300 });
    // Threads per mm = S / F = 300 / 150 = 2.
    expect(tap.spindle!.max / tap.feed!.max).toBe(2);
    expect(errorsOn(a, 6)).toEqual([]);
  });

  it("G84 with the spindle turning counterclockwise is an error", () => {
    // [NIST] 3.5.16.5: "it is an error if the spindle is not turning clockwise before this cycle is executed".
    const a = run(["G21 G17 G90 G94 G54", "T1 M6 (M6X0.5 TAP)", "S300 M4", "G0 X0 Y0", "G43 H1 Z25", "G99 G84 X0 Y0 Z-10 R2 F150", "G80", "G0 Z25", "M30"]);
    expect(errorsOn(a, 6).length).toBeGreaterThan(0);
  });
});

describe("[NIST] 3.5.16 the other cycles and the other planes", () => {
  const head = ["G21 G17 G90 G94 G54 F100", "T1 M6", "S1000 M3", "G0 X0 Y0", "G43 H1 Z10"];

  it("G82 dwells P seconds at each hole bottom ([NIST] 3.5.16.3)", () => {
    const a = run([...head, "G99 G82 X5 Y0 Z-2 R2 P0.5", "X10", "X15", "G80", "M30"]);
    // Derived: 3 holes x 0.5 s = 1.5 s; 3 x 4 mm of feed.
    expect(a.time.dwellSeconds).toBeCloseTo(1.5, 9);
    expect(a.feedLength).toBeCloseTo(12, 9);
  });

  it("G85 feeds in and feeds back out ([NIST] 3.5.16.6; with G99 clear Z is R)", () => {
    const a = run([...head, "G99 G85 X5 Y0 Z-2 R2", "G80", "M30"]);
    expectSequence(moveSequence(a, 6), [
      ["rapid", [5, 0, 10]],
      ["rapid", [5, 0, 2]],
      ["feed", [5, 0, -2]],
      ["feed", [5, 0, 2]],
    ]);
  });

  it("G86 feeds in, dwells and retracts at traverse rate ([NIST] 3.5.16.7)", () => {
    const a = run([...head, "G98 G86 X5 Y0 Z-2 R2 P1", "G80", "M30"]);
    expectSequence(moveSequence(a, 6), [
      ["rapid", [5, 0, 10]],
      ["rapid", [5, 0, 2]],
      ["feed", [5, 0, -2]],
      ["rapid", [5, 0, 10]],
    ]);
    expect(a.time.dwellSeconds).toBeCloseTo(1, 9);
  });

  it("G89 feeds in, dwells and feeds out ([NIST] 3.5.16.10)", () => {
    // [NIST-SRC] convert_cycle_g89 feeds out to clear Z; controls that feed out to R and then traverse to the old
    // Z under G98 differ above R, so only what both agree on is checked: 4 in, at least 4 out, back at Z10.
    const a = run([...head, "G98 G89 X5 Y0 Z-2 R2 P1", "G80", "M30"]);
    const seq = moveSequence(a, 6);
    expect(seq[seq.length - 1]![1][2]).toBeCloseTo(10, 6);
    expect(a.feedLength).toBeGreaterThanOrEqual(8 - 1e-9);
    expect(a.time.dwellSeconds).toBeCloseTo(1, 9);
  });

  it("G18: the cycle drills along Y, R and the hole bottom are Y values", () => {
    // "The behavior is always analogous if the YZ or XZ-plane is selected": example 1 turned into XZ, from
    // (X1, Y3, Z2): traverse in XZ to (4,3,5), Y to 2.8, feed Y to 1.5, traverse back to old Y 3.
    const a = run(["G20 G17 G90 G94 G54 F10", "G0 X1 Y3 Z2", "G18 G98 G81 X4 Z5 Y1.5 R2.8", "G80 G17", "M2"]);
    expectSequence(moveSequence(a, 3), [
      ["rapid", [4, 3, 5]],
      ["rapid", [4, 2.8, 5]],
      ["feed", [4, 1.5, 5]],
      ["rapid", [4, 3, 5]],
    ]);
  });

  it("G19: the cycle drills along X", () => {
    const a = run(["G20 G17 G90 G94 G54 F10", "G0 X3 Y1 Z2", "G19 G98 G81 Y4 Z5 X1.5 R2.8", "G80 G17", "M2"]);
    expectSequence(moveSequence(a, 3), [
      ["rapid", [3, 4, 5]],
      ["rapid", [2.8, 4, 5]],
      ["feed", [1.5, 4, 5]],
      ["rapid", [3, 4, 5]],
    ]);
  });
});

describe("[NIST] 3.5.3.2 centre-format arc example", () => {
  // From (7,7): G17 G2 X10 Y16 I3 J4 -> centre (10,11), radius 5 ([NIST] 3.5.3.2, "The radius of this arc would be 5").
  // Derived [GEO]: start angle atan2(-4,-3) = -126.870 deg, end angle 90 deg; clockwise sweep 143.130 deg = 2.49809 rad;
  // length 5 x 2.49809 = 12.4905; the sweep passes 180 deg, so X reaches 10 - 5 = 5; box X[5,10] Y[7,16].
  // Safe Z 10: at Z9 the arc is then a cut (a feed move that stays above safe Z would be positioning, issue 9).
  const a = run(["G20 G90 G94 G54 F10", "G0 X7 Y7 Z9", "g17 g2 x 10 y 16 i 3 j 4 z 9", "M2"], { safeZ: 10 });

  it("has the arc's length", () => {
    expect(a.feedLength).toBeCloseTo(12.4905, 4);
  });

  it("has the arc's exact bounds, through the 180 degree point", () => {
    expect(a.cuttingBounds.min.x).toBeCloseTo(5, 6);
    expect(a.cuttingBounds.max.x).toBeCloseTo(10, 6);
    expect(a.cuttingBounds.min.y).toBeCloseTo(7, 6);
    expect(a.cuttingBounds.max.y).toBeCloseTo(16, 6);
  });

  it("draws chords whose vertices lie on the circle, within the stated chord tolerance", () => {
    const arcs = segments(a, 3).filter((s) => s.kind === MotionKind.Arc);
    expect(arcs.length).toBeGreaterThan(1);
    for (const s of arcs) {
      expect(Math.hypot(s.to[0] - 10, s.to[1] - 11)).toBeCloseTo(5, 4);
      // Sagitta of a chord of length c on radius r: r - sqrt(r^2 - (c/2)^2) [GEO].
      const c = len(s);
      expect(5 - Math.sqrt(25 - (c / 2) ** 2)).toBeLessThanOrEqual(a.toolpath.chordTolerance + 1e-6);
    }
  });

  it("is not flagged as an arc problem", () => {
    expect(rulesOn(a, 3).filter((r) => r.startsWith("arc-"))).toEqual([]);
  });
});

describe("[NIST] 3.5.3.2 start/end radius tolerance: 0.0002 in, 0.002 mm ([NIST-SRC] TOLERANCE_INCH / TOLERANCE_MM)", () => {
  // From (0,0) with I5: centre (5,0), start radius 5; the end radius is X - 5.
  const cases: Array<[string, string, boolean]> = [
    ["G21", "X10.003", true], // 0.003 mm > 0.002
    ["G21", "X10.0015", false], // 0.0015 mm < 0.002
    ["G20", "X10.0003", true], // 0.0003 in > 0.0002
    ["G20", "X10.0001", false], // 0.0001 in < 0.0002
  ];
  for (const [units, x, fires] of cases) {
    it(`${units} G3 ${x} Y0 I5 ${fires ? "is" : "is not"} a radius mismatch`, () => {
      const a = run([`${units} G17 G90 G94 G54`, "G0 X0 Y0 Z0", `G3 ${x} Y0 I5 F10`, "M2"]);
      if (fires) expect(rulesOn(a, 3)).toContain("arc-radius-mismatch");
      else expect(rulesOn(a, 3)).not.toContain("arc-radius-mismatch");
    });
  }
});

describe("[NIST] 3.3.5 / 3.4 modal-group and word conflicts", () => {
  const base = ["G21 G17 G90 G94 G54 F100", "G0 X0 Y0 Z5"];
  const conflicts: Array<[string, string]> = [
    ["G0 G1 X1", "two motion-group (group 1) words on a line, [NIST] 3.4"],
    ["M3 M5", "two spindle-group (M group 7) words on a line, [NIST] 3.4"],
    ["G0 X1 X2", "a letter other than G or M twice on a line, [NIST] 3.3.5"],
    ["G20 G21", "two units-group (group 6) words, [NIST] 3.4"],
  ];
  for (const [code, why] of conflicts) {
    it(`"${code}" is a modal conflict: ${why}`, () => {
      const a = run([...base, code, "M30"]);
      expect(rulesOn(a, 3)).toContain("modal-conflict");
      expect(errorsOn(a, 3).length).toBeGreaterThan(0);
    });
  }

  it('"G80 X1" is an error: axis words with G80 and no group 0 code that uses them ([NIST] 3.5.15)', () => {
    const a = run([...base, "G80 X1", "M30"]);
    expect(errorsOn(a, 3).length).toBeGreaterThan(0);
  });

  it('"G0 G28 X0" is an error: a group 0 and a group 1 code both using axis words ([NIST] 3.4)', () => {
    const a = run([...base, "G0 G28 X0", "M30"]);
    expect(errorsOn(a, 3).length).toBeGreaterThan(0);
  });

  it("words of different groups on one line are fine", () => {
    const a = run([...base, "G90 G94 G17 G1 X1 M3 S1000", "M30"]);
    expect(rulesOn(a, 3)).not.toContain("modal-conflict");
  });
});

describe("[NIST] 3.5.5 G10 L2 sets a coordinate system origin", () => {
  // "G10 L2 P1 x 3.5 y 17.2 sets the origin of the first coordinate system (the one selected by G54) to a point where
  // X is 3.5 and Y is 17.2 (in absolute coordinates). The Z coordinate of the origin ... [is] whatever [it was]."
  const program = ["G21 G17 G90 G94", "G10 L2 P1 X3.5 Y17.2", "G54 G0 X0 Y0", "M30"];
  const options: AnalyzeOptions = { workOffsets: { G54: { x: 0, y: 0, z: -100 } } };

  it("G54's origin becomes (3.5, 17.2) with Z unchanged", () => {
    const a = run(program, options);
    const g54 = a.workOffsets.find((w) => w.code === "G54")!;
    expect(g54.number).toBe(1);
    expect(g54.origin).not.toBeNull();
    expect(g54.origin!.x).toBeCloseTo(3.5, 9);
    expect(g54.origin!.y).toBeCloseTo(17.2, 9);
    expect(g54.origin!.z).toBeCloseTo(-100, 9);
  });

  it("then G54 G0 X0 Y0 ends at machine (3.5, 17.2): part position plus origin", () => {
    const a = run(program, options);
    const g54 = a.workOffsets.find((w) => w.code === "G54")!;
    // The move's end point in part coordinates is (0,0); the contract places it in machine space by adding the origin.
    expect(g54.bounds.max.x).toBeCloseTo(0, 9);
    expect(g54.bounds.max.y).toBeCloseTo(0, 9);
    expect(g54.bounds.max.x! + g54.origin!.x).toBeCloseTo(3.5, 9);
    expect(g54.bounds.max.y! + g54.origin!.y).toBeCloseTo(17.2, 9);
  });

  it("the machine position is what the travel check sees: X travel to 3.4 is exceeded, to 3.6 is not", () => {
    const tight: MachineProfile = { ...machine, travel: { ...machine.travel, x: { min: -100, max: 3.4 } } };
    const roomy: MachineProfile = { ...machine, travel: { ...machine.travel, x: { min: -100, max: 3.6 } } };
    expect(rulesOn(run(program, { ...options, machine: tight }), 3)).toContain("over-travel");
    expect(rulesOn(run(program, { ...options, machine: roomy }), 3)).not.toContain("over-travel");
  });

  it("the toolpath of a later move, placed by the origin, is in machine space: part (0,0,5) is machine (3.5, 17.2, -95)", () => {
    const a = run(["G21 G17 G90 G94", "G10 L2 P1 X3.5 Y17.2", "G54 G0 X10 Y10 Z5", "G0 X0 Y0", "M30"], options);
    const t = a.toolpath;
    const i = t.segmentCount - 1;
    expect(t.line[i]).toBe(4);
    const origin = a.workOffsets[t.offset[i]!]!.origin!;
    expect(t.positions[3 * i + 3]! + origin.x).toBeCloseTo(3.5, 5);
    expect(t.positions[3 * i + 4]! + origin.y).toBeCloseTo(17.2, 5);
    expect(t.positions[3 * i + 5]! + origin.z).toBeCloseTo(-95, 5);
  });

  it("P outside 1-9 is an error", () => {
    // [NIST] 3.5.5: "It is an error if the P number does not evaluate to an integer in the range 1 to 9."
    const a = run(["G21 G17 G90 G94", "G10 L2 P10 X3.5", "G54 G0 X0 Y0", "M30"]);
    expect(errorsOn(a, 2).length).toBeGreaterThan(0);
    const b = run(["G21 G17 G90 G94", "G10 L2 P0 X3.5", "G54 G0 X0 Y0", "M30"]);
    expect(errorsOn(b, 2).length).toBeGreaterThan(0);
  });
});

describe("[NIST] 3.5.18 G92 axis offsets", () => {
  // "Suppose the current point is at X=4 ... G92 x7 sets the X-axis offset to -3 ... If G92 x9 is then programmed, the
  // new X-axis offset is -5, which is calculated by [[7-9] + -3]."
  const program = ["G21 G17 G90 G94 G54", "G0 X4 Y0 Z0", "G92 X7", "G92 X9", "G0 X10", "M30"];

  it("after G92 X7 and G92 X9 the offset is -5: program X10 is part X5, and the move starts where the tool stood, X4", () => {
    // The toolpath is in part coordinates (relative to the G54 origin, types.ts): program X = part X - offset.
    // Derived: the tool stays at part X4 through both G92 lines; program X10 with offset -5 is part X 10 + -5 = 5.
    const a = run(program, { workOffsets: { G54: { x: 0, y: 0, z: 0 } } });
    const s = segments(a, 5).filter((m) => len(m) > 1e-9);
    expect(s).toHaveLength(1);
    expect(s[0]!.from[0]).toBeCloseTo(4, 5);
    expect(s[0]!.to[0]).toBeCloseTo(5, 5);
  });

  it("with offset -5 the move to X10 ends at machine X5 (travel 5.5 is enough, 4.9 is not)", () => {
    // Derived: machine X = 10 + (-5) = 5 with G54 at machine 0.
    const within: MachineProfile = { ...machine, travel: { ...machine.travel, x: { min: -100, max: 5.5 } } };
    const short: MachineProfile = { ...machine, travel: { ...machine.travel, x: { min: -100, max: 4.9 } } };
    const opts = { workOffsets: { G54: { x: 0, y: 0, z: 0 } } };
    expect(rulesOn(run(program, { ...opts, machine: within }), 5)).not.toContain("over-travel");
    expect(rulesOn(run(program, { ...opts, machine: short }), 5)).toContain("over-travel");
  });
});

describe("[NIST] 3.5.4 dwell", () => {
  it("G4 P2 dwells 2 seconds", () => {
    const a = run(["G21 G17 G90 G94 G54", "G0 X0 Y0 Z5", "G4 P2", "M30"], { machine });
    expect(a.time.dwellSeconds).toBeCloseTo(2, 9);
    expect(a.time.totalSeconds).toBeGreaterThanOrEqual(2);
    const without = run(["G21 G17 G90 G94 G54", "G0 X0 Y0 Z5", "", "M30"], { machine });
    expect(a.time.totalSeconds - without.time.totalSeconds).toBeCloseTo(2, 6);
  });

  it("a negative P is an error", () => {
    const a = run(["G21 G17 G90 G94 G54", "G0 X0 Y0 Z5", "G4 P-1", "M30"]);
    expect(errorsOn(a, 3).length).toBeGreaterThan(0);
  });
});

describe("[NIST] 3.6.1 M2 ends the program", () => {
  it("no line after M2 runs: it adds no motion and no bounds", () => {
    // "No more lines of code in an RS274/NGC file will be executed after the M2 or M30 command is executed."
    const a = run(["G21 G17 G90 G94 G54", "G0 X0 Y0 Z5", "M2", "G0 X100 Y100"]);
    expect(a.endLine).toBe(3);
    expect(a.bounds.max.x).toBeCloseTo(0, 9);
    expect(segments(a, 4)).toEqual([]);
  });

  it("M30 ends it the same way", () => {
    const a = run(["G21 G17 G90 G94 G54", "G0 X0 Y0 Z5", "M30", "G1 X100 F100"]);
    expect(a.endLine).toBe(3);
    expect(a.feedLength).toBe(0);
  });
});

describe("[NIST] 3.8 table 8, order of execution within a line", () => {
  it("G0 X1 G54 G21 M3 S1000 T2 M6 M2: units, offset, tool change and spindle before the move; M2 last", () => {
    const a = run(["G0 X1 G54 G21 M3 S1000 T2 M6 M2"]);
    // Table 8: units (G21) and work offset (G54) come before motion, so neither is missing for this move.
    expect(a.units).toBe("mm");
    expect(a.findings.map((f) => f.rule)).not.toContain("units-missing");
    expect(a.findings.map((f) => f.rule)).not.toContain("offset-not-set");
    // T and M6 are executed before motion; the tool in the spindle for the move is T2.
    expect(a.toolChanges).toHaveLength(1);
    expect(a.toolChanges[0]!.tool).toBe(2);
    // Stop (M2) is last: the move still happens.
    expect(a.endLine).toBe(1);
    expect(a.bounds.max.x).toBeCloseTo(1, 9);
  });

  it("spindle on (M3) comes after the tool change on the same line, so the next cut has the spindle turning", () => {
    // Table 8: "change tool (M6)" is step 6, "spindle on or off (M3, M4, M5)" step 7; [NIST] 3.6.3: after M6 the
    // spindle is stopped, so with the opposite order the cut would run with the spindle off.
    const a = run(["G21 G17 G90 G94 G54", "G0 X0 Y0 Z5 M3 S1000 T2 M6", "G43 H2 Z5", "G1 Z-1 F100", "G0 Z5", "M30"]);
    expect(a.findings.map((f) => f.rule)).not.toContain("spindle-off-cut");
  });

  it("M6 stops the spindle: a cut after a tool change with no new M3 is a cut with the spindle off ([NIST] 3.6.3)", () => {
    // [NIST] 3.6.3: "When the tool change is complete: The spindle will be stopped."
    const lines = ["G21 G17 G90 G94 G54", "T1 M6", "S1000 M3", "G0 X0 Y0", "G43 H1 Z5", "G1 Z-1 F100", "G0 Z50", "T2 M6", "G43 H2 Z5", "G1 Z-1", "G0 Z50", "M30"];
    expect(rulesOn(run(lines), 10)).toContain("spindle-off-cut");
    // With M3 after the change the same cut is fine.
    const restarted = [...lines.slice(0, 8), "M3", ...lines.slice(8)];
    expect(run(restarted).findings.map((f) => f.rule)).not.toContain("spindle-off-cut");
  });

  it("M6 loads the last T selected ([NIST] 3.6.3)", () => {
    const a = run(["G21 G17 G90 G94 G54", "T5", "T6", "M6", "G0 X0 Y0 Z5", "M30"]);
    expect(a.toolChanges).toHaveLength(1);
    expect(a.toolChanges[0]!.tool).toBe(6);
    expect(a.toolChanges[0]!.line).toBe(4);
  });

  it("a negative S is an error, S0 is allowed ([NIST] 3.7.2)", () => {
    const neg = run(["G21 G17 G90 G94 G54", "S-100 M3", "G0 X0 Y0 Z5", "M30"]);
    expect(errorsOn(neg, 2).length).toBeGreaterThan(0);
    const zero = run(["G21 G17 G90 G94 G54", "S0 M3", "G0 X0 Y0 Z5", "M30"]);
    expect(errorsOn(zero, 2)).toEqual([]);
  });
});

describe("[NIST] 3.5.13 coordinate systems 1-9", () => {
  it("G54-G59 are systems 1-6 and G59.1-G59.3 are 7-9", () => {
    const codes = ["G54", "G55", "G56", "G57", "G58", "G59", "G59.1", "G59.2", "G59.3"];
    const a = run(["G21 G17 G90 G94", ...codes.map((c, i) => `${c} G0 X${i} Y0 Z5`), "M30"]);
    expect(a.workOffsets.map((w) => w.code)).toEqual(codes);
    expect(a.workOffsets.map((w) => w.number)).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9]);
  });
});

describe("[NIST] 3.5.19 inverse time feed", () => {
  it("G93 F2 makes the move take half a minute whatever its length", () => {
    const a = run(["G21 G17 G90 G94 G54", "G0 X0 Y0 Z0", "G93 G1 X100 F2", "G94", "M30"]);
    expect(a.time.feedSeconds).toBeCloseTo(30, 6);
  });

  it("G93 applies to arcs too: G2 with F4 takes a quarter minute", () => {
    const a = run(["G21 G17 G90 G94 G54", "G0 X0 Y0 Z0", "G93 G2 X10 Y0 I5 F4", "G94", "M30"]);
    expect(a.time.feedSeconds).toBeCloseTo(15, 6);
    expect(a.feedLength).toBeCloseTo(5 * Math.PI, 6);
  });

  it("a G1 with no F in G93 is an error", () => {
    const a = run(["G21 G17 G90 G94 G54", "G0 X0 Y0 Z0", "G93 G1 X100 F2", "X200", "G94", "M30"]);
    expect(errorsOn(a, 4).length).toBeGreaterThan(0);
  });
});

describe("[NIST] errors the report lists for arcs, compensation and cycles", () => {
  // A tool, its offset and the spindle are set so that only the line under test can be wrong.
  const head = ["G21 G17 G90 G94 G54 F100", "T1 M6", "S1000 M3", "G0 X0 Y0", "G43 H1 Z0"];

  it("an arc in G17 with neither X nor Y is an error ([NIST] 3.5.3.2: 'X and Y are both omitted')", () => {
    const a = run([...head, "G2 I5 J0", "M30"]);
    expect(errorsOn(a, 6).map((f) => f.rule)).toContain("arc-invalid");
  });

  it("G41 outside the XY plane is an error ([NIST] 3.5.10: 'the XY-plane is not active')", () => {
    const a = run([...head, "G18 G41 D1 G1 X5", "G40 G17", "M30"]);
    expect(errorsOn(a, 6).map((f) => f.rule)).toContain("comp-invalid");
  });

  it("selecting a work offset with compensation on is an error ([NIST] 3.5.13)", () => {
    const a = run([...head, "G41 D1 G1 X5", "G55", "G40", "M30"]);
    expect(errorsOn(a, 7).length).toBeGreaterThan(0);
  });

  it("a canned cycle with compensation on is an error ([NIST] 3.5.16)", () => {
    const a = run([...head, "G41 D1 G1 X5", "G81 X10 Y10 Z-1 R1", "G80 G40", "M30"]);
    expect(errorsOn(a, 7).length).toBeGreaterThan(0);
  });

  it("a canned cycle in G93 inverse time is an error ([NIST] 3.5.16)", () => {
    const a = run([...head, "G93 G81 X10 Y10 Z-1 R1 F2", "G80 G94", "M30"]);
    expect(errorsOn(a, 6).length).toBeGreaterThan(0);
  });

  it("a peck cycle with Q zero or negative is an error ([NIST] 3.5.16.4)", () => {
    const a = run([...head, "G0 Z5", "G99 G83 X10 Y10 Z-10 R1 Q0", "G80", "M30"]);
    expect(errorsOn(a, 7).length).toBeGreaterThan(0);
  });
});
