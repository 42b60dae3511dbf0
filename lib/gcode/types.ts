/**
 * Public contract of the Cyclegate analysis engine. Keep stable: add fields, never rename.
 *
 * Conventions
 * - Line numbers are 1-based physical lines of the file (CR, LF and CRLF each end one line).
 * - Lengths, positions and bounds are in the program's units (`Analysis.units`).
 * - Program/part coordinates: coordinates in the active work offset (G54...), with any G52/G92 shift applied,
 *   i.e. the position of the tool tip relative to part zero. Machine coordinates are only known where the work
 *   offset values are known (from options or a G10 in the program).
 */

/** Length units. */
export type Units = "mm" | "inch";

/**
 * Dialect the program is read in (README "Dialects"): "common" is the word-address dialect most posts write for
 * industrial controls (the default); "strict-ngc" is the [NIST] RS274/NGC interpreter's, to the letter.
 */
export type Dialect = "common" | "strict-ngc";

/** Every dialect, default first. */
export const DIALECTS: readonly Dialect[] = ["common", "strict-ngc"];

/** Severity of a finding. */
export type Severity = "error" | "warning" | "info";

/** Every rule id the engine can report. */
export type RuleId =
  | "offset-not-set"
  | "rapid-below-safe-z"
  | "length-offset-mismatch"
  | "length-offset-missing"
  | "arc-radius-mismatch"
  | "arc-invalid"
  | "modal-conflict"
  | "feed-missing"
  | "spindle-off-cut"
  | "fixture-mismatch"
  | "tool-change-low"
  | "units-missing"
  | "program-end-missing"
  | "incremental-left-on"
  | "over-travel"
  | "feed-over-limit"
  | "spindle-over-limit"
  | "cycle-r-below-z"
  | "comp-invalid"
  | "unknown-code"
  | "not-evaluated"
  // additions a practitioner expects
  | "tool-not-loaded"
  | "dwell-invalid"
  | "line-too-long"
  | "subprogram-missing"
  | "subprogram-invalid"
  | "comp-left-on"
  | "word-invalid"
  | "cycle-invalid"
  | "offset-invalid"
  | "arc-start-unknown"
  | "spindle-invalid"
  | "tool-invalid"
  | "code-after-end"
  | "coordinate-shift"
  | "execution-limit"
  | "toolpath-truncated"
  | "assumption";

/** Every rule id, in a stable order (handy for UIs and tests). */
export const RULE_IDS: readonly RuleId[] = [
  "offset-not-set",
  "rapid-below-safe-z",
  "length-offset-mismatch",
  "length-offset-missing",
  "arc-radius-mismatch",
  "arc-invalid",
  "modal-conflict",
  "feed-missing",
  "spindle-off-cut",
  "fixture-mismatch",
  "tool-change-low",
  "units-missing",
  "program-end-missing",
  "incremental-left-on",
  "over-travel",
  "feed-over-limit",
  "spindle-over-limit",
  "cycle-r-below-z",
  "comp-invalid",
  "unknown-code",
  "not-evaluated",
  "tool-not-loaded",
  "dwell-invalid",
  "line-too-long",
  "subprogram-missing",
  "subprogram-invalid",
  "comp-left-on",
  "word-invalid",
  "cycle-invalid",
  "offset-invalid",
  "arc-start-unknown",
  "spindle-invalid",
  "tool-invalid",
  "code-after-end",
  "coordinate-shift",
  "execution-limit",
  "toolpath-truncated",
  "assumption",
];

/** Machine profile; mirrors the machines table. Lengths and speeds are in the machine's units. */
export interface MachineProfile {
  /** Units of every length/speed below. */
  units: Units;
  /** Travel limits in machine coordinates. */
  travel: { x: { min: number; max: number }; y: { min: number; max: number }; z: { min: number; max: number } };
  /** Rapid traverse rate, units/min. */
  rapidRate: number;
  /** Highest programmable feed, units/min. */
  maxFeed: number;
  /** Highest spindle speed, rpm. */
  maxSpindle: number;
  /** Axis acceleration used by the time estimate, units/s^2. */
  acceleration: number;
  /** Seconds per tool change. */
  toolChangeSeconds: number;
  /** Tool changes are done by hand (the control stops at M6). */
  manualToolChange: boolean;
  /** The program starts and stops the spindle (M3/M4/M5); when false, cutting with the spindle "off" is only a warning. */
  spindleProgramControlled: boolean;
  /** The tool length offset number H must equal the tool number T. */
  hMustEqualT: boolean;
  /** Default safe Z above part zero. */
  safeZ: number;
  /** How many work offsets the control has (6 = G54..G59; more means G54.1 Pn is available). */
  workOffsetCount: number;
  /** Dialect of the control (default "common"). */
  dialect?: Dialect;
  /**
   * Largest accepted difference between an arc's start and end radius, and the most a radius-format R may fall
   * short of half the chord and still be read as a half circle; machine units. Absent: the dialect's default
   * (common 0.02 mm / 0.001 in, strict-ngc [NIST]'s 0.002 mm / 0.0002 in).
   */
  arcTolerance?: number;
}

/** Options of analyzeProgram. */
export interface AnalyzeOptions {
  /** Machine profile; without one the engine uses documented defaults and lists them in `assumptions`. */
  machine?: MachineProfile;
  /** Safe Z for this program, program units; overrides the profile's. Default 0 (part zero on the top face). */
  safeZ?: number;
  /**
   * The program's parts per cycle: identical parts cut under successive work offsets. Default: found from the
   * program (README "Multi-part programs"), else 1.
   */
  parts?: number;
  /** Dialect; overrides the profile's (default "common"). */
  dialect?: Dialect;
  /** Arc radius tolerance in program units; overrides the profile's (see MachineProfile.arcTolerance). */
  arcTolerance?: number;
  /** Known work offset values: "G54", "G55", "G54.1 P3" -> machine coordinates of part zero, program units. */
  workOffsets?: Record<string, { x: number; y: number; z: number }>;
  /** Arc flattening tolerance for the toolpath, program units (default 0.01 mm / 0.0005 in). */
  chordTolerance?: number;
  /** Block delete switch: when true, lines starting with "/" are skipped (default false: they run). */
  blockDelete?: boolean;
  /** Most findings listed per rule (default 50); the rest are only counted in `findingCounts`. */
  maxFindingsPerRule?: number;
  /** Build the toolpath (default true). */
  toolpath?: boolean;
  /**
   * Add the time columns `Toolpath.time` and `Toolpath.startTime` (default false): where each segment's motion
   * starts and ends on the time estimate's clock, for playback. Nothing else in the analysis changes.
   */
  segmentTimes?: boolean;
}

/** A point; each axis may be null when it is not known. */
export interface Vec3N {
  x: number | null;
  y: number | null;
  z: number | null;
}

/** A point with all axes known. */
export interface Vec3 {
  x: number;
  y: number;
  z: number;
}

/**
 * Axis-aligned bounds. An axis with no data is null in both `min` and `max`
 * (an axis the program never set contributes nothing).
 */
export interface Bounds {
  /** Lowest value per axis. */
  min: Vec3N;
  /** Highest value per axis. */
  max: Vec3N;
}

/** One finding. */
export interface Finding {
  /** Rule id. */
  rule: RuleId;
  /** error | warning | info. */
  severity: Severity;
  /** 1-based physical line (0 when the finding concerns the whole program, e.g. program-end-missing on an empty file). */
  line: number;
  /** What is wrong, in plain words. */
  message: string;
  /** What to do about it. */
  hint: string;
}

/** Count of findings per rule, including those not listed. */
export interface FindingCount {
  /** Rule id. */
  rule: RuleId;
  /** Severity of the rule's findings (the highest seen). */
  severity: Severity;
  /** How many times the rule fired. */
  count: number;
  /** How many of them are listed in `findings`. */
  listed: number;
}

/** Time estimate, seconds. */
export interface TimeBreakdown {
  /** Programmed-feed time: length / F (G94) or 1/F minutes per move (G93), no acceleration. */
  feedSeconds: number;
  /** Rapid length / rapid rate, no acceleration. */
  rapidSeconds: number;
  /** Dwell time (G4 and cycle dwells). */
  dwellSeconds: number;
  /** Tool change time (changes x toolChangeSeconds); always 0 per work offset: changes are reported apart. */
  toolChangeSeconds: number;
  /** Machine-aware estimate: trapezoidal speed profile per move + tool changes + dwells (stops excluded). */
  totalSeconds: number;
}

/** One work offset the program used (or the default one it ran in). */
export interface WorkOffsetSummary {
  /** "G54" ... "G59", "G59.1" ... "G59.3", "G54.1 P7". */
  code: string;
  /** Coordinate system number: 1 = G54 ... 6 = G59, 7-9 = G59.1-G59.3, 100 + n = G54.1 Pn. */
  number: number;
  /** Line where the program selected it; null when the program moved in it without selecting it (default G54). */
  firstLine: number | null;
  /** First line of a motion under it, or null. */
  firstMotionLine: number | null;
  /** Last line of a motion under it, or null. */
  lastLine: number | null;
  /** Machine coordinates of part zero, when known (from options, or a G10 L2/L20 in the program); else null. */
  origin: Vec3 | null;
  /** Where `origin` comes from. */
  originSource: "options" | "program" | null;
  /** Bounds of all motion under it, part coordinates. */
  bounds: Bounds;
  /** Bounds of cutting motion (feeds, arcs, cycle feeds) under it. */
  cuttingBounds: Bounds;
  /** Tool numbers that moved under it, in order of first use. */
  tools: number[];
  /** Cutting length (feeds, arcs, cycle feeds). */
  feedLength: number;
  /** Rapid length. */
  rapidLength: number;
  /** Time of the moves and dwells under this offset (tool changes and machine moves are not charged to offsets). */
  time: TimeBreakdown;
}

/** One tool the program loaded or selected. */
export interface ToolSummary {
  /** Tool number T. */
  number: number;
  /** Description from the tool comment the post wrote, or null. */
  description: string | null;
  /** Line of the comment the description came from, or null. */
  descriptionLine: number | null;
  /** Tool length offset numbers (H) used with this tool, in order of first use. */
  lengthOffsets: number[];
  /** Cutter comp offset numbers (D) used with this tool. */
  diameterOffsets: number[];
  /** Spindle speed range (rpm) while cutting with this tool, or null. */
  spindle: { min: number; max: number } | null;
  /** Feed range (units/min in G94, or inverse-time F in G93) while cutting, or null. */
  feed: { min: number; max: number } | null;
  /** Cutting length. */
  feedLength: number;
  /** Rapid length. */
  rapidLength: number;
  /** Time with this tool (the change to it counts to it). */
  time: TimeBreakdown;
  /** Lowest Z reached (part coordinates), or null. */
  lowestZ: number | null;
  /** First line where the tool was loaded or moved. */
  firstLine: number;
  /** Last line where it moved (or was loaded). */
  lastLine: number;
  /** How many times it was loaded by M6. */
  loads: number;
  /** Work offset codes it moved under. */
  offsets: string[];
  /** Bounds of all motion with it. */
  bounds: Bounds;
  /** Bounds of cutting motion with it. */
  cuttingBounds: Bounds;
}

/** One M6 tool change. */
export interface ToolChange {
  /** Line of the M6. */
  line: number;
  /** Tool loaded (T number), or null when no T had been selected. */
  tool: number | null;
  /** Tool in the spindle before, or null. */
  previous: number | null;
}

/** Motion kinds, per toolpath segment. */
export const MotionKind = {
  /** G0. */
  Rapid: 0,
  /** G1 (and G38.2). */
  Feed: 1,
  /** One chord of a G2/G3 arc. */
  Arc: 2,
  /** Feed inside a canned cycle. */
  CycleFeed: 3,
  /** Rapid inside a canned cycle. */
  CycleRapid: 4,
  /** G53 move or the final leg of G28/G30, drawn only when the offset origin is known. */
  Machine: 5,
  /** Not a motion: the path jumps (unknown position in between, offset switch); do not draw. */
  Jump: 6,
} as const;
/** One of the MotionKind values. */
export type MotionKindValue = (typeof MotionKind)[keyof typeof MotionKind];

/** `Toolpath.tool` value when no tool is loaded. */
export const NO_TOOL = 0xffff;

/**
 * Toolpath for the viewer. Layout: a single polyline. Vertex i is `positions[3i..3i+2]`; segment i runs from vertex i
 * to vertex i+1, so there are `segmentCount + 1` vertices (0 when there are no segments). Where the path is not
 * continuous a segment of kind `Jump` links the two pieces: skip it when drawing. Positions are part coordinates of
 * the segment's work offset (`offset[i]`); add `workOffsets[offset[i]].origin` to place a part in machine space.
 * Arrays are exactly as long as the data (views; they may share a larger buffer).
 */
export interface Toolpath {
  /** Number of segments. */
  segmentCount: number;
  /** xyz per vertex, part coordinates, program units. */
  positions: Float32Array;
  /** Per segment: 1-based physical line. */
  line: Uint32Array;
  /** Per segment: MotionKind value. */
  kind: Uint8Array;
  /** Per segment: index into `Analysis.tools`, or NO_TOOL. */
  tool: Uint16Array;
  /** Per segment: index into `Analysis.workOffsets`. */
  offset: Uint8Array;
  /** Arc flattening tolerance used (largest distance from a chord to its arc), program units. */
  chordTolerance: number;
  /**
   * With the option `segmentTimes`: per segment, seconds from the program's start to the end of its motion on the
   * clock of `time.totalSeconds` (trapezoidal moves, tool changes, dwells). Non-decreasing; a Jump ends where it
   * starts. Chords of one arc share the arc's time evenly.
   */
  time?: Float32Array;
  /**
   * With `segmentTimes`: per segment, seconds at the start of its motion. `startTime[i] - time[i - 1]` is the pause
   * before segment i: a tool change, a dwell, or moves that are timed but not drawn.
   */
  startTime?: Float32Array;
}

/** Program stops. */
export interface StopSummary {
  /** M0 count. */
  programStops: number;
  /** M1 count. */
  optionalStops: number;
  /** Lines of the M0/M1/M60 (first 1000). */
  lines: number[];
}

/** Motion in machine coordinates (G53 moves and the final legs of G28/G30), reported apart. */
export interface MachineMoveSummary {
  /** Number of such moves. */
  count: number;
  /** Their lines (first 1000). */
  lines: number[];
  /** Bounds of their end points in machine coordinates (axes they set). */
  bounds: Bounds;
  /** Length of those moves whose start and end are known (needs the offset origin), program units. */
  length: number;
}

/** How much of the program the engine evaluated. */
export interface Coverage {
  /** Physical lines holding code (words, macro syntax or stray characters; not blank, comment-only or % lines). */
  codeLines: number;
  /**
   * Code lines the engine did not evaluate although the control would run them: macro syntax, o-word control
   * blocks, unknown G codes, lines skipped for an error, moves under a coordinate transform it does not apply,
   * lines after the execution limit. Each physical line counts once however often it runs.
   */
  notEvaluatedLines: number;
  /** (codeLines - notEvaluatedLines) / codeLines; 1 for a program without code. Under 1: the analysis is partial. */
  evaluatedShare: number;
  /** The first 1000 of those lines, ascending. */
  lines: number[];
}

/** Result of analyzeProgram. */
export interface Analysis {
  /** ENGINE_VERSION of the engine that made it: a stored analysis with an older number is out of date. */
  version: number;
  /** Dialect the program was read in. */
  dialect: Dialect;
  /** Arc radius tolerance used, report units (in the report units' own mode; see MachineProfile.arcTolerance). */
  arcTolerance: number;
  /** How much of the program was evaluated. */
  coverage: Coverage;
  /** Program units: the first G20/G21, else the machine's, else mm. All lengths are in these units. */
  units: Units;
  /** Whether the program states its units (G20/G21) at all. */
  unitsDeclared: boolean;
  /** Physical lines in the file. */
  lineCount: number;
  /** Size in bytes. */
  byteLength: number;
  /** Blocks executed (subprogram repeats count each time). */
  blocksExecuted: number;
  /** Program number from an O word before the first block, or null. */
  programNumber: number | null;
  /** Line of the M2/M30 that ended the program, or null. */
  endLine: number | null;
  /** Work offsets, in order of first use. Index = `Toolpath.offset`. */
  workOffsets: WorkOffsetSummary[];
  /** Tools, in order of first use. Index = `Toolpath.tool`. */
  tools: ToolSummary[];
  /** M6 tool changes, in order (first 10000). */
  toolChanges: ToolChange[];
  /** Number of M6 tool changes. */
  toolChangeCount: number;
  /** Order of a multi-part program: see README. */
  toolOrder: "by-tool" | "by-part" | "single" | "mixed";
  /** Parts per cycle the analysis assumed (option `parts`, else found from the program, else 1). */
  parts: number;
  /** Bounds of all program-coordinate motion end points and arc extremes (part coordinates). */
  bounds: Bounds;
  /** Bounds of cutting motion only. */
  cuttingBounds: Bounds;
  /** Motion in machine coordinates, reported apart. */
  machineMoves: MachineMoveSummary;
  /** Cutting length: G1, G2/G3 (helix length), cycle feeds. */
  feedLength: number;
  /** Rapid length: G0 and cycle rapids (straight-line). Machine moves are not included. */
  rapidLength: number;
  /** Time estimate. */
  time: TimeBreakdown;
  /** M0/M1 stops, not in `time`. */
  stops: StopSummary;
  /** Counts of motions by kind. */
  motionCounts: { rapid: number; feed: number; arc: number; cycles: number; machine: number };
  /** Spindle speed range over the program (rpm), or null. */
  spindle: { min: number; max: number } | null;
  /** Safe Z used by the checks, program units. */
  safeZ: number;
  /** Findings in line order within each rule; at most `maxFindingsPerRule` per rule. */
  findings: Finding[];
  /** Per-rule counts, including findings not listed. */
  findingCounts: FindingCount[];
  /** Values the engine had to assume (default rapid rate etc.). */
  assumptions: string[];
  /** Toolpath for the viewer. */
  toolpath: Toolpath;
}

/** Toolpath in JSON-safe form: typed arrays as base64 of their little-endian bytes. */
export interface JsonToolpath {
  segmentCount: number;
  chordTolerance: number;
  encoding: "base64-le";
  positions: string;
  line: string;
  kind: string;
  tool: string;
  offset: string;
  /** Only when the toolpath has its time columns (option `segmentTimes`). */
  time?: string;
  startTime?: string;
}

/** Analysis in JSON-safe form (what `--json` prints and what the server stores). */
export type JsonAnalysis = Omit<Analysis, "toolpath"> & { toolpath: JsonToolpath };

/** Result of checkTextProgram. */
export type TextCheck = { ok: true } | { ok: false; reason: string };
