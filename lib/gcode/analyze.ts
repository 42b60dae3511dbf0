import type {
  AnalyzeOptions,
  Analysis,
  Bounds,
  Dialect,
  Finding,
  FindingCount,
  MachineProfile,
  Severity,
  TimeBreakdown,
  ToolChange,
  Toolpath,
  ToolSummary,
  Units,
  WorkOffsetSummary,
} from "./types";
import { MotionKind, NO_TOOL, RULE_IDS } from "./types";
import { HINTS, R } from "./rules";
import {
  ARC_A0,
  ARC_CA,
  ARC_CB,
  ARC_OK,
  ARC_R,
  ARC_RADIUS_TOO_SMALL,
  ARC_REND,
  ARC_SWEEP,
  arcExtremes,
  arcFromCenter,
  arcFromRadius,
  chordCount,
} from "./arc";
import { checkPartOffsets, classifyToolOrder, compareFixtures, findParts, type CutRun } from "./parts";
import { ToolpathColumn } from "./toolpath";
import { ENGINE_VERSION } from "./version";

// Imported constants copied into module constants: a bundler or loader may turn each use of an imported binding
// into a getter call, which the hot loop should not pay.
const K_RAPID: number = MotionKind.Rapid, K_FEED: number = MotionKind.Feed, K_ARC: number = MotionKind.Arc;
const K_CYCLE_FEED: number = MotionKind.CycleFeed, K_CYCLE_RAPID: number = MotionKind.CycleRapid;
const K_MACHINE: number = MotionKind.Machine, K_JUMP: number = MotionKind.Jump;
const NO_TOOL_IDX: number = NO_TOOL;
const A_CA = ARC_CA, A_CB = ARC_CB, A_R = ARC_R, A_A0 = ARC_A0, A_SWEEP = ARC_SWEEP, A_REND = ARC_REND;

// ---- letters -------------------------------------------------------------------------------------------------
const L_A = 0, L_B = 1, L_C = 2, L_D = 3, L_F = 5, L_G = 6, L_H = 7, L_I = 8, L_J = 9, L_K = 10, L_L = 11;
const L_M = 12, L_N = 13, L_O = 14, L_P = 15, L_Q = 16, L_R = 17, L_S = 18, L_T = 19, L_X = 23, L_Y = 24, L_Z = 25;
const B_X = 1 << L_X, B_Y = 1 << L_Y, B_Z = 1 << L_Z;
const B_XYZ = B_X | B_Y | B_Z;
const B_AXES = B_XYZ | (1 << L_A) | (1 << L_B) | (1 << L_C);
const B_F = 1 << L_F, B_S = 1 << L_S, B_T = 1 << L_T, B_N = 1 << L_N, B_O = 1 << L_O;
const B_D = 1 << L_D, B_H = 1 << L_H, B_I = 1 << L_I, B_J = 1 << L_J, B_K = 1 << L_K, B_L = 1 << L_L;
const B_P = 1 << L_P, B_Q = 1 << L_Q, B_R = 1 << L_R;
const B_IJK = B_I | B_J | B_K;
const B_IJKR = B_IJK | B_R;
const B_KNOWN = B_AXES | B_D | B_F | B_H | B_I | B_J | B_K | B_L | B_N | B_O | B_P | B_Q | B_R | B_S | B_T;
const AXIS_OF_LETTER = [L_X, L_Y, L_Z];

// ---- line flags ------------------------------------------------------------------------------------------------
const F_EXPR = 1, F_KEYWORD = 2, F_BADWORD = 4, F_BADCHAR = 8, F_BLOCKDEL = 16, F_PERCENT = 32;
const F_BADCOMMENT = 64, F_OVERFLOW = 128, F_BADCODE = 256, F_TEXT = 512, F_KWEXPR = 1024;
/** Flags that make a line a code line even without a word. */
const F_CODE = F_EXPR | F_KEYWORD | F_BADWORD | F_BADCHAR | F_OVERFLOW | F_BADCODE | F_TEXT | F_KWEXPR;

// ---- keywords: o-word control and macro syntax ------------------------------------------------------------------
const KW_SUB = 1, KW_ENDSUB = 2, KW_CALL = 3, KW_RETURN = 4, KW_IF = 5, KW_ELSEIF = 6, KW_ELSE = 7, KW_ENDIF = 8;
const KW_WHILE = 9, KW_ENDWHILE = 10, KW_DO = 11, KW_REPEAT = 12, KW_ENDREPEAT = 13, KW_BREAK = 14, KW_CONTINUE = 15;
/** Keywords that stand alone on a macro line (GOTO 10, END 1). */
const KW_MACRO = 16;
/** Keywords that only belong inside an expression or a condition (EQ, SIN, THEN ...): at or above this id. */
const KW_EXPR = 17;
/** Letter runs of up to 10 letters, base 27: exact in a double. */
function letterHash(s: string): number {
  let h = 0;
  for (let i = 0; i < s.length; i++) h = h * 27 + ((s.charCodeAt(i) | 32) - 96);
  return h;
}
const KEYWORDS = new Map<number, number>();
(
  [
    ["sub", KW_SUB], ["endsub", KW_ENDSUB], ["call", KW_CALL], ["return", KW_RETURN], ["if", KW_IF],
    ["elseif", KW_ELSEIF], ["else", KW_ELSE], ["endif", KW_ENDIF], ["while", KW_WHILE], ["endwhile", KW_ENDWHILE],
    ["do", KW_DO], ["repeat", KW_REPEAT], ["endrepeat", KW_ENDREPEAT], ["break", KW_BREAK], ["continue", KW_CONTINUE],
    ["goto", KW_MACRO], ["end", KW_MACRO],
  ] as const
).forEach(([w, id]) => KEYWORDS.set(letterHash(w), id));
for (const w of [
  "then", "eq", "ne", "gt", "ge", "lt", "le", "and", "or", "xor", "mod", "sin", "cos", "tan", "asin", "acos", "atan",
  "sqrt", "abs", "round", "fix", "fup", "exp", "ln", "bin", "bcd", "exists", "pow",
]) {
  KEYWORDS.set(letterHash(w), KW_EXPR);
}
/** Keyword id of the letters b[s, e), or 0. */
function keywordAt(b: Uint8Array, s: number, e: number): number {
  if (e - s > 10) return 0;
  let h = 0;
  for (let i = s; i < e; i++) h = h * 27 + ((b[i]! | 32) - 96);
  return KEYWORDS.get(h) ?? 0;
}
/** Key of a named o-word `o<name>`: a negative number, so that it never meets a numbered O. Case does not matter. */
function nameKey(b: Uint8Array, s: number, e: number): number {
  let h = 0;
  for (let i = s; i < e; i++) {
    const c = b[i]!;
    h = (h * 131 + (c >= 65 && c <= 90 ? c + 32 : c)) % 1099511627776;
  }
  return -1 - h;
}

const MAX_WORDS = 48;
// toolpath chunks: small programs stay in a chunk that grows x4; past CHUNK_MAX, full chunks go to the columns
const CHUNK_MIN = 256;
const CHUNK_MAX = 16384;
const NIST_LINE_LENGTH = 256;
const MAX_CHORDS = 10000;

// ---- modal groups ([NIST] table 4, and the common dialect's) ------------------------------------------------------
const GG_NONMODAL = 0, GG_MOTION = 1, GG_PLANE = 2, GG_DIST = 3, GG_FEEDMODE = 5, GG_UNITS = 6, GG_COMP = 7;
const GG_LENGTH = 8, GG_RETURN = 10, GG_OFFSET = 12, GG_PATH = 13, GG_MACRO = 14;
/** Common dialect: G80 cancels a cycle without being a motion mode. */
const GG_CANCEL = 15;
/** Common dialect: G90.1 / G91.1 arc centre mode. */
const GG_ARCMODE = 16;
const GG_COUNT = 17;
function groupTable(common: boolean): Int8Array {
  const t = new Int8Array(1000).fill(-1);
  const g = (group: number, ...codes: number[]): void => {
    for (const c of codes) t[Math.round(c * 10)] = group;
  };
  g(GG_NONMODAL, 4, 10, 28, 30, 53, 92, 92.1, 92.2, 92.3, 52);
  g(GG_MOTION, 0, 1, 2, 3, 38.2, 73, 80, 81, 82, 83, 84, 85, 86, 87, 88, 89);
  g(GG_PLANE, 17, 18, 19);
  g(GG_DIST, 90, 91);
  g(GG_FEEDMODE, 93, 94);
  g(GG_UNITS, 20, 21);
  g(GG_COMP, 40, 41, 42);
  g(GG_LENGTH, 43, 44, 49);
  g(GG_RETURN, 98, 99);
  g(GG_OFFSET, 54, 55, 56, 57, 58, 59, 54.1, 59.1, 59.2, 59.3);
  g(GG_PATH, 61, 61.1, 64);
  g(GG_MACRO, 65, 66, 67); // macro calls: never evaluated
  if (common) {
    // exact stop for one block: no effect on the path; coordinate transforms the engine does not apply (rotation,
    // scaling, mirror, polar) and their cancels
    g(GG_NONMODAL, 9, 68, 51, 51.1, 16, 69, 50, 50.1, 15);
    g(GG_MOTION, 74, 76); // reverse tapping, fine boring
    g(GG_CANCEL, 80);
    g(GG_ARCMODE, 90.1, 91.1);
  }
  return t;
}
const G_GROUP_STRICT = groupTable(false);
const G_GROUP_COMMON = groupTable(true);
const M_GROUP = new Int8Array(100).fill(-1);
for (const c of [0, 1, 2, 30, 60, 98, 99]) M_GROUP[c] = 4;
M_GROUP[6] = 6;
for (const c of [3, 4, 5, 19]) M_GROUP[c] = 7;
for (const c of [7, 8, 9]) M_GROUP[c] = 8;
for (const c of [48, 49]) M_GROUP[c] = 9;

// named codes (x10) used in the logic
const G0 = 0, G1 = 10, G2 = 20, G3 = 30, G4 = 40, G10 = 100, G28 = 280, G30 = 300, G38_2 = 382, G52 = 520, G53 = 530;
const G73 = 730, G74 = 740, G76 = 760, G80 = 800, G81 = 810, G82 = 820, G83 = 830, G84 = 840, G86 = 860, G87 = 870;
const G88 = 880, G89 = 890, G90 = 900, G90_1 = 901, G92 = 920, G92_1 = 921, G92_2 = 922, G92_3 = 923, G98 = 980;
const G21 = 210, G20 = 200, G40 = 400, G49 = 490, G17 = 170, G54_1 = 541, G93 = 930;
const G15 = 150, G16 = 160, G50 = 500, G50_1 = 501, G51 = 510, G51_1 = 511, G68 = 680, G69 = 690;
/** The coordinate transforms of the common dialect (not applied by the engine). */
function isTransform(code: number): boolean {
  return code === G68 || code === G51 || code === G51_1 || code === G16;
}
/** True for the canned cycles (G73, G74, G76, G81-G89). */
function isCycle(code: number): boolean {
  return code === G73 || code === G74 || code === G76 || (code >= G81 && code <= G89);
}
function isArc(code: number): boolean {
  return code === G2 || code === G3;
}

const P10 = new Float64Array(23);
for (let i = 0; i < 23; i++) P10[i] = Number(`1e${i}`);

const MM_PER_INCH = 25.4;

// ---- defaults without a machine profile (mm; converted) ---------------------------------------------------------
const DEFAULT_RAPID_MM = 5000;
const DEFAULT_ACCEL_MM = 1000;
const DEFAULT_TOOL_CHANGE_S = 5;
// Arc radius tolerance defaults, in mm for G21 and in inches for G20: [NIST] 3.5.3.2 for strict-ngc; README
// "Arc tolerance" for the common dialect's (about 7x the worst rounding of a 3-decimal metric post).
const ARC_TOL_STRICT_MM = 0.002, ARC_TOL_STRICT_IN = 0.0002;
const ARC_TOL_COMMON_MM = 0.02, ARC_TOL_COMMON_IN = 0.001;

// stride of per-tool / per-offset accumulators
const S_FEED_LEN = 0, S_RAPID_LEN = 1, S_FEED_S = 2, S_RAPID_S = 3, S_DWELL_S = 4, S_TC_S = 5, S_TOTAL_S = 6;
const SSTRIDE = 8;
const BSTRIDE = 12; // min xyz, max xyz (all), min xyz, max xyz (cutting)

// skipping modes
const SKIP_NONE = 0, SKIP_M99_BODY = 1, SKIP_SUB_BODY = 2, SKIP_CONTROL = 3;

interface Frame {
  retPos: number;
  retLine: number;
  bodyPos: number;
  bodyLine: number;
  left: number;
  callLine: number;
}

interface Desc {
  text: string;
  line: number;
  prio: number;
}

function newBounds(n: number): Float64Array<ArrayBuffer> {
  const b = new Float64Array(n * BSTRIDE);
  for (let i = 0; i < n; i++) initBox(b, i * BSTRIDE);
  return b;
}
function initBox(b: Float64Array, o: number): void {
  for (let k = 0; k < BSTRIDE; k += 6) {
    b[o + k] = b[o + k + 1] = b[o + k + 2] = Infinity;
    b[o + k + 3] = b[o + k + 4] = b[o + k + 5] = -Infinity;
  }
}
function grow64(a: Float64Array<ArrayBuffer>, need: number, fill: (b: Float64Array<ArrayBuffer>, from: number) => void): Float64Array<ArrayBuffer> {
  if (need <= a.length) return a;
  let n = a.length * 2;
  while (n < need) n *= 2;
  const b = new Float64Array(n);
  b.set(a);
  fill(b, a.length);
  return b;
}
function growI32(a: Int32Array<ArrayBuffer>, need: number): Int32Array<ArrayBuffer> {
  if (need <= a.length) return a;
  let n = Math.max(16, a.length * 2);
  while (n < need) n *= 2;
  const b = new Int32Array(n);
  b.set(a);
  return b;
}
function boxOut(b: Float64Array, o: number): Bounds {
  const v = (i: number, lo: boolean): number | null => {
    const x = b[o + i]!;
    return lo ? (x === Infinity ? null : x) : x === -Infinity ? null : x;
  };
  return {
    min: { x: v(0, true), y: v(1, true), z: v(2, true) },
    max: { x: v(3, false), y: v(4, false), z: v(5, false) },
  };
}
function fmt(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  return String(Math.round(x * 10000) / 10000);
}
function offsetCode(num: number): string {
  if (num >= 1 && num <= 6) return `G${53 + num}`;
  if (num >= 7 && num <= 9) return `G59.${num - 6}`;
  return `G54.1 P${num - 100}`;
}
function parseOffsetKey(key: string): number {
  const k = key.toUpperCase().replace(/\s+/g, "");
  const m = /^G(5[4-9])$/.exec(k);
  if (m) return Number(m[1]) - 53;
  const m2 = /^G59\.([1-3])$/.exec(k);
  if (m2) return 6 + Number(m2[1]);
  const m3 = /^G54\.1P(\d+)$/.exec(k);
  if (m3) return 100 + Number(m3[1]);
  return -1;
}
/** Trapezoidal move time [KIN]: top speed v (units/s), acceleration a (units/s^2). */
export function trapezoidSeconds(len: number, v: number, a: number): number {
  if (!(len > 0) || !(v > 0)) return 0;
  if (!(a > 0) || !Number.isFinite(a)) return len / v;
  return len >= (v * v) / a ? len / v + v / a : 2 * Math.sqrt(len / a);
}
/**
 * Tool description without the separators posts wrap it in ("|", "-", ":" standing alone or at a word's ends),
 * words kept in order: "| 10MM FLAT END MILL | H1 |" is "10MM FLAT END MILL H1"; "-3." and "3-FLUTE" stay.
 */
export function cleanDescription(raw: string): string {
  const words: string[] = [];
  for (const w of raw.trim().split(/\s+/)) {
    let s = 0;
    let e = w.length;
    while (s < e && (w[s] === "|" || w[s] === ":" || (w[s] === "-" && !/[\d.]/.test(w[s + 1] ?? "")))) s++;
    while (e > s && (w[e - 1] === "|" || w[e - 1] === ":" || w[e - 1] === "-" || w[e - 1] === ",")) e--;
    if (e > s) words.push(w.slice(s, e).replace(/\|/g, " ").trim());
  }
  return words.filter((w) => w.length > 0).join(" ");
}

/** The analysis run: one instance per analyzeProgram call. */
class Engine {
  readonly b: Uint8Array;
  readonly n: number;
  // per line
  readonly lv = new Float64Array(26);
  readonly gc = new Int32Array(MAX_WORDS);
  readonly mc = new Int32Array(MAX_WORDS);
  mask = 0;
  dup = 0;
  flags = 0;
  gN = 0;
  mN = 0;
  line = 0;
  ls = 0;
  le = 0;
  cs = -1;
  ce = -1;
  kw = 0; // first keyword on the line
  bad = -1; // where the first word error starts
  readonly gWord = new Int32Array(GG_COUNT);
  // options
  readonly opt: AnalyzeOptions;
  readonly machine: MachineProfile | undefined;
  readonly dialect: Dialect;
  readonly common: boolean;
  readonly gGroup: Int8Array;
  units: Units = "mm";
  unitsDeclared = false;
  mScale = 1; // machine units -> report units
  rapidRate = 0; // report units/min
  maxFeed = Infinity;
  maxSpindle = Infinity;
  accel = 0; // report units/s^2
  tcSeconds = 0;
  safeZ = 0;
  hMustEqualT = true;
  spindleControlled = true;
  workOffsetCount = Infinity;
  tol = 0.01;
  cap = 50;
  wantPath = true;
  defaultRapid = false;
  defaultAccel = false;
  assumptions: string[] = [];
  // modal state (report units, part coordinates)
  readonly pos = new Float64Array([NaN, NaN, NaN]);
  readonly shift92 = new Float64Array(3);
  readonly shift52 = new Float64Array(3);
  readonly shift = new Float64Array(3);
  saved92 = new Float64Array(3);
  sc = 1; // current program units -> report units
  progInch = false;
  absolute = true;
  arcAbsolute = false; // G90.1: I/J/K are absolute centre coordinates
  motion = G80; // [NIST] 3.2.2: the initial state has no motion mode
  motionBeforeCycle = G80;
  plane = 17;
  inverseTime = false;
  feed = NaN; // report units / min
  feedRaw = NaN; // as programmed (G93: 1/min)
  spindle = NaN;
  spindleDir = 5;
  selectedT = -1;
  toolIdx = NO_TOOL_IDX; // index into tools (loaded)
  toolSlot = 0; // accumulator slot: 0 = no tool
  comp = 40;
  compD = NaN;
  lengthMode = 49;
  lengthH = NaN;
  lengthSinceChange = false;
  offNum = 1;
  offIdx = -1;
  offSelected = false;
  retractOld = true; // G98
  cycR = NaN;
  cycZ = NaN;
  cycQ = NaN;
  cycP = 0;
  cycInit = NaN; // common dialect: the initial level, where the cycle started
  zHome = true; // Z is at the home (tool change) position: where a program starts and every M6 leaves it
  xform = 0; // code (x10) of an active coordinate transform that is not applied, or 0
  committed = false; // a move, an origin or a shift happened: the report units are fixed
  firstMotion = true;
  relAxes = 0; // axes measured from an unset start point (a program in G91 from its start)
  readonly inc = new Float64Array(3); // the increments of an incremental move whose start is unknown
  incSince = 0; // line of the M6 that G91 was left on across, or 0
  ended = false;
  stopped = false; // the execution limit was reached
  endLine: number | null = null;
  tail = false;
  programNumber: number | null = null;
  sawBlock = false;
  percentSeen = 0;
  lastMainLine = 0;
  // skipping: subprogram bodies that are not called, o-word control blocks
  skipKind = SKIP_NONE;
  skipKey = 0;
  skipEnd = 0; // keyword that ends an o-word control block
  skipLine0 = 0;
  skipCount = 0;
  skipAxes = 0;
  pend = new Int32Array(0); // code lines of a body being skipped in the main flow (not evaluated if it never ends)
  pendN = 0;
  // once-per-stretch flags
  feedMissingSaid = false;
  spindleSaid = false;
  manualSpindleSaid = false;
  toolSaid = false;
  lengthSaid = false;
  offsetSaid = false;
  unitsSaid = false;
  overTravelSaid = 0;
  // accumulators
  readonly gS = new Float64Array(SSTRIDE);
  readonly gB = newBounds(1);
  readonly mB = newBounds(1);
  tS = new Float64Array(SSTRIDE * 16);
  tB = newBounds(16);
  oS = new Float64Array(SSTRIDE * 8);
  oB = newBounds(8);
  tFeedMin: number[] = [];
  tFeedMax: number[] = [];
  tSpinMin: number[] = [];
  tSpinMax: number[] = [];
  feedLen = 0;
  rapidLen = 0;
  machineLen = 0;
  machineCount = 0;
  machineLines: number[] = [];
  counts = { rapid: 0, feed: 0, arc: 0, cycles: 0, machine: 0 };
  spinMin = Infinity;
  spinMax = -Infinity;
  stops = { programStops: 0, optionalStops: 0, lines: [] as number[] };
  // coverage
  codeLines = 0;
  neBits: Uint8Array | null = null;
  neCount = 0;
  // tools and offsets
  tools: {
    number: number; firstLine: number; lastLine: number; loads: number; h: number[]; d: number[]; offsets: number[];
  }[] = [];
  toolOfNumber = new Map<number, number>();
  offsets: {
    num: number; firstLine: number | null; firstMotion: number | null; last: number | null; tools: number[];
  }[] = [];
  offIdxOfNum = new Map<number, number>();
  origins = new Map<number, Float64Array>();
  originSource = new Map<number, "options" | "program">();
  changes: ToolChange[] = [];
  changeCount = 0;
  descs = new Map<number, Desc>();
  pendingDescTool = -1;
  pendingDescLine = 0;
  // cutting runs (one tool under one offset) and cut stretches, for the multi-part checks
  runs: CutRun[] = [];
  lastRunTool = -2;
  lastRunOff = -2;
  runBlocks = 0; // cut blocks of the current run
  runBase = 0; // cut blocks of the current run's tool and offset in earlier runs
  readonly blocksOf = new Map<number, number>();
  cutBlock = -1;
  approach = 0; // first line after the last cut that starts the way to the next one (0: not yet)
  stretches = new Int32Array(64); // per cut stretch: tool, offset, approach line, cut blocks before it
  stretchN = 0;
  stretchBlock = -1;
  // subprograms
  labels: Map<number, { pos: number; line: number }> | null = null;
  stack: Frame[] = [];
  jump = -1;
  jumpLine = 0;
  blocks = 0;
  blockLimit: number;
  // findings
  findings: Finding[] = [];
  readonly fCount = new Int32Array(RULE_IDS.length);
  readonly fSev = new Int8Array(RULE_IDS.length);
  // toolpath: segments and vertices are written into plain chunks; full chunks are appended to the columns
  tpLimit: number;
  tpN = 0; // segments
  tpV = 0; // vertices
  cN = 0; // segments in the chunk
  cV = 0; // vertices in the chunk
  capS: number;
  capV: number;
  cPos: Float32Array<ArrayBuffer>;
  cLine: Uint32Array<ArrayBuffer>;
  cKind: Uint8Array<ArrayBuffer>;
  cTool: Uint16Array<ArrayBuffer>;
  cOff: Uint8Array<ArrayBuffer>;
  colPos: ToolpathColumn<Float32Array<ArrayBuffer>> | null = null;
  colLine: ToolpathColumn<Uint32Array<ArrayBuffer>> | null = null;
  colKind: ToolpathColumn<Uint8Array<ArrayBuffer>> | null = null;
  colTool: ToolpathColumn<Uint16Array<ArrayBuffer>> | null = null;
  colOff: ToolpathColumn<Uint8Array<ArrayBuffer>> | null = null;
  lvx = NaN;
  lvy = NaN;
  lvz = NaN;
  tpFull = false;
  // scratch
  readonly arcOut = new Float64Array(6);
  readonly pts = new Float64Array(8);
  readonly tgt = new Float64Array(3);
  readonly tmp = new Float64Array(3);
  readonly decoder = new TextDecoder("utf-8");

  constructor(bytes: Uint8Array, opt: AnalyzeOptions) {
    this.b = bytes;
    this.n = bytes.length;
    this.opt = opt;
    this.machine = opt.machine;
    this.dialect = opt.dialect ?? opt.machine?.dialect ?? "common";
    this.common = this.dialect === "common";
    this.gGroup = this.common ? G_GROUP_COMMON : G_GROUP_STRICT;
    this.cap = opt.maxFindingsPerRule ?? 50;
    this.wantPath = opt.toolpath !== false;
    this.blockLimit = 2_000_000 + (this.n >>> 1);
    this.tpLimit = 8_000_000 + (this.n >>> 3);
    const cap = this.wantPath ? Math.min(CHUNK_MAX, Math.max(CHUNK_MIN, this.n >>> 4)) : 0;
    this.capS = this.capV = cap;
    this.cPos = new Float32Array(cap * 3);
    this.cLine = new Uint32Array(cap);
    this.cKind = new Uint8Array(cap);
    this.cTool = new Uint16Array(cap);
    this.cOff = new Uint8Array(cap);
  }

  // ---- findings ----------------------------------------------------------------------------------------------
  /** Counts a finding; true when it should also be listed. */
  want(rule: number, sev: Severity): boolean {
    const s = sev === "error" ? 3 : sev === "warning" ? 2 : 1;
    if (s > this.fSev[rule]!) this.fSev[rule] = s;
    return this.fCount[rule]!++ < this.cap;
  }
  add(rule: number, sev: Severity, line: number, message: string, hint?: string): void {
    const id = RULE_IDS[rule]!;
    this.findings.push({ rule: id, severity: sev, line, message, hint: hint ?? HINTS[id] });
  }
  say(rule: number, sev: Severity, line: number, message: string, hint?: string): void {
    if (this.want(rule, sev)) this.add(rule, sev, line, message, hint);
  }
  /** Marks a code line the engine did not evaluate (counted once however often it runs). */
  markNotEvaluated(line: number): void {
    let bits = this.neBits;
    if (bits === null) bits = this.neBits = new Uint8Array((this.n >>> 3) + 2);
    const i = line >>> 3;
    const m = 1 << (line & 7);
    if (i < bits.length && !(bits[i]! & m)) {
      bits[i] = bits[i]! | m;
      this.neCount++;
    }
  }

  // ---- setup -------------------------------------------------------------------------------------------------
  /**
   * Settings that depend on the report units: from setup, and again when the first G20/G21 that runs comes before
   * anything has moved and differs from the machine's units (the report units come from what executes).
   */
  applyUnits(units: Units): void {
    const m = this.machine;
    this.units = units;
    const inch = units === "inch";
    this.progInch = inch;
    this.sc = 1;
    const mmToReport = inch ? 1 / MM_PER_INCH : 1;
    this.mScale = m ? (m.units === units ? 1 : m.units === "mm" ? 1 / MM_PER_INCH : MM_PER_INCH) : 1;
    this.rapidRate = m ? m.rapidRate * this.mScale : 0;
    this.maxFeed = m && m.maxFeed > 0 ? m.maxFeed * this.mScale : Infinity;
    this.accel = m ? m.acceleration * this.mScale : 0;
    this.defaultRapid = !(this.rapidRate > 0);
    if (this.defaultRapid) this.rapidRate = DEFAULT_RAPID_MM * mmToReport;
    this.defaultAccel = !(this.accel > 0);
    if (this.defaultAccel) this.accel = DEFAULT_ACCEL_MM * mmToReport;
    this.safeZ = this.opt.safeZ ?? (m ? m.safeZ * this.mScale : 0);
    this.tol = this.opt.chordTolerance ?? (inch ? 0.0005 : 0.01);
    if (this.feedRaw === this.feedRaw && !this.inverseTime) this.feed = this.feedRaw * this.sc;
  }

  setup(): void {
    const m = this.machine;
    if (m) {
      this.maxSpindle = m.maxSpindle > 0 ? m.maxSpindle : Infinity;
      this.tcSeconds = m.toolChangeSeconds;
      this.hMustEqualT = m.hMustEqualT;
      this.spindleControlled = m.spindleProgramControlled;
      this.workOffsetCount = m.workOffsetCount;
    } else this.tcSeconds = DEFAULT_TOOL_CHANGE_S;
    this.applyUnits(m?.units ?? "mm");
    if (this.opt.workOffsets) {
      for (const [key, v] of Object.entries(this.opt.workOffsets)) {
        const num = parseOffsetKey(key);
        if (num < 0 || !v) continue;
        this.origins.set(num, new Float64Array([v.x, v.y, v.z]));
        this.originSource.set(num, "options");
      }
    }
  }

  /** The defaults the run used, once the report units are settled. */
  listAssumptions(): void {
    const inch = this.units === "inch";
    if (this.defaultRapid) {
      this.assumptions.push(`rapid rate not given: assumed ${fmt(this.rapidRate)} ${inch ? "in" : "mm"}/min (${DEFAULT_RAPID_MM} mm/min)`);
    }
    if (this.defaultAccel) {
      this.assumptions.push(`acceleration not given: assumed ${fmt(this.accel)} ${inch ? "in" : "mm"}/s^2 (${DEFAULT_ACCEL_MM} mm/s^2)`);
    }
    if (!this.machine) this.assumptions.push(`tool change time not given: assumed ${DEFAULT_TOOL_CHANGE_S} s`);
    for (const a of this.assumptions) this.say(R.assumption, "info", 0, a);
  }

  /** Arc radius tolerance in report units, for the program's current units. */
  arcTolerance(inchMode: boolean): number {
    if (this.opt.arcTolerance !== undefined) return this.opt.arcTolerance;
    const m = this.machine;
    if (m && m.arcTolerance !== undefined) return m.arcTolerance * this.mScale;
    const mm = inchMode
      ? (this.common ? ARC_TOL_COMMON_IN : ARC_TOL_STRICT_IN) * MM_PER_INCH
      : this.common ? ARC_TOL_COMMON_MM : ARC_TOL_STRICT_MM;
    return this.units === "inch" ? mm / MM_PER_INCH : mm;
  }

  // ---- scanning ----------------------------------------------------------------------------------------------
  run(): void {
    this.setup();
    const b = this.b;
    const n = this.n;
    const lv = this.lv;
    const gc = this.gc;
    const mc = this.mc;
    // a UTF-8 byte-order mark is not part of the first block
    let p = n >= 3 && b[0] === 0xef && b[1] === 0xbb && b[2] === 0xbf ? 3 : 0;
    let line = 0;
    while (p < n) {
      line++;
      const ls = p;
      let mask = 0;
      let dup = 0;
      let flags = 0;
      let gN = 0;
      let mN = 0;
      let cs = -1;
      let ce = -1;
      let kw = 0;
      let bad = -1;
      let first = true;
      let le = n;
      while (p < n) {
        let c = b[p]!;
        if (c === 10) {
          le = p;
          p++;
          break;
        }
        if (c === 13) {
          le = p;
          p++;
          if (p < n && b[p] === 10) p++;
          break;
        }
        if (c === 32 || c === 9) {
          p++;
          continue;
        }
        const L = (c | 32) - 97;
        if (L >= 0 && L < 26 && c < 128) {
          first = false;
          p++;
          const afterLetter = p;
          // number: sign, digits, point; spaces and tabs are allowed inside ([NIST] 3.3.1)
          while (p < n && ((c = b[p]!) === 32 || c === 9)) p++;
          let neg = false;
          if (p < n && (c === 45 || c === 43)) {
            neg = c === 45;
            p++;
          }
          let digits = 0;
          let dec = -1;
          // up to 9 digits in int32 arithmetic (exact, and cheaper than a chain of double multiply-adds)
          let im = 0;
          while (p < n) {
            c = b[p]!;
            const d = c - 48;
            if (d >= 0 && d <= 9) {
              if (digits === 9) break;
              im = (im * 10 + d) | 0;
              if (dec >= 0) dec++;
              digits++;
            } else if (c === 46 && dec < 0) {
              dec = 0;
            } else if (c !== 32 && c !== 9) {
              break;
            }
            p++;
          }
          let mant = im;
          // more digits: the same in doubles, keeping 17 significant digits and scaling by the rest
          if (digits === 9) {
            while (p < n) {
              c = b[p]!;
              const d = c - 48;
              if (d >= 0 && d <= 9) {
                if (mant < 1e17) {
                  mant = mant * 10 + d;
                  if (dec >= 0) dec++;
                } else if (dec < 0) {
                  mant *= 10;
                }
                digits++;
              } else if (c === 46 && dec < 0) {
                dec = 0;
              } else if (c !== 32 && c !== 9) {
                break;
              }
              p++;
            }
          }
          const bit = 1 << L;
          if (digits === 0) {
            if (p === afterLetter && p < n) {
              const c2 = c | 32;
              if (c2 >= 97 && c2 <= 122) {
                // a letter followed by a letter: a keyword of macro or o-word syntax, or plain text ("GOO")
                let q = p + 1;
                while (q < n && (b[q]! | 32) >= 97 && (b[q]! | 32) <= 122) q++;
                const id = keywordAt(b, afterLetter - 1, q);
                if (id === 0) {
                  flags |= F_TEXT;
                  if (bad < 0) bad = afterLetter - 1;
                } else {
                  flags |= id >= KW_EXPR ? F_KWEXPR : F_KEYWORD;
                  if (kw === 0) kw = id;
                }
                p = q;
                continue;
              }
              if (L === L_O && c === 60) {
                // o<name>: a named subroutine label
                let q = p + 1;
                while (q < n && b[q] !== 62 && b[q] !== 10 && b[q] !== 13) q++;
                if (q < n && b[q] === 62) {
                  if (mask & bit) dup |= bit;
                  mask |= bit;
                  lv[L] = nameKey(b, p + 1, q);
                  p = q + 1;
                  continue;
                }
              }
            }
            if (p < n && (c === 35 || c === 91)) {
              flags |= F_EXPR;
              if (L !== L_G && L !== L_M) {
                mask |= bit;
                lv[L] = NaN;
              }
            } else {
              flags |= F_BADWORD; // an address with no value
              if (bad < 0) bad = afterLetter - 1;
            }
            continue;
          }
          let v = dec > 0 ? (dec < 23 ? mant / P10[dec]! : mant / Math.pow(10, dec)) : mant;
          if (neg) v = -v;
          if (L === L_G) {
            if (gN < MAX_WORDS) {
              const code = Math.round(v * 10);
              if (code < 0 || code >= 1000 || Math.abs(v * 10 - code) > 1e-6) {
                flags |= F_BADCODE;
                gc[gN++] = -1 - Math.min(1e9, Math.abs(Math.round(v * 1000)));
              } else gc[gN++] = code;
            } else flags |= F_OVERFLOW;
          } else if (L === L_M) {
            if (mN < MAX_WORDS) {
              if (v < 0 || v >= 100 || v !== Math.floor(v)) {
                flags |= F_BADCODE;
                mc[mN++] = -1;
              } else mc[mN++] = v;
            } else flags |= F_OVERFLOW;
          } else {
            if (mask & bit) dup |= bit;
            mask |= bit;
            lv[L] = v;
          }
          continue;
        }
        if (c === 40) {
          // comment: to ")" on the same line
          const s = p + 1;
          p++;
          while (p < n && (c = b[p]!) !== 41 && c !== 10 && c !== 13) p++;
          if (cs < 0) {
            cs = s;
            ce = p;
          }
          if (p < n && b[p] === 41) p++;
          else flags |= F_BADCOMMENT;
          continue;
        }
        if (c === 59) {
          const s = p + 1;
          while (p < n && (c = b[p]!) !== 10 && c !== 13) p++;
          if (cs < 0) {
            cs = s;
            ce = p;
          }
          continue;
        }
        if (c === 47 && first) flags |= F_BLOCKDEL;
        else if (c === 37) flags |= F_PERCENT;
        else if (c === 35 || c === 91 || c === 93 || c === 61 || c === 60 || c === 62) flags |= F_EXPR;
        else if (c > 32) {
          flags |= F_BADCHAR; // a number with no letter, or a character that belongs to no word
          if (bad < 0) bad = p;
        }
        first = false;
        p++;
      }
      this.line = line;
      this.ls = ls;
      this.le = le;
      this.mask = mask;
      this.dup = dup;
      this.flags = flags;
      this.gN = gN;
      this.mN = mN;
      this.cs = cs;
      this.ce = ce;
      this.kw = kw;
      this.bad = bad;
      // code lines are counted on the pass through the file, not again inside a subprogram call
      if (this.stack.length === 0 && (mask !== 0 || gN !== 0 || mN !== 0 || (flags & F_CODE) !== 0)) this.codeLines++;
      if (this.tail) this.tailLine();
      else if (this.skipKind !== SKIP_NONE) this.skipLine();
      else this.exec();
      if (this.jump >= 0) {
        p = this.jump;
        line = this.jumpLine;
        this.jump = -1;
      }
    }
    this.finish(line);
  }

  // ---- lines after the end, subprogram bodies, o-word control blocks ----------------------------------------------
  hasM(code: number): boolean {
    for (let i = 0; i < this.mN; i++) if (this.mc[i] === code) return true;
    return false;
  }
  hasG(code10: number): boolean {
    for (let i = 0; i < this.gN; i++) if (this.gc[i] === code10) return true;
    return false;
  }
  isCodeLine(): boolean {
    return this.mask !== 0 || this.gN !== 0 || this.mN !== 0 || (this.flags & F_CODE) !== 0;
  }
  tailLine(): void {
    if (this.mask & B_O && (this.kw === 0 || this.kw === KW_SUB)) {
      this.startBody(this.kw === KW_SUB ? SKIP_SUB_BODY : SKIP_M99_BODY);
      return;
    }
    if (this.stopped) {
      if (this.isCodeLine()) this.markNotEvaluated(this.line);
      return;
    }
    if (this.ended && ((this.mask & ~B_N) !== 0 || this.gN > 0 || this.mN > 0) && !(this.flags & F_PERCENT)) {
      this.say(R.codeAfterEnd, "warning", this.line, "code after the end of the program never runs");
    }
  }
  /** Starts skipping a subprogram body (until M99, or its `O<n> endsub`) that the main flow reaches. */
  startBody(kind: number): void {
    this.skipKind = kind;
    this.skipKey = this.lv[L_O]!;
    this.skipLine0 = this.line;
    this.pendN = 0;
    this.tail = false;
  }
  /** Starts skipping an o-word control block (if, while, do, repeat): its condition is not evaluated. */
  startControl(end: number): void {
    this.skipKind = SKIP_CONTROL;
    this.skipKey = this.lv[L_O]!;
    this.skipEnd = end;
    this.skipLine0 = this.line;
    this.skipCount = 1;
    this.skipAxes = 0;
    this.markNotEvaluated(this.line);
  }
  skipLine(): void {
    const kind = this.skipKind;
    const o = (this.mask & B_O) !== 0;
    if (kind === SKIP_CONTROL) {
      const code = this.isCodeLine();
      if (code) {
        this.skipCount++;
        this.skipAxes |= this.mask;
        this.markNotEvaluated(this.line);
        if (this.stack.length === 0) this.lastMainLine = this.line;
      }
      if (o && this.kw === this.skipEnd && this.lv[L_O] === this.skipKey) {
        this.skipKind = SKIP_NONE;
        this.endControl(this.line);
      }
      return;
    }
    const done = kind === SKIP_M99_BODY ? this.hasM(99) : o && this.kw === KW_ENDSUB && this.lv[L_O] === this.skipKey;
    if (done) {
      this.skipKind = SKIP_NONE;
      this.pendN = 0;
      if (this.ended) this.tail = true;
    } else if (!this.ended && this.isCodeLine()) {
      // a body in the main flow: if it never ends, the lines it swallowed were main program lines
      this.pend = growI32(this.pend, this.pendN + 1);
      this.pend[this.pendN++] = this.line;
    }
  }
  endControl(lastLine: number): void {
    const what = this.skipEnd === KW_ENDIF ? "if" : this.skipEnd === KW_ENDREPEAT ? "repeat" : this.skipEnd === KW_WHILE ? "do" : "while";
    const name = this.skipKey >= 0 ? `O${this.skipKey}` : "o<name>";
    this.say(R.notEvaluated, "warning", this.skipLine0,
      `${name} ${what} block: its condition is not evaluated, so its ${this.skipCount} lines (${this.skipLine0} to ${lastLine}) are not either`);
    // the control would move the axes the block names: their positions are now unknown
    for (let i = 0; i < 3; i++) if (this.skipAxes & (1 << AXIS_OF_LETTER[i]!)) this.pos[i] = NaN;
    if (this.skipAxes & B_Z) this.zHome = false;
  }

  // ---- one block -----------------------------------------------------------------------------------------------
  exec(): void {
    const line = this.line;
    const len = this.le - this.ls;
    if (len > NIST_LINE_LENGTH && this.want(R.lineTooLong, "warning")) {
      this.add(R.lineTooLong, "warning", line, `line is ${len} characters long (more than ${NIST_LINE_LENGTH})`);
    }
    let flags = this.flags;
    const mask = this.mask;
    if (flags & F_BLOCKDEL && this.opt.blockDelete) return;
    if (flags & F_PERCENT) {
      if (mask === 0 && this.gN === 0 && this.mN === 0) {
        if (this.sawBlock || this.percentSeen > 0) {
          // the second % ends the tape ([NIST] 3.3.2); what follows is read only for subprogram bodies
          this.percentSeen++;
          if (this.sawBlock) {
            this.tail = true;
          }
        } else this.percentSeen++;
        return;
      }
      flags &= ~F_PERCENT;
      flags |= F_BADCHAR;
    }
    if (this.cs >= 0) this.comment();
    if (mask === 0 && this.gN === 0 && this.mN === 0 && (flags & ~(F_BLOCKDEL | F_BADCOMMENT)) === 0) {
      if (this.pendingDescTool >= 0 && this.cs < 0 && this.line > this.pendingDescLine + 1) this.pendingDescTool = -1;
      if (flags & F_BADCOMMENT) this.say(R.wordInvalid, "warning", line, "line has a comment without its closing parenthesis");
      return;
    }
    if (this.pendingDescTool >= 0 && this.line > this.pendingDescLine) this.pendingDescTool = -1;
    if (mask & B_O) {
      this.oLine(line);
      return;
    }
    this.sawBlock = true;
    if (this.stack.length === 0) this.lastMainLine = line;
    if (++this.blocks > this.blockLimit) {
      this.say(R.executionLimit, "error", line, `more than ${this.blockLimit} blocks executed: analysis stopped`);
      this.stack.length = 0;
      this.stopped = true;
      this.tail = true;
      this.markNotEvaluated(line);
      return;
    }
    if (flags & (F_EXPR | F_KEYWORD)) {
      this.notEvaluated(line);
      return;
    }
    if (flags & (F_TEXT | F_KWEXPR | F_BADWORD | F_BADCHAR)) {
      this.wordError(line, flags);
      return;
    }
    if (flags & (F_BADCOMMENT | F_OVERFLOW)) {
      this.say(R.wordInvalid, "warning", line, `line has ${flags & F_BADCOMMENT ? "a comment without its closing parenthesis" : "too many words"}`);
    }
    if (this.dup !== 0) {
      this.say(R.modalConflict, "error", line, `letter ${letters(this.dup)} appears twice on the line: the line is not run`);
      this.skipBlock(line);
      return;
    }
    // fast path: only axis words (and F/S/N) with the modal motion in force
    if (this.gN === 0 && this.mN === 0 && (mask & ~(B_AXES | B_F | B_S | B_N)) === 0 && !(flags & F_BADCODE)) {
      if (mask & B_F) this.setFeed(line);
      if (mask & B_S) this.setSpindle(line);
      if (mask & B_AXES) {
        if (this.motion === G80) {
          this.say(R.modalConflict, "error", line, "axis words with no motion mode in force (G80)");
          this.skipBlock(line);
        } else this.motionBlock(line, this.motion, 0);
      }
      return;
    }
    this.full(line);
  }

  /** A line the engine does not run: what it names becomes unknown, and it counts as not evaluated. */
  skipBlock(line: number): void {
    this.notEvaluatedAxes();
    this.markNotEvaluated(line);
  }

  notEvaluated(line: number): void {
    this.say(R.notEvaluated, "warning", line, "macro variables or expressions are not evaluated: the line is skipped");
    // the control would move the axes this line names: their positions are now unknown
    this.skipBlock(line);
  }

  /** A word that cannot stand where it does: the control would refuse the line, so it is not run. */
  wordError(line: number, flags: number): void {
    const b = this.b;
    let s = this.bad;
    let e = s;
    while (e < this.le && e - s < 24 && b[e] !== 32 && b[e] !== 9 && b[e] !== 40 && b[e] !== 59) e++;
    if (e === s) e = s + 1;
    const text = s >= 0 ? this.decoder.decode(b.subarray(s, e)) : "";
    let what: string;
    if (flags & F_TEXT) {
      let zero = e > s + 1;
      for (let i = s + 1; i < e; i++) if ((b[i]! | 32) !== 111) zero = false;
      what = `"${text}" is not a word: a letter must be followed by its number${zero ? " (the letter O typed for a zero?)" : ""}`;
    } else if (flags & F_BADWORD) {
      what = `address ${String.fromCharCode(b[s]! & ~32)} has no value`;
    } else if (flags & F_BADCHAR) {
      what = `"${text}" belongs to no word (a number needs its letter; text belongs in a comment)`;
    } else {
      what = "a macro keyword outside an expression";
    }
    this.say(R.wordInvalid, "error", line, `${what}: the control would refuse the line, and it is not run`);
    this.skipBlock(line);
  }

  /** Lines that start with an O word: program number, subprogram labels and o-word control. */
  oLine(line: number): void {
    const kw = this.kw;
    const key = this.lv[L_O]!;
    if (this.flags & F_TEXT) this.wordError(line, F_TEXT);
    if (kw === 0 || kw === KW_SUB) {
      if (this.stack.length > 0) {
        this.say(R.subprogramInvalid, "error", line, "a subprogram runs into the next O label without M99");
        this.returnFromSub();
        return;
      }
      if (kw === 0 && !this.sawBlock && this.programNumber === null && key >= 0) {
        this.programNumber = key;
        return;
      }
      // a subprogram body in the main flow: not executed unless called
      this.startBody(kw === KW_SUB ? SKIP_SUB_BODY : SKIP_M99_BODY);
      return;
    }
    this.sawBlock = true;
    if (this.stack.length === 0) this.lastMainLine = line;
    if (kw === KW_ENDSUB || kw === KW_RETURN) {
      if (this.stack.length > 0) this.returnFromSub();
      else this.say(R.subprogramInvalid, "error", line, `o-word ${kw === KW_ENDSUB ? "endsub" : "return"} outside a subprogram call`);
      return;
    }
    if (kw === KW_CALL) {
      if (++this.blocks > this.blockLimit) {
        this.say(R.executionLimit, "error", line, `more than ${this.blockLimit} blocks executed: analysis stopped`);
        this.stack.length = 0;
        this.stopped = true;
        this.tail = true;
        return;
      }
      this.callSubAt(line, key, 1, key >= 0 ? `O${key}` : "the named subroutine");
      return;
    }
    if (kw === KW_IF || kw === KW_WHILE || kw === KW_DO || kw === KW_REPEAT) {
      this.startControl(kw === KW_IF ? KW_ENDIF : kw === KW_WHILE ? KW_ENDWHILE : kw === KW_DO ? KW_WHILE : KW_ENDREPEAT);
      return;
    }
    this.say(R.notEvaluated, "warning", line, "o-word control line is not evaluated");
    this.markNotEvaluated(line);
  }

  full(line: number): void {
    const gc = this.gc;
    const mc = this.mc;
    const lv = this.lv;
    const gg = this.gGroup;
    const gWord = this.gWord;
    const common = this.common;
    let mask = this.mask;
    // modal groups on this line
    let gSeen = 0;
    let g0Axis = -1; // group-0 code that uses axis words
    let g0Other = 0; // bit set of group 0 codes present: 1=G4 2=G53 4=G92.1 8=G92.2 16=G92.3
    let unknownG = -1;
    for (let i = 0; i < this.gN; i++) {
      const code = gc[i]!;
      const grp = code >= 0 ? gg[code]! : -1;
      if (grp < 0) {
        if (unknownG === -1) unknownG = i;
        continue;
      }
      if (grp === GG_MACRO) {
        this.say(R.notEvaluated, "warning", line, `macro call ${fmtCode(code)} is not evaluated: the line is skipped`);
        this.skipBlock(line);
        return;
      }
      if (grp === GG_NONMODAL) {
        if (code === G4) g0Other |= 1;
        else if (code === G53) g0Other |= 2;
        else if (code === G92_1 || code === G92_2 || code === G92_3) g0Other |= code === G92_1 ? 4 : code === G92_2 ? 8 : 16;
        else if (code === G69 || code === G50 || code === G50_1 || code === G15) g0Other |= 32;
        else if (code === G10 || code === G28 || code === G30 || code === G92 || code === G52 || isTransform(code)) {
          if (g0Axis >= 0) {
            this.say(R.modalConflict, "error", line, `${fmtCode(g0Axis)} and ${fmtCode(code)} both use the axis words`);
            this.skipBlock(line);
            return;
          }
          g0Axis = code;
        }
        continue;
      }
      const gb = 1 << grp;
      if (gSeen & gb) {
        this.say(R.modalConflict, "error", line, `${fmtCode(gWord[grp]!)} and ${fmtCode(code)} are in the same modal group`);
        this.skipBlock(line);
        return;
      }
      gSeen |= gb;
      gWord[grp] = code;
    }
    const motionCode = gSeen & (1 << GG_MOTION) ? gWord[GG_MOTION]! : -1;
    // letters the dialect does not use; on a line with an unknown G code they are that code's own
    if (mask & ~B_KNOWN && unknownG < 0) {
      this.say(R.unknownCode, "warning", line, `letter ${letters(mask & ~B_KNOWN)} is not used by this dialect`);
    }
    let mSeen = 0;
    let stop = -1, toolChange = false, spin = -1;
    let coolant = -1;
    let unknownM = -1;
    for (let i = 0; i < this.mN; i++) {
      const code = mc[i]!;
      const grp = code >= 0 ? M_GROUP[code]! : -1;
      if (grp < 0) {
        if (unknownM === -1) unknownM = i;
        continue;
      }
      const gb = 1 << grp;
      if (mSeen & gb && !(grp === 8 && coolant !== 9 && code !== 9)) {
        this.say(R.modalConflict, "error", line, `two M codes of the same modal group on the line (M${code})`);
        this.skipBlock(line);
        return;
      }
      mSeen |= gb;
      if (grp === 4) stop = code;
      else if (grp === 6) toolChange = true;
      else if (grp === 7) spin = code;
      else if (grp === 8) coolant = code;
    }
    // a group-1 code and a group-0 code that both use axis words: an error in [NIST] 3.4; the common dialect lets
    // the group-0 code take them and the motion code only set the mode (G0 G91 G28 Z0)
    if (g0Axis >= 0 && motionCode >= 0 && mask & B_AXES && !common) {
      this.say(R.modalConflict, "error", line, `${fmtCode(motionCode)} and ${fmtCode(g0Axis)} both use the axis words`);
      this.skipBlock(line);
      return;
    }
    // codes the dialect does not know: what they would do is not known, so their axis words are not run
    let holdMotion = false;
    if (unknownG >= 0) {
      const code = gc[unknownG]!;
      const shown = code >= 0 ? fmtCode(code) : `G${fmt((-1 - code) / 1000)}`;
      holdMotion = (mask & B_AXES) !== 0;
      this.say(R.unknownCode, "warning", line, holdMotion
        ? `unknown code ${shown}: the line's axis words are not run as a move, so ${letters(mask & B_AXES)} ${(mask & B_AXES & ((mask & B_AXES) - 1)) !== 0 ? "are" : "is"} unknown from here`
        : `unknown code ${shown} is not evaluated`);
      this.markNotEvaluated(line);
    }
    if (unknownM >= 0) {
      const code = mc[unknownM]!;
      const shown = code >= 0 ? `M${code}` : "an M code that is not a whole number from 0 to 99";
      if (mask & B_AXES) {
        holdMotion = true;
        this.say(R.unknownCode, "warning", line, `unknown code ${shown}: the line's axis words are not run as a move, and their positions are unknown from here`);
        this.markNotEvaluated(line);
      } else if (common && code >= 0) {
        this.say(R.unknownCode, "info", line, `${shown} is a machine function this dialect does not know: not checked`);
      } else this.say(R.unknownCode, "warning", line, `unknown code ${shown}`);
    }
    const cancel = (gSeen & (1 << GG_CANCEL)) !== 0;
    // the motion this line runs in: what decides whether I/J/K/R belong on it
    const effMotion = motionCode >= 0 ? motionCode : cancel && isCycle(this.motion) ? this.motionBeforeCycle : this.motion;
    if (unknownG < 0 && mask & B_IJKR && g0Axis !== G10 && !isTransform(g0Axis) && !isArc(effMotion) && !isCycle(effMotion) && !(stop === 98 && (mask & B_IJKR) === B_K)) {
      this.say(R.wordInvalid, "error", line,
        `${letters(mask & B_IJKR)} on a line whose motion is ${effMotion === G80 ? "none" : fmtCode(effMotion)}: only arcs and canned cycles take I, J, K and R, so the line is not run`);
      this.skipBlock(line);
      return;
    }
    // ---- order of execution ([NIST] table 8) ----
    if (gSeen & (1 << GG_FEEDMODE)) {
      this.inverseTime = gWord[GG_FEEDMODE] === G93;
      if (this.inverseTime) this.feedRaw = NaN;
    }
    if (mask & B_F) this.setFeed(line);
    if (mask & B_S) this.setSpindle(line);
    if (mask & B_T) this.selectTool(line);
    if (toolChange) this.changeTool(line);
    if (spin >= 0) {
      if (spin === 3 || spin === 4 || spin === 5) {
        if (spin !== this.spindleDir) this.spindleSaid = false;
        this.spindleDir = spin;
      }
    }
    if (g0Other & 1) this.dwell(line, lv[L_P]!, (mask & B_P) !== 0);
    if (gSeen & (1 << GG_PLANE)) {
      const plane = gWord[GG_PLANE]!;
      if (this.comp !== 40 && plane !== G17) this.say(R.compInvalid, "error", line, "plane changed with cutter compensation on");
      this.plane = plane / 10;
    }
    if (gSeen & (1 << GG_UNITS)) {
      const inch = gWord[GG_UNITS] === G20;
      // the report units are those of the first G20/G21 that runs, when nothing has moved before it
      if (!this.unitsDeclared && !this.committed && inch !== (this.units === "inch")) this.applyUnits(inch ? "inch" : "mm");
      this.unitsDeclared = true;
      if (this.comp !== 40 && inch !== this.progInch) this.say(R.compInvalid, "error", line, "units changed with cutter compensation on");
      this.progInch = inch;
      this.sc = inch === (this.units === "inch") ? 1 : inch ? MM_PER_INCH : 1 / MM_PER_INCH;
    }
    if (gSeen & (1 << GG_COMP)) this.setComp(line, gWord[GG_COMP]!, mask);
    if (gSeen & (1 << GG_LENGTH)) this.setLength(line, gWord[GG_LENGTH]!, mask);
    if (gSeen & (1 << GG_OFFSET)) this.selectOffset(line, gWord[GG_OFFSET]!);
    if (gSeen & (1 << GG_DIST)) {
      this.absolute = gWord[GG_DIST] === G90;
      this.incSince = 0;
    }
    if (gSeen & (1 << GG_ARCMODE)) this.arcAbsolute = gWord[GG_ARCMODE] === G90_1;
    if (gSeen & (1 << GG_RETURN)) this.retractOld = gWord[GG_RETURN] === G98;
    if (g0Other & 32) this.xform = 0;
    if (g0Other & (4 | 8 | 16)) {
      if (g0Other & 16) this.shift92.set(this.saved92);
      else {
        this.saved92.set(this.shift92);
        this.shift92.fill(0);
      }
      this.updateShift();
    }
    let axesUsed = false;
    if (g0Axis >= 0) {
      axesUsed = true;
      if (g0Axis === G10) this.g10(line);
      else if (g0Axis === G28 || g0Axis === G30) this.home(line, g0Axis === G30);
      else if (g0Axis === G92 || g0Axis === G52) this.setShift(line, g0Axis === G52);
      else this.transform(line, g0Axis);
    }
    if (cancel) {
      // common dialect: G80 ends the cycle; the motion mode from before it is in force again
      if (isCycle(this.motion)) this.motion = this.motionBeforeCycle;
      this.cycR = this.cycZ = NaN;
    }
    if (motionCode >= 0) {
      if (motionCode === G80) {
        this.motion = G80;
        this.cycR = this.cycZ = NaN;
        if (mask & B_AXES && !axesUsed) {
          this.say(R.modalConflict, "error", line, "axis words on a G80 line: G80 cancels motion");
          this.skipBlock(line);
          mask &= ~B_AXES;
        }
      } else {
        if (isCycle(motionCode) && motionCode !== this.motion) {
          // a new cycle: sticky values reset
          this.cycQ = NaN;
          if (!isCycle(this.motion)) {
            this.motionBeforeCycle = this.motion;
            this.cycInit = NaN;
          }
        }
        this.motion = motionCode;
      }
    }
    if (holdMotion) {
      if (!axesUsed) this.notEvaluatedAxes();
    } else if (!axesUsed && mask & B_AXES) {
      if (g0Other & 2) this.machineMove(line);
      else if (this.motion === G80) {
        this.say(R.modalConflict, "error", line, "axis words with no motion mode in force (G80)");
        this.skipBlock(line);
      } else this.motionBlock(line, this.motion, mask);
    } else if (g0Other & 2 && !axesUsed) {
      this.say(R.wordInvalid, "warning", line, "G53 without axis words");
    } else if (!axesUsed && isArc(this.motion) && (motionCode >= 0 || mask & B_IJKR)) {
      if (common && mask & B_IJK && !(mask & B_R)) {
        // common dialect: an arc with a centre and no end point in the plane is a full circle
        this.motionBlock(line, this.motion, mask);
      } else {
        this.say(R.arcInvalid, "error", line, `${fmtCode(this.motion)} with no end point in the plane`);
        this.markNotEvaluated(line);
      }
    }
    if (stop >= 0) this.stopCode(line, stop);
  }

  notEvaluatedAxes(): void {
    const mask = this.mask;
    for (let i = 0; i < 3; i++) if (mask & (1 << AXIS_OF_LETTER[i]!)) this.pos[i] = NaN;
    if (mask & B_Z) this.zHome = false;
  }

  /** Common dialect: rotation, scaling, mirror and polar coordinates are known but not applied. */
  transform(line: number, code: number): void {
    this.xform = code;
    this.say(R.notEvaluated, "warning", line,
      `${fmtCode(code)} transforms the coordinates and the engine does not apply it: the moves until its cancel are analysed as written, not as the machine runs them`);
    this.markNotEvaluated(line);
  }
  // ---- modal settings ------------------------------------------------------------------------------------------
  setFeed(line: number): void {
    const f = this.lv[L_F]!;
    if (f < 0) {
      this.say(R.wordInvalid, "error", line, `negative feed F${fmt(f)}`);
      return;
    }
    this.feedRaw = f;
    this.feed = f * this.sc;
    if (f > 0) this.feedMissingSaid = false;
    if (!this.inverseTime && this.feed > this.maxFeed * (1 + 1e-9)) {
      this.say(R.feedOverLimit, "warning", line, `feed F${fmt(f)} is above the machine's limit of ${fmt(this.maxFeed / this.sc)}`);
    }
  }
  setSpindle(line: number): void {
    const s = this.lv[L_S]!;
    if (s < 0) {
      this.say(R.spindleInvalid, "error", line, `negative spindle speed S${fmt(s)}`);
      return;
    }
    if (s !== this.spindle) this.spindleSaid = false;
    this.spindle = s;
    if (s > this.maxSpindle) {
      this.say(R.spindleOverLimit, "warning", line, `spindle speed S${fmt(s)} is above the machine's limit of ${fmt(this.maxSpindle)} rpm`);
    }
  }
  selectTool(line: number): void {
    const t = this.lv[L_T]!;
    if (t < 0 || t !== Math.floor(t) || t > 65534) {
      this.say(R.toolInvalid, "error", line, `T${fmt(t)} is not a valid tool number`);
      return;
    }
    this.selectedT = t;
    this.toolEntry(t, line);
    if (this.cs >= 0) this.setDesc(t, this.commentText(), line, 3);
    else {
      this.pendingDescTool = t;
      this.pendingDescLine = line;
    }
  }
  toolEntry(t: number, line: number): number {
    let i = this.toolOfNumber.get(t);
    if (i === undefined) {
      i = this.tools.length;
      if (i >= NO_TOOL_IDX - 1) return NO_TOOL_IDX;
      this.tools.push({ number: t, firstLine: line, lastLine: line, loads: 0, h: [], d: [], offsets: [] });
      this.toolOfNumber.set(t, i);
      this.tFeedMin.push(Infinity);
      this.tFeedMax.push(-Infinity);
      this.tSpinMin.push(Infinity);
      this.tSpinMax.push(-Infinity);
      const slots = i + 2;
      this.tS = grow64(this.tS, slots * SSTRIDE, () => {});
      this.tB = grow64(this.tB, slots * BSTRIDE, (b, from) => {
        for (let o = from; o < b.length; o += BSTRIDE) initBox(b, o);
      });
    }
    return i;
  }
  changeTool(line: number): void {
    const prev = this.toolIdx === NO_TOOL_IDX ? null : this.tools[this.toolIdx]!.number;
    if (this.selectedT < 0) {
      this.say(R.toolInvalid, "error", line, "M6 with no tool selected (no T word before it)");
    }
    if (this.pos[2]! < this.safeZ - 1e-9 && !this.zHome) {
      this.say(R.toolChangeLow, "error", line, `tool change at Z${fmt(this.pos[2]!)}, below safe Z ${fmt(this.safeZ)}`);
    }
    // G91 left on across the change by a program that moves in G90: reported at the first move after the change,
    // if G90 does not come first (a program in G91 from its start means it)
    this.incSince = this.absolute || !this.movedAbsolute ? 0 : line;
    if (this.comp !== 40) this.say(R.compInvalid, "error", line, "tool change with cutter compensation on");
    this.changeCount++;
    if (this.changes.length < 10000) this.changes.push({ line, tool: this.selectedT < 0 ? null : this.selectedT, previous: prev });
    if (this.selectedT >= 0) {
      const i = this.toolEntry(this.selectedT, line);
      this.toolIdx = i;
      this.toolSlot = i === NO_TOOL_IDX ? 0 : i + 1;
      if (i !== NO_TOOL_IDX) {
        const t = this.tools[i]!;
        t.loads++;
        t.lastLine = line;
      }
    }
    this.lengthSinceChange = false;
    this.lengthSaid = false;
    this.toolSaid = false;
    this.lastCut = false;
    // [NIST] 3.6.3: the spindle is stopped when the change is complete
    this.spindleDir = 5;
    this.spindleSaid = false;
    this.overTravelSaid = 0;
    // the change leaves Z at the tool change position, above the work (common practice)
    this.zHome = true;
    this.addSeconds(S_TC_S, this.tcSeconds);
  }
  dwell(line: number, p: number, given: boolean): void {
    if (!given || !(p >= 0)) {
      this.say(R.dwellInvalid, "error", line, given ? `negative dwell P${fmt(p)}` : "G4 without a P word");
      return;
    }
    this.addDwell(p);
  }
  addDwell(sec: number): void {
    this.addSeconds(S_DWELL_S, sec);
  }
  /**
   * Adds `sec` to one time slot and to the total, for the program, the current tool and (dwells only) the offset
   * in use: a tool change belongs to no part, and a dwell before any offset is in use creates none.
   */
  addSeconds(slot: number, sec: number): void {
    this.gS[slot]! += sec;
    this.gS[S_TOTAL_S]! += sec;
    this.tS[this.toolSlot * SSTRIDE + slot]! += sec;
    this.tS[this.toolSlot * SSTRIDE + S_TOTAL_S]! += sec;
    const oi = this.offIdx;
    if (slot === S_TC_S || oi < 0) return;
    this.oS[oi * SSTRIDE + slot]! += sec;
    this.oS[oi * SSTRIDE + S_TOTAL_S]! += sec;
  }
  setComp(line: number, comp: number, mask: number): void {
    if (comp === G40) {
      this.comp = 40;
      return;
    }
    if (this.plane !== 17) this.say(R.compInvalid, "error", line, "cutter compensation is only allowed in the XY plane (G17)");
    if (this.comp !== 40) this.say(R.compInvalid, "error", line, `${fmtCode(comp)} while cutter compensation is already on`);
    if (mask & B_D) {
      const d = this.lv[L_D]!;
      if (d < 0 || d !== Math.floor(d)) this.say(R.compInvalid, "error", line, `D${fmt(d)} is not a valid offset number`);
      this.compD = d;
      if (this.toolIdx !== NO_TOOL_IDX) {
        const arr = this.tools[this.toolIdx]!.d;
        if (!arr.includes(d)) arr.push(d);
      }
    } else if (Number.isNaN(this.compD)) {
      this.say(R.compInvalid, "warning", line, `${fmtCode(comp)} without a D word`);
    }
    this.comp = comp / 10;
  }
  setLength(line: number, len: number, mask: number): void {
    if (len === G49) {
      this.lengthMode = 49;
      this.lengthSinceChange = false;
      return;
    }
    let h = this.lengthH;
    if (mask & B_H) {
      h = this.lv[L_H]!;
      if (h < 0 || h !== Math.floor(h)) {
        this.say(R.wordInvalid, "error", line, `H${fmt(h)} is not a valid offset number`);
        return;
      }
    } else if (this.toolIdx !== NO_TOOL_IDX && Number.isNaN(h)) {
      h = this.tools[this.toolIdx]!.number;
    }
    this.lengthMode = len / 10;
    this.lengthH = h;
    this.lengthSinceChange = true;
    if (this.toolIdx !== NO_TOOL_IDX) {
      const t = this.tools[this.toolIdx]!;
      if (!Number.isNaN(h) && !t.h.includes(h)) t.h.push(h);
      if (this.hMustEqualT && h !== t.number) {
        this.say(R.lengthOffsetMismatch, "error", line, `tool length offset H${fmt(h)} with tool T${t.number} in the spindle`);
      }
    }
  }
  selectOffset(line: number, code: number): void {
    let num: number;
    if (code === G54_1) {
      const p = this.lv[L_P]!;
      if (!(this.mask & B_P) || p < 1 || p !== Math.floor(p)) {
        this.say(R.offsetInvalid, "error", line, "G54.1 needs P with a positive integer");
        return;
      }
      if (this.machine && p > this.workOffsetCount - 6) {
        this.say(R.offsetInvalid, "error", line, `G54.1 P${p}: the control has ${Math.max(0, this.workOffsetCount - 6)} extended offsets`);
      }
      num = 100 + p;
    } else if (code >= 540 && code <= 590 && code % 10 === 0) {
      num = code / 10 - 53;
      if (this.machine && num > this.workOffsetCount) {
        this.say(R.offsetInvalid, "error", line, `${fmtCode(code)}: the control has ${this.workOffsetCount} work offsets`);
      }
    } else {
      num = 6 + (code - 590);
      if (this.machine && this.workOffsetCount < 7) {
        this.say(R.offsetInvalid, "warning", line, `${fmtCode(code)}: the control has ${this.workOffsetCount} work offsets`);
      }
    }
    if (this.comp !== 40) this.say(R.compInvalid, "error", line, "work offset changed with cutter compensation on");
    this.offSelected = true;
    if (this.approach === 0) this.approach = line;
    if (num !== this.offNum) {
      for (let i = 0; i < 3; i++) {
        const machinePos = this.pos[i]! + this.org(this.offNum, i);
        this.pos[i] = machinePos - this.org(num, i);
      }
      this.offNum = num;
      this.overTravelSaid = 0;
      this.lastCut = false;
    }
    this.offIdx = this.offsetEntry(num);
    const e = this.offsets[this.offIdx];
    if (e && e.firstLine === null) e.firstLine = line;
  }
  offsetEntry(num: number): number {
    let i = this.offIdxOfNum.get(num);
    if (i === undefined) {
      i = this.offsets.length;
      if (i >= 255) return 254;
      this.offsets.push({ num, firstLine: null, firstMotion: null, last: null, tools: [] });
      this.offIdxOfNum.set(num, i);
      this.oS = grow64(this.oS, (i + 1) * SSTRIDE, () => {});
      this.oB = grow64(this.oB, (i + 1) * BSTRIDE, (b, from) => {
        for (let o = from; o < b.length; o += BSTRIDE) initBox(b, o);
      });
    }
    return i;
  }
  curOff(): number {
    if (this.offIdx < 0) this.offIdx = this.offsetEntry(this.offNum);
    return this.offIdx;
  }
  /** Machine coordinate of part zero of system `num` on axis i; NaN when unknown. */
  org(num: number, i: number): number {
    const o = this.origins.get(num);
    return o ? o[i]! : NaN;
  }
  updateShift(): void {
    for (let i = 0; i < 3; i++) this.shift[i] = this.shift52[i]! + this.shift92[i]!;
  }
  setShift(line: number, local: boolean): void {
    const mask = this.mask;
    if (this.comp !== 40 && !local) this.say(R.compInvalid, "error", line, "G92 with cutter compensation on");
    this.say(R.coordinateShift, "info", line, local ? "G52 local coordinate shift" : "G92 coordinate shift");
    this.committed = true;
    for (let i = 0; i < 3; i++) {
      if (!(mask & (1 << AXIS_OF_LETTER[i]!))) continue;
      const v = this.lv[AXIS_OF_LETTER[i]!]! * this.sc;
      if (local) this.shift52[i] = v;
      // G92: the current point gets the given program coordinate ([NIST] 3.5.18); part coordinates stay
      else this.shift92[i] = this.pos[i]! - this.shift52[i]! - v;
    }
    this.updateShift();
  }
  g10(line: number): void {
    const lv = this.lv;
    const mask = this.mask;
    const l = lv[L_L]!;
    if (!(mask & B_L) || (l !== 2 && l !== 20)) {
      if (mask & B_L && (l === 1 || l === 10 || l === 11 || l === 12)) {
        this.say(R.notEvaluated, "info", line, `G10 L${l} writes the tool table: not evaluated`);
      } else this.say(R.unknownCode, "warning", line, "G10 needs L2 or L20 for work offsets");
      return;
    }
    const p = lv[L_P]!;
    if (!(mask & B_P) || p < 1 || p > 9 || p !== Math.floor(p)) {
      this.say(R.offsetInvalid, "error", line, `G10 L${l}: P must be an integer from 1 to 9`);
      return;
    }
    const num = p;
    const cur = this.origins.get(num);
    const o = cur ? Float64Array.from(cur) : new Float64Array([NaN, NaN, NaN]);
    for (let i = 0; i < 3; i++) {
      if (!(mask & (1 << AXIS_OF_LETTER[i]!))) continue;
      const v = lv[AXIS_OF_LETTER[i]!]! * this.sc;
      if (l === 2) o[i] = v;
      // L20: the current point gets the given coordinate in system P
      else o[i] = this.pos[i]! + this.org(this.offNum, i) - this.shift[i]! - v;
    }
    if (num === this.offNum) {
      for (let i = 0; i < 3; i++) {
        const machinePos = this.pos[i]! + this.org(num, i);
        this.pos[i] = machinePos - o[i]!;
      }
    }
    this.origins.set(num, o);
    this.originSource.set(num, "program");
    this.committed = true;
  }


  // ---- motion --------------------------------------------------------------------------------------------------
  /**
   * Target of a move: programmed axes in part coordinates (absolute or incremental). An incremental axis from an
   * unknown position keeps its increment in `inc`, so the move's length is still known.
   */
  target(mask: number): void {
    const tgt = this.tgt;
    const lv = this.lv;
    const sc = this.sc;
    const pos = this.pos;
    const shift = this.shift;
    const inc = this.inc;
    if (this.absolute) {
      tgt[0] = mask & B_X ? lv[L_X]! * sc + shift[0]! : pos[0]!;
      tgt[1] = mask & B_Y ? lv[L_Y]! * sc + shift[1]! : pos[1]!;
      tgt[2] = mask & B_Z ? lv[L_Z]! * sc + shift[2]! : pos[2]!;
      inc[0] = inc[1] = inc[2] = 0;
    } else {
      inc[0] = mask & B_X ? lv[L_X]! * sc : 0;
      inc[1] = mask & B_Y ? lv[L_Y]! * sc : 0;
      inc[2] = mask & B_Z ? lv[L_Z]! * sc : 0;
      tgt[0] = pos[0]! + inc[0]!;
      tgt[1] = pos[1]! + inc[1]!;
      tgt[2] = pos[2]! + inc[2]!;
    }
  }

  motionBlock(line: number, motion: number, maskIn: number): void {
    const mask = maskIn === 0 ? this.mask : maskIn;
    this.committed = true;
    if (!this.offSelected && !this.offsetSaid) {
      this.offsetSaid = true;
      this.say(R.offsetNotSet, "warning", line, `motion before any work offset was selected: it runs in the active offset (${offsetCode(this.offNum)} assumed)`);
    }
    if (!this.unitsDeclared && !this.unitsSaid) {
      this.unitsSaid = true;
      this.say(R.unitsMissing, "warning", line, `motion before any G20/G21: units assumed ${this.units}`);
    }
    if (this.firstMotion) this.startPoint(line);
    if (this.absolute) this.movedAbsolute = true;
    if (this.incSince !== 0) {
      if (!this.absolute) {
        this.say(R.incrementalLeftOn, "warning", line,
          `G91 incremental, left on since before the tool change on line ${this.incSince}, is in force: this move runs incremental`);
      }
      this.incSince = 0;
    }
    if (this.xform !== 0) this.markNotEvaluated(line);
    if (motion === G0) {
      this.target(mask);
      this.linear(line, K_RAPID);
      return;
    }
    if (motion === G1 || motion === G38_2) {
      this.target(mask);
      this.feedCheck(line);
      this.linear(line, K_FEED);
      return;
    }
    if (motion === G2 || motion === G3) {
      this.feedCheck(line);
      this.arc(line, motion === G2, mask);
      return;
    }
    this.cycle(line, motion, mask);
  }

  /**
   * The program's first move. A program in G91 from its start never says where it starts: its moves are measured
   * from that start point, which becomes 0 on the axes it leaves unset, so its lengths, time and shape are known.
   */
  startPoint(line: number): void {
    this.firstMotion = false;
    const pos = this.pos;
    if (this.absolute || pos[0] === pos[0] || pos[1] === pos[1]) return;
    let rel = 0;
    for (let i = 0; i < 3; i++) {
      if (pos[i] !== pos[i]) {
        pos[i] = 0;
        rel |= 1 << i;
      }
    }
    this.relAxes = rel;
    const text = "the program moves in G91 from a start point it never sets: positions are measured from that point";
    this.say(R.assumption, "info", line, text);
    this.lateAssumptions.push(`${text} (line ${line})`);
  }
  lateAssumptions: string[] = [];
  movedAbsolute = false;

  feedCheck(line: number): void {
    if (this.inverseTime ? !(this.mask & B_F) : !(this.feed > 0)) {
      if (this.inverseTime) {
        this.say(R.feedMissing, "error", line, "G93 inverse time: every feed move needs its own F word");
      } else if (!this.feedMissingSaid) {
        this.feedMissingSaid = true;
        this.say(R.feedMissing, "error", line, "feed move with no feed rate in force");
      }
    }
  }

  /** The checks every cut shares (the definition of a cut is in `linear`). */
  cutChecks(line: number): void {
    if (this.toolIdx === NO_TOOL_IDX && !this.toolSaid) {
      this.toolSaid = true;
      this.say(R.toolNotLoaded, "warning", line,
        this.selectedT >= 0 ? `cutting with T${this.selectedT} selected but never loaded by M6` : "cutting with no tool loaded");
    }
    if ((this.spindleDir === 5 || this.spindle === 0) && !this.spindleSaid) {
      this.spindleSaid = true;
      if (this.spindleControlled) {
        this.say(R.spindleOffCut, "error", line, this.spindleDir === 5 ? "cutting with the spindle stopped" : "cutting with the spindle at S0");
      } else if (!this.manualSpindleSaid) {
        // the program cannot tell whether a spindle switched by hand is turning: said once, as information
        this.manualSpindleSaid = true;
        this.say(R.spindleOffCut, "info", line, "the spindle of this machine is switched by hand: the program cannot show that it turns while cutting");
      }
    }
    if (this.toolIdx !== NO_TOOL_IDX && !this.lengthSinceChange && !this.lengthSaid) {
      this.lengthSaid = true;
      this.say(R.lengthOffsetMissing, "error", line, `cutting with T${this.tools[this.toolIdx]!.number} with no tool length offset (G43/G44) since the tool change`);
    }
  }

  /** Accounts a straight move from the current position to `tgt` and makes it the current position. */
  linear(line: number, kind: number): void {
    // coordinates travel in typed arrays, not as arguments: double arguments would be boxed on every call
    const pos = this.pos;
    const tgt = this.tgt;
    const sx = pos[0]!, sy = pos[1]!, sz = pos[2]!;
    const x = tgt[0]!, y = tgt[1]!, z = tgt[2]!;
    if (kind === K_RAPID && (this.relAxes & 4) === 0) {
      // a rapid that moves X/Y while below safe Z, or that ends below it
      const lim = this.safeZ - 1e-9;
      const endsBelow = z < lim;
      if (endsBelow || (sz < lim && ((x === x && x !== sx) || (y === y && y !== sy)))) {
        this.say(R.rapidBelowSafeZ, "warning", line,
          endsBelow ? `rapid ends at Z${fmt(z)}, below safe Z ${fmt(this.safeZ)}` : `rapid in X/Y at Z${fmt(sz)}, below safe Z ${fmt(this.safeZ)}`);
      }
    }
    let dx = x - sx, dy = y - sy, dz = z - sz;
    // an unknown end: an incremental axis still has its increment, an absolute one from nowhere counts nothing
    if (dx !== dx) dx = this.inc[0]!;
    if (dy !== dy) dy = this.inc[1]!;
    if (dz !== dz) dz = this.inc[2]!;
    const len = Math.sqrt(dx * dx + dy * dy + dz * dz);
    this.mlen = len;
    // A cut is a feed move that starts or ends at or below safe Z; one that stays above it is positioning. An
    // unknown Z is below unless the tool is at its home height (program start, after M6 or a Z home move).
    let cut = false;
    if (kind === K_FEED || kind === K_CYCLE_FEED) {
      const lim = this.safeZ + 1e-9;
      cut = (sz === sz ? sz < lim : !this.zHome) || (z === z ? z < lim : !this.zHome);
    }
    this.cutNow = cut;
    if (cut) this.cutting(line);
    else if (this.approach === 0 && !(dz > 0 && dx === 0 && dy === 0)) this.approach = line;
    this.account(line, kind);
    if (cut && !this.lastCut) this.cutStart();
    this.lastCut = cut;
    // point(), without its stretch switch: account() has just made the stretch current
    addBox(this.cB, 0, tgt, cut);
    if (this.machine !== undefined && this.originSource.size > 0) this.travel(tgt);
    if (len > 0 || sx !== sx || sy !== sy || sz !== sz) this.seg(line, kind, tgt);
    pos[0] = x;
    pos[1] = y;
    pos[2] = z;
    if (z === z) this.zHome = false;
  }

  /** A cutting move: the checks, and the count of cutting blocks of the current tool under the current offset. */
  cutting(line: number): void {
    this.cutChecks(line);
    const oi = this.offIdx < 0 ? this.curOff() : this.offIdx;
    if (this.toolIdx !== this.lastRunTool || oi !== this.lastRunOff) this.newRun(this.toolIdx, oi);
    if (this.cutBlock !== this.blocks) {
      this.cutBlock = this.blocks;
      if (!this.lastCut && this.stretchBlock !== this.blocks) this.newStretch(oi);
      this.runBlocks++;
    }
  }
  /** Where a stretch of cutting starts: its tool, offset, approach line and how many cutting blocks came before. */
  newStretch(oi: number): void {
    this.stretchBlock = this.blocks;
    const i = this.stretchN * 4;
    if (i + 4 > this.stretches.length) {
      if (this.stretchN >= 1_000_000) return;
      this.stretches = growI32(this.stretches, i + 4);
    }
    const s = this.stretches;
    s[i] = this.toolIdx;
    s[i + 1] = oi;
    s[i + 2] = this.approach === 0 ? this.line : this.approach;
    s[i + 3] = this.runBase + this.runBlocks;
    this.stretchN++;
  }

  mlen = 0;
  cutNow = false;
  accTool = -1;
  accOff = -1;
  // The current stretch (one tool slot under one offset): a move's sums and bounds go here, and are folded into the
  // program, tool and offset accumulators when the tool or the offset changes (and at the end), so that a move
  // updates one set of accumulators instead of three.
  readonly cS = new Float64Array(SSTRIDE);
  readonly cB = newBounds(1);
  curSlot = -1;
  curOi = -1;
  /** Index of the current offset, with the stretch accumulators switched to the current tool and offset. */
  stretch(): number {
    const oi = this.offIdx < 0 ? this.curOff() : this.offIdx;
    if (this.toolSlot !== this.curSlot || oi !== this.curOi) this.fold(oi);
    return oi;
  }
  /** Adds the stretch into the program, tool and offset accumulators and starts a new one for slot/offset `oi`. */
  fold(oi: number): void {
    const slot = this.curSlot;
    if (slot >= 0) {
      const cs = this.cS;
      const gs = this.gS, ts = this.tS, os = this.oS;
      const tb = slot * SSTRIDE, ob = this.curOi * SSTRIDE;
      for (let k = 0; k < SSTRIDE; k++) {
        const v = cs[k]!;
        gs[k]! += v;
        ts[tb + k]! += v;
        os[ob + k]! += v;
        cs[k] = 0;
      }
      const cb = this.cB;
      mergeBox(this.gB, 0, cb);
      mergeBox(this.tB, slot * BSTRIDE, cb);
      mergeBox(this.oB, this.curOi * BSTRIDE, cb);
      initBox(cb, 0);
    }
    this.curSlot = this.toolSlot;
    this.curOi = oi;
  }
  /** Lengths, times and counts of one move of length `mlen`. */
  account(line: number, kind: number): void {
    const len = this.mlen;
    const acc = this.accel;
    const rapid = kind === K_RAPID || kind === K_CYCLE_RAPID;
    const oi = this.stretch();
    const cs = this.cS;
    let t: number;
    let total: number;
    if (rapid) {
      t = (len / this.rapidRate) * 60;
      const v = this.rapidRate / 60;
      total = len > 0 ? (len >= (v * v) / acc ? len / v + v / acc : 2 * Math.sqrt(len / acc)) : 0;
      this.rapidLen += len;
      cs[S_RAPID_LEN]! += len;
      cs[S_RAPID_S]! += t;
    } else {
      let v: number; // units/min
      if (this.inverseTime) {
        const f = this.mask & B_F ? this.feedRaw : NaN;
        t = f > 0 ? 60 / f : 0;
        v = t > 0 ? (len / t) * 60 : 0;
      } else {
        v = this.feed;
        t = v > 0 ? (len / v) * 60 : 0;
      }
      const vs = (v < this.maxFeed ? v : this.maxFeed) / 60;
      // trapezoidal profile [KIN]; a triangle when the move is too short to reach the feed
      total = vs > 0 && len > 0 ? (len >= (vs * vs) / acc ? len / vs + vs / acc : 2 * Math.sqrt(len / acc)) : 0;
      this.feedLen += len;
      cs[S_FEED_LEN]! += len;
      cs[S_FEED_S]! += t;
      if (this.cutNow) {
        const ti = this.toolIdx;
        const fr = this.inverseTime ? this.feedRaw : this.feed;
        // the ranges only change when the feed, the speed or the tool does (NaN always takes the long way)
        if (fr !== this.rangeFeed || this.spindle !== this.rangeSpin || ti !== this.rangeTool) this.cutRanges(ti, fr);
      }
    }
    cs[S_TOTAL_S]! += total;
    // first/last lines; the lists only change when the tool or the offset does
    const o = this.offsets[oi]!;
    o.last = line;
    if (this.toolIdx !== NO_TOOL_IDX) this.tools[this.toolIdx]!.lastLine = line;
    if (this.toolIdx !== this.accTool || oi !== this.accOff) {
      this.accTool = this.toolIdx;
      this.accOff = oi;
      if (o.firstMotion === null) o.firstMotion = line;
      if (this.toolIdx !== NO_TOOL_IDX) {
        const tl = this.tools[this.toolIdx]!;
        if (!tl.offsets.includes(oi)) tl.offsets.push(oi);
        if (!o.tools.includes(tl.number)) o.tools.push(tl.number);
      }
    }
    if (kind === K_RAPID) this.counts.rapid++;
    else if (kind === K_FEED) this.counts.feed++;
    else if (kind === K_ARC) this.counts.arc++;
  }

  rangeFeed = NaN;
  rangeSpin = NaN;
  rangeTool = -1;
  /** Feed and spindle ranges while cutting, per tool and for the program. */
  cutRanges(ti: number, fr: number): void {
    const s = this.spindle;
    this.rangeFeed = fr;
    this.rangeSpin = s;
    this.rangeTool = ti;
    if (ti !== NO_TOOL_IDX) {
      if (fr === fr) {
        if (fr < this.tFeedMin[ti]!) this.tFeedMin[ti] = fr;
        if (fr > this.tFeedMax[ti]!) this.tFeedMax[ti] = fr;
      }
      if (s === s) {
        if (s < this.tSpinMin[ti]!) this.tSpinMin[ti] = s;
        if (s > this.tSpinMax[ti]!) this.tSpinMax[ti] = s;
      }
    }
    if (s === s) {
      if (s < this.spinMin) this.spinMin = s;
      if (s > this.spinMax) this.spinMax = s;
    }
  }

  /** A new cutting run: the cutting tool or the offset changed. */
  newRun(ti: number, oi: number): void {
    const prev = this.runs[this.runs.length - 1];
    if (prev) {
      prev.endSeg = this.tpN;
      prev.blocks = this.runBlocks;
      const k = this.lastRunTool * 256 + this.lastRunOff;
      this.blocksOf.set(k, (this.blocksOf.get(k) ?? 0) + this.runBlocks);
    }
    this.lastRunTool = ti;
    this.lastRunOff = oi;
    this.runBase = this.blocksOf.get(ti * 256 + oi) ?? 0;
    this.runBlocks = 0;
    if (this.runs.length < 100000) this.runs.push({ tool: ti, offset: oi, startSeg: this.tpN, endSeg: -1, blocks: 0 });
  }

  lastCut = false;
  /** The start of a cutting stretch belongs to the cutting bounds (it is already in the overall ones). */
  cutStart(): void {
    this.stretch();
    addBox(this.cB, 6, this.pos, false);
    this.approach = 0;
  }
  /** Adds an end point (or arc extreme) to the program bounds; NaN axes are skipped by the comparisons. */
  point(p: Float64Array, cut: boolean): void {
    this.stretch();
    addBox(this.cB, 0, p, cut);
    if (this.machine !== undefined && this.originSource.size > 0) this.travel(p);
  }

  travel(p: Float64Array): void {
    if (this.relAxes !== 0) return;
    const x = p[0]!, y = p[1]!, z = p[2]!;
    const o = this.origins.get(this.offNum);
    const m = this.machine;
    if (!o || !m) return;
    const s = this.mScale;
    const tr = m.travel;
    const eps = 1e-6;
    const mx = x + o[0]!, my = y + o[1]!, mz = z + o[2]!;
    let bits = 0;
    if (mx < tr.x.min * s - eps) bits |= 1;
    if (mx > tr.x.max * s + eps) bits |= 2;
    if (my < tr.y.min * s - eps) bits |= 4;
    if (my > tr.y.max * s + eps) bits |= 8;
    if (mz < tr.z.min * s - eps) bits |= 16;
    if (mz > tr.z.max * s + eps) bits |= 32;
    const fresh = bits & ~this.overTravelSaid;
    if (fresh) {
      this.overTravelSaid |= bits;
      const names = ["X-", "X+", "Y-", "Y+", "Z-", "Z+"].filter((_, i) => fresh & (1 << i)).join(", ");
      this.say(R.overTravel, "error", this.line,
        `move to machine X${fmt(mx)} Y${fmt(my)} Z${fmt(mz)} is outside the travel (${names}) under ${offsetCode(this.offNum)}`);
    }
  }
  // ---- toolpath --------------------------------------------------------------------------------------------------
  seg(line: number, kind: number, e: Float64Array): void {
    if (!this.wantPath || this.tpFull) return;
    const x = e[0]!, y = e[1]!, z = e[2]!;
    if (x !== x || y !== y || z !== z) return;
    const pos = this.pos;
    const sx = pos[0]!, sy = pos[1]!, sz = pos[2]!;
    const startKnown = sx === sx && sy === sy && sz === sz;
    if (this.tpV === 0) {
      if (!startKnown) {
        this.vertex(x, y, z);
        return;
      }
      this.vertex(sx, sy, sz);
    } else if (!startKnown || sx !== this.lvx || sy !== this.lvy || sz !== this.lvz) {
      this.push(line, K_JUMP, startKnown ? pos : e);
      if (!startKnown) return;
    }
    this.push(line, kind, e);
  }
  vertex(x: number, y: number, z: number): void {
    let v = this.cV;
    if (v === this.capV) v = this.fullVertexChunk();
    const o = v * 3;
    const cp = this.cPos;
    cp[o] = x;
    cp[o + 1] = y;
    cp[o + 2] = z;
    this.cV = v + 1;
    this.tpV++;
    this.lvx = x;
    this.lvy = y;
    this.lvz = z;
  }
  push(line: number, kind: number, e: Float64Array): void {
    const i = this.tpN;
    if (i >= this.tpLimit) {
      this.tpFull = true;
      this.say(R.toolpathTruncated, "warning", line, `toolpath truncated at ${i} segments`);
      return;
    }
    let j = this.cN;
    if (j === this.capS) j = this.fullSegmentChunk();
    this.cLine[j] = line;
    this.cKind[j] = kind;
    this.cTool[j] = this.toolIdx;
    this.cOff[j] = this.offIdx < 0 ? this.curOff() : this.offIdx;
    this.cN = j + 1;
    this.tpN = i + 1;
    this.vertex(e[0]!, e[1]!, e[2]!);
  }
  /** Makes room in a full vertex chunk; returns the next free index in it. */
  fullVertexChunk(): number {
    if (this.capV < CHUNK_MAX) {
      this.capV = Math.min(CHUNK_MAX, this.capV * 4);
      const p = new Float32Array(this.capV * 3);
      p.set(this.cPos);
      this.cPos = p;
      return this.cV;
    }
    if (!this.colPos) this.colPos = new ToolpathColumn(Float32Array, (this.tpLimit + 1) * 3);
    this.colPos.append(this.cPos, this.cV * 3);
    this.cV = 0;
    return 0;
  }
  /** Makes room in a full segment chunk; returns the next free index in it. */
  fullSegmentChunk(): number {
    if (this.capS < CHUNK_MAX) {
      const cap = (this.capS = Math.min(CHUNK_MAX, this.capS * 4));
      const ln = new Uint32Array(cap);
      ln.set(this.cLine);
      this.cLine = ln;
      const k = new Uint8Array(cap);
      k.set(this.cKind);
      this.cKind = k;
      const t = new Uint16Array(cap);
      t.set(this.cTool);
      this.cTool = t;
      const o = new Uint8Array(cap);
      o.set(this.cOff);
      this.cOff = o;
      return this.cN;
    }
    if (!this.colLine) {
      const lim = this.tpLimit;
      this.colLine = new ToolpathColumn(Uint32Array, lim);
      this.colKind = new ToolpathColumn(Uint8Array, lim);
      this.colTool = new ToolpathColumn(Uint16Array, lim);
      this.colOff = new ToolpathColumn(Uint8Array, lim);
    }
    this.flushSegments();
    return 0;
  }
  flushSegments(): void {
    const j = this.cN;
    this.colLine!.append(this.cLine, j);
    this.colKind!.append(this.cKind, j);
    this.colTool!.append(this.cTool, j);
    this.colOff!.append(this.cOff, j);
    this.cN = 0;
  }
  /** The toolpath arrays at the end of the run, each exactly as long as its data. */
  takePath(): Pick<Toolpath, "positions" | "line" | "kind" | "tool" | "offset"> {
    const n = this.tpN;
    if (n === 0) {
      // a lone start vertex is not a path: no segments, no vertices
      return { positions: new Float32Array(0), line: new Uint32Array(0), kind: new Uint8Array(0), tool: new Uint16Array(0), offset: new Uint8Array(0) };
    }
    let positions: Float32Array<ArrayBuffer>;
    if (this.colPos) {
      this.colPos.append(this.cPos, this.cV * 3);
      positions = this.colPos.take();
    } else positions = this.cPos.slice(0, this.cV * 3);
    this.cPos = new Float32Array(0);
    if (this.colLine) {
      this.flushSegments();
      this.cLine = new Uint32Array(0);
      this.cKind = new Uint8Array(0);
      this.cTool = new Uint16Array(0);
      this.cOff = new Uint8Array(0);
      const kind = this.colKind!.take();
      const offset = this.colOff!.take();
      const tool = this.colTool!.take();
      const line = this.colLine.take();
      return { positions, line, kind, tool, offset };
    }
    const j = this.cN;
    return { positions, line: this.cLine.slice(0, j), kind: this.cKind.slice(0, j), tool: this.cTool.slice(0, j), offset: this.cOff.slice(0, j) };
  }

  // ---- arcs --------------------------------------------------------------------------------------------------
  arc(line: number, cw: boolean, mask: number): void {
    const lv = this.lv;
    const sc = this.sc;
    // plane axes: first, second, normal; offsets letters
    let ia: number, ib: number, ic: number, la: number, lb: number, oa: number, ob: number;
    if (this.plane === 17) {
      ia = 0; ib = 1; ic = 2; la = L_X; lb = L_Y; oa = L_I; ob = L_J;
    } else if (this.plane === 18) {
      ia = 2; ib = 0; ic = 1; la = L_Z; lb = L_X; oa = L_K; ob = L_I;
    } else {
      ia = 1; ib = 2; ic = 0; la = L_Y; lb = L_Z; oa = L_J; ob = L_K;
    }
    this.target(mask);
    const tgt = this.tgt;
    const pos = this.pos;
    const planeName = this.plane === 17 ? "XY" : this.plane === 18 ? "XZ" : "YZ";
    const hasR = (mask & B_R) !== 0;
    const hasCentre = (mask & ((1 << oa) | (1 << ob))) !== 0;
    // the common dialect reads a centre with no end point in the plane as a full circle
    if (!(mask & ((1 << la) | (1 << lb))) && !(this.common && hasCentre && !hasR)) {
      this.say(R.arcInvalid, "error", line, `arc with no end point in the ${planeName} plane`);
      this.markNotEvaluated(line);
      return;
    }
    if (hasR && hasCentre) {
      this.say(R.arcInvalid, "error", line, "arc with both R and a centre (I/J/K)");
      this.markNotEvaluated(line);
      return;
    }
    if (!hasR && !hasCentre) {
      this.say(R.arcInvalid, "error", line, "arc with neither R nor a centre offset (I/J/K)");
      this.markNotEvaluated(line);
      return;
    }
    let sa = pos[ia]!, sb = pos[ib]!, ea = tgt[ia]!, eb = tgt[ib]!;
    const known = sa === sa && sb === sb && ea === ea && eb === eb;
    if (!known) {
      if (this.absolute || this.arcAbsolute) {
        this.say(R.arcStartUnknown, "warning", line, "arc from a position that is not known: it is not drawn");
        this.cutNow = false;
        this.mlen = 0;
        this.account(line, K_ARC);
        pos[0] = tgt[0]!;
        pos[1] = tgt[1]!;
        pos[2] = tgt[2]!;
        return;
      }
      // incremental: the arc is known relative to its start, so its length is
      sa = 0;
      sb = 0;
      ea = this.inc[ia]!;
      eb = this.inc[ib]!;
    }
    const out = this.arcOut;
    if (hasR) {
      const r = lv[L_R]! * sc;
      // strict: the [NIST] rule (R short by a relative 1e-12 at most); common: short by the arc tolerance at most
      const st = arcFromRadius(sa, sb, ea, eb, r, cw, out, this.common ? this.arcTolerance(this.progInch) : 0);
      if (st !== ARC_OK) {
        this.say(R.arcInvalid, "error", line,
          st === ARC_RADIUS_TOO_SMALL
            ? `radius R${fmt(lv[L_R]!)} is shorter than half the distance to the end point`
            : "radius-format arc whose end point is its start point");
        this.markNotEvaluated(line);
        return;
      }
    } else {
      let ci: number, cj: number;
      if (this.arcAbsolute) {
        // G90.1: I/J/K are the centre's own coordinates
        ci = mask & (1 << oa) ? lv[oa]! * sc + this.shift[ia]! - sa : 0;
        cj = mask & (1 << ob) ? lv[ob]! * sc + this.shift[ib]! - sb : 0;
      } else {
        ci = mask & (1 << oa) ? lv[oa]! * sc : 0;
        cj = mask & (1 << ob) ? lv[ob]! * sc : 0;
      }
      if (!arcFromCenter(sa, sb, ea, eb, ci, cj, cw, out)) {
        this.say(R.arcInvalid, "error", line, "arc centre is at the start point");
        this.markNotEvaluated(line);
        return;
      }
      // [NIST] 3.5.3.2: the end must be as far from the centre as the start (within the arc tolerance)
      const tolArc = this.arcTolerance(this.progInch);
      const diff = Math.abs(out[A_REND]! - out[A_R]!);
      if (diff > tolArc + 1e-12) {
        this.say(R.arcRadiusMismatch, "error", line,
          `start radius ${fmt(out[A_R]! / sc)} and end radius ${fmt(out[A_REND]! / sc)} differ by ${fmt(diff / sc)} (more than ${fmt(tolArc / sc)})`);
      }
    }
    const ca = out[A_CA]!, cb = out[A_CB]!, r = out[A_R]!, a0 = out[A_A0]!, sweep = out[A_SWEEP]!;
    const sc0 = pos[ic]!;
    const ec = tgt[ic]!;
    let dc = ec - sc0;
    if (dc !== dc) dc = this.inc[ic]!;
    const rs = r * sweep;
    const length = Math.sqrt(rs * rs + dc * dc);
    const np = known ? arcExtremes(ca, cb, r, a0, sweep, cw, this.pts) : 0;
    // a cut by the definition in `linear`; an arc in G18/G19 also counts by its lowest point
    const lim = this.safeZ + 1e-9;
    const sz = pos[2]!, ez = tgt[2]!;
    let cut = (sz === sz ? sz < lim : !this.zHome) || (ez === ez ? ez < lim : !this.zHome);
    if (!cut && this.plane !== 17) {
      const zi = this.plane === 18 ? 0 : 1;
      for (let k = 0; k < np; k++) if (this.pts[k * 2 + zi]! < lim) cut = true;
    }
    this.cutNow = cut;
    if (cut) this.cutting(line);
    else if (this.approach === 0) this.approach = line;
    this.mlen = length;
    this.account(line, K_ARC);
    if (!known) {
      this.say(R.arcStartUnknown, "warning", line, "arc from a position that is not known: its length is counted, it is not drawn");
      this.lastCut = cut;
      pos[0] = tgt[0]!;
      pos[1] = tgt[1]!;
      pos[2] = tgt[2]!;
      return;
    }
    if (cut && !this.lastCut) this.cutStart();
    this.lastCut = cut;
    // exact bounds: extremes inside the sweep, then the end point
    const p3 = this.tmp;
    for (let k = 0; k < np; k++) {
      p3[ia] = this.pts[k * 2]!;
      p3[ib] = this.pts[k * 2 + 1]!;
      p3[ic] = NaN;
      this.point(p3, cut);
    }
    this.point(tgt, cut);
    if (this.wantPath && !this.tpFull) {
      const nChords = chordCount(r, sweep, this.tol, MAX_CHORDS);
      const step = (cw ? -sweep : sweep) / nChords;
      const cs = Math.cos(step), sn = Math.sin(step);
      let ux = Math.cos(a0), uy = Math.sin(a0);
      for (let k = 1; k <= nChords; k++) {
        if (k === nChords) {
          this.seg(line, K_ARC, tgt);
        } else {
          const nx = ux * cs - uy * sn;
          uy = ux * sn + uy * cs;
          ux = nx;
          p3[ia] = ca + r * ux;
          p3[ib] = cb + r * uy;
          p3[ic] = sc0 + (dc * k) / nChords;
          this.seg(line, K_ARC, p3);
        }
        pos[0] = this.lvx;
        pos[1] = this.lvy;
        pos[2] = this.lvz;
      }
    }
    pos[0] = tgt[0]!;
    pos[1] = tgt[1]!;
    pos[2] = tgt[2]!;
    this.zHome = false;
  }

  // ---- canned cycles ([NIST] 3.5.16, 3.5.20) ---------------------------------------------------------------------
  cycle(line: number, motion: number, mask: number): void {
    const lv = this.lv;
    const sc = this.sc;
    const pos = this.pos;
    this.counts.cycles++;
    if (this.comp !== 40) this.say(R.compInvalid, "error", line, "canned cycle with cutter compensation on");
    this.feedCheck(line);
    let ia: number, ib: number, ic: number, la: number, lb: number, lc: number;
    if (this.plane === 17) {
      ia = 0; ib = 1; ic = 2; la = L_X; lb = L_Y; lc = L_Z;
    } else if (this.plane === 18) {
      ia = 2; ib = 0; ic = 1; la = L_Z; lb = L_X; lc = L_Y;
    } else {
      ia = 1; ib = 2; ic = 0; la = L_Y; lb = L_Z; lc = L_X;
    }
    const m = mask;
    let reps = 1;
    if (m & B_L) {
      const l = lv[L_L]!;
      if (!(l >= 1) || l !== Math.floor(l)) {
        this.say(R.cycleInvalid, "error", line, `L${fmt(l)}: the repeat count must be a positive integer`);
        this.markNotEvaluated(line);
        return;
      }
      reps = Math.min(l, 100000);
    } else if (m & B_K && motion !== G87) {
      const k = lv[L_K]!;
      if (k >= 1 && k === Math.floor(k)) reps = Math.min(k, 100000);
    }
    const oldC = pos[ic]!;
    if (!(m & B_R) && this.cycR !== this.cycR && this.common && oldC === oldC) {
      // common dialect: no R ever given: the cycle starts from and returns to the initial level
      this.cycR = this.absolute ? oldC : 0;
      this.say(R.cycleInvalid, "warning", line,
        `canned cycle with no R plane: it starts from and retracts to the initial level ${fmt(oldC / sc)}, under G98 and G99 alike`);
    }
    // R and Z: sticky; in G91, R is relative to the current position and Z to R
    let rr: number, zz: number;
    if (this.absolute) {
      if (m & B_R) this.cycR = lv[L_R]! * sc + this.shift[ic]!;
      if (m & (1 << lc)) this.cycZ = lv[lc]! * sc + this.shift[ic]!;
      rr = this.cycR;
      zz = this.cycZ;
    } else {
      if (m & B_R) this.cycR = lv[L_R]! * sc;
      if (m & (1 << lc)) this.cycZ = lv[lc]! * sc;
      rr = oldC + this.cycR;
      zz = rr + this.cycZ;
    }
    if (rr !== rr || zz !== zz) {
      if (this.cycR !== this.cycR || this.cycZ !== this.cycZ) {
        this.say(R.cycleInvalid, "error", line, this.cycR !== this.cycR ? "canned cycle with no R plane" : "canned cycle with no bottom (Z)");
      } else {
        this.say(R.arcStartUnknown, "warning", line, "incremental canned cycle from an unknown position");
      }
      this.skipBlock(line);
      return;
    }
    if (rr < zz) {
      this.say(R.cycleRBelowZ, "error", line, `R plane ${fmt(rr / sc)} is below the bottom ${fmt(zz / sc)}`);
      this.markNotEvaluated(line);
      return;
    }
    if (m & B_Q) this.cycQ = lv[L_Q]! * sc;
    if (m & B_P) this.cycP = lv[L_P]!;
    const peck = motion === G73 || motion === G83;
    if (peck && !(this.cycQ > 0)) {
      this.say(R.cycleInvalid, "error", line, `${fmtCode(motion)} needs a positive Q peck depth`);
      this.markNotEvaluated(line);
      return;
    }
    if (this.inverseTime) {
      this.say(R.cycleInvalid, "error", line, "canned cycle in G93 inverse time mode");
    }
    if (motion === G84 && this.spindleDir !== 3) {
      this.say(R.cycleInvalid, "error", line, "G84 tapping needs the spindle turning clockwise (M3)");
    }
    if (motion === G74 && this.spindleDir !== 4) {
      this.say(R.cycleInvalid, "error", line, "G74 reverse tapping needs the spindle turning counterclockwise (M4)");
    }
    // G98 returns to the Z the block started at ([NIST] 3.5.20); the common dialect's to the initial level, the Z
    // where the cycle started, even after G99 holes
    if (this.cycInit !== this.cycInit) this.cycInit = oldC;
    const old = this.common ? this.cycInit : oldC;
    const clear = this.retractOld ? (old > rr ? old : rr) : rr;
    this.cycA = ia;
    this.cycB = ib;
    this.cycC = ic;
    // preliminary: up to R if below it
    if (oldC < rr || oldC !== oldC) {
      this.cycMove(line, K_CYCLE_RAPID, pos[ia]!, pos[ib]!, rr);
    }
    // the moves to the R plane and between holes are rapids: reported when they run below safe Z
    let lowSaid = ic !== 2 || (this.relAxes & 4) !== 0;
    const lim = this.safeZ - 1e-9;
    // peck back-off 0.010 in / 0.254 mm ([NIST-SRC])
    const backoff = this.units === "inch" ? 0.01 : 0.254;
    for (let rep = 0; rep < reps; rep++) {
      let a = pos[ia]!, b = pos[ib]!;
      if (this.absolute) {
        if (m & (1 << la)) a = lv[la]! * sc + this.shift[ia]!;
        if (m & (1 << lb)) b = lv[lb]! * sc + this.shift[ib]!;
      } else {
        if (m & (1 << la)) a += lv[la]! * sc;
        if (m & (1 << lb)) b += lv[lb]! * sc;
      }
      if (!lowSaid && pos[ic]! < lim && (a !== pos[ia] || b !== pos[ib])) {
        lowSaid = true;
        this.say(R.rapidBelowSafeZ, "warning", line, `rapid between holes at the R plane Z${fmt(pos[ic]!)}, below safe Z ${fmt(this.safeZ)}`);
      }
      this.cycMove(line, K_CYCLE_RAPID, a, b, pos[ic]!);
      if (pos[ic] !== rr) {
        if (!lowSaid && rr < lim) {
          lowSaid = true;
          this.say(R.rapidBelowSafeZ, "warning", line, `rapid down to the cycle's R plane Z${fmt(rr)}, below safe Z ${fmt(this.safeZ)}`);
        }
        this.cycMove(line, K_CYCLE_RAPID, a, b, rr);
      }
      if (peck) {
        const q = this.cycQ;
        for (let d = rr - q; d > zz; d -= q) {
          this.cycMove(line, K_CYCLE_FEED, a, b, d);
          if (motion === G83) {
            this.cycMove(line, K_CYCLE_RAPID, a, b, rr);
            this.cycMove(line, K_CYCLE_RAPID, a, b, d + backoff);
          } else {
            this.cycMove(line, K_CYCLE_RAPID, a, b, d + backoff);
          }
        }
        this.cycMove(line, K_CYCLE_FEED, a, b, zz);
        this.cycMove(line, K_CYCLE_RAPID, a, b, clear);
      } else if (motion === G81 || motion === G82 || motion === G86 || motion === G87 || motion === G88 || motion === G76) {
        this.cycMove(line, K_CYCLE_FEED, a, b, zz);
        if ((motion === G82 || motion === G86 || motion === G88) && this.cycP > 0) this.addDwell(this.cycP);
        this.cycMove(line, K_CYCLE_RAPID, a, b, clear);
      } else {
        // G74 G84 G85 G89: feed in, feed out to R
        this.cycMove(line, K_CYCLE_FEED, a, b, zz);
        if (motion === G89 && this.cycP > 0) this.addDwell(this.cycP);
        this.cycMove(line, K_CYCLE_FEED, a, b, rr);
        if (clear > rr) this.cycMove(line, K_CYCLE_RAPID, a, b, clear);
      }
    }
  }

  cycA = 0;
  cycB = 1;
  cycC = 2;
  /** One cycle leg to (a, b, c) in the cycle's plane axes. */
  cycMove(line: number, kind: number, a: number, b: number, c: number): void {
    const t = this.tgt;
    t[this.cycA] = a;
    t[this.cycB] = b;
    t[this.cycC] = c;
    const inc = this.inc;
    inc[0] = inc[1] = inc[2] = 0;
    this.linear(line, kind);
  }

  // ---- G28/G30 and G53 -----------------------------------------------------------------------------------------
  home(line: number, second: boolean): void {
    const mask = this.mask;
    this.committed = true;
    if (this.comp !== 40) this.say(R.compInvalid, "error", line, `${second ? "G30" : "G28"} with cutter compensation on`);
    if (mask & B_XYZ) {
      this.target(mask);
      // G91 G28 Z0: the intermediate point is where the tool is, so there is no first leg at all
      const inc = this.inc;
      if (this.absolute || inc[0] !== 0 || inc[1] !== 0 || inc[2] !== 0) this.linear(line, K_RAPID);
    }
    // final leg: the named axes (all, when none is named) go to the home position, machine 0
    const all = (mask & B_XYZ) === 0;
    const t = this.tmp;
    for (let i = 0; i < 3; i++) t[i] = all || mask & (1 << AXIS_OF_LETTER[i]!) ? 0 : NaN;
    this.machineLeg(line, t, all ? 7 : ((mask >> L_X) & 7));
    if (all || mask & B_Z) this.zHome = true;
  }
  machineMove(line: number): void {
    const mask = this.mask;
    this.committed = true;
    if (this.comp !== 40) this.say(R.compInvalid, "error", line, "G53 with cutter compensation on");
    // [NIST] 3.5.12: G53 needs G0 or G1 in force; in the common dialect G53 moves at rapid whatever the mode
    if (!this.common && this.motion !== G0 && this.motion !== G1) {
      this.say(R.wordInvalid, "error", line, "G53 needs G0 or G1 in force");
    }
    const t = this.tmp;
    const s = this.sc;
    for (let i = 0; i < 3; i++) {
      const L = AXIS_OF_LETTER[i]!;
      t[i] = mask & (1 << L) ? this.lv[L]! * s : NaN;
    }
    this.machineLeg(line, t, (mask >> L_X) & 7);
    const m = this.machine;
    if (mask & B_Z) {
      const z = t[2]!;
      const top = m ? m.travel.z.max * this.mScale : 0;
      const range = m ? (m.travel.z.max - m.travel.z.min) * this.mScale : 0;
      this.zHome = z >= top - 0.1 * range - 1e-9;
    }
    if (m) {
      const tr = m.travel;
      const s2 = this.mScale;
      const lo = [tr.x.min, tr.y.min, tr.z.min];
      const hi = [tr.x.max, tr.y.max, tr.z.max];
      for (let i = 0; i < 3; i++) {
        const v = t[i]!;
        if (v === v && (v < lo[i]! * s2 - 1e-6 || v > hi[i]! * s2 + 1e-6)) {
          this.say(R.overTravel, "error", line, `G53 move to machine ${"XYZ"[i]}${fmt(v)} is outside the travel`);
          break;
        }
      }
    }
  }
  /**
   * A move to machine coordinates `mc` (NaN = axis not moved); `axes` bit i set when axis i moves. Its time counts
   * to the program and the tool, not to a work offset; it is drawn once the program uses an offset.
   */
  machineLeg(line: number, mc: Float64Array, axes: number): void {
    const o = this.origins.get(this.offNum);
    const pos = this.pos;
    this.machineCount++;
    this.counts.machine++;
    this.lastCut = false;
    if (this.approach === 0 && axes !== 4) this.approach = line;
    if (this.machineLines.length < 1000) this.machineLines.push(line);
    addBox(this.mB, 0, mc, false);
    const nx = axes & 1 ? mc[0]! - this.org(this.offNum, 0) : pos[0]!;
    const ny = axes & 2 ? mc[1]! - this.org(this.offNum, 1) : pos[1]!;
    const nz = axes & 4 ? mc[2]! - this.org(this.offNum, 2) : pos[2]!;
    if (o) {
      const dx = nx - pos[0]!, dy = ny - pos[1]!, dz = nz - pos[2]!;
      const len = Math.sqrt((dx === dx ? dx * dx : 0) + (dy === dy ? dy * dy : 0) + (dz === dz ? dz * dz : 0));
      if (len > 0) {
        this.machineLen += len;
        const t = (len / this.rapidRate) * 60;
        const total = trapezoidSeconds(len, this.rapidRate / 60, this.accel);
        const tb = this.toolSlot * SSTRIDE;
        this.gS[S_RAPID_S]! += t;
        this.gS[S_TOTAL_S]! += total;
        this.tS[tb + S_RAPID_S]! += t;
        this.tS[tb + S_TOTAL_S]! += total;
      }
      if (this.offIdx >= 0) {
        const e = this.tgt;
        e[0] = nx;
        e[1] = ny;
        e[2] = nz;
        this.seg(line, K_MACHINE, e);
      }
    }
    pos[0] = nx;
    pos[1] = ny;
    pos[2] = nz;
  }

  // ---- stops and subprograms ------------------------------------------------------------------------------------
  stopCode(line: number, code: number): void {
    if (code === 0 || code === 1 || code === 60) {
      if (code === 1) this.stops.optionalStops++;
      else this.stops.programStops++;
      if (this.stops.lines.length < 1000) this.stops.lines.push(line);
      return;
    }
    if (code === 98) {
      this.callSub(line);
      return;
    }
    if (code === 99) {
      if (this.stack.length > 0) {
        this.returnFromSub();
        return;
      }
      this.endProgram(line, false);
      return;
    }
    this.endProgram(line, true);
  }
  endProgram(line: number, reset: boolean): void {
    if (!reset && !this.absolute) this.say(R.incrementalLeftOn, "warning", line, "G91 incremental is in force at the end of the program");
    if (this.comp !== 40) this.say(R.compLeftOn, "warning", line, "cutter compensation is still on at the end of the program");
    this.ended = true;
    this.endLine = line;
    this.stack.length = 0;
    this.tail = true;
    if (reset) {
      // [NIST] 3.6.1: M2/M30 reset these modes
      this.offNum = 1;
      this.offIdx = -1;
      this.plane = 17;
      this.absolute = true;
      this.inverseTime = false;
      this.comp = 40;
      this.spindleDir = 5;
      this.motion = G1;
    }
  }
  /**
   * Subprogram labels of the file: `O<n>` lines (bodies that end with M99) and `O<n> sub` / `o<name> sub` lines
   * (bodies that end with `endsub`), each mapped to the start of the line after it. First label wins.
   */
  findLabels(): Map<number, { pos: number; line: number }> {
    const map = new Map<number, { pos: number; line: number }>();
    const b = this.b;
    const n = this.n;
    let p = 0;
    let line = 1;
    while (p < n) {
      let q = p;
      while (q < n && (b[q] === 32 || b[q] === 9)) q++;
      if (q < n && (b[q]! | 32) === 111) {
        q++;
        while (q < n && (b[q] === 32 || b[q] === 9)) q++;
        let key = NaN;
        if (b[q] === 60) {
          const s = q + 1;
          while (q < n && b[q] !== 62 && b[q] !== 10 && b[q] !== 13) q++;
          if (b[q] === 62) {
            key = nameKey(b, s, q);
            q++;
          }
        } else {
          let v = 0;
          let digits = 0;
          while (q < n && b[q]! >= 48 && b[q]! <= 57 && digits < 12) {
            v = v * 10 + b[q]! - 48;
            q++;
            digits++;
          }
          if (digits > 0) key = v;
        }
        // the keyword after the label, if any: only "sub" (or none, for a numbered label) starts a body
        while (q < n && (b[q] === 32 || b[q] === 9)) q++;
        let e = q;
        while (e < n && (b[e]! | 32) >= 97 && (b[e]! | 32) <= 122) e++;
        const kw = e > q ? keywordAt(b, q, e) : 0;
        const body = e > q ? kw === KW_SUB : key >= 0;
        if (key === key && body && !map.has(key)) {
          let end = q;
          while (end < n && b[end] !== 10 && b[end] !== 13) end++;
          if (end < n && b[end] === 13) end++;
          if (end < n && b[end] === 10) end++;
          map.set(key, { pos: end, line: line + 1 });
        }
      }
      while (p < n && b[p] !== 10 && b[p] !== 13) p++;
      if (p < n && b[p] === 13) p++;
      if (p < n && b[p] === 10 && b[p - 1] !== 10) p++;
      else if (p < n && b[p] === 10) p++;
      line++;
    }
    return map;
  }
  /** M98 P<n> [L<k> | K<k>]. */
  callSub(line: number): void {
    const lv = this.lv;
    const mask = this.mask;
    if (!(mask & B_P)) {
      this.say(R.subprogramInvalid, "error", line, "M98 without P (the program number)");
      return;
    }
    let prog = lv[L_P]!;
    let reps = 1;
    if (mask & B_L) reps = lv[L_L]!;
    else if (mask & B_K) reps = lv[L_K]!;
    else if (prog >= 100000) {
      // P with more than four digits: leading digits repeat the four-digit program (common practice)
      reps = Math.floor(prog / 10000);
      prog = prog % 10000;
    }
    // common dialect: L0 (K0) calls the subprogram no times
    if (reps === 0 && this.common) return;
    if (!(reps >= 1) || reps !== Math.floor(reps)) {
      this.say(R.subprogramInvalid, "error", line, `repeat count ${fmt(reps)} is not a positive integer`);
      return;
    }
    this.callSubAt(line, prog, reps, `O${prog}`);
  }
  callSubAt(line: number, key: number, reps: number, name: string): void {
    if (this.labels === null) this.labels = this.findLabels();
    const target = this.labels.get(key);
    if (!target) {
      this.say(R.subprogramMissing, "error", line, `subprogram ${name} is not in the file`);
      return;
    }
    if (this.stack.length >= 8) {
      this.say(R.subprogramInvalid, "error", line, "subprogram calls nested more than 8 deep");
      return;
    }
    const next = this.nextLineStart();
    this.stack.push({ retPos: next, retLine: line, bodyPos: target.pos, bodyLine: target.line, left: reps, callLine: line });
    this.jump = target.pos;
    this.jumpLine = target.line - 1;
  }
  nextLineStart(): number {
    const b = this.b;
    let p = this.le;
    if (p < this.n && b[p] === 13) p++;
    if (p < this.n && b[p] === 10) p++;
    return p;
  }
  returnFromSub(): void {
    const f = this.stack[this.stack.length - 1]!;
    f.left--;
    if (f.left > 0) {
      this.jump = f.bodyPos;
      this.jumpLine = f.bodyLine - 1;
      return;
    }
    this.stack.pop();
    this.jump = f.retPos;
    this.jumpLine = f.retLine;
  }

  // ---- comments and tool descriptions ------------------------------------------------------------------------------
  commentText(): string {
    return this.decoder.decode(this.b.subarray(this.cs, this.ce)).trim();
  }
  comment(): void {
    const b = this.b;
    let s = this.cs;
    while (s < this.ce && (b[s] === 32 || b[s] === 9)) s++;
    // header list "(T1 D=10. ... FLAT END MILL)"
    if (s + 1 < this.ce && (b[s]! | 32) === 116 && b[s + 1]! >= 48 && b[s + 1]! <= 57) {
      let q = s + 1;
      let t = 0;
      while (q < this.ce && b[q]! >= 48 && b[q]! <= 57) t = t * 10 + b[q++]! - 48;
      if (q === this.ce || b[q] === 32 || b[q] === 9 || b[q] === 45 || b[q] === 58 || b[q] === 61 || b[q] === 44 || b[q] === 124) {
        this.setDesc(t, this.commentText(), this.line, 1);
      }
    }
    if (this.pendingDescTool >= 0 && this.line === this.pendingDescLine + 1 && this.mask === 0 && this.gN === 0 && this.mN === 0) {
      this.setDesc(this.pendingDescTool, this.commentText(), this.line, 2);
      this.pendingDescTool = -1;
    }
  }
  setDesc(t: number, raw: string, line: number, prio: number): void {
    let text = raw.trim();
    const m = /^T\s*(\d+)\b[\s\-:=,|]*/i.exec(text);
    if (m && Number(m[1]) === t) text = text.slice(m[0].length).trim();
    text = cleanDescription(text);
    if (!text) return;
    const cur = this.descs.get(t);
    if (!cur || prio > cur.prio) this.descs.set(t, { text, line, prio });
  }

  // ---- the end -----------------------------------------------------------------------------------------------------
  finish(lines: number): void {
    this.lineCount = lines;
    this.fold(-1);
    if (this.stack.length > 0) {
      this.say(R.subprogramInvalid, "error", this.stack[this.stack.length - 1]!.callLine, "subprogram ends without M99");
    }
    if (this.skipKind === SKIP_CONTROL) {
      this.endControl(lines);
    } else if (this.skipKind !== SKIP_NONE && !this.ended && this.pendN > 0) {
      // a body the main flow ran into never ends: what it swallowed was never evaluated
      const name = this.skipKey >= 0 ? `O${this.skipKey}` : "o<name>";
      this.say(R.notEvaluated, "warning", this.skipLine0,
        `${name} starts a subprogram body that never ends (no ${this.skipKind === SKIP_M99_BODY ? "M99" : "endsub"}): the ${this.pendN} lines after it are not evaluated`);
      for (let i = 0; i < this.pendN; i++) this.markNotEvaluated(this.pend[i]!);
    }
    // stopped at the execution limit, the end of the program was never reached: nothing to say about it
    if (!this.ended && !this.stopped) {
      if (this.sawBlock) {
        if (!this.absolute) this.say(R.incrementalLeftOn, "warning", this.lastMainLine, "G91 incremental is in force at the end of the file");
        if (this.comp !== 40) this.say(R.compLeftOn, "warning", this.lastMainLine, "cutter compensation is still on at the end of the file");
      }
      this.say(R.programEndMissing, "warning", this.lastMainLine, "the program has no M2/M30 end");
    }
    const prev = this.runs[this.runs.length - 1];
    if (prev && prev.endSeg < 0) {
      prev.endSeg = this.tpN;
      prev.blocks = this.runBlocks;
    }
    this.listAssumptions();
    for (const a of this.lateAssumptions) this.assumptions.push(a);
  }
  lineCount = 0;
}

/** Widens box `o` of `b` (all and cutting halves) by box 0 of `c`. */
function mergeBox(b: Float64Array, o: number, c: Float64Array): void {
  for (let k = 0; k < BSTRIDE; k += 6) {
    for (let i = 0; i < 3; i++) {
      if (c[k + i]! < b[o + k + i]!) b[o + k + i] = c[k + i]!;
      if (c[k + i + 3]! > b[o + k + i + 3]!) b[o + k + i + 3] = c[k + i + 3]!;
    }
  }
}
function addBox(b: Float64Array, o: number, p: Float64Array, cut: boolean): void {
  const x = p[0]!, y = p[1]!, z = p[2]!;
  if (x < b[o]!) b[o] = x;
  if (y < b[o + 1]!) b[o + 1] = y;
  if (z < b[o + 2]!) b[o + 2] = z;
  if (x > b[o + 3]!) b[o + 3] = x;
  if (y > b[o + 4]!) b[o + 4] = y;
  if (z > b[o + 5]!) b[o + 5] = z;
  if (cut) {
    if (x < b[o + 6]!) b[o + 6] = x;
    if (y < b[o + 7]!) b[o + 7] = y;
    if (z < b[o + 8]!) b[o + 8] = z;
    if (x > b[o + 9]!) b[o + 9] = x;
    if (y > b[o + 10]!) b[o + 10] = y;
    if (z > b[o + 11]!) b[o + 11] = z;
  }
}

function letters(mask: number): string {
  let s = "";
  for (let i = 0; i < 26; i++) if (mask & (1 << i)) s += (s ? ", " : "") + String.fromCharCode(65 + i);
  return s;
}
function fmtCode(code10: number): string {
  return code10 % 10 === 0 ? `G${code10 / 10}` : `G${Math.floor(code10 / 10)}.${code10 % 10}`;
}

function timeOut(s: Float64Array, o: number): TimeBreakdown {
  return {
    feedSeconds: s[o + S_FEED_S]!,
    rapidSeconds: s[o + S_RAPID_S]!,
    dwellSeconds: s[o + S_DWELL_S]!,
    toolChangeSeconds: s[o + S_TC_S]!,
    totalSeconds: s[o + S_TOTAL_S]!,
  };
}

function range(min: number, max: number): { min: number; max: number } | null {
  return min <= max ? { min, max } : null;
}

/**
 * Analyses an NC program: modal interpretation, work offsets, tools, bounds, time, findings and the toolpath.
 * Never throws on bad input; a string is encoded to UTF-8 bytes first.
 */
export function analyzeProgram(source: string | Uint8Array, options: AnalyzeOptions = {}): Analysis {
  const bytes = typeof source === "string" ? new TextEncoder().encode(source) : source;
  const e = new Engine(bytes, options);
  e.run();
  const toolpath: Toolpath = { segmentCount: e.tpN, ...e.takePath(), chordTolerance: e.tol };
  // parts: found from the program unless given, then the fixture checks and the tool order
  const cutOffsets = new Set<number>();
  for (const r of e.runs) cutOffsets.add(r.offset);
  const pathWhole = e.wantPath && !e.tpFull;
  const tol = e.units === "inch" ? 0.0001 : 0.001;
  const parts = options.parts ?? (pathWhole && cutOffsets.size >= 2 ? findParts(toolpath, e.runs, tol) : 1);
  const loads = e.tools.map((t) => t.loads);
  const toolOrder = classifyToolOrder(e.runs, loads, parts);
  if (pathWhole && cutOffsets.size >= 2 && parts >= 2) fixtureFindings(e, toolpath, parts, tol);
  const tools: ToolSummary[] = e.tools.map((t, i) => {
    const slot = (i + 1) * SSTRIDE;
    const bo = (i + 1) * BSTRIDE;
    const d = e.descs.get(t.number);
    const bounds = boxOut(e.tB, bo);
    return {
      number: t.number,
      description: d ? d.text : null,
      descriptionLine: d ? d.line : null,
      lengthOffsets: t.h,
      diameterOffsets: t.d,
      spindle: range(e.tSpinMin[i]!, e.tSpinMax[i]!),
      feed: range(e.tFeedMin[i]!, e.tFeedMax[i]!),
      feedLength: e.tS[slot + S_FEED_LEN]!,
      rapidLength: e.tS[slot + S_RAPID_LEN]!,
      time: timeOut(e.tS, slot),
      lowestZ: bounds.min.z,
      firstLine: t.firstLine,
      lastLine: t.lastLine,
      loads: t.loads,
      offsets: t.offsets.map((oi) => offsetCode(e.offsets[oi]!.num)),
      bounds,
      cuttingBounds: boxOut(e.tB, bo + 6),
    };
  });
  const workOffsets: WorkOffsetSummary[] = e.offsets.map((o, i) => {
    const origin = e.origins.get(o.num);
    const known = origin && origin.every((v) => Number.isFinite(v));
    return {
      code: offsetCode(o.num),
      number: o.num,
      firstLine: o.firstLine,
      firstMotionLine: o.firstMotion,
      lastLine: o.last,
      origin: known ? { x: origin[0]!, y: origin[1]!, z: origin[2]! } : null,
      originSource: known ? (e.originSource.get(o.num) ?? null) : null,
      bounds: boxOut(e.oB, i * BSTRIDE),
      cuttingBounds: boxOut(e.oB, i * BSTRIDE + 6),
      tools: o.tools,
      feedLength: e.oS[i * SSTRIDE + S_FEED_LEN]!,
      rapidLength: e.oS[i * SSTRIDE + S_RAPID_LEN]!,
      time: timeOut(e.oS, i * SSTRIDE),
    };
  });
  // findings: listed per rule in line order, rules in RULE_IDS order
  const order = new Map<string, number>(RULE_IDS.map((r, i) => [r, i]));
  const findings = e.findings.sort((a, b) => order.get(a.rule)! - order.get(b.rule)! || a.line - b.line);
  const findingCounts: FindingCount[] = [];
  for (let i = 0; i < RULE_IDS.length; i++) {
    const c = e.fCount[i]!;
    if (c === 0) continue;
    const s = e.fSev[i]!;
    findingCounts.push({ rule: RULE_IDS[i]!, severity: s === 3 ? "error" : s === 2 ? "warning" : "info", count: c, listed: Math.min(c, e.cap) });
  }
  let neLines: number[] = [];
  const bits = e.neBits;
  if (bits) {
    neLines = [];
    for (let i = 0; i < bits.length && neLines.length < 1000; i++) {
      const v = bits[i]!;
      if (v === 0) continue;
      for (let k = 0; k < 8; k++) if (v & (1 << k) && neLines.length < 1000) neLines.push(i * 8 + k);
    }
  }
  const notEvaluated = Math.min(e.neCount, e.codeLines);
  return {
    version: ENGINE_VERSION,
    dialect: e.dialect,
    arcTolerance: e.arcTolerance(e.units === "inch"),
    coverage: {
      codeLines: e.codeLines,
      notEvaluatedLines: notEvaluated,
      evaluatedShare: e.codeLines > 0 ? (e.codeLines - notEvaluated) / e.codeLines : 1,
      lines: neLines,
    },
    units: e.units,
    unitsDeclared: e.unitsDeclared,
    lineCount: e.lineCount,
    byteLength: bytes.length,
    blocksExecuted: e.blocks,
    programNumber: e.programNumber,
    endLine: e.endLine,
    workOffsets,
    tools,
    toolChanges: e.changes,
    toolChangeCount: e.changeCount,
    toolOrder,
    parts,
    bounds: boxOut(e.gB, 0),
    cuttingBounds: boxOut(e.gB, 6),
    machineMoves: { count: e.machineCount, lines: e.machineLines, bounds: boxOut(e.mB, 0), length: e.machineLen },
    feedLength: e.feedLen,
    rapidLength: e.rapidLen,
    time: timeOut(e.gS, 0),
    stops: e.stops,
    motionCounts: e.counts,
    spindle: range(e.spinMin, e.spinMax),
    safeZ: e.safeZ,
    findings,
    findingCounts,
    assumptions: e.assumptions,
    toolpath,
  };
}

/** fixture-mismatch: the part offsets each tool cuts under, then each tool's parts compared with its first. */
function fixtureFindings(e: Engine, toolpath: Toolpath, parts: number, tol: number): void {
  const code = (oi: number): string => offsetCode(e.offsets[oi]?.num ?? 1);
  for (const p of checkPartOffsets(e.runs, parts, e.stretches, e.stretchN)) {
    const t = e.tools[p.tool];
    const name = t ? `T${t.number}` : "cutting with no tool";
    if (p.kind === "stray") {
      e.say(R.fixtureMismatch, "warning", p.line,
        `${name} cuts under ${code(p.offset)}, which is not one of the offsets the other tools cut their parts under${p.partOffset >= 0 ? ` (${code(p.partOffset)} typed as ${code(p.offset)}?)` : ""}`);
    } else {
      e.say(R.fixtureMismatch, "warning", p.line,
        `${name} never cuts under ${code(p.partOffset)}: its part there runs under ${code(p.offset)} again, from this line (is the ${code(p.partOffset)} line missing?)`);
    }
  }
  for (const m of compareFixtures(toolpath, e.runs, tol)) {
    const t = e.tools[m.tool];
    const o1 = e.offsets[m.refOffset];
    const o2 = e.offsets[m.offset];
    if (!t || !o1 || !o2) continue;
    e.say(R.fixtureMismatch, "warning", m.line,
      `T${t.number} cuts differently under ${offsetCode(o2.num)} than under ${offsetCode(o1.num)}: ${m.reason}`);
  }
}
