import { describe, expect, it } from "vitest";
import { analyzeProgram } from "../gcode";
import { analysisDiff } from "./analysis-diff";

const program = (body: string[]) => ["%", "O1 (T)", "G90 G94 G17 G21", ...body, "M30", "%"].join("\n");

describe("analysisDiff", () => {
  it("reports tools added, removed and changed, offsets, time and findings new and resolved", () => {
    const a = analyzeProgram(
      program(["G54", "T1 M6 (D10 END MILL)", "G0 X0 Y0 S3000 M3", "G43 H1 Z5", "G1 Z-1 F100", "G1 X10 F300", "G0 Z5", "T2 M6", "G43 H2 Z5", "G1 X20"]),
      { toolpath: false },
    );
    const b = analyzeProgram(
      program(["G55", "T1 M6 (D10 END MILL)", "G0 X0 Y0 S3000 M3", "G43 H1 Z5", "G1 Z-1 F100", "G1 X40 F300", "G0 Z5", "T3 M6", "G43 H4 Z5", "G1 X20"]),
      { toolpath: false },
    );
    const d = analysisDiff(a, b);
    expect(d.tools.added).toEqual([3]);
    expect(d.tools.removed).toEqual([2]);
    expect(d.tools.changed.map((c) => c.number)).toEqual([1]);
    expect(Object.keys(d.tools.changed[0]!.changes)).toContain("totalSeconds");
    expect(d.offsets.added).toEqual(["G55"]);
    expect(d.offsets.removed).toEqual(["G54"]);
    expect(d.time.totalSeconds.delta).toBeCloseTo(b.time.totalSeconds - a.time.totalSeconds, 9);
    // T3 with H4: a length offset mismatch only in b.
    expect(d.findings.new.map((f) => f.rule)).toContain("length-offset-mismatch");
    expect(d.bounds.all).not.toBeNull();
  });

  it("finds nothing new between an analysis and itself", () => {
    const a = analyzeProgram(program(["T1 M6", "G54 G0 X0 Y0", "G43 H1 Z5", "G1 X5 F100"]), { toolpath: false });
    const d = analysisDiff(a, a);
    expect(d.tools).toEqual({ added: [], removed: [], changed: [] });
    expect(d.findings.new).toEqual([]);
    expect(d.findings.resolved).toEqual([]);
    expect(d.findings.unchanged).toBe(a.findings.length);
    expect(d.bounds).toEqual({ all: null, cutting: null });
  });
});
