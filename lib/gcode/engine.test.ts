import { describe, expect, it } from "vitest";
import { ENGINE_VERSION, analyzeProgram, checkTextProgram, deserializeAnalysis, serializeAnalysis, segmentEndpoints } from "./index";
import { arcExtremes, arcFromCenter, arcFromRadius, ARC_OK, ARC_RADIUS_TOO_SMALL, ARC_SWEEP, ARC_CA, ARC_CB, chordCount } from "./arc";
import { trapezoidSeconds } from "./analyze";
import { MotionKind } from "./types";

const run = (lines: string[], o = {}) => analyzeProgram(lines.join("\n"), o);

describe("tokenizer and number parsing", () => {
  it("reads spaces inside words, lower case, signs and leading points ([NIST] 3.3.1)", () => {
    // from (0,0,0): x 1 2 . 5 is X12.5, y-.5 is Y-0.5
    const a = run(["G21 G90 G54", "G0 X0 Y0 Z0", "g1 x 1 2 . 5 y-.5 f100", "M30"]);
    expect(a.bounds.max.x).toBe(12.5);
    expect(a.bounds.min.y).toBe(-0.5);
    expect(a.feedLength).toBeCloseTo(Math.hypot(12.5, 0.5), 12);
  });
  it("parses decimals exactly like parseFloat for up to 15 digits", () => {
    for (const s of ["0.1", "123.456", "-0.0001", "99999.99999", "1.", ".5"]) {
      const a = run(["G21 G90 G54", `G0 X${s} Y0 Z0`, "M30"]);
      expect(a.bounds.max.x).toBe(parseFloat(s));
    }
  });
  it("ends lines at CR, LF and CRLF alike", () => {
    const a = analyzeProgram("G21 G90 G54\rG0 X1 Y0 Z0\r\nX2\nM2");
    expect(a.lineCount).toBe(4);
    expect(a.endLine).toBe(4);
  });
  it("ignores comments in parentheses and after a semicolon", () => {
    const a = run(["G21 G90 G54 (X99)", "G0 X1 Y0 Z0 ; X77", "M30"]);
    expect(a.bounds.max.x).toBe(1);
  });
  it("flags expressions instead of misreading them", () => {
    const a = run(["G21 G90 G54", "G0 X1 Y1 Z1", "G1 X[#1+2] F100", "M30"]);
    expect(a.findings.map((f) => [f.rule, f.line])).toContainEqual(["not-evaluated", 3]);
    expect(a.bounds.max.x).toBe(1);
  });
});

describe("arc math [GEO]", () => {
  const out = new Float64Array(6);
  it("centre format: from (7,7) G2 X10 Y16 I3 J4 sweeps 143.130 degrees ([NIST] 3.5.3.2 example)", () => {
    expect(arcFromCenter(7, 7, 10, 16, 3, 4, true, out)).toBe(true);
    // derived: angles atan2(-4,-3) and atan2(5,0); clockwise difference 360 - 216.87 = 143.13 degrees
    expect((out[ARC_SWEEP]! * 180) / Math.PI).toBeCloseTo(143.1301, 3);
    const pts = new Float64Array(8);
    const n = arcExtremes(out[ARC_CA]!, out[ARC_CB]!, 5, out[3]!, out[ARC_SWEEP]!, true, pts);
    // the 90-degree point is the end (10,16) itself; the 180-degree point (5,11) lies inside the sweep
    expect(Array.from(pts.subarray(0, n * 2))).toEqual([10, 16, 5, 11]);
  });
  it("radius format picks the centre by sign of R ([NIST] 3.5.3.1)", () => {
    expect(arcFromRadius(0, 0, 5, 5, 5, true, out)).toBe(ARC_OK);
    expect(out[ARC_CA]).toBeCloseTo(5, 12);
    expect(out[ARC_CB]).toBeCloseTo(0, 12);
    expect(arcFromRadius(0, 0, 5, 5, -5, true, out)).toBe(ARC_OK);
    expect(out[ARC_CA]).toBeCloseTo(0, 12);
    expect(out[ARC_CB]).toBeCloseTo(5, 12);
    expect((out[ARC_SWEEP]! * 180) / Math.PI).toBeCloseTo(270, 9);
    expect(arcFromRadius(0, 0, 10, 0, 4.999, true, out)).toBe(ARC_RADIUS_TOO_SMALL);
  });
  it("chord count keeps the sagitta within the tolerance", () => {
    const n = chordCount(2000, 2 * Math.PI, 0.01, 100000);
    expect(2000 * (1 - Math.cos(Math.PI / n))).toBeLessThanOrEqual(0.01);
  });
});

describe("time [KIN]", () => {
  it("trapezoid: v = 1000 mm/min, a = 500 mm/s^2", () => {
    // derived: v = 16.667 mm/s; 100 mm -> 100/16.667 + 16.667/500 = 6.0333 s; 0.2 mm -> 2*sqrt(0.2/500) = 0.04 s
    expect(trapezoidSeconds(100, 1000 / 60, 500)).toBeCloseTo(6.0333, 4);
    expect(trapezoidSeconds(0.2, 1000 / 60, 500)).toBeCloseTo(0.04, 6);
  });
});

describe("toolpath layout and serialization", () => {
  it("chains segments and round-trips through JSON", () => {
    const a = run(["G21 G90 G54", "G0 X0 Y0 Z5", "G1 Z-1 F100", "G1 X10", "G2 X20 Y0 R5", "M30"]);
    const out = new Float64Array(6);
    expect(segmentEndpoints(a.toolpath, 0, out)).toBe(MotionKind.Feed);
    expect(Array.from(out)).toEqual([0, 0, 5, 0, 0, -1]);
    const back = deserializeAnalysis(JSON.parse(JSON.stringify(serializeAnalysis(a))));
    expect(Array.from(back.toolpath.positions)).toEqual(Array.from(a.toolpath.positions));
    expect(Array.from(back.toolpath.kind)).toEqual(Array.from(a.toolpath.kind));
    expect(back.toolpath.segmentCount).toBe(a.toolpath.segmentCount);
  });
});

describe("engine version", () => {
  it("is a positive integer above the old format's 1, and every analysis carries it through JSON", () => {
    expect(Number.isInteger(ENGINE_VERSION)).toBe(true);
    expect(ENGINE_VERSION).toBeGreaterThanOrEqual(2);
    const a = run(["G21 G90 G54", "G0 X1 Y1 Z1", "M30"]);
    expect(a.version).toBe(ENGINE_VERSION);
    expect(deserializeAnalysis(JSON.parse(JSON.stringify(serializeAnalysis(a)))).version).toBe(ENGINE_VERSION);
  });
});

describe("bad input", () => {
  it("rejects empty, NUL, control bytes and invalid UTF-8; never throws in the engine", () => {
    expect(checkTextProgram(new Uint8Array())).toMatchObject({ ok: false });
    expect(checkTextProgram(new Uint8Array([71, 48, 0, 10]))).toMatchObject({ ok: false });
    expect(checkTextProgram(new Uint8Array([71, 48, 0xff, 10]))).toMatchObject({ ok: false });
    expect(checkTextProgram(new TextEncoder().encode("G0 X1\n"))).toEqual({ ok: true });
    const junk = new Uint8Array(100000);
    for (let i = 0; i < junk.length; i++) junk[i] = (i * 2654435761) >>> 24;
    expect(() => analyzeProgram(junk)).not.toThrow();
    expect(() => analyzeProgram("X".repeat(1 << 20))).not.toThrow();
  });
});
