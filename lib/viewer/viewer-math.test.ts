import { describe, expect, it } from "vitest";
import { analyzeProgram } from "../gcode/index";
import { MotionKind } from "../gcode/types";
import { anchorLines } from "./anchors";
import { viewerDataFromAnalysis } from "./from-analysis";
import { compactTimeline, formatClock, locate, pairsDone, pausesOf, segmentEndingAfter, timelineOf } from "./playback";
import { Box3, offsetBoxes, placeOffsets, sceneBox, travelBox, unitFactor } from "./placement";
import { buildIndices, segmentsOfLine, vertexAttributes } from "./render-buffers";
import { benchProgram } from "../../scripts/bench-program";

const machine = {
  units: "mm" as const,
  travel: { x: { min: -500, max: 0 }, y: { min: -400, max: 0 }, z: { min: -400, max: 0 } },
  rapidRate: 6000,
  maxFeed: 6000,
  maxSpindle: 10000,
  acceleration: 500,
  toolChangeSeconds: 30,
  manualToolChange: true,
  spindleProgramControlled: true,
  hMustEqualT: true,
  safeZ: 2,
  workOffsetCount: 6,
};

const twoParts = [
  "G21 G90 G94 G17 G54",
  "T1 M6",
  "G0 G43 H1 Z25 S3000 M3",
  "G0 X0 Y0",
  "G0 Z2",
  "G1 Z-1 F300",
  "G1 X40",
  "G1 Y20",
  "G0 Z25",
  "G55 G0 X0 Y0",
  "G0 Z2",
  "G1 Z-1 F300",
  "G1 X40",
  "G1 Y20",
  "G0 Z25",
  "T2 M6",
  "G0 G43 H2 Z25",
  "G54 G0 X10 Y10",
  "G81 Z-5 R2 F100",
  "G80",
  "M30",
].join("\n");

const data = () => viewerDataFromAnalysis(analyzeProgram(twoParts, { machine, segmentTimes: true }));

describe("placement in machine space", () => {
  it("puts each part at its entered origin, converting machine mm to program inches", () => {
    expect(unitFactor("mm", "inch")).toBeCloseTo(1 / 25.4, 12);
    const p = placeOffsets(
      [{ code: "G54", origin: null }, { code: "G55", origin: null }, { code: "G56", origin: { x: 1, y: 2, z: 3 } }],
      [{ code: "G54", x: -254, y: -127, z: -50.8 }, { code: "g56", x: 9, y: 9, z: 9 }],
      "mm",
      "inch",
    );
    expect(p.origins[0]!.x).toBeCloseTo(-10, 12);
    expect(p.origins[0]!.y).toBeCloseTo(-5, 12);
    expect(p.origins[0]!.z).toBeCloseTo(-2, 12);
    expect(p.sources).toEqual(["machine", null, "program"]);
    // the program's own G10 wins: it is what the control will use
    expect(p.origins[2]).toEqual({ x: 1, y: 2, z: 3 });
    expect(p.unknown).toEqual(["G55"]);
    expect(travelBox(machine.travel, "mm", "mm").min).toEqual({ x: -500, y: -400, z: -400 });
  });

  it("two vises 110 mm apart: the parts' boxes are 110 mm apart in machine space and on top of each other in part space", () => {
    const { path, meta } = data();
    const boxes = offsetBoxes(path, meta.workOffsets.length, MotionKind.Jump);
    expect(boxes[0]!.min.x).toBe(0);
    expect(boxes[0]!.max.x).toBe(40);
    const place = placeOffsets(meta.workOffsets, [{ code: "G54", x: -262.5, y: -118, z: -196 }, { code: "G55", x: -152.5, y: -118, z: -196 }], "mm", "mm");
    const g54 = sceneBox(boxes, (i) => i === 0, place.origins);
    const g55 = sceneBox(boxes, (i) => i === 1, place.origins);
    expect(g55.min.x - g54.min.x).toBeCloseTo(110, 6);
    const both = sceneBox(boxes, () => true, place.origins);
    expect(both.max.x - both.min.x).toBeCloseTo(150, 6);
    expect(sceneBox(boxes, () => true, null).max.x).toBe(40);
    expect(new Box3().empty).toBe(true);
  });
});

describe("playback on the time estimate", () => {
  it("finds the segment at a time, interpolates the tool and names the pause before a tool change", () => {
    const { path } = data();
    const n = path.segmentCount;
    expect(segmentEndingAfter(path.time, n, -1)).toBe(0);
    expect(segmentEndingAfter(path.time, n, 1e9)).toBe(n);
    // halfway along the first cut of 40 mm (line 7)
    const cut = Array.from(path.line).indexOf(7);
    const mid = (path.startTime[cut]! + path.time[cut]!) / 2;
    const tl = timelineOf(path);
    const at = locate(tl, mid);
    expect(at.segment).toBe(cut);
    expect(at.phase).toBe("moving");
    expect(at.x).toBeCloseTo(20, 3);
    // the 30 s change to T2 (line 16) sits before the first segment written after it
    const afterChange = Array.from(path.line).findIndex((l) => l > 16);
    expect(path.startTime[afterChange]! - path.time[afterChange - 1]!).toBeCloseTo(30, 4);
    const pauseAt = locate(tl, path.time[afterChange - 1]! + 10);
    expect(pauseAt.phase).toBe("pause");
    expect(pauseAt.pause).toBe("tool-change");
    expect(pauseAt.segment).toBe(afterChange);
    expect(locate(tl, 1e9).phase).toBe("end");
    // the page's compact form (end times, sparse pauses, per-vertex bytes) tells the same
    const compact = compactTimeline(path.positions, path.time, pausesOf(path), vertexAttributes(path));
    for (let i = 0; i < path.segmentCount; i++) {
      expect(compact.start(i)).toBe(path.startTime[i]);
      expect(compact.kind(i)).toBe(path.kind[i]);
      expect(compact.tool(i)).toBe(path.tool[i]);
    }
    expect(locate(compact, pauseAt.x)).toEqual(locate(tl, pauseAt.x));
    expect(pausesOf(path).at.length).toBeLessThan(path.segmentCount / 2);
    expect(formatClock(3725.9)).toBe("1:02:05");
    expect(formatClock(65)).toBe("1:05");
  });

  it("counts the index pairs done for drawRange", () => {
    const idx = Uint32Array.from([0, 1, 1, 2, 5, 6, 6, 9]);
    expect(pairsDone(idx, 4, 0)).toBe(0);
    expect(pairsDone(idx, 4, 2)).toBe(2);
    expect(pairsDone(idx, 4, 6)).toBe(3);
    expect(pairsDone(idx, 4, 8)).toBe(3);
    expect(pairsDone(idx, 4, 9)).toBe(4);
  });
});

describe("render buffers", () => {
  it("drops hidden tools, offsets, rapids and Jumps from the indices; the coarse index keeps every run's ends", () => {
    const { path } = data();
    const all = { tools: new Uint8Array(256).fill(1), offsets: new Uint8Array(256).fill(1), rapids: true };
    const full = buildIndices(path, all);
    const drawable = Array.from(path.kind).filter((k) => k !== MotionKind.Jump).length;
    expect(full.shown).toBe(drawable);
    expect((full.cut.length + full.rapid.length) / 2).toBe(drawable);
    const noT2 = buildIndices(path, { ...all, tools: Uint8Array.from({ length: 256 }, (_, i) => (i === 1 ? 0 : 1)) });
    for (let k = 0; k < noT2.cut.length; k += 2) expect(path.tool[noT2.cut[k]!]).toBe(0);
    const noRapids = buildIndices(path, { ...all, rapids: false });
    expect(noRapids.rapid.length).toBe(0);
    const coarse = buildIndices(path, all, 5);
    expect(coarse.step).toBeGreaterThan(1);
    expect(coarse.cutCoarse.length).toBeLessThan(full.cut.length);
    // the coarse pairs start and end on the same vertices as the runs they stand for
    expect(coarse.cutCoarse[0]).toBe(full.cut[0]);
    const attrs = vertexAttributes(path);
    expect(attrs[(full.cut[1]!) * 4]).toBe(path.kind[full.cut[0]!]);
    const seg = segmentsOfLine(path, 7);
    expect(seg.length).toBe(2); // one move on line 7 (line 13 cuts the same under G55)
  });
});

describe("the coarse index for moving the view", () => {
  it("stays near its target on a program of drilling cycles (kinds alternating every move) and long passes", () => {
    const { path } = viewerDataFromAnalysis(analyzeProgram(benchProgram(60_000), { segmentTimes: true }));
    const all = { tools: new Uint8Array(256).fill(1), offsets: new Uint8Array(256).fill(1), rapids: true };
    const ix = buildIndices(path, all, 5000);
    const pairs = (ix.cutCoarse.length + ix.rapidCoarse.length) / 2;
    expect(ix.shown).toBeGreaterThan(50_000);
    expect(pairs).toBeLessThan(5000 * 1.6);
    expect(pairs).toBeGreaterThan(5000 * 0.5);
    // every pair runs forward along the path
    for (let k = 0; k < ix.cutCoarse.length; k += 2) expect(ix.cutCoarse[k + 1]).toBeGreaterThan(ix.cutCoarse[k]!);
  });
});

describe("finding anchors", () => {
  it("sits on the end of the line's own move, else where the tool is when the line runs", () => {
    const { path } = data();
    const { segment, atEnd } = anchorLines(path, [6, 16, 0, 999]);
    expect(path.line[segment[0]!]).toBe(6);
    expect(atEnd[0]).toBe(1);
    // line 16 (T2 M6) has no motion: the first segment after it, at its start
    expect(path.line[segment[1]!]).toBe(Array.from(path.line).find((l) => l > 16));
    expect(atEnd[1]).toBe(0);
    expect(segment[2]).toBe(-1);
    expect(segment[3]).toBe(path.segmentCount - 1);
  });
});
