import { describe, expect, it } from "vitest";
import { analyzeProgram } from "../gcode/index";
import { viewerDataFromAnalysis } from "./from-analysis";
import { diffPaths } from "./overlay-diff";

/** A plate with two square pockets; `dx` moves the second one. */
function plate(dx: number, renumber = false): string {
  const pocket = (x: number, y: number) => [`G0 X${x} Y${y}`, "G0 Z2", "G1 Z-3 F200", `G1 X${x + 10}`, `G1 Y${y + 10}`, `G1 X${x}`, `G1 Y${y}`, "G0 Z10"];
  const lines = ["G21 G90 G17 G54", "T1 M6", "G43 H1 Z10 S4000 M3", ...pocket(10, 10), ...pocket(40 + dx, 10), "M30"];
  return (renumber ? ["(HEADER ADDED IN THE NEW REVISION)", ...lines] : lines).join("\n");
}
const load = (src: string) => viewerDataFromAnalysis(analyzeProgram(src, { segmentTimes: true }));

describe("revision overlay diff", () => {
  it("a revision that moves one pocket changes exactly that pocket's segments and its approach", () => {
    const a = load(plate(15));
    const b = load(plate(0));
    const d = diffPaths(a, b, 0.01);
    const changedLines = new Set<number>();
    for (let i = 0; i < a.path.segmentCount; i++) if (d.aChanged[i]) changedLines.add(a.path.line[i]!);
    // lines 12-19 are the second pocket: its rapid over, the plunge, four sides; the first pocket is untouched
    for (const l of changedLines) expect(l).toBeGreaterThanOrEqual(12);
    expect(changedLines.has(15)).toBe(true);
    expect(d.aChangedCount).toBe(d.bChangedCount);
    expect(d.aChangedCount).toBeGreaterThanOrEqual(6);
  });

  it("renumbered lines and an added comment change nothing; a reversed cut does", () => {
    const a = load(plate(0, true));
    const b = load(plate(0));
    expect(diffPaths(a, b, 0.01).aChangedCount).toBe(0);
    const reversed = load(plate(0).replace("G1 X20\nG1 Y20\nG1 X10\nG1 Y10", "G1 Y20\nG1 X20\nG1 Y10\nG1 X10"));
    expect(diffPaths(reversed, b, 0.01).aChangedCount).toBe(4);
  });

  it("counts a segment cut twice in one revision and once in the other as one change", () => {
    const once = load("G21 G90 G54 T1 M6\nG43 H1 Z5 S1000 M3\nG0 X0 Y0\nG1 Z-1 F100\nG1 X10\nM30");
    const twice = load("G21 G90 G54 T1 M6\nG43 H1 Z5 S1000 M3\nG0 X0 Y0\nG1 Z-1 F100\nG1 X10\nG0 Z5\nG0 X0\nG1 Z-1\nG1 X10\nM30");
    const d = diffPaths(twice, once, 0.01);
    // the second pass adds: up, back, down, and the second X10
    expect(d.aChangedCount).toBe(4);
    expect(d.bChangedCount).toBe(0);
  });
});
