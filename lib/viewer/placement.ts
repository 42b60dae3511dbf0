/**
 * Machine space: each work offset's part placed at its origin, in the program's units, with the machine's travel
 * box. An origin comes from the program itself when it sets it (G10: what the control will use when it runs), else
 * from the value entered at the machine (machine_work_offsets, the machine's units), else it is not known and that
 * part is not placed.
 */
import type { Units } from "../gcode/types";

export interface Xyz {
  x: number;
  y: number;
  z: number;
}

/** A value entered at the machine: machine coordinates of part zero, machine units. */
export interface EnteredOffset extends Xyz {
  code: string;
}

export type OriginSource = "program" | "machine" | null;

export interface Placement {
  /** Per offset index: the origin in program units, or null when not known. */
  origins: (Xyz | null)[];
  sources: OriginSource[];
  /** Codes of the offsets that cannot be placed. */
  unknown: string[];
}

/** Factor from `from` units to `to` units. */
export function unitFactor(from: Units, to: Units): number {
  if (from === to) return 1;
  return from === "mm" ? 1 / 25.4 : 25.4;
}

export function placeOffsets(
  offsets: readonly { code: string; origin: Xyz | null }[],
  entered: readonly EnteredOffset[],
  machineUnits: Units,
  programUnits: Units,
): Placement {
  const f = unitFactor(machineUnits, programUnits);
  const byCode = new Map(entered.map((e) => [normalizeCode(e.code), e]));
  const origins: (Xyz | null)[] = [];
  const sources: OriginSource[] = [];
  const unknown: string[] = [];
  for (const o of offsets) {
    const set = byCode.get(normalizeCode(o.code));
    if (o.origin) {
      origins.push({ ...o.origin });
      sources.push("program");
    } else if (set) {
      origins.push({ x: set.x * f, y: set.y * f, z: set.z * f });
      sources.push("machine");
    } else {
      origins.push(null);
      sources.push(null);
      unknown.push(o.code);
    }
  }
  return { origins, sources, unknown };
}

/** "G54.1 P3" and "g54.1p3" name one offset. */
export function normalizeCode(code: string): string {
  return code.toUpperCase().replace(/\s+/g, "");
}

/** The machine's travel in program units, as a box. */
export function travelBox(
  travel: { x: { min: number; max: number }; y: { min: number; max: number }; z: { min: number; max: number } },
  machineUnits: Units,
  programUnits: Units,
): { min: Xyz; max: Xyz } {
  const f = unitFactor(machineUnits, programUnits);
  return {
    min: { x: travel.x.min * f, y: travel.y.min * f, z: travel.z.min * f },
    max: { x: travel.x.max * f, y: travel.y.max * f, z: travel.z.max * f },
  };
}

/** A box that grows point by point (min > max while empty). */
export class Box3 {
  min: Xyz = { x: Infinity, y: Infinity, z: Infinity };
  max: Xyz = { x: -Infinity, y: -Infinity, z: -Infinity };
  get empty(): boolean {
    return this.min.x > this.max.x;
  }
  add(x: number, y: number, z: number): this {
    if (x < this.min.x) this.min.x = x;
    if (y < this.min.y) this.min.y = y;
    if (z < this.min.z) this.min.z = z;
    if (x > this.max.x) this.max.x = x;
    if (y > this.max.y) this.max.y = y;
    if (z > this.max.z) this.max.z = z;
    return this;
  }
  union(b: { min: Xyz; max: Xyz }): this {
    if (b.min.x > b.max.x) return this;
    this.add(b.min.x, b.min.y, b.min.z);
    return this.add(b.max.x, b.max.y, b.max.z);
  }
}

/**
 * Per-offset boxes of the drawable segments (part coordinates), one pass over the path: what the view fits to
 * and where each part's safe-Z plane goes.
 */
export function offsetBoxes(
  path: { segmentCount: number; positions: Float32Array; kind: Uint8Array; offset: Uint8Array },
  offsetCount: number,
  jumpKind: number,
): Box3[] {
  const boxes = Array.from({ length: offsetCount }, () => new Box3());
  const p = path.positions;
  for (let i = 0; i < path.segmentCount; i++) {
    if (path.kind[i] === jumpKind) continue;
    const b = boxes[path.offset[i]!];
    if (!b) continue;
    const v = i * 3;
    b.add(p[v]!, p[v + 1]!, p[v + 2]!);
    b.add(p[v + 3]!, p[v + 4]!, p[v + 5]!);
  }
  return boxes;
}

/** The box of the shown offsets, each moved by its origin (machine space) or not (part space). */
export function sceneBox(boxes: readonly Box3[], shown: (i: number) => boolean, origins: readonly (Xyz | null)[] | null): Box3 {
  const out = new Box3();
  boxes.forEach((b, i) => {
    if (b.empty || !shown(i)) return;
    if (!origins) return void out.union(b);
    const o = origins[i];
    if (!o) return;
    out.add(b.min.x + o.x, b.min.y + o.y, b.min.z + o.z);
    out.add(b.max.x + o.x, b.max.y + o.y, b.max.z + o.z);
  });
  return out;
}
