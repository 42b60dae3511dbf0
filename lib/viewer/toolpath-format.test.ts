import { readFileSync } from "node:fs";
import { gzipSync } from "node:zlib";
import { describe, expect, it } from "vitest";
import { analyzeProgram } from "../gcode/index";
import { MotionKind } from "../gcode/types";
import { benchProgram } from "@/scripts/bench-program";
import { decodeToolpath, encodeToolpath, positionStep, ToolpathFormatError } from "./toolpath-format";
import { viewerDataFromAnalysis } from "./from-analysis";

const fixture = (name: string) => readFileSync(new URL(`../../tests/fixtures/${name}`, import.meta.url));

/** Encodes the engine's own arrays, decodes them and checks every column against the engine's. */
function roundTrip(bytes: Uint8Array | string, options: Parameters<typeof analyzeProgram>[1] = {}) {
  const a = analyzeProgram(bytes, { ...options, segmentTimes: true });
  const { path, meta } = viewerDataFromAnalysis(a);
  const encoded = encodeToolpath(path, meta);
  const back = decodeToolpath(encoded);
  const tp = a.toolpath;
  const n = tp.segmentCount;
  expect(back.path.segmentCount).toBe(n);
  expect(back.meta).toEqual(JSON.parse(JSON.stringify(meta)));
  expect(Array.from(back.path.line)).toEqual(Array.from(tp.line));
  expect(Array.from(back.path.kind)).toEqual(Array.from(tp.kind));
  expect(Array.from(back.path.tool)).toEqual(Array.from(tp.tool));
  expect(Array.from(back.path.offset)).toEqual(Array.from(tp.offset));
  const q = positionStep(tp.chordTolerance, tp.positions);
  expect(back.path.positions.length).toBe(tp.positions.length);
  let worst = 0;
  for (let i = 0; i < tp.positions.length; i++) worst = Math.max(worst, Math.abs(back.path.positions[i]! - tp.positions[i]!));
  // half a step, plus Float32 rounding of values of this size
  expect(worst).toBeLessThanOrEqual(q / 2 + 1e-6 * Math.max(1, Math.abs(a.bounds.max.y ?? 1)));
  for (let i = 0; i < n; i++) {
    // half a millisecond, plus the Float32 rounding of both values (long programs have coarse clocks)
    const tol = 0.0005 + tp.time![i]! * 2 ** -22 + 1e-7;
    expect(Math.abs(back.path.time[i]! - tp.time![i]!)).toBeLessThanOrEqual(tol);
    expect(Math.abs(back.path.startTime[i]! - tp.startTime![i]!)).toBeLessThanOrEqual(tol);
  }
  return { a, encoded, back };
}

describe("toolpath binary layout (CGTP 1)", () => {
  it("round-trips a two-vise program with arcs, cycles and two offsets", () => {
    const { a, back } = roundTrip(fixture("two-vise-by-tool.nc"));
    expect(a.toolpath.segmentCount).toBeGreaterThan(100);
    expect(new Set(back.path.offset).size).toBe(2);
    expect(back.path.kind).toContain(MotionKind.CycleFeed);
    expect(back.path.kind).toContain(MotionKind.Arc);
    // programmed points (3 decimals in mm) come back exactly as the engine's Float32 values
    const i = Array.from(a.toolpath.kind).indexOf(MotionKind.Feed);
    expect(back.path.positions[i * 3 + 3]).toBe(a.toolpath.positions[i * 3 + 3]);
  });

  it("round-trips an inch program, a Jump and a program with no path", () => {
    roundTrip(["G20 G90 G54 T1 M6", "G43 H1 Z1. S2000 M3", "G0 X0 Y0", "G1 Z-.1 F10.", "G2 X1. Y1. R1.", "G55", "G0 X.5 Y.5 Z.1", "G1 X.75", "M30"].join("\n"));
    const empty = roundTrip("(nothing moves)\nM30\n");
    expect(empty.back.path.segmentCount).toBe(0);
    expect(empty.back.path.positions.length).toBe(0);
  });

  it("round-trips a bench slice and is several times smaller than the text once gzipped", () => {
    const text = benchProgram(60_000);
    const { encoded, a } = roundTrip(text);
    const n = a.toolpath.segmentCount;
    const gzPath = gzipSync(encoded).length;
    const gzText = gzipSync(Buffer.from(text)).length;
    expect(gzPath / n).toBeLessThan(4);
    expect(gzPath).toBeLessThan(gzText);
  });

  it("keeps far-out coordinates in range with a coarser step", () => {
    const { back } = roundTrip("G21 G90 G54\nG0 X0 Y0 Z0\nG1 X900000 F100\nG1 Y-900000\nM30\n");
    expect(back.path.positions[3]).toBeCloseTo(900000, -1);
  });

  it("refuses what is not a CGTP answer", () => {
    expect(() => decodeToolpath(new Uint8Array(10))).toThrow(ToolpathFormatError);
    const { encoded } = roundTrip("G21 G90 G54\nG0 X0 Y0 Z0\nG1 X1 F100\nM30\n");
    const bad = encoded.slice();
    bad[4] = 9;
    expect(() => decodeToolpath(bad)).toThrow(/format 9/);
    expect(() => decodeToolpath(encoded.subarray(0, encoded.length - 1))).toThrow(/wrong size/);
    const wrong = encoded.slice();
    wrong[0] = 0;
    expect(() => decodeToolpath(wrong)).toThrow(/not a toolpath/);
  });
});
