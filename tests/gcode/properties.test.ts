/**
 * Property tests (fast-check) over random valid programs: straight moves, centre-format arcs in all three planes
 * (end point placed on the circle [GEO]), incremental stretches and comments.
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { analyzeProgram } from "../../lib/gcode/index";
import { MotionKind, type Analysis, type Bounds } from "../../lib/gcode/types";

type Move =
  | { kind: "line"; rapid: boolean; x?: number; y?: number; z?: number }
  | { kind: "arc"; plane: 17 | 18 | 19; ccw: boolean; i: number; j: number; angle: number; rise: number }
  | { kind: "inc"; dx: number; dy: number; dz: number }
  | { kind: "comment"; text: string };

interface Program {
  start: { x: number; y: number; z: number };
  moves: Move[];
}

const coord = fc.integer({ min: -20000, max: 20000 }).map((n) => n / 100);
const small = fc.integer({ min: -500, max: 500 }).map((n) => n / 100);
const radiusPart = fc.integer({ min: 50, max: 2000 }).map((n) => (n / 100) * (n % 2 === 0 ? 1 : -1));

const move: fc.Arbitrary<Move> = fc.oneof(
  fc.record(
    {
      kind: fc.constant("line" as const),
      rapid: fc.boolean(),
      x: coord,
      y: coord,
      z: coord,
    },
    { requiredKeys: ["kind", "rapid"] },
  ),
  fc.record({
    kind: fc.constant("arc" as const),
    plane: fc.constantFrom(17 as const, 18 as const, 19 as const),
    ccw: fc.boolean(),
    i: radiusPart,
    j: radiusPart,
    angle: fc.integer({ min: 5, max: 355 }),
    rise: small,
  }),
  fc.record({ kind: fc.constant("inc" as const), dx: small, dy: small, dz: small }),
  fc.record({
    kind: fc.constant("comment" as const),
    text: fc.string({ maxLength: 20 }).map((s) => s.replace(/[()\r\n]/g, "")),
  }),
);

const program: fc.Arbitrary<Program> = fc.record({
  start: fc.record({ x: coord, y: coord, z: coord }),
  moves: fc.array(move, { minLength: 1, maxLength: 25 }),
});

/**
 * Writes the program in mm, or in inches (every length / 25.4); `shift` is added to every absolute X/Y/Z.
 * Arc end points are computed here so that the text of every version is a valid arc.
 */
function render(p: Program, opts: { inch?: boolean; shift?: [number, number, number] } = {}): string {
  const s = opts.inch ? 1 / 25.4 : 1;
  const [sx, sy, sz] = opts.shift ?? [0, 0, 0];
  const num = (v: number) => (v * s).toFixed(opts.inch ? 7 : 5);
  const out: string[] = [opts.inch ? "G20 G17 G90 G94 G40 G49 G80" : "G21 G17 G90 G94 G40 G49 G80", "G54", "F500"];
  // The current point in unshifted program units (mm), tracked to place arc end points.
  const pos = { ...p.start };
  out.push(`G0 X${num(pos.x + sx)} Y${num(pos.y + sy)} Z${num(pos.z + sz)}`);
  for (const m of p.moves) {
    if (m.kind === "line") {
      const words: string[] = [m.rapid ? "G0" : "G1"];
      if (m.x !== undefined) (pos.x = m.x), words.push(`X${num(m.x + sx)}`);
      if (m.y !== undefined) (pos.y = m.y), words.push(`Y${num(m.y + sy)}`);
      if (m.z !== undefined) (pos.z = m.z), words.push(`Z${num(m.z + sz)}`);
      if (words.length === 1) continue;
      out.push(words.join(" "));
    } else if (m.kind === "inc") {
      pos.x += m.dx;
      pos.y += m.dy;
      pos.z += m.dz;
      out.push(`G91 G1 X${num(m.dx)} Y${num(m.dy)} Z${num(m.dz)}`, "G90");
    } else if (m.kind === "arc") {
      // Plane axes (a, b) and the normal axis n.
      const [a, b, n] = m.plane === 17 ? (["x", "y", "z"] as const) : m.plane === 18 ? (["z", "x", "y"] as const) : (["y", "z", "x"] as const);
      const ca = pos[a] + m.i;
      const cb = pos[b] + m.j;
      const r = Math.hypot(m.i, m.j);
      const a0 = Math.atan2(pos[b] - cb, pos[a] - ca);
      const a1 = a0 + ((m.ccw ? 1 : -1) * m.angle * Math.PI) / 180;
      // The end point is rounded to 0.01 and the centre is then moved onto the perpendicular bisector of the
      // chord (same side, same radius), so that both ends are equally far from the written centre.
      const ea = Math.round((ca + r * Math.cos(a1)) * 100) / 100;
      const eb = Math.round((cb + r * Math.sin(a1)) * 100) / 100;
      const en = pos[n] + m.rise;
      const mx = (pos[a] + ea) / 2;
      const my = (pos[b] + eb) / 2;
      const dx = ea - pos[a];
      const dy = eb - pos[b];
      const chord = Math.hypot(dx, dy);
      if (chord < 0.05) continue;
      const side = (ca - mx) * -dy + (cb - my) * dx >= 0 ? 1 : -1;
      const h = Math.sqrt(Math.max(r * r - (chord / 2) ** 2, 0));
      const cx = mx + (side * -dy * h) / chord;
      const cy = my + (side * dx * h) / chord;
      const off = { [a]: cx - pos[a], [b]: cy - pos[b] } as Record<"x" | "y" | "z", number>;
      const centre = m.plane === 17 ? `I${num(off.x!)} J${num(off.y!)}` : m.plane === 18 ? `I${num(off.x!)} K${num(off.z!)}` : `J${num(off.y!)} K${num(off.z!)}`;
      const end = { ...pos, [a]: ea, [b]: eb, [n]: en };
      out.push(
        `G${m.plane} G${m.ccw ? 3 : 2} X${num(end.x + sx)} Y${num(end.y + sy)} Z${num(end.z + sz)} ${centre}`,
        "G17",
      );
      Object.assign(pos, end);
    } else {
      out.push(`(${m.text})`);
    }
  }
  out.push("M30");
  return out.join("\n") + "\n";
}

function drawnVertices(a: Analysis): Array<[number, number, number]> {
  const t = a.toolpath;
  const out: Array<[number, number, number]> = [];
  for (let i = 0; i < t.segmentCount; i++) {
    const k = t.kind[i];
    if (k === MotionKind.Jump || k === MotionKind.Machine) continue;
    for (const v of [i, i + 1]) out.push([t.positions[3 * v]!, t.positions[3 * v + 1]!, t.positions[3 * v + 2]!]);
  }
  return out;
}

function expectBoundsClose(b: Bounds, want: Bounds, tol: number) {
  for (const side of ["min", "max"] as const) {
    for (const axis of ["x", "y", "z"] as const) {
      const got = b[side][axis];
      const exp = want[side][axis];
      if (exp === null) expect(got).toBeNull();
      else expect(Math.abs(got! - exp), `${side}.${axis}`).toBeLessThanOrEqual(tol);
    }
  }
}

// GCODE_PROPERTY_RUNS raises the number of cases for a deeper local run; the suite default keeps it quick.
const scale = Math.max(1, Number(process.env.GCODE_PROPERTY_RUNS ?? 60) / 60);
const runs = { numRuns: Math.round(60 * scale) };

describe("properties of the analysis", () => {
  it("random valid programs never throw and are not reported as invalid arcs", () => {
    fc.assert(
      fc.property(program, (p) => {
        const a = analyzeProgram(render(p));
        expect(a.findings.filter((f) => f.rule === "arc-invalid" || f.rule === "arc-radius-mismatch")).toEqual([]);
      }),
      runs,
    );
  });

  it("any text at all never throws", () => {
    fc.assert(
      fc.property(fc.string({ maxLength: 400 }), (s) => {
        analyzeProgram(s);
      }),
      { numRuns: Math.round(300 * scale) },
    );
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 400 }), (bytes) => {
        analyzeProgram(bytes);
      }),
      { numRuns: Math.round(300 * scale) },
    );
  });

  it("random word salad of real letters and codes never throws", () => {
    const word = fc.tuple(fc.constantFrom(..."GMXYZIJKRFSTHDPQLNO#[]/;%".split("")), fc.double({ min: -1e6, max: 1e6, noNaN: true }));
    fc.assert(
      fc.property(fc.array(fc.array(word, { maxLength: 12 }), { maxLength: 40 }), (lines) => {
        analyzeProgram(lines.map((ws) => ws.map(([l, v]) => `${l}${v}`).join(" ")).join("\n"));
      }),
      { numRuns: Math.round(200 * scale) },
    );
  });

  it("the bounds contain every toolpath vertex", () => {
    fc.assert(
      fc.property(program, (p) => {
        const a = analyzeProgram(render(p));
        const b = a.bounds;
        for (const v of drawnVertices(a)) {
          (["x", "y", "z"] as const).forEach((axis, k) => {
            const tol = 1e-4 * Math.max(1, Math.abs(v[k]!));
            expect(v[k]!).toBeGreaterThanOrEqual(b.min[axis]! - tol);
            expect(v[k]!).toBeLessThanOrEqual(b.max[axis]! + tol);
          });
        }
      }),
      runs,
    );
  });

  it("translating a program translates its bounds and keeps its lengths", () => {
    fc.assert(
      fc.property(program, fc.tuple(coord, coord, coord), (p, shift) => {
        const a = analyzeProgram(render(p));
        const b = analyzeProgram(render(p, { shift }));
        const [dx, dy, dz] = shift;
        const moved: Bounds = {
          min: { x: a.bounds.min.x! + dx, y: a.bounds.min.y! + dy, z: a.bounds.min.z! + dz },
          max: { x: a.bounds.max.x! + dx, y: a.bounds.max.y! + dy, z: a.bounds.max.z! + dz },
        };
        expectBoundsClose(b.bounds, moved, 1e-6);
        expect(Math.abs(b.feedLength - a.feedLength)).toBeLessThanOrEqual(1e-6 * Math.max(1, a.feedLength));
        expect(Math.abs(b.rapidLength - a.rapidLength)).toBeLessThanOrEqual(1e-6 * Math.max(1, a.rapidLength));
      }),
      runs,
    );
  });

  it("a radius-format arc is the same arc as its centre-format twin, in every plane", () => {
    // [NIST] 3.5.3.1: R > 0 for at most 180 degrees, R < 0 for more; sweeps kept inside the well-conditioned
    // ranges the report names (up to 165 and from 195 to 345 degrees).
    const arc = fc.record({
      plane: fc.constantFrom(17, 18, 19),
      ccw: fc.boolean(),
      r: fc.integer({ min: 100, max: 5000 }).map((n) => n / 100),
      start: fc.integer({ min: 0, max: 359 }),
      sweep: fc.oneof(fc.integer({ min: 10, max: 165 }), fc.integer({ min: 195, max: 345 })),
    });
    fc.assert(
      fc.property(arc, ({ plane, ccw, r, start, sweep }) => {
        const a0 = (start * Math.PI) / 180;
        const a1 = a0 + ((ccw ? 1 : -1) * sweep * Math.PI) / 180;
        // Centre at the origin of the plane; start and end on the circle, written to 6 decimals.
        const f = (v: number) => v.toFixed(6);
        const [sa, sb, ea, eb] = [r * Math.cos(a0), r * Math.sin(a0), r * Math.cos(a1), r * Math.sin(a1)].map(f);
        const axes = plane === 17 ? ["X", "Y", "I", "J"] : plane === 18 ? ["Z", "X", "K", "I"] : ["Y", "Z", "J", "K"];
        const [A, B, CA, CB] = axes as [string, string, string, string];
        const startLine = `G0 ${A}${sa} ${B}${sb}` + (plane === 17 ? " Z0" : plane === 18 ? " Y0" : " X0");
        const g = ccw ? "G3" : "G2";
        const centre = `G${plane} ${g} ${A}${ea} ${B}${eb} ${CA}${f(-Number(sa))} ${CB}${f(-Number(sb))}`;
        const radius = `G${plane} ${g} ${A}${ea} ${B}${eb} R${f(sweep > 180 ? -r : r)}`;
        const prog = (move: string) => ["G21 G90 G94 G54 F100", "G17 G0 X0 Y0 Z0", startLine, move, "G17", "M30"].join("\n");
        const c = analyzeProgram(prog(centre));
        const q = analyzeProgram(prog(radius));
        expect(q.findings.filter((x) => x.rule.startsWith("arc-"))).toEqual([]);
        // [GEO] length r * sweep.
        expect(c.feedLength).toBeCloseTo((r * sweep * Math.PI) / 180, 3);
        expect(q.feedLength).toBeCloseTo(c.feedLength, 4);
        expectBoundsClose(q.cuttingBounds, c.cuttingBounds, 1e-4);
      }),
      { numRuns: Math.round(150 * scale) },
    );
  });

  it("the mm and inch versions of one program agree after scaling by 25.4", () => {
    fc.assert(
      fc.property(program, (p) => {
        const mm = analyzeProgram(render(p));
        const inch = analyzeProgram(render(p, { inch: true }));
        expect(mm.units).toBe("mm");
        expect(inch.units).toBe("inch");
        const scaled: Bounds = {
          min: { x: inch.bounds.min.x! * 25.4, y: inch.bounds.min.y! * 25.4, z: inch.bounds.min.z! * 25.4 },
          max: { x: inch.bounds.max.x! * 25.4, y: inch.bounds.max.y! * 25.4, z: inch.bounds.max.z! * 25.4 },
        };
        // Inch values are written to 7 decimals: 25.4 x 5e-8 = 1.3e-6 mm per number.
        expectBoundsClose(mm.bounds, scaled, 1e-4);
        expect(Math.abs(inch.feedLength * 25.4 - mm.feedLength)).toBeLessThanOrEqual(1e-4 * Math.max(1, mm.feedLength));
        expect(Math.abs(inch.rapidLength * 25.4 - mm.rapidLength)).toBeLessThanOrEqual(1e-4 * Math.max(1, mm.rapidLength));
        // F500 in/min vs mm/min is not the same feed, so times are not compared.
      }),
      runs,
    );
  });
});
