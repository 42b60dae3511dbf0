/**
 * Facts of the trade, marked "common practice" where no published source is named, and the two-vise demo programs
 * (tests/fixtures/two-vise-by-tool.nc and its by-part twin: two identical parts under G54 and G55, three tools).
 */
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeProgram } from "../../lib/gcode/index";
import type { Analysis, AnalyzeOptions, MachineProfile } from "../../lib/gcode/types";

const fixture = (name: string) => readFileSync(join(__dirname, "..", "fixtures", name), "utf8");

const machine: MachineProfile = {
  units: "mm",
  travel: { x: { min: 0, max: 800 }, y: { min: 0, max: 500 }, z: { min: -500, max: 0 } },
  rapidRate: 24000,
  maxFeed: 10000,
  maxSpindle: 10000,
  acceleration: 2000,
  toolChangeSeconds: 8,
  manualToolChange: false,
  spindleProgramControlled: true,
  hMustEqualT: true,
  safeZ: 0,
  workOffsetCount: 6,
};

describe("work offset numbering", () => {
  const codes = ["G54", "G55", "G56", "G57", "G58", "G59"];

  it("common practice (and [NIST] 3.5.13): work offset 1 is G54, 2 is G55 ... 6 is G59", () => {
    const a = analyzeProgram(["G21 G17 G90 G94", ...codes.map((c, i) => `${c} G0 X${i} Y0 Z50`), "M30"].join("\n"));
    expect(a.workOffsets.map((w) => [w.code, w.number])).toEqual(codes.map((c, i) => [c, i + 1]));
  });

  it("common practice (and [NIST] 3.5.5): G10 L2 Pn writes offset n, so P2 sets G55 and P6 sets G59", () => {
    const lines = ["G21 G17 G90 G94"];
    codes.forEach((_, i) => lines.push(`G10 L2 P${i + 1} X${(i + 1) * 100} Y${i + 1} Z-${i + 1}`));
    codes.forEach((c) => lines.push(`${c} G0 X0 Y0 Z50`));
    lines.push("M30");
    const a = analyzeProgram(lines.join("\n"));
    for (const [i, c] of codes.entries()) {
      const w = a.workOffsets.find((o) => o.code === c)!;
      expect(w.origin, c).toEqual({ x: (i + 1) * 100, y: i + 1, z: -(i + 1) });
      expect(w.originSource).toBe("program");
    }
  });

  it("common practice: extended offsets G54.1 P1.. are further offsets, apart from G54", () => {
    const a = analyzeProgram(["G21 G17 G90 G94", "G54 G0 X0 Y0 Z50", "G54.1 P7 G0 X0 Y0 Z50", "M30"].join("\n"), {
      machine: { ...machine, workOffsetCount: 54 },
    });
    const codesSeen = a.workOffsets.map((w) => w.code);
    expect(codesSeen).toHaveLength(2);
    expect(codesSeen[0]).toBe("G54");
    expect(codesSeen[1]).toMatch(/^G54\.1 P7$/);
  });
});

describe("two vises, two identical parts, three tools", () => {
  const byTool = analyzeProgram(fixture("two-vise-by-tool.nc"), { machine, parts: 2 });
  const byPart = analyzeProgram(fixture("two-vise-by-part.nc"), { machine, parts: 2 });

  // Cutting per part, [GEO] and [NIST-SRC] convert_cycle_g83 (back-off 0.254 mm), re-derived:
  //   T1 face mill: plunge 2 + 140 + 26 + 140 = 308.
  //   T2 end mill: profile per depth 10+50+80+50+80+10 = 280 plus four r5 quarter arcs 4 x 2.5*pi = 31.41593,
  //     two depths 622.83185, plunges 7 + 5; bore: plunge 2, four helix turns 4 x hypot(10*pi, 2) = 125.91808,
  //     a flat circle 10*pi = 31.41593, 5 back to centre; total 634.83185 + 164.33401 = 799.16586.
  //   T3 drill: G81 4 x (2 - -8) = 40; G83 R2 Q3 Z-18 feeds 3 + 5 x 3.254 + 2.254 = 21.524 per hole, 2 holes 43.048;
  //     total 83.048.
  const perPart = { 1: 308, 2: 799.16586, 3: 83.048 } as const;
  const partTotal = perPart[1] + perPart[2] + perPart[3]; // 1190.21386

  const programs: Array<[string, Analysis]> = [
    ["by tool", byTool],
    ["by part", byPart],
  ];

  for (const [name, a] of programs) {
    describe(name, () => {
      it("is metric, uses G54 then G55, and cuts two parts", () => {
        expect(a.units).toBe("mm");
        expect(a.workOffsets.map((w) => w.code)).toEqual(["G54", "G55"]);
        expect(a.parts).toBe(2);
      });

      it("has no errors or warnings (fixture-mismatch included: the parts are identical)", () => {
        expect(a.findings.filter((f) => f.severity !== "info")).toEqual([]);
      });

      it("names its three tools from the post's tool comments, each with its own H", () => {
        expect(a.tools.map((t) => t.number)).toEqual([1, 2, 3]);
        expect(a.tools[0]!.description ?? "").toMatch(/face mill/i);
        expect(a.tools[1]!.description ?? "").toMatch(/end mill/i);
        expect(a.tools[2]!.description ?? "").toMatch(/drill/i);
        expect(a.tools.map((t) => t.lengthOffsets)).toEqual([[1], [2], [3]]);
        expect(a.tools.map((t) => t.offsets)).toEqual([
          ["G54", "G55"],
          ["G54", "G55"],
          ["G54", "G55"],
        ]);
      });

      it("has each tool's cutting length, lowest Z, feed and speed range", () => {
        for (const t of a.tools) {
          expect(t.feedLength, `T${t.number}`).toBeCloseTo(2 * perPart[t.number as 1 | 2 | 3], 3);
        }
        expect(a.tools.map((t) => t.lowestZ)).toEqual([0, -10, -18]);
        expect(a.tools.map((t) => t.spindle)).toEqual([
          { min: 1900, max: 1900 },
          { min: 8000, max: 8000 },
          { min: 4500, max: 4500 },
        ]);
        expect(a.tools.map((t) => t.feed)).toEqual([
          { min: 600, max: 1400 },
          { min: 300, max: 1200 },
          { min: 450, max: 450 },
        ]);
        expect(a.feedLength).toBeCloseTo(2 * partTotal, 3);
      });

      it("gives both offsets the same cutting, part for part", () => {
        const [g54, g55] = a.workOffsets;
        expect(g54!.feedLength).toBeCloseTo(partTotal, 3);
        expect(g55!.feedLength).toBeCloseTo(partTotal, 3);
        expect(g54!.tools).toEqual([1, 2, 3]);
        expect(g55!.tools).toEqual([1, 2, 3]);
        // Part coordinates: face mill X -30..110, profile lead-in Y -10 to the far side Y 55, deepest G83 hole Z -18,
        // highest feed start Z 2 (plunges and cycle feeds start there).
        for (const w of [g54!, g55!]) {
          expect(w.cuttingBounds).toEqual({ min: { x: -30, y: -10, z: -18 }, max: { x: 110, y: 55, z: 2 } });
        }
      });
    });
  }

  it("common practice: ordered by tool, it changes tools once per tool", () => {
    expect(byTool.toolOrder).toBe("by-tool");
    expect(byTool.toolChangeCount).toBe(3);
    expect(byTool.toolChanges.map((c) => c.tool)).toEqual([1, 2, 3]);
    expect(byTool.tools.map((t) => t.loads)).toEqual([1, 1, 1]);
  });

  it("common practice: ordered by part, it changes tools once per part per tool", () => {
    expect(byPart.toolOrder).toBe("by-part");
    expect(byPart.toolChangeCount).toBe(6);
    expect(byPart.toolChanges.map((c) => c.tool)).toEqual([1, 2, 3, 1, 2, 3]);
    expect(byPart.tools.map((t) => t.loads)).toEqual([2, 2, 2]);
  });

  it("records where each change, tool and offset begins", () => {
    const lines = fixture("two-vise-by-part.nc").split("\n");
    const lineOf = (re: RegExp, from = 0) => lines.findIndex((l, i) => i >= from && re.test(l)) + 1;
    expect(byPart.toolChanges.map((c) => c.previous)).toEqual([null, 1, 2, 3, 1, 2]);
    expect(byPart.toolChanges[0]!.line).toBe(lineOf(/T1 M6/));
    expect(byPart.toolChanges[3]!.line).toBe(lineOf(/T1 M6/, lineOf(/T1 M6/)));
    expect(byPart.tools[0]!.firstLine).toBe(lineOf(/T1 M6/));
    const [g54, g55] = byPart.workOffsets;
    expect(g54!.firstLine).toBe(lineOf(/G54 G0/));
    expect(g55!.firstLine).toBe(lineOf(/G55 G0/));
    expect(g55!.firstMotionLine).toBe(lineOf(/G55 G0/));
    expect(g54!.lastLine!).toBeLessThan(g55!.firstLine!);
  });

  it("the by-part order costs three more tool changes of the profile's 8 s", () => {
    expect(byTool.time.toolChangeSeconds).toBeCloseTo(3 * 8, 9);
    expect(byPart.time.toolChangeSeconds).toBeCloseTo(6 * 8, 9);
    expect(byPart.time.feedSeconds).toBeCloseTo(byTool.time.feedSeconds, 6);
  });

  it("without the parts option the two cutting offsets count as two parts, and the order is still by tool", () => {
    const a = analyzeProgram(fixture("two-vise-by-tool.nc"), { machine });
    expect(a.parts).toBe(2);
    expect(a.toolOrder).toBe("by-tool");
  });

  it("common practice: the tool list a post writes in the header names the tools too", () => {
    // Strip the comments from the M6 lines: only the header's "(T1 D50 FACE MILL 5FL - H1)" lines are left.
    const source = fixture("two-vise-by-tool.nc")
      .split("\n")
      .map((l) => (/ M6 \(/.test(l) ? l.replace(/ \(.*\)$/, "") : l))
      .join("\n");
    expect(source).not.toMatch(/M6 \(/);
    const a = analyzeProgram(source, { machine });
    expect(a.tools.map((t) => t.description ?? "")).toEqual([
      expect.stringMatching(/face mill/i),
      expect.stringMatching(/end mill/i),
      expect.stringMatching(/drill/i),
    ]);
  });

  describe("with the vises' offsets known, travel is checked part by part", () => {
    // Vise 1 part zero at machine X100, vise 2 at X300; the face mill reaches part X110, i.e. machine X210 and X410.
    const workOffsets = { G54: { x: 100, y: 100, z: -300 }, G55: { x: 300, y: 100, z: -300 } };
    const lines = fixture("two-vise-by-tool.nc").split("\n");
    // 1-based lines of every tool's vise 2 section: from its comment to the M5 before the next tool change.
    const vise2 = new Set<number>();
    let inVise2 = false;
    lines.forEach((l, i) => {
      if (l.includes("VISE 2)")) inVise2 = true;
      else if (/\bM5\b/.test(l)) inVise2 = false;
      if (inVise2) vise2.add(i + 1);
    });
    const faceMillVise2 = lines.findIndex((l) => l.includes("FACE MILL 5FL - VISE 2")) + 1;

    it("a table 800 long takes both parts", () => {
      const a = analyzeProgram(lines.join("\n"), { machine, workOffsets, parts: 2 });
      expect(a.findings.filter((f) => f.rule === "over-travel")).toEqual([]);
      expect(a.workOffsets.map((w) => w.origin)).toEqual([workOffsets.G54, workOffsets.G55]);
    });

    it("with X travel to 380 only vise 2 runs over: the face mill at machine X410, the end mill at X385", () => {
      const short = { ...machine, travel: { ...machine.travel, x: { min: 0, max: 380 } } };
      const a = analyzeProgram(lines.join("\n"), { machine: short, workOffsets, parts: 2 });
      const over = a.findings.filter((f) => f.rule === "over-travel").map((f) => f.line);
      // The face mill's pass to part X110 is the first move past machine X380 (300 + 110 = 410).
      expect(over[0]).toBe(lines.findIndex((l, i) => i >= faceMillVise2 && l.includes("X110")) + 1);
      for (const line of over) expect(vise2.has(line), `line ${line}`).toBe(true);
    });
  });

  describe("a second part that differs from the first is reported (fixture-mismatch)", () => {
    const source = fixture("two-vise-by-tool.nc");
    const lines = source.split("\n");
    // The drill's section for vise 2 starts at its comment; its first G81 line is the one changed.
    const vise2Drill = lines.findIndex((l) => l.includes("DRILL - VISE 2"));
    const g81 = lines.findIndex((l, i) => i > vise2Drill && l.includes("G81"));
    const hole = lines.findIndex((l, i) => i > g81 && /^N\d+ X70$/.test(l));

    it("a hole drilled 1 mm deeper in vise 2, on the line that differs", () => {
      const changed = lines.map((l, i) => (i === g81 ? l.replace("Z-8", "Z-9") : l)).join("\n");
      const a = analyzeProgram(changed, { machine, parts: 2 });
      const mismatch = a.findings.filter((f) => f.rule === "fixture-mismatch");
      expect(mismatch.map((f) => f.line)).toEqual([g81 + 1]);
    });

    it("a hole left out in vise 2", () => {
      const changed = lines.filter((_, i) => i !== hole).join("\n");
      const a = analyzeProgram(changed, { machine, parts: 2 });
      expect(a.findings.filter((f) => f.rule === "fixture-mismatch").length).toBeGreaterThan(0);
    });

    it("the tool time adds up to the program's", () => {
      const sum = byTool.tools.reduce((t, x) => t + x.time.totalSeconds, 0);
      expect(sum).toBeCloseTo(byTool.time.totalSeconds, 6);
    });
  });

  it("one part only: the by-tool program cut down to G54 is a single-part program", () => {
    // Drop each tool's VISE 2 section: from its comment up to the M5 that starts the retract before the next change.
    let skipping = false;
    const onePart = fixture("two-vise-by-tool.nc")
      .split("\n")
      .filter((line) => {
        if (line.includes("VISE 2)")) skipping = true;
        else if (/\bM5\b/.test(line)) skipping = false;
        return !skipping;
      })
      .join("\n");
    const a = analyzeProgram(onePart, { machine } satisfies AnalyzeOptions);
    expect(a.workOffsets.map((w) => w.code)).toEqual(["G54"]);
    expect(a.toolOrder).toBe("single");
    expect(a.feedLength).toBeCloseTo(partTotal, 3);
  });
});
