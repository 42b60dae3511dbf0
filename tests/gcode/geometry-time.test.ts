/**
 * Arc geometry [GEO] (length r*|theta|, helix hypot(r*theta, dz) as in [NIST-SRC] find_arc_length, bounds = end points
 * plus each 0/90/180/270 degree point inside the sweep), radius-format arcs ([NIST] 3.5.3.1) and the time model:
 * feed time = length / F ([NIST] 2.1.2.5, 2.1.2.16) and the trapezoidal move [KIN]:
 * with top speed v and acceleration a, t = L/v + v/a when L >= v^2/a, else t = 2*sqrt(L/a).
 */
import { describe, expect, it } from "vitest";
import { analyzeProgram } from "../../lib/gcode/index";
import { MotionKind, type Analysis, type AnalyzeOptions, type MachineProfile } from "../../lib/gcode/types";

function run(lines: string[], options?: AnalyzeOptions): Analysis {
  return analyzeProgram(lines.join("\n") + "\n", options);
}

function expectBox(
  a: Analysis,
  box: { x?: [number, number]; y?: [number, number]; z?: [number, number] },
  digits = 6,
) {
  const b = a.cuttingBounds;
  for (const axis of ["x", "y", "z"] as const) {
    const want = box[axis];
    if (!want) continue;
    expect(b.min[axis], `min ${axis}`).toBeCloseTo(want[0], digits);
    expect(b.max[axis], `max ${axis}`).toBeCloseTo(want[1], digits);
  }
}

const rulesOn = (a: Analysis, line: number) => a.findings.filter((f) => f.line === line).map((f) => f.rule);

/** Chord end points of the arcs of one line. */
function arcVertices(a: Analysis, line: number): Array<[number, number, number]> {
  const t = a.toolpath;
  const out: Array<[number, number, number]> = [];
  for (let i = 0; i < t.segmentCount; i++) {
    if (t.line[i] !== line || t.kind[i] !== MotionKind.Arc) continue;
    out.push([t.positions[3 * i + 3]!, t.positions[3 * i + 4]!, t.positions[3 * i + 5]!]);
  }
  return out;
}

// Every arc starts from a known point: the first move sets X, Y and Z.
const head = ["G21 G17 G90 G94 G54 F100", "G0 X0 Y0 Z0"];

describe("radius-format arcs [NIST] 3.5.3.1, from (0,0)", () => {
  it("G2 X10 Y0 R5: half circle about (5,0), over the top: Y[0,5], length 5*pi", () => {
    // [GEO] clockwise from 180 deg to 0 deg passes 90 deg, the point (5,5). Length 5*pi = 15.70796.
    const a = run([...head, "G2 X10 Y0 R5", "M30"]);
    expect(a.feedLength).toBeCloseTo(5 * Math.PI, 5);
    expectBox(a, { x: [0, 10], y: [0, 5] });
    expect(rulesOn(a, 3)).not.toContain("arc-invalid");
  });

  it("G2 X5 Y5 R5: quarter circle about (5,0), length 7.854", () => {
    // [GEO] start angle 180, end 90, clockwise 90 deg; length 5*pi/2 = 7.85398; box X[0,5] Y[0,5].
    const a = run([...head, "G2 X5 Y5 R5", "M30"]);
    expect(a.feedLength).toBeCloseTo(7.85398, 4);
    expectBox(a, { x: [0, 5], y: [0, 5] });
    for (const [x, y] of arcVertices(a, 3)) expect(Math.hypot(x - 5, y)).toBeCloseTo(5, 4);
  });

  it("G2 X5 Y5 R-5: the 270 degree arc about (0,5), length 23.562, box X[-5,5] Y[0,10]", () => {
    // [NIST] 3.5.3.1: negative R turns more than 180 deg. [GEO] centre (0,5): start angle -90, end 0, clockwise
    // 270 deg through 180 (-5,5) and 90 (0,10); length 5*3*pi/2 = 23.56194.
    const a = run([...head, "G2 X5 Y5 R-5", "M30"]);
    expect(a.feedLength).toBeCloseTo(23.56194, 4);
    expectBox(a, { x: [-5, 5], y: [0, 10] });
    for (const [x, y] of arcVertices(a, 3)) expect(Math.hypot(x, y - 5)).toBeCloseTo(5, 4);
  });

  it("G3 X5 Y5 R5 turns the other way about (0,5)", () => {
    // [GEO] counterclockwise minor arc from (0,0) to (5,5) has its centre left of the chord: (0,5); box X[0,5] Y[0,5].
    const a = run([...head, "G3 X5 Y5 R5", "M30"]);
    expect(a.feedLength).toBeCloseTo(7.85398, 4);
    for (const [x, y] of arcVertices(a, 3)) expect(Math.hypot(x, y - 5)).toBeCloseTo(5, 4);
  });

  it("G2 X10 Y0 R4.999 is invalid in strict-ngc: R shorter than half the 10 mm chord", () => {
    const a = run([...head, "G2 X10 Y0 R4.999", "M30"], { dialect: "strict-ngc" });
    expect(rulesOn(a, 3)).toContain("arc-invalid");
  });

  it("a radius-format arc that ends where it starts is invalid", () => {
    // [NIST] 3.5.3.1: "It is an error if ... the end point of the arc is the same as the current point."
    const a = run([...head, "G2 X0 Y0 R5", "M30"]);
    expect(rulesOn(a, 3)).toContain("arc-invalid");
  });

  it("an arc in G17 with neither I nor J is invalid ([NIST] 3.5.3.2)", () => {
    const a = run([...head, "G2 X10 Y0", "M30"]);
    expect(rulesOn(a, 3)).toContain("arc-invalid");
  });
});

describe("centre-format full circles and helices [GEO]", () => {
  it("G2 X0 Y0 I5: a full circle, length 10*pi, box X[0,10] Y[-5,5]", () => {
    // [NIST] 3.5.3.2: in centre format an end point equal to the start is a full circle.
    const a = run([...head, "G2 X0 Y0 I5 J0", "M30"]);
    expect(a.feedLength).toBeCloseTo(10 * Math.PI, 5);
    expectBox(a, { x: [0, 10], y: [-5, 5] });
  });

  it("helix: full circle r=5 rising 10 has length hypot(10*pi, 10) = 32.969", () => {
    // [NIST-SRC] find_arc_length: hypot(radius * theta, dz) = hypot(31.4159, 10) = 32.9690.
    const a = run(["G21 G17 G90 G94 G54 F100", "G0 X5 Y0 Z0", "G3 X5 Y0 Z10 I-5 J0", "M30"]);
    expect(a.feedLength).toBeCloseTo(32.969, 3);
    expectBox(a, { x: [-5, 5], y: [-5, 5], z: [0, 10] });
  });

  it("feed time uses the helix length: 32.969 mm at F100 is 19.781 s", () => {
    // [NIST] 2.1.2.5: the feed rate applies along the XYZ path; 32.9690 / 100 * 60 = 19.7814 s.
    const a = run(["G21 G17 G90 G94 G54 F100", "G0 X5 Y0 Z0", "G3 X5 Y0 Z10 I-5 J0", "M30"]);
    expect(a.time.feedSeconds).toBeCloseTo(19.7814, 3);
  });
});

describe("arcs in the G18 and G19 planes ([NIST] 3.5.3: clockwise as seen from the positive third axis)", () => {
  it("G18 G2 X10 Z0 I5 K0 from the origin dips to Z-5", () => {
    // [GEO] Seen from +Y with X to the right, +Z points down the page (X x -Z = +Y), so a clockwise half circle from
    // X0 to X10 bulges toward -Z: box X[0,10] Z[-5,0]; Y stays 0; length 5*pi.
    const a = run([...head, "G18 G2 X10 Z0 I5 K0", "G17", "M30"]);
    expect(a.feedLength).toBeCloseTo(5 * Math.PI, 5);
    expectBox(a, { x: [0, 10], y: [0, 0], z: [-5, 0] });
  });

  it("G18 G3 X10 Z0 I5 K0 bulges toward +Z", () => {
    const a = run([...head, "G18 G3 X10 Z0 I5 K0", "G17", "M30"]);
    expectBox(a, { x: [0, 10], z: [0, 5] });
  });

  it("G19 G2 Y10 Z0 J5 K0 from the origin rises to Z5", () => {
    // [GEO] Seen from +X with Y to the right, +Z points up (Y x Z = +X): clockwise from Y0 to Y10 goes over the top.
    const a = run([...head, "G19 G2 Y10 Z0 J5 K0", "G17", "M30"]);
    expect(a.feedLength).toBeCloseTo(5 * Math.PI, 5);
    expectBox(a, { x: [0, 0], y: [0, 10], z: [0, 5] });
  });

  it("G18 helix: a full circle in XZ advancing 10 in Y has length 32.969", () => {
    const a = run([...head, "G18 G2 X0 Y10 Z0 I5 K0", "G17", "M30"]);
    expect(a.feedLength).toBeCloseTo(32.969, 3);
    expectBox(a, { x: [0, 10], y: [0, 10], z: [-5, 5] });
  });

  it("G19 quarter arc by radius: G19 G3 Y5 Z5 R5 from the origin, centre (Y0, Z5)", () => {
    // [GEO] counterclockwise minor arc in (Y,Z) from (0,0) to (5,5): centre left of the chord = (0,5); length 7.854.
    const a = run([...head, "G19 G3 Y5 Z5 R5", "G17", "M30"]);
    expect(a.feedLength).toBeCloseTo(7.85398, 4);
    for (const [, y, z] of arcVertices(a, 3)) expect(Math.hypot(y, z - 5)).toBeCloseTo(5, 4);
  });
});

describe("arc chords keep within the stated chord tolerance [GEO]", () => {
  // Sagitta of a chord of length c on radius r: r - sqrt(r^2 - (c/2)^2).
  function worstSagitta(a: Analysis, line: number, cx: number, cy: number, r: number): number {
    const t = a.toolpath;
    let worst = 0;
    for (let i = 0; i < t.segmentCount; i++) {
      if (t.line[i] !== line || t.kind[i] !== MotionKind.Arc) continue;
      const x0 = t.positions[3 * i]!;
      const y0 = t.positions[3 * i + 1]!;
      const x1 = t.positions[3 * i + 3]!;
      const y1 = t.positions[3 * i + 4]!;
      // Distance from the centre to the chord's midpoint, measured in double precision from the float32 ends.
      const mid = Math.hypot((x0 + x1) / 2 - cx, (y0 + y1) / 2 - cy);
      worst = Math.max(worst, r - mid);
    }
    return worst;
  }

  const cases: Array<[string, number, number | undefined]> = [
    ["r = 5 at the default tolerance", 5, undefined],
    ["r = 2000 at the default tolerance (a large blend radius)", 2000, undefined],
    ["r = 100 at a 0.0001 mm tolerance", 100, 0.0001],
  ];
  for (const [what, r, tol] of cases) {
    it(what, () => {
      const a = run(["G21 G17 G90 G94 G54 F1000", `G0 X${r} Y0 Z0`, `G3 X${r} Y0 I${-r} J0`, "M30"], tol ? { chordTolerance: tol } : {});
      if (tol) expect(a.toolpath.chordTolerance).toBeLessThanOrEqual(tol);
      // Float32 positions carry about 6e-8 relative error: allow that on top of the stated tolerance.
      expect(worstSagitta(a, 3, 0, 0, r)).toBeLessThanOrEqual(a.toolpath.chordTolerance + r * 2e-7);
    });
  }
});

describe("time model", () => {
  // [KIN] v = 1000 mm/min = 16.667 mm/s, a = 500 mm/s^2, so v^2/a = 0.5556 mm.
  //   L = 100 mm >= 0.5556: t = 100/16.667 + 16.667/500 = 6 + 0.0333 = 6.0333 s.
  //   L = 0.2 mm < 0.5556: t = 2*sqrt(0.2/500) = 0.0400 s.
  // The profile makes these the only terms: no tool change time and a rapid rate that does not limit feeds.
  const profile: MachineProfile = {
    units: "mm",
    travel: { x: { min: -1000, max: 1000 }, y: { min: -1000, max: 1000 }, z: { min: -1000, max: 1000 } },
    rapidRate: 30000,
    maxFeed: 20000,
    maxSpindle: 20000,
    acceleration: 500,
    toolChangeSeconds: 0,
    manualToolChange: false,
    spindleProgramControlled: true,
    hMustEqualT: true,
    safeZ: 0,
    workOffsetCount: 6,
  };
  const prog = (move: string) => ["G21 G17 G90 G94 G54", "G0 X0 Y0 Z0", move, "M30"];
  const total = (move: string) => run(prog(move), { machine: profile }).time.totalSeconds;

  it("a 100 mm feed at 1000 mm/min takes 6.0333 s with acceleration 500 mm/s^2", () => {
    expect(total("G1 X100 F1000") - total("")).toBeCloseTo(6.0333, 3);
  });

  it("a 0.2 mm feed at 1000 mm/min never reaches top speed: 0.0400 s", () => {
    expect(total("G1 X0.2 F1000") - total("")).toBeCloseTo(0.04, 4);
  });

  it("feedSeconds is length / F without acceleration: 100 mm at F1000 is 6 s", () => {
    const a = run(prog("G1 X100 F1000"), { machine: profile });
    expect(a.time.feedSeconds).toBeCloseTo(6, 9);
  });

  it("rapidSeconds is rapid length / rapid rate: 300 mm at 30000 mm/min is 0.6 s", () => {
    const a = run(prog("G0 X300"), { machine: profile });
    expect(a.rapidLength).toBeCloseTo(300, 9);
    expect(a.time.rapidSeconds).toBeCloseTo(0.6, 9);
  });

  it("a 300 mm rapid at 30000 mm/min with 500 mm/s^2 is triangular in the estimate: 1.5492 s", () => {
    // [KIN] v = 500 mm/s, v^2/a = 500 mm > 300 mm, so top speed is never reached: t = 2*sqrt(300/500) = 1.5492 s.
    expect(total("G0 X300") - total("")).toBeCloseTo(2 * Math.sqrt(300 / 500), 3);
  });

  it("tool changes add the profile's tool change time", () => {
    const withChanges: MachineProfile = { ...profile, toolChangeSeconds: 7 };
    const a = run(["G21 G17 G90 G94 G54", "T1 M6", "G0 X0 Y0 Z50", "T2 M6", "M30"], { machine: withChanges });
    expect(a.toolChangeCount).toBe(2);
    expect(a.time.toolChangeSeconds).toBeCloseTo(14, 9);
  });

  it("M0 and M1 stops are counted apart, not in the time", () => {
    const a = run(["G21 G17 G90 G94 G54", "G0 X0 Y0 Z0", "M0", "M1", "M1", "M30"], { machine: profile });
    expect(a.stops.programStops).toBe(1);
    expect(a.stops.optionalStops).toBe(2);
    expect(a.stops.lines).toEqual([3, 4, 5]);
    expect(a.time.totalSeconds).toBeCloseTo(total(""), 9);
  });
});
