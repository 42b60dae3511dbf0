/**
 * The toolpath's time columns (option `segmentTimes`): each segment's start and end on the clock of the time
 * estimate. Move times are the trapezoidal profile [KIN]: with top speed v and acceleration a,
 * t = L/v + v/a when L >= v^2/a, else 2*sqrt(L/a). Dwells are G4 P seconds ([NIST] 3.5.4); a tool change costs the
 * profile's toolChangeSeconds (the engine's time model, lib/gcode/README.md "Time model").
 */
import { describe, expect, it } from "vitest";
import { analyzeProgram, serializeAnalysis, deserializeToolpath } from "../../lib/gcode/index";
import { MotionKind, type Analysis, type AnalyzeOptions } from "../../lib/gcode/types";
import { readFileSync } from "node:fs";
import { benchProgram } from "../../scripts/bench-program";
import { testMachine } from "./profiles";

function run(lines: string[], options: AnalyzeOptions = {}): Analysis {
  return analyzeProgram(lines.join("\n") + "\n", { segmentTimes: true, ...options });
}

const machine = testMachine({ rapidRate: 6000, maxFeed: 6000, acceleration: 500, toolChangeSeconds: 7 });

/** [KIN] trapezoid, v in units/min. */
const trap = (len: number, vPerMin: number, a: number) => {
  const v = vPerMin / 60;
  return len >= (v * v) / a ? len / v + v / a : 2 * Math.sqrt(len / a);
};

describe("segment times", () => {
  it("are absent without the option, and the rest of the analysis is the same with it", () => {
    const src = ["G21 G90 G54 T1 M6", "G43 H1 Z10", "G0 X0 Y0", "G1 Z-1 F300 S1000 M3", "G2 X10 Y0 R5", "G4 P2", "G0 Z10", "M30"];
    const plain = analyzeProgram(src.join("\n"), { machine });
    const timed = analyzeProgram(src.join("\n"), { machine, segmentTimes: true });
    expect(plain.toolpath.time).toBeUndefined();
    expect(plain.toolpath.startTime).toBeUndefined();
    expect(Object.keys(plain.toolpath)).not.toContain("time");
    const { time, startTime, ...rest } = timed.toolpath;
    expect(time).toBeInstanceOf(Float32Array);
    expect(startTime).toBeInstanceOf(Float32Array);
    expect(JSON.stringify(serializeAnalysis({ ...timed, toolpath: rest }))).toBe(JSON.stringify(serializeAnalysis(plain)));
  });

  it("one rapid, one feed: each segment's duration is its [KIN] trapezoid, the last end is totalSeconds", () => {
    const a = run(["G21 G90 G54", "G0 X0 Y0 Z0", "G0 X100", "G1 X130 F600", "M30"], { machine });
    const tp = a.toolpath;
    const t = tp.time!, s = tp.startTime!;
    // segment 0: the rapid of 100 mm at 6000 mm/min = 100 mm/s, a = 500: 100 >= 100^2/500 = 20 -> 1 + 0.2 = 1.2 s
    // segment 1: 30 mm at 600 mm/min = 10 mm/s: 30 >= 0.2 -> 3 + 0.02 = 3.02 s
    expect(tp.segmentCount).toBe(2);
    expect(s[0]).toBeCloseTo(0, 6);
    expect(t[0]).toBeCloseTo(trap(100, 6000, 500), 5);
    expect(t[0]).toBeCloseTo(1.2, 5);
    expect(s[1]).toBeCloseTo(t[0]!, 6);
    expect(t[1]! - s[1]!).toBeCloseTo(3.02, 5);
    expect(t[1]).toBeCloseTo(a.time.totalSeconds, 4);
  });

  it("a tool change and a dwell show as pauses before the next motion", () => {
    const a = run(
      ["G21 G90 G54", "T1 M6", "G43 H1 Z50 S1000 M3", "G0 X0 Y0 Z5", "G1 Z-1 F300", "G4 P2.5", "G0 Z50", "T2 M6", "G43 H2 Z50", "G0 X20 Y0 Z5", "M30"],
      { machine },
    );
    const tp = a.toolpath;
    const t = tp.time!, s = tp.startTime!;
    const lineOf = (i: number) => tp.line[i]!;
    // the dwell (line 6) comes between the feed of line 5 and the rapid of line 7
    const up = Array.from(tp.line).indexOf(7);
    expect(lineOf(up - 1)).toBe(5);
    expect(s[up]! - t[up - 1]!).toBeCloseTo(2.5, 5);
    // the change to T2 (line 8) comes before the moves of line 9: 7 s from the profile
    const afterChange = Array.from(tp.line).findIndex((l) => l >= 9);
    expect(tp.tool[afterChange]).toBe(1);
    expect(s[afterChange]! - t[afterChange - 1]!).toBeCloseTo(7, 4);
    expect(a.time.toolChangeSeconds).toBeCloseTo(14, 6);
    expect(a.time.dwellSeconds).toBeCloseTo(2.5, 6);
    // the first change (line 2) comes before any motion: the first segment starts at 7 s
    expect(s[0]).toBeCloseTo(7, 5);
    expect(t[tp.segmentCount - 1]).toBeCloseTo(a.time.totalSeconds, 4);
  });

  it("the chords of an arc share its time evenly; a Jump takes none", () => {
    const a = run(["G21 G90 G54 G17", "G0 X0 Y0 Z0", "G1 X10 F600", "G3 X0 Y10 R10", "G0 Z10", "M30"], { machine, chordTolerance: 0.01 });
    const tp = a.toolpath;
    const t = tp.time!, s = tp.startTime!;
    const chords: number[] = [];
    for (let i = 0; i < tp.segmentCount; i++) if (tp.kind[i] === MotionKind.Arc) chords.push(i);
    expect(chords.length).toBeGreaterThan(10);
    const whole = t[chords.at(-1)!]! - s[chords[0]!]!;
    // [GEO] quarter circle of radius 10: 5*pi = 15.708 mm at 10 mm/s, [KIN] + v/a = 0.02 s
    expect(whole).toBeCloseTo(trap(5 * Math.PI, 600, 500), 4);
    for (const i of chords) expect(t[i]! - s[i]!).toBeCloseTo(whole / chords.length, 4);
    for (let i = 1; i < chords.length; i++) expect(s[chords[i]!]).toBeCloseTo(t[chords[i - 1]!]!, 5);

    // an offset switch with unknown origins leaves the position unknown: the next move from it is not drawn, and
    // the one after is linked by a Jump that starts and ends when its motion starts
    const b = run(["G21 G90 G54", "G0 X0 Y0 Z0", "G1 X10 F600", "G55", "G0 X5 Y5 Z5", "G1 X8 F600", "M30"], { machine });
    const bt = b.toolpath;
    const jump = Array.from(bt.kind).indexOf(MotionKind.Jump);
    expect(jump).toBeGreaterThan(0);
    expect(bt.time![jump]).toBe(bt.startTime![jump]);
    expect(bt.startTime![jump + 1]).toBe(bt.startTime![jump]);
  });

  it("times never go back, and the last end matches totalSeconds on the posts fixtures and a bench slice", () => {
    const dir = new URL("../fixtures/posts/", import.meta.url);
    const files: Uint8Array[] = ["two-vise-by-tool.nc", "two-vise-by-part.nc"].map((f) => readFileSync(new URL(`../${f}`, dir)));
    files.push(new TextEncoder().encode(benchProgram(20_000)));
    for (const bytes of files) {
      const a = analyzeProgram(bytes, { machine, segmentTimes: true });
      const tp = a.toolpath;
      const t = tp.time!, s = tp.startTime!;
      expect(tp.segmentCount).toBeGreaterThan(10);
      let prev = 0;
      let moving = 0;
      for (let i = 0; i < tp.segmentCount; i++) {
        expect(s[i]!).toBeGreaterThanOrEqual(prev);
        expect(t[i]!).toBeGreaterThanOrEqual(s[i]!);
        moving += t[i]! - s[i]!;
        prev = t[i]!;
      }
      // what follows the last segment (here: nothing timed) is the difference; Float32 keeps ~7 digits
      expect(t[tp.segmentCount - 1]! / a.time.totalSeconds).toBeCloseTo(1, 5);
      // the motion alone is at most the total less the tool changes and dwells
      expect(moving).toBeLessThanOrEqual(a.time.totalSeconds - a.time.toolChangeSeconds - a.time.dwellSeconds + 1e-2);
    }
  });

  it("survive the JSON form", () => {
    const a = run(["G21 G90 G54", "G0 X0 Y0 Z0", "G1 X10 F600", "G4 P1", "G1 Y10", "M30"], { machine });
    const back = deserializeToolpath(serializeAnalysis(a).toolpath);
    expect(Array.from(back.time!)).toEqual(Array.from(a.toolpath.time!));
    expect(Array.from(back.startTime!)).toEqual(Array.from(a.toolpath.startTime!));
  });
});
