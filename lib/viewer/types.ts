/**
 * What the 3D backplot works on: the engine's toolpath with its time columns (one segment per row) and a small
 * summary of the analysis. Built either from the toolpath route's binary answer (toolpath-format.ts) or from an
 * analysis run in the browser (from-analysis.ts); everything downstream is the same.
 */
import type { Bounds, RuleId, Severity, Toolpath, Units } from "../gcode/types";

/**
 * The engine's toolpath columns (lib/gcode/README.md "Toolpath layout") with its time columns present, which the
 * engine writes only with the option `segmentTimes`.
 */
export type ViewerPath = Pick<Toolpath, "segmentCount" | "positions" | "line" | "kind" | "tool" | "offset"> & Required<Pick<Toolpath, "time" | "startTime">>;

/** A finding placed on the path: at the end of its line's first drawn segment, else where the tool is when it runs. */
export interface ViewerFinding {
  rule: RuleId;
  severity: Severity;
  line: number;
  message: string;
  hint: string;
  /** The segment it sits on, or -1 when the path has none (a finding on the whole program, an empty path). */
  segment: number;
  /** At the segment's end (the line's own move) or its start (the tool's position when the line runs). */
  atEnd: boolean;
}

/** What the viewer needs of the analysis besides the path. */
export interface ViewerMeta {
  /** ENGINE_VERSION that made the path. */
  engineVersion: number;
  units: Units;
  lineCount: number;
  chordTolerance: number;
  safeZ: number;
  totalSeconds: number;
  bounds: Bounds;
  /** Index = `ViewerPath.tool`. */
  tools: { number: number; description: string | null }[];
  /** Index = `ViewerPath.offset`; `origin` only when the program sets it itself (G10) or it was given. */
  workOffsets: { code: string; origin: { x: number; y: number; z: number } | null }[];
  findings: ViewerFinding[];
  /** The engine stopped adding segments (toolpath-truncated). */
  truncated: boolean;
}
