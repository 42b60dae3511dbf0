/**
 * Cross-check against a general-purpose interpreter from the registry, gcode-toolpath 3.0.0, on cycle-free fixtures:
 * overall bounds, feed length and rapid length must agree. Lengths and arc extremes are computed here from its
 * line and arc callbacks with plain arc geometry [GEO] (length r*|theta|, helix hypot(r*theta, dz); extremes at the
 * 0/90/180/270 degree points inside the sweep).
 *
 * Known differences, each handled in the open below and each shown by its own test:
 * 1. It starts every axis at 0; the engine leaves an axis the program has not set unknown. We start it at NaN so an
 *    unset axis stays out of its figures too: a NaN axis has no bounds, a move from a NaN to a number has no known
 *    length, and an axis NaN at both ends did not move.
 * 2. It drops the axis words of a `G43 H.. Z..` line (G43 has no handler and takes the line's words with it). We give it
 *    such lines split in two, `G43 H..` then the rest, which is what the line means.
 * 3. It has no canned cycles: X/Y-only lines after G81.. replay as plain moves. Hence cycle-free fixtures.
 * 4. It reports millimetres for G20 programs; we divide by 25.4.
 */
import { readFileSync } from "node:fs";
import { join } from "node:path";
import Toolpath from "gcode-toolpath";
import { describe, expect, it } from "vitest";
import { analyzeProgram } from "../../lib/gcode/index";
import { MotionKind, type Analysis } from "../../lib/gcode/types";

type P3 = { x: number; y: number; z: number };
type Axis = "x" | "y" | "z";
const AXES: Axis[] = ["x", "y", "z"];

interface Figures {
  feed: number;
  rapid: number;
  min: Record<Axis, number | null>;
  max: Record<Axis, number | null>;
  ends: P3[];
}

const fixtureDir = join(__dirname, "..", "fixtures", "reference");
const readFixture = (name: string) => readFileSync(join(fixtureDir, name), "utf8");

/** Known difference 2: `G43 H1 Z25` becomes `G43 H1` and `Z25`. */
function splitLengthOffsetLines(source: string): string {
  return source
    .split(/\r?\n/)
    .flatMap((line) => {
      const m = /^(.*?)(G0*43\s*H\s*\d+)(.*)$/i.exec(line);
      if (!m) return [line];
      const rest = `${m[1]} ${m[3]}`.trim();
      return rest ? [m[2]!, rest] : [m[2]!];
    })
    .join("\n");
}

function emptyFigures(): Figures {
  return { feed: 0, rapid: 0, min: { x: null, y: null, z: null }, max: { x: null, y: null, z: null }, ends: [] };
}

function include(f: Figures, axis: Axis, v: number) {
  if (Number.isNaN(v)) return;
  const lo = f.min[axis];
  const hi = f.max[axis];
  f.min[axis] = lo === null ? v : Math.min(lo, v);
  f.max[axis] = hi === null ? v : Math.max(hi, v);
}

const TAU = 2 * Math.PI;
const mod = (a: number) => ((a % TAU) + TAU) % TAU;

/** An axis unknown at both ends did not move; unknown at one end only, the move has no known length. */
function delta(a: number, b: number): number {
  if (Number.isNaN(a) && Number.isNaN(b)) return 0;
  return b - a;
}

/** Runs gcode-toolpath and measures its moves. `scale` converts its millimetres to the program's units. */
function reference(source: string, scale: number, start: P3 = { x: NaN, y: NaN, z: NaN }): Figures {
  const f = emptyFigures();
  const point = (p: P3): P3 => ({ x: p.x * scale, y: p.y * scale, z: p.z * scale });
  const addPoint = (p: P3) => AXES.forEach((a) => include(f, a, p[a]));
  const toolpath = new Toolpath({
    position: start,
    addLine: (modal, v1, v2) => {
      const a = point(v1);
      const b = point(v2);
      addPoint(a);
      addPoint(b);
      const d = Math.hypot(delta(a.x, b.x), delta(a.y, b.y), delta(a.z, b.z));
      if (Number.isNaN(d)) return;
      f.ends.push(b);
      if (modal.motion === "G0") f.rapid += d;
      else f.feed += d;
    },
    addArcCurve: (modal, v1, v2, v0) => {
      // Plane axes: (u, v) in the plane, w along its normal.
      const s = point(v1);
      const e = point(v2);
      const c = point(v0);
      const r = Math.hypot(s.x - c.x, s.y - c.y);
      const a1 = Math.atan2(s.y - c.y, s.x - c.x);
      const a2 = Math.atan2(e.y - c.y, e.x - c.x);
      const ccw = modal.motion === "G3";
      const same = Math.hypot(e.x - s.x, e.y - s.y) < 1e-9;
      const sweep = same ? TAU : ccw ? mod(a2 - a1) || TAU : mod(a1 - a2) || TAU;
      const length = Math.hypot(r * sweep, delta(s.z, e.z));
      if (Number.isNaN(length)) return;
      f.feed += length;
      const planePoints: P3[] = [s, e];
      for (let k = 0; k < 4; k++) {
        const th = (k * Math.PI) / 2;
        const d = ccw ? mod(th - a1) : mod(a1 - th);
        if (d <= sweep + 1e-12) planePoints.push({ x: c.x + r * Math.cos(th), y: c.y + r * Math.sin(th), z: s.z });
      }
      const toXyz = (p: P3): P3 =>
        modal.plane === "G18" ? { x: p.y, y: p.z, z: p.x } : modal.plane === "G19" ? { x: p.z, y: p.x, z: p.y } : p;
      planePoints.forEach((p) => addPoint(toXyz(p)));
      f.ends.push(toXyz(e));
    },
  });
  toolpath.loadFromStringSync(source);
  return f;
}

function vertices(a: Analysis): P3[] {
  const t = a.toolpath;
  const out: P3[] = [];
  for (let i = 0; i < t.segmentCount; i++) {
    if (t.kind[i] === MotionKind.Jump) continue;
    out.push({ x: t.positions[3 * i + 3]!, y: t.positions[3 * i + 4]!, z: t.positions[3 * i + 5]! });
  }
  return out;
}

const cases: Array<{ file: string; scale: number; what: string }> = [
  { file: "profile-mm.nc", scale: 1, what: "metric profile: lines, IJ and R corner arcs, helix, G91 section" },
  { file: "planes.nc", scale: 1, what: "arcs in G18 and G19 and a G17 helix" },
  { file: "inch.nc", scale: 1 / 25.4, what: "inch program with R and negative-R arcs" },
  { file: "engraving.nc", scale: 1, what: "one-tool engraving: short feeds and arcs at F20" },
  { file: "no-z.nc", scale: 1, what: "a program that never sets Z" },
];

describe("agreement with gcode-toolpath on cycle-free fixtures", () => {
  for (const c of cases) {
    describe(`${c.file} (${c.what})`, () => {
      const source = readFixture(c.file);
      const engine = analyzeProgram(source);
      const ref = reference(splitLengthOffsetLines(source), c.scale);

      it("has the same overall bounds", () => {
        for (const axis of AXES) {
          const rmin = ref.min[axis];
          const rmax = ref.max[axis];
          if (rmin === null || rmax === null) {
            expect(engine.bounds.min[axis], `min ${axis}`).toBeNull();
            expect(engine.bounds.max[axis], `max ${axis}`).toBeNull();
          } else {
            expect(engine.bounds.min[axis], `min ${axis}`).toBeCloseTo(rmin, 6);
            expect(engine.bounds.max[axis], `max ${axis}`).toBeCloseTo(rmax, 6);
          }
        }
      });

      it("has the same feed length", () => {
        expect(ref.feed).toBeGreaterThan(0);
        expect(engine.feedLength).toBeCloseTo(ref.feed, 6);
      });

      it("has the same rapid length", () => {
        expect(engine.rapidLength).toBeCloseTo(ref.rapid, 6);
      });

      it("has every move end point of the reference in its toolpath", () => {
        const v = vertices(engine);
        const tol = 1e-3 * Math.max(1, c.scale);
        // The engine's toolpath holds only points with all three axes known (types.ts: Float32 positions), so an end
        // the reference still has an unknown (NaN) axis in is not looked for.
        const known = ref.ends.filter((p) => AXES.every((a) => !Number.isNaN(p[a])));
        const missing = known.filter(
          (p) => !v.some((q) => Math.abs(q.x - p.x) < tol && Math.abs(q.y - p.y) < tol && Math.abs(q.z - p.z) < tol),
        );
        if (c.file !== "no-z.nc") expect(known.length).toBeGreaterThan(0);
        expect(missing).toEqual([]);
      });
    });
  }
});

describe("the known differences, shown", () => {
  it("1. unset axes: started at 0 the reference puts Z=0 in the bounds of a program that never sets Z", () => {
    const source = readFixture("no-z.nc");
    const atZero = reference(source, 1, { x: 0, y: 0, z: 0 });
    expect(atZero.min.z).toBe(0);
    expect(atZero.max.z).toBe(0);
    // It also counts a rapid from its assumed (0,0,0) to the first point: hypot(10, 10) = 14.142.
    expect(atZero.rapid).toBeCloseTo(Math.hypot(10, 10), 9);
    const engine = analyzeProgram(source);
    expect(engine.bounds.min.z).toBeNull();
    expect(engine.bounds.max.z).toBeNull();
    expect(engine.rapidLength).toBe(0);
  });

  it("2. G43 lines: unsplit, the reference loses the Z25 of `G43 H1 Z25` and with it the plunge", () => {
    const source = ["G21 G90 G17 G94 G54", "G0 X0 Y0", "G43 H1 Z25", "G1 Z-1 F100", "M30"].join("\n");
    const unsplit = reference(source, 1);
    // Z was never known to it before the plunge, so the plunge has no length and Z25 is not in its bounds.
    expect(unsplit.feed).toBe(0);
    expect(unsplit.max.z).toBe(-1);
    const split = reference(splitLengthOffsetLines(source), 1);
    expect(split.feed).toBeCloseTo(26, 9);
    const engine = analyzeProgram(source);
    expect(engine.feedLength).toBeCloseTo(26, 9);
    expect(engine.bounds.max.z).toBeCloseTo(25, 9);
  });

  it("3. canned cycles: the reference draws the hole positions as rapids and no feed at all", () => {
    const source = ["G21 G90 G17 G94 G54", "G0 X0 Y0 Z25", "G99 G81 X10 Y10 Z-5 R2 F100", "X20", "G80", "M30"].join("\n");
    const ref = reference(source, 1);
    expect(ref.feed).toBe(0);
    const engine = analyzeProgram(source);
    // [NIST] 3.5.16.2: each G81 hole feeds from R 2 to Z-5: 2 holes x 7 = 14.
    expect(engine.feedLength).toBeCloseTo(14, 9);
    expect(engine.cuttingBounds.min.z).toBeCloseTo(-5, 9);
  });

  it("4. units: the reference works in millimetres, the engine in the program's inches", () => {
    const source = readFixture("inch.nc");
    const mm = reference(splitLengthOffsetLines(source), 1);
    const engine = analyzeProgram(source);
    expect(engine.units).toBe("inch");
    expect(mm.feed / 25.4).toBeCloseTo(engine.feedLength, 6);
  });
});
