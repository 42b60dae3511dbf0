/**
 * tests/fixtures/posts: programs of our own, written in the styles posts and shops write (N numbers or not, O
 * numbers, % marks, safe-start lines, G91 G28 Z0 before changes, tool lists with separators, G91.1, rounded arcs,
 * cycles with and without R, G18/G19 arcs, both kinds of subprogram, a byte-order mark, CR LF, inch without G20,
 * G1 positioning, I/J full circles, G91 from the start, a second side, two vises by tool and by part) and a few
 * with one seeded defect. Beside each, <name>.expected.json lists the errors and warnings it must give, each with
 * why, and facts re-derived by hand ([GEO] lengths, "common practice" for the rest). A clean program gives no error
 * and no warning; a seeded one gives its defect on the named line and nothing else.
 */
import { readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeProgram } from "../../lib/gcode/index";
import type { Analysis, AnalyzeOptions, Bounds, MachineProfile, RuleId, Severity } from "../../lib/gcode/types";
import { testInchMachine, testMachine } from "./profiles";
import { DEMO_MACHINES } from "../../db/demo-data";
import { toMachineProfile, type MachineFields } from "../../lib/machine-profile";

const dir = join(__dirname, "..", "fixtures", "posts");

// The demo shop's machines (db/demo-data.ts): the bench mill with its hand-switched spindle as it is, the vertical
// centre with spindle speeds up to 12000 rpm, and an inch twin of the vertical centre.
const vmc = testMachine({
  travel: { x: { min: -762, max: 0 }, y: { min: -406, max: 0 }, z: { min: -508, max: 0 } },
  rapidRate: 24_000,
  acceleration: 2_500,
  toolChangeSeconds: 4.5,
  safeZ: 2,
  workOffsetCount: 54,
});
const profiles: Record<string, MachineProfile> = {
  vmc,
  "vmc-inch": testInchMachine({ toolChangeSeconds: 4.5, workOffsetCount: 54 }),
  bench: toMachineProfile({ notes: "", ...DEMO_MACHINES[0]! } as MachineFields),
};

interface Expected {
  about: string;
  options: { machine?: string; parts?: number; dialect?: AnalyzeOptions["dialect"] };
  findings: { rule: RuleId; line: number; severity: Severity; why: string }[];
  facts: {
    units?: "mm" | "inch";
    workOffsets?: string[];
    descriptions?: Record<string, string>;
    fullyEvaluated?: boolean;
    feedLength?: number;
    rapidLength?: number;
    bounds?: Bounds;
    parts?: number;
    toolOrder?: Analysis["toolOrder"];
    infos?: RuleId[];
    strictRule?: RuleId;
    rapidLines?: number[];
    toolFeed?: Record<string, { min: number; max: number }>;
    sameOffsetFeedTime?: boolean;
    sameOffsetTotalTime?: boolean;
    lineCount?: number;
    programNumber?: number;
  };
}

const names = readdirSync(dir)
  .filter((f) => f.endsWith(".nc"))
  .map((f) => f.slice(0, -3))
  .sort();

function optionsOf(e: Expected): AnalyzeOptions {
  const o: AnalyzeOptions = {};
  if (e.options.machine) o.machine = profiles[e.options.machine];
  if (e.options.parts) o.parts = e.options.parts;
  if (e.options.dialect) o.dialect = e.options.dialect;
  return o;
}

const shown = (a: Analysis) => a.findings.filter((f) => f.severity !== "info").map((f) => `${f.line} ${f.severity} ${f.rule}: ${f.message}`);

describe("the posts fixtures", () => {
  it("hold at least 20 programs, each with its expected findings beside it", () => {
    expect(names.length).toBeGreaterThanOrEqual(20);
    for (const n of names) expect(() => readFileSync(join(dir, `${n}.expected.json`), "utf8"), n).not.toThrow();
  });
});

describe.each(names)("%s", (name) => {
  const bytes = readFileSync(join(dir, `${name}.nc`));
  const e = JSON.parse(readFileSync(join(dir, `${name}.expected.json`), "utf8")) as Expected;
  const a = analyzeProgram(bytes, optionsOf(e));
  const f = e.facts;

  it(e.findings.length === 0 ? "is clean: no error and no warning" : "gives its seeded findings on the right lines, and nothing else", () => {
    const got = a.findings.filter((x) => x.severity !== "info").map((x) => `${x.line} ${x.severity} ${x.rule}`).sort();
    const want = e.findings.map((x) => `${x.line} ${x.severity} ${x.rule}`).sort();
    expect(got, shown(a).join("\n")).toEqual(want);
    for (const rule of f.infos ?? []) expect(a.findings.some((x) => x.rule === rule && x.severity === "info"), rule).toBe(true);
  });

  it("has the facts worked out beside it", () => {
    if (f.units) expect(a.units).toBe(f.units);
    if (f.workOffsets) expect(a.workOffsets.map((w) => w.code)).toEqual(f.workOffsets);
    if (f.fullyEvaluated !== undefined) expect(a.coverage.evaluatedShare === 1).toBe(f.fullyEvaluated);
    if (f.feedLength !== undefined) expect(a.feedLength).toBeCloseTo(f.feedLength, 3);
    if (f.rapidLength !== undefined) expect(a.rapidLength).toBeCloseTo(f.rapidLength, 6);
    if (f.bounds) expect(a.bounds).toEqual(f.bounds);
    if (f.parts !== undefined) expect(a.parts).toBe(f.parts);
    if (f.toolOrder) expect(a.toolOrder).toBe(f.toolOrder);
    if (f.lineCount !== undefined) expect(a.lineCount).toBe(f.lineCount);
    if (f.programNumber !== undefined) expect(a.programNumber).toBe(f.programNumber);
    for (const [t, d] of Object.entries(f.descriptions ?? {})) expect(a.tools.find((x) => x.number === Number(t))?.description).toBe(d);
    for (const [t, r] of Object.entries(f.toolFeed ?? {})) expect(a.tools.find((x) => x.number === Number(t))?.feed).toEqual(r);
    if (f.rapidLines) {
      // Common dialect: after G80 the motion in force before the cycle (G0 here) moves the bare Z.
      const tp = a.toolpath;
      const lineOf = (n: number) => String(bytes).split(/\r?\n/).findIndex((l) => l.startsWith(`N${n} `)) + 1;
      for (const n of f.rapidLines) {
        const line = lineOf(n);
        const kinds = [...tp.line.keys()].filter((i) => tp.line[i] === line).map((i) => tp.kind[i]);
        expect(kinds, `N${n}`).toEqual([0]);
      }
    }
    if (f.sameOffsetFeedTime) {
      // Two identical parts: the same cutting time under each offset, and tool changes charged to neither.
      const [p1, p2] = a.workOffsets;
      expect(p2!.time.feedSeconds).toBeCloseTo(p1!.time.feedSeconds, 9);
      expect(p1!.time.toolChangeSeconds + p2!.time.toolChangeSeconds).toBe(0);
      expect(a.time.toolChangeSeconds).toBeGreaterThan(0);
    }
    if (f.sameOffsetTotalTime) expect(a.workOffsets[1]!.time.totalSeconds).toBeCloseTo(a.workOffsets[0]!.time.totalSeconds, 9);
    expect(a.version).toBeGreaterThanOrEqual(2);
  });

  if (f.strictRule) {
    it(`read as strict RS274/NGC instead, it gives ${f.strictRule} (the dialect difference it shows)`, () => {
      const strict = analyzeProgram(bytes, { ...optionsOf(e), dialect: "strict-ngc" });
      expect(strict.findings.map((x) => x.rule)).toContain(f.strictRule);
      expect(strict.dialect).toBe("strict-ngc");
    });
  }
});

describe("seeding the multi-part defects into a clean two-vise program", () => {
  // Common practice: a multi-part program by tool selects each vise's offset before that part's moves; losing the
  // line cuts part 2 on part 1 again, and a mistyped offset cuts it where no vise is.
  const sources: Array<[string, string]> = [
    ["posts/16-two-vise-by-tool.nc (offset on its own line)", readFileSync(join(dir, "16-two-vise-by-tool.nc"), "utf8")],
    ["two-vise-by-tool.nc (offset on the line of the first move)", readFileSync(join(dir, "..", "two-vise-by-tool.nc"), "utf8")],
  ];
  for (const [what, source] of sources) {
    const lines = source.split("\n");
    const t2 = lines.findIndex((l) => /\bT2 M6\b/.test(l));
    const g55 = lines.findIndex((l, i) => i > t2 && /\bG55\b/.test(l));

    describe(what, () => {
      it("the clean program has no fixture finding and two parts", () => {
        const a = analyzeProgram(source, { machine: vmc });
        expect(a.findings.filter((x) => x.rule === "fixture-mismatch")).toEqual([]);
        expect(a.parts).toBe(2);
      });

      for (const parts of [undefined, 2]) {
        it(`the end mill's G55 line deleted: found on the line that took its place${parts ? " (parts given)" : ""}`, () => {
          const seeded = lines.filter((_, i) => i !== g55).join("\n");
          const a = analyzeProgram(seeded, { machine: vmc, parts });
          const found = a.findings.filter((x) => x.rule === "fixture-mismatch");
          expect(found.map((x) => x.line)).toEqual([g55 + 1]);
          expect(found[0]!.message).toMatch(/T2 never cuts under G55/);
        });

        it(`G56 typed for the end mill's G55: found on the G56 line${parts ? " (parts given)" : ""}`, () => {
          const seeded = lines.map((l, i) => (i === g55 ? l.replace("G55", "G56") : l)).join("\n");
          const a = analyzeProgram(seeded, { machine: vmc, parts });
          const found = a.findings.filter((x) => x.rule === "fixture-mismatch");
          expect(found.map((x) => x.line)).toEqual([g55 + 1]);
          expect(found[0]!.message).toMatch(/T2 cuts under G56/);
        });
      }
    });
  }
});
