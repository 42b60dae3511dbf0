/**
 * One table drives every rule: tests/fixtures/rules/<rule>.nc fires the rule on each line marked `(<-- rule)`
 * (or on at least one of the lines marked `(<-- rule?)`), and <rule>.clean.nc, a look-alike, must not fire it.
 * The rule definitions are issue 3's; where a published source backs the rule it is named in the fixture's header.
 */
import { readFileSync, existsSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeProgram } from "../../lib/gcode/index";
import { RULE_IDS, type Analysis, type AnalyzeOptions, type MachineProfile, type RuleId } from "../../lib/gcode/types";

const dir = join(__dirname, "..", "fixtures", "rules");

const machine: MachineProfile = {
  units: "mm",
  travel: { x: { min: 0, max: 600 }, y: { min: 0, max: 400 }, z: { min: -500, max: 0 } },
  rapidRate: 24000,
  maxFeed: 10000,
  maxSpindle: 10000,
  acceleration: 1500,
  toolChangeSeconds: 6,
  manualToolChange: false,
  spindleProgramControlled: true,
  hMustEqualT: true,
  safeZ: 0,
  workOffsetCount: 6,
};

interface RuleCase {
  rule: RuleId;
  /** Options for both programs. */
  options?: AnalyzeOptions;
  /** Options for the clean look-alike, when they differ. */
  cleanOptions?: AnalyzeOptions;
  /** Expected lines when they cannot be marked in the file (line 0: the whole program). */
  lines?: number[];
}

const table: RuleCase[] = [
  { rule: "offset-not-set" },
  { rule: "rapid-below-safe-z" },
  { rule: "length-offset-mismatch" },
  { rule: "length-offset-missing" },
  { rule: "arc-radius-mismatch" },
  { rule: "arc-invalid" },
  { rule: "modal-conflict" },
  { rule: "feed-missing" },
  { rule: "spindle-off-cut" },
  { rule: "fixture-mismatch", options: { parts: 2 } },
  { rule: "tool-change-low" },
  { rule: "units-missing" },
  { rule: "program-end-missing" },
  { rule: "incremental-left-on" },
  // Machine X travel 0..600 with G54 at machine (100, 100, -400).
  { rule: "over-travel", options: { machine, workOffsets: { G54: { x: 100, y: 100, z: -400 } } } },
  { rule: "feed-over-limit", options: { machine: { ...machine, maxFeed: 5000 } } },
  { rule: "spindle-over-limit", options: { machine: { ...machine, maxSpindle: 8000 } } },
  { rule: "cycle-r-below-z" },
  { rule: "comp-invalid" },
  { rule: "unknown-code" },
  { rule: "not-evaluated" },
  { rule: "tool-not-loaded" },
  { rule: "dwell-invalid" },
  { rule: "line-too-long" },
  { rule: "subprogram-missing" },
  { rule: "subprogram-invalid" },
  { rule: "comp-left-on" },
  { rule: "word-invalid" },
  { rule: "cycle-invalid" },
  { rule: "offset-invalid" },
  { rule: "arc-start-unknown" },
  { rule: "spindle-invalid" },
  { rule: "tool-invalid" },
  { rule: "code-after-end" },
  { rule: "coordinate-shift" },
  { rule: "execution-limit" },
  { rule: "toolpath-truncated" },
  { rule: "assumption", lines: [0], cleanOptions: { machine } },
];

interface Marks {
  all: number[];
  any: number[];
}

function marks(source: string, rule: RuleId): Marks {
  const all: number[] = [];
  const any: number[] = [];
  source.split(/\r\n|\r|\n/).forEach((text, i) => {
    if (text.includes(`(<-- ${rule})`)) all.push(i + 1);
    if (text.includes(`(<-- ${rule}?)`)) any.push(i + 1);
  });
  return { all, any };
}

const cache = new Map<string, Analysis>();
function analyse(file: string, options?: AnalyzeOptions): Analysis {
  const key = `${file} ${JSON.stringify(options ?? {})}`;
  let a = cache.get(key);
  if (!a) {
    a = analyzeProgram(readFileSync(join(dir, file)), options);
    cache.set(key, a);
  }
  return a;
}

const linesOf = (a: Analysis, rule: RuleId) => a.findings.filter((f) => f.rule === rule).map((f) => f.line);

describe("the rule table", () => {
  it("covers every rule id of the engine, once", () => {
    expect([...table.map((c) => c.rule)].sort()).toEqual([...RULE_IDS].sort());
  });

  it("has a firing fixture and a clean look-alike for each rule", () => {
    for (const c of table) {
      expect(existsSync(join(dir, `${c.rule}.nc`)), `${c.rule}.nc`).toBe(true);
      expect(existsSync(join(dir, `${c.rule}.clean.nc`)), `${c.rule}.clean.nc`).toBe(true);
    }
  });
});

describe.each(table)("$rule", (c) => {
  const fire = `${c.rule}.nc`;
  const clean = `${c.rule}.clean.nc`;
  const m = marks(readFileSync(join(dir, fire), "utf8"), c.rule);
  const expected = c.lines ?? m.all;

  it(`fires on the marked line${expected.length + m.any.length > 1 ? "s" : ""}`, { timeout: 30_000 }, () => {
    expect(expected.length + m.any.length, "the fixture marks where the rule fires").toBeGreaterThan(0);
    const got = linesOf(analyse(fire, c.options), c.rule);
    for (const line of expected) expect(got, `line ${line}`).toContain(line);
    if (m.any.length > 0) expect(got.some((l) => m.any.includes(l)), `one of lines ${m.any.join(", ")}`).toBe(true);
  });

  it("does not fire on the clean look-alike", { timeout: 30_000 }, () => {
    const a = analyse(clean, c.cleanOptions ?? c.options);
    expect(a.findings.filter((f) => f.rule === c.rule)).toEqual([]);
  });

  it("the clean look-alike has no other errors or warnings", { timeout: 30_000 }, () => {
    const a = analyse(clean, c.cleanOptions ?? c.options);
    expect(a.findings.filter((f) => f.severity !== "info").map((f) => `${f.line} ${f.rule}: ${f.message}`)).toEqual([]);
  });
});

describe("rules that depend on the options", () => {
  it("rapid-below-safe-z uses the safeZ option: with safe Z 5 the Z2 rapids of the clean fixture are too low", () => {
    const source = readFileSync(join(dir, "rapid-below-safe-z.clean.nc"), "utf8");
    const line = source.split("\n").findIndex((l) => l.startsWith("G0 X40 Y20")) + 1;
    const a = analyzeProgram(source, { safeZ: 5 });
    expect(linesOf(a, "rapid-below-safe-z")).toContain(line);
    expect(a.safeZ).toBe(5);
  });

  it("rapid-below-safe-z takes the profile's safe Z when there is no safeZ option", () => {
    const source = readFileSync(join(dir, "rapid-below-safe-z.clean.nc"), "utf8");
    const a = analyzeProgram(source, { machine: { ...machine, safeZ: 5 } });
    expect(a.safeZ).toBe(5);
    expect(linesOf(a, "rapid-below-safe-z").length).toBeGreaterThan(0);
    const b = analyzeProgram(source, { machine: { ...machine, safeZ: 5 }, safeZ: 1 });
    expect(b.safeZ).toBe(1);
    expect(linesOf(b, "rapid-below-safe-z")).toEqual([]);
  });

  it("length-offset-mismatch is off on a machine that does not tie H to T", () => {
    const a = analyse("length-offset-mismatch.nc", { machine: { ...machine, hMustEqualT: false } });
    expect(linesOf(a, "length-offset-mismatch")).toEqual([]);
  });

  it("spindle-off-cut is an error where the program controls the spindle; where it does not, one info line says so", () => {
    // Common practice: a spindle switched by hand is not in the program, so the program cannot show it turning.
    const on = analyse("spindle-off-cut.nc", { machine });
    const off = analyse("spindle-off-cut.nc", { machine: { ...machine, spindleProgramControlled: false } });
    expect(on.findings.find((f) => f.rule === "spindle-off-cut")?.severity).toBe("error");
    expect(off.findings.filter((f) => f.rule === "spindle-off-cut").map((f) => f.severity)).toEqual(["info"]);
  });

  it("limits in an inch profile apply to a metric program after conversion (types.ts: the machine's units)", () => {
    // 200 in/min = 5080 mm/min; 0.2 in = 5.08 mm.
    const inch: MachineProfile = {
      ...machine,
      units: "inch",
      travel: { x: { min: 0, max: 24 }, y: { min: 0, max: 16 }, z: { min: -20, max: 0 } },
      rapidRate: 945,
      maxFeed: 200,
      maxSpindle: 10000,
      acceleration: 60,
      safeZ: 0.2,
    };
    const prog = (f: number) => ["G21 G17 G90 G94 G54", "T1 M6", "S1000 M3", "G0 X0 Y0", "G43 H1 Z25", `G1 X40 F${f}`, "G0 Z25", "M30"].join("\n");
    expect(linesOf(analyzeProgram(prog(5000), { machine: inch }), "feed-over-limit")).toEqual([]);
    expect(linesOf(analyzeProgram(prog(5100), { machine: inch }), "feed-over-limit")).toEqual([6]);
    const low = ["G21 G17 G90 G94 G54", "T1 M6", "S1000 M3", "G0 X0 Y0", "G43 H1 Z5", "G0 X10", "M30"].join("\n");
    // Z5 mm is below the profile's safe Z of 5.08 mm.
    const a = analyzeProgram(low, { machine: inch });
    expect(a.safeZ).toBeCloseTo(5.08, 9);
    expect(linesOf(a, "rapid-below-safe-z")).toContain(6);
  });

  it("over-travel needs the offset values: without them the same program is not checked", () => {
    const a = analyse("over-travel.nc", { machine });
    expect(linesOf(a, "over-travel")).toEqual([]);
  });

  it("fixture-mismatch compares parts only when there are several", () => {
    const a = analyse("fixture-mismatch.nc", { parts: 1 });
    expect(linesOf(a, "fixture-mismatch")).toEqual([]);
  });
});

describe("every finding is complete", () => {
  it("has a known rule, a severity, a line within the file, a message and a hint", () => {
    for (const [key, a] of cache) {
      for (const f of a.findings) {
        expect(RULE_IDS, key).toContain(f.rule);
        expect(["error", "warning", "info"]).toContain(f.severity);
        expect(f.line).toBeGreaterThanOrEqual(0);
        expect(f.line).toBeLessThanOrEqual(a.lineCount);
        expect(f.message.length).toBeGreaterThan(0);
        expect(f.hint.length).toBeGreaterThan(0);
      }
    }
    expect(cache.size).toBeGreaterThan(0);
  });
});
