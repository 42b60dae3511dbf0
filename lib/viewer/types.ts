/**
 * What the 3D backplot works on: the engine's toolpath with its time columns (one segment per row) and a small
 * summary of the analysis. Built either from the toolpath route's binary answer (toolpath-format.ts) or from an
 * analysis run in the browser (from-analysis.ts); everything downstream is the same.
 */
import type { Bounds, RuleId, Severity, Units } from "../gcode/types";

/** The toolpath columns, laid out as the engine's `Toolpath` (lib/gcode/README.md "Toolpath layout"). */
export interface ViewerPath {
  segmentCount: number;
  /** xyz per vertex (segmentCount + 1 vertices, none without segments), part coordinates, program units. */
  positions: Float32Array;
  line: Uint32Array;
  kind: Uint8Array;
  tool: Uint16Array;
  offset: Uint8Array;
  /** Seconds from the program's start to the end of each segment's motion. */
  time: Float32Array;
  /** Seconds at the start of each segment's motion (a pause before it shows as a gap after `time[i - 1]`). */
  startTime: Float32Array;
}

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
