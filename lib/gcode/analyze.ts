import type {
  AnalyzeOptions,
  Analysis,
  Bounds,
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
import { compareFixtures, classifyToolOrder, type CutRun } from "./parts";
import { ToolpathColumn } from "./toolpath";

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
const B_KNOWN = B_AXES | B_D | B_F | B_H | B_I | B_J | B_K | B_L | B_N | B_O | B_P | B_Q | B_R | B_S | B_T;
const AXIS_OF_LETTER = [L_X, L_Y, L_Z];

// ---- line flags ------------------------------------------------------------------------------------------------
const F_EXPR = 1, F_KEYWORD = 2, F_BADWORD = 4, F_BADCHAR = 8, F_BLOCKDEL = 16, F_PERCENT = 32;
const F_BADCOMMENT = 64, F_OVERFLOW = 128, F_BADCODE = 256;

const MAX_WORDS = 48;
// toolpath chunks: small programs stay in a chunk that grows x4; past CHUNK_MAX, full chunks go to the columns
const CHUNK_MIN = 256;
const CHUNK_MAX = 16384;
const NIST_LINE_LENGTH = 256;
const MAX_CHORDS = 10000;

// ---- modal groups ([NIST] table 4) -----------------------------------------------------------------------------
const G_GROUP = new Int8Array(1000).fill(-1);
function g(group: number, ...codes: number[]): void {
  for (const c of codes) G_GROUP[Math.round(c * 10)] = group;
}
g(0, 4, 10, 28, 30, 53, 92, 92.1, 92.2, 92.3, 52);
g(1, 0, 1, 2, 3, 38.2, 73, 80, 81, 82, 83, 84, 85, 86, 87, 88, 89);
g(2, 17, 18, 19);
g(3, 90, 91);
g(5, 93, 94);
g(6, 20, 21);
g(7, 40, 41, 42);
g(8, 43, 44, 49);
g(10, 98, 99);
g(12, 54, 55, 56, 57, 58, 59, 54.1, 59.1, 59.2, 59.3);
g(13, 61, 61.1, 64);
g(14, 65, 66, 67); // macro calls: never evaluated
const M_GROUP = new Int8Array(100).fill(-1);
for (const c of [0, 1, 2, 30, 60, 98, 99]) M_GROUP[c] = 4;
M_GROUP[6] = 6;
for (const c of [3, 4, 5, 19]) M_GROUP[c] = 7;
for (const c of [7, 8, 9]) M_GROUP[c] = 8;
for (const c of [48, 49]) M_GROUP[c] = 9;

const P10 = new Float64Array(23);
for (let i = 0; i < 23; i++) P10[i] = Number(`1e${i}`);

const MM_PER_INCH = 25.4;

// ---- defaults without a machine profile (mm; converted) ---------------------------------------------------------
const DEFAULT_RAPID_MM = 5000;
const DEFAULT_ACCEL_MM = 1000;
const DEFAULT_TOOL_CHANGE_S = 5;

// stride of per-tool / per-offset accumulators
const S_FEED_LEN = 0, S_RAPID_LEN = 1, S_FEED_S = 2, S_RAPID_S = 3, S_DWELL_S = 4, S_TC_S = 5, S_TOTAL_S = 6;
const SSTRIDE = 8;
const BSTRIDE = 12; // min xyz, max xyz (all), min xyz, max xyz (cutting)

const TWO_PI = Math.PI * 2;

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
  // options
  readonly opt: AnalyzeOptions;
  readonly machine: MachineProfile | undefined;
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
  motion = 800; // G80 at start ([NIST] 3.2.2 initial state has no motion mode)
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
  zHome = false;
  ended = false;
  endLine: number | null = null;
  tail = false;
  skipSub = false;
  programNumber: number | null = null;
  sawBlock = false;
  percentSeen = 0;
  // once-per-stretch flags
  feedMissingSaid = false;
  spindleSaid = false;
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
  runs: CutRun[] = [];
  lastRunTool = -2;
  lastRunOff = -2;
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

  // ---- setup -------------------------------------------------------------------------------------------------
  firstUnits(): Units | null {
    // the first G20/G21 outside comments decides the report units; found with a cheap scan
    const b = this.b;
    const n = Math.min(this.n, 1 << 20);
    let inComment = false;
    for (let i = 0; i < n - 2; i++) {
      const c = b[i]!;
      if (inComment) {
        if (c === 41 || c === 10 || c === 13) inComment = false;
        continue;
      }
      if (c === 40) inComment = true;
      else if (c === 59) {
        while (i < n && b[i] !== 10 && b[i] !== 13) i++;
      } else if ((c | 32) === 103) {
        let j = i + 1;
        while (j < n && (b[j] === 32 || b[j] === 9)) j++;
        if (b[j] === 50) {
          j++;
          while (j < n && (b[j] === 32 || b[j] === 9)) j++;
          const d = b[j];
          const after = b[j + 1];
          if ((d === 48 || d === 49) && !(after !== undefined && after >= 48 && after <= 57) && after !== 46) {
            return d === 48 ? "inch" : "mm";
          }
        }
      }
    }
    return null;
  }

  setup(): void {
    const m = this.machine;
    const fu = this.firstUnits();
    this.units = fu ?? m?.units ?? "mm";
    const inch = this.units === "inch";
    this.progInch = inch;
    this.sc = 1;
    const toReport = (machineUnits: Units): number =>
      machineUnits === this.units ? 1 : machineUnits === "mm" ? 1 / MM_PER_INCH : MM_PER_INCH;
    const mmToReport = inch ? 1 / MM_PER_INCH : 1;
    if (m) {
      this.mScale = toReport(m.units);
      this.rapidRate = m.rapidRate * this.mScale;
      this.maxFeed = m.maxFeed > 0 ? m.maxFeed * this.mScale : Infinity;
      this.maxSpindle = m.maxSpindle > 0 ? m.maxSpindle : Infinity;
      this.accel = m.acceleration * this.mScale;
      this.tcSeconds = m.toolChangeSeconds;
      this.hMustEqualT = m.hMustEqualT;
      this.spindleControlled = m.spindleProgramControlled;
      this.workOffsetCount = m.workOffsetCount;
    }
    if (!(this.rapidRate > 0)) {
      this.rapidRate = DEFAULT_RAPID_MM * mmToReport;
      this.assumptions.push(
        `rapid rate not given: assumed ${fmt(this.rapidRate)} ${inch ? "in" : "mm"}/min (${DEFAULT_RAPID_MM} mm/min)`,
      );
    }
    if (!(this.accel > 0)) {
      this.accel = DEFAULT_ACCEL_MM * mmToReport;
      this.assumptions.push(
        `acceleration not given: assumed ${fmt(this.accel)} ${inch ? "in" : "mm"}/s^2 (${DEFAULT_ACCEL_MM} mm/s^2)`,
      );
    }
    if (!m) {
      this.tcSeconds = DEFAULT_TOOL_CHANGE_S;
      this.assumptions.push(`tool change time not given: assumed ${DEFAULT_TOOL_CHANGE_S} s`);
    }
    this.safeZ = this.opt.safeZ ?? (m ? m.safeZ * this.mScale : 0);
    this.tol = this.opt.chordTolerance ?? (inch ? 0.0005 : 0.01);
    if (this.opt.workOffsets) {
      for (const [key, v] of Object.entries(this.opt.workOffsets)) {
        const num = parseOffsetKey(key);
        if (num < 0 || !v) continue;
        this.origins.set(num, new Float64Array([v.x, v.y, v.z]));
        this.originSource.set(num, "options");
      }
    }
    for (const a of this.assumptions) this.say(R.assumption, "info", 0, a);
  }

  // ---- scanning ----------------------------------------------------------------------------------------------
  run(): void {
    this.setup();
    const b = this.b;
    const n = this.n;
    const lv = this.lv;
    const gc = this.gc;
    const mc = this.mc;
    let p = 0;
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
            const c2 = p < n ? b[p]! | 32 : 0;
            if (p < n && (c === 35 || c === 91)) {
              flags |= F_EXPR;
              if (L !== L_G && L !== L_M) {
                mask |= bit;
                lv[L] = NaN;
              }
            } else if (p === afterLetter && c2 >= 97 && c2 <= 122) flags |= F_KEYWORD;
            else flags |= F_BADWORD; // the word is dropped
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
        else if (c > 32) flags |= F_BADCHAR;
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
      if (this.tail) this.tailLine();
      else if (this.skipSub) this.skipLine();
      else this.exec();
      if (this.jump >= 0) {
        p = this.jump;
        line = this.jumpLine;
        this.jump = -1;
      }
    }
    this.finish(line);
  }

  // ---- lines after the end, subprogram bodies ------------------------------------------------------------------
  hasM(code: number): boolean {
    for (let i = 0; i < this.mN; i++) if (this.mc[i] === code) return true;
    return false;
  }
  hasG(code10: number): boolean {
    for (let i = 0; i < this.gN; i++) if (this.gc[i] === code10) return true;
    return false;
  }
  tailLine(): void {
    if (this.mask & B_O) {
      this.skipSub = true;
      this.tail = false;
      this.skipLine();
      return;
    }
    if (this.ended && ((this.mask & ~B_N) !== 0 || this.gN > 0 || this.mN > 0) && !(this.flags & F_PERCENT)) {
      this.say(R.codeAfterEnd, "warning", this.line, "code after the end of the program never runs");
    }
  }
  skipLine(): void {
    // inside a subprogram body that is not being called: skip to its M99
    if (this.hasM(99)) {
      this.skipSub = false;
      if (this.ended) this.tail = true;
    }
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
    if (mask === 0 && this.gN === 0 && this.mN === 0 && (flags & ~F_BLOCKDEL) === 0) {
      if (this.pendingDescTool >= 0 && this.cs < 0 && this.line > this.pendingDescLine + 1) this.pendingDescTool = -1;
      return;
    }
    if (this.pendingDescTool >= 0 && this.line > this.pendingDescLine) this.pendingDescTool = -1;
    if (mask & B_O) {
      if (this.stack.length > 0) {
        this.say(R.subprogramInvalid, "error", line, "a subprogram runs into the next O label without M99");
        this.returnFromSub();
        return;
      }
      if (!this.sawBlock && this.programNumber === null) {
        this.programNumber = this.lv[L_O]!;
        return;
      }
      // a subprogram body in the main flow: not executed unless called
      this.skipSub = true;
      this.skipLine();
      return;
    }
    this.sawBlock = true;
    if (++this.blocks > this.blockLimit) {
      this.say(R.executionLimit, "error", line, `more than ${this.blockLimit} blocks executed: analysis stopped`);
      this.stack.length = 0;
      this.tail = true;
      return;
    }
    if (flags & (F_EXPR | F_KEYWORD)) {
      this.notEvaluated(line);
      return;
    }
    if (flags & (F_BADWORD | F_BADCHAR | F_BADCOMMENT | F_OVERFLOW)) {
      const what =
        flags & F_BADWORD
          ? "a letter without a number"
          : flags & F_BADCHAR
            ? "a character that is not part of a word"
            : flags & F_BADCOMMENT
              ? "a comment without its closing parenthesis"
              : "too many words";
      this.say(R.wordInvalid, "warning", line, `line has ${what}`);
    }
    if (this.dup !== 0) {
      this.say(R.modalConflict, "error", line, `letter ${letters(this.dup)} appears twice on the line`);
      return;
    }
    if (mask & ~B_KNOWN) {
      this.say(R.unknownCode, "warning", line, `letter ${letters(mask & ~B_KNOWN)} is not used by this dialect`);
    }
    // fast path: only axis words (and F/S/N) with the modal motion in force
    if (this.gN === 0 && this.mN === 0 && (mask & ~(B_AXES | B_F | B_S | B_N)) === 0 && !(flags & F_BADCODE)) {
      if (mask & B_F) this.setFeed(line);
      if (mask & B_S) this.setSpindle(line);
      if (mask & B_AXES) {
        if (this.motion === 800) this.say(R.modalConflict, "error", line, "axis words with no motion mode in force (G80)");
        else this.motionBlock(line, this.motion, 0);
      }
      return;
    }
    this.full(line);
  }

  notEvaluated(line: number): void {
    this.say(R.notEvaluated, "warning", line, "macro variables or expressions are not evaluated: the line is skipped");
    // the control would move the axes this line names: their positions are now unknown
    const mask = this.mask;
    for (let i = 0; i < 3; i++) if (mask & (1 << AXIS_OF_LETTER[i]!)) this.pos[i] = NaN;
  }

  full(line: number): void {
    const gc = this.gc;
    const mc = this.mc;
    const lv = this.lv;
    let mask = this.mask;
    // modal groups on this line
    let gSeen = 0;
    let motionCode = -1;
    let g0Axis = -1; // group-0 code that uses axis words
    let g0Other = 0; // bit set of group 0 codes present: 1=G4 2=G53 4=G92.1 8=G92.2 16=G92.3
    let plane = -1, dist = -1, feedMode = -1, units = -1, comp = -1, len = -1, ret = -1, off = -1, path = -1;
    for (let i = 0; i < this.gN; i++) {
      const code = gc[i]!;
      const grp = code >= 0 ? G_GROUP[code]! : -1;
      if (grp < 0) {
        const shown = code >= 0 ? fmtCode(code) : `G${fmt((-1 - code) / 1000)}`;
        this.say(R.unknownCode, "warning", line, `unknown code ${shown}`);
        continue;
      }
      if (grp === 14) {
        this.say(R.notEvaluated, "warning", line, `macro call ${fmtCode(code)} is not evaluated: the line is skipped`);
        this.notEvaluatedAxes();
        return;
      }
      if (grp === 0) {
        if (code === 40) g0Other |= 1;
        else if (code === 530) g0Other |= 2;
        else if (code === 921 || code === 922 || code === 923) g0Other |= code === 921 ? 4 : code === 922 ? 8 : 16;
        else {
          if (g0Axis >= 0) {
            this.say(R.modalConflict, "error", line, `${fmtCode(g0Axis)} and ${fmtCode(code)} both use the axis words`);
            return;
          }
          g0Axis = code;
        }
        continue;
      }
      const gb = 1 << grp;
      if (gSeen & gb) {
        const prev =
          grp === 1 ? motionCode : grp === 2 ? plane : grp === 3 ? dist : grp === 5 ? feedMode : grp === 6 ? units
            : grp === 7 ? comp : grp === 8 ? len : grp === 10 ? ret : grp === 12 ? off : path;
        this.say(R.modalConflict, "error", line, `${fmtCode(prev)} and ${fmtCode(code)} are in the same modal group`);
        return;
      }
      gSeen |= gb;
      switch (grp) {
        case 1: motionCode = code; break;
        case 2: plane = code; break;
        case 3: dist = code; break;
        case 5: feedMode = code; break;
        case 6: units = code; break;
        case 7: comp = code; break;
        case 8: len = code; break;
        case 10: ret = code; break;
        case 12: off = code; break;
        default: path = code;
      }
    }
    let mSeen = 0;
    let stop = -1, toolChange = false, spin = -1;
    let coolant = -1;
    for (let i = 0; i < this.mN; i++) {
      const code = mc[i]!;
      const grp = code >= 0 ? M_GROUP[code]! : -1;
      if (grp < 0) {
        this.say(R.unknownCode, "warning", line, code >= 0 ? `unknown code M${code}` : "unknown M code");
        continue;
      }
      const gb = 1 << grp;
      if (mSeen & gb && !(grp === 8 && coolant !== 9 && code !== 9)) {
        this.say(R.modalConflict, "error", line, `two M codes of the same modal group on the line (M${code})`);
        return;
      }
      mSeen |= gb;
      if (grp === 4) stop = code;
      else if (grp === 6) toolChange = true;
      else if (grp === 7) spin = code;
      else if (grp === 8) coolant = code;
    }
    // a group-1 code and a group-0 code that both use axis words ([NIST] 3.4)
    if (g0Axis >= 0 && motionCode >= 0 && mask & B_AXES) {
      this.say(R.modalConflict, "error", line, `${fmtCode(motionCode)} and ${fmtCode(g0Axis)} both use the axis words`);
      return;
    }
    // ---- order of execution ([NIST] table 8) ----
    if (feedMode >= 0) {
      this.inverseTime = feedMode === 930;
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
    if (plane >= 0) {
      if (this.comp !== 40 && plane !== 170) this.say(R.compInvalid, "error", line, "plane changed with cutter compensation on");
      this.plane = plane / 10;
    }
    if (units >= 0) {
      this.unitsDeclared = true;
      const inch = units === 200;
      if (this.comp !== 40 && inch !== this.progInch) this.say(R.compInvalid, "error", line, "units changed with cutter compensation on");
      this.progInch = inch;
      this.sc = inch === (this.units === "inch") ? 1 : inch ? MM_PER_INCH : 1 / MM_PER_INCH;
    }
    if (comp >= 0) this.setComp(line, comp, mask);
    if (len >= 0) this.setLength(line, len, mask);
    if (off >= 0) this.selectOffset(line, off);
    if (dist >= 0) this.absolute = dist === 900;
    if (ret >= 0) this.retractOld = ret === 980;
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
      if (g0Axis === 100) this.g10(line);
      else if (g0Axis === 280 || g0Axis === 300) this.home(line, g0Axis === 300);
      else if (g0Axis === 920 || g0Axis === 520) this.setShift(line, g0Axis === 520);
    }
    if (motionCode >= 0) {
      if (motionCode === 800) {
        this.motion = 800;
        this.cycR = this.cycZ = NaN;
        if (mask & B_AXES && !axesUsed) {
          this.say(R.modalConflict, "error", line, "axis words on a G80 line: G80 cancels motion");
          mask &= ~B_AXES;
        }
      } else {
        if (motionCode >= 730 && motionCode !== this.motion) {
          // a new cycle: sticky values reset
          this.cycQ = NaN;
        }
        this.motion = motionCode;
      }
    }
    if (!axesUsed && mask & B_AXES) {
      if (g0Other & 2) this.machineMove(line);
      else if (this.motion === 800) {
        this.say(R.modalConflict, "error", line, "axis words with no motion mode in force (G80)");
      } else this.motionBlock(line, this.motion, mask);
    } else if (g0Other & 2 && !axesUsed) {
      this.say(R.wordInvalid, "warning", line, "G53 without axis words");
    } else if ((motionCode === 20 || motionCode === 30) && !axesUsed) {
      this.say(R.arcInvalid, "error", line, `${fmtCode(motionCode)} with no end point in the plane`);
    }
    if (stop >= 0) this.stopCode(line, stop);
  }

  notEvaluatedAxes(): void {
    const mask = this.mask;
    for (let i = 0; i < 3; i++) if (mask & (1 << AXIS_OF_LETTER[i]!)) this.pos[i] = NaN;
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
    if (!this.absolute) this.say(R.incrementalLeftOn, "warning", line, "G91 incremental is in force at the tool change");
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
  /** Adds `sec` to one time slot and to the total, for the program, the current tool and the current offset. */
  addSeconds(slot: number, sec: number): void {
    this.gS[slot]! += sec;
    this.gS[S_TOTAL_S]! += sec;
    this.tS[this.toolSlot * SSTRIDE + slot]! += sec;
    this.tS[this.toolSlot * SSTRIDE + S_TOTAL_S]! += sec;
    const oi = this.curOff();
    this.oS[oi * SSTRIDE + slot]! += sec;
    this.oS[oi * SSTRIDE + S_TOTAL_S]! += sec;
  }
  setComp(line: number, comp: number, mask: number): void {
    if (comp === 400) {
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
    if (len === 490) {
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
    if (code === 541) {
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
  }

  // ---- motion --------------------------------------------------------------------------------------------------
  /** Target of a move: programmed axes in part coordinates (absolute or incremental). */
  target(mask: number): void {
    const tgt = this.tgt;
    const lv = this.lv;
    const sc = this.sc;
    const pos = this.pos;
    const shift = this.shift;
    if (this.absolute) {
      tgt[0] = mask & B_X ? lv[L_X]! * sc + shift[0]! : pos[0]!;
      tgt[1] = mask & B_Y ? lv[L_Y]! * sc + shift[1]! : pos[1]!;
      tgt[2] = mask & B_Z ? lv[L_Z]! * sc + shift[2]! : pos[2]!;
    } else {
      tgt[0] = mask & B_X ? pos[0]! + lv[L_X]! * sc : pos[0]!;
      tgt[1] = mask & B_Y ? pos[1]! + lv[L_Y]! * sc : pos[1]!;
      tgt[2] = mask & B_Z ? pos[2]! + lv[L_Z]! * sc : pos[2]!;
    }
  }

  motionBlock(line: number, motion: number, maskIn: number): void {
    const mask = maskIn === 0 ? this.mask : maskIn;
    if (!this.offSelected && !this.offsetSaid) {
      this.offsetSaid = true;
      this.say(R.offsetNotSet, "warning", line, `motion before any work offset was selected: it runs in the active offset (${offsetCode(this.offNum)} assumed)`);
    }
    if (!this.unitsDeclared && !this.unitsSaid) {
      this.unitsSaid = true;
      this.say(R.unitsMissing, "warning", line, `motion before any G20/G21: units assumed ${this.units}`);
    }
    if (motion === 0) {
      this.target(mask);
      this.linear(line, K_RAPID);
      return;
    }
    if (motion === 10 || motion === 382) {
      this.target(mask);
      this.cutChecks(line);
      this.linear(line, K_FEED);
      return;
    }
    if (motion === 20 || motion === 30) {
      this.cutChecks(line);
      this.arc(line, motion === 20, mask);
      return;
    }
    this.cycle(line, motion, mask);
  }

  cutChecks(line: number): void {
    if (this.inverseTime ? !(this.mask & B_F) : !(this.feed > 0)) {
      if (this.inverseTime) {
        this.say(R.feedMissing, "error", line, "G93 inverse time: every feed move needs its own F word");
      } else if (!this.feedMissingSaid) {
        this.feedMissingSaid = true;
        this.say(R.feedMissing, "error", line, "feed move with no feed rate in force");
      }
    }
    if (this.toolIdx === NO_TOOL_IDX && !this.toolSaid) {
      this.toolSaid = true;
      this.say(R.toolNotLoaded, "warning", line,
        this.selectedT >= 0 ? `cutting with T${this.selectedT} selected but never loaded by M6` : "cutting with no tool loaded");
    }
    if ((this.spindleDir === 5 || this.spindle === 0) && !this.spindleSaid) {
      this.spindleSaid = true;
      const sev: Severity = this.spindleControlled ? "error" : "warning";
      this.say(R.spindleOffCut, sev, line, this.spindleDir === 5 ? "cutting with the spindle stopped" : "cutting with the spindle at S0");
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
    if (kind === K_RAPID) {
      // a rapid that moves X/Y while below safe Z, or that ends below it
      const lim = this.safeZ - 1e-9;
      const endsBelow = z < lim;
      if (endsBelow || (sz < lim && ((x === x && x !== sx) || (y === y && y !== sy)))) {
        this.say(R.rapidBelowSafeZ, "warning", line,
          endsBelow ? `rapid ends at Z${fmt(z)}, below safe Z ${fmt(this.safeZ)}` : `rapid in X/Y at Z${fmt(sz)}, below safe Z ${fmt(this.safeZ)}`);
      }
    }
    let dx = x - sx, dy = y - sy, dz = z - sz;
    if (dx !== dx) dx = 0;
    if (dy !== dy) dy = 0;
    if (dz !== dz) dz = 0;
    const len = Math.sqrt(dx * dx + dy * dy + dz * dz);
    this.mlen = len;
    this.account(line, kind);
    const cut = kind !== K_RAPID && kind !== K_CYCLE_RAPID;
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

  mlen = 0;
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
      const ti = this.toolIdx;
      const fr = this.inverseTime ? this.feedRaw : this.feed;
      // the ranges only change when the feed, the speed or the tool does (NaN always takes the long way)
      if (fr !== this.rangeFeed || this.spindle !== this.rangeSpin || ti !== this.rangeTool) this.cutRanges(ti, fr);
      if (ti !== this.lastRunTool || oi !== this.lastRunOff) this.newRun(ti, oi);
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

  newRun(ti: number, oi: number): void {
    this.lastRunTool = ti;
    this.lastRunOff = oi;
    const prev = this.runs[this.runs.length - 1];
    if (prev) prev.endSeg = this.tpN;
    if (this.runs.length < 100000) this.runs.push({ tool: ti, offset: oi, startSeg: this.tpN, endSeg: -1 });
  }

  lastCut = false;
  /** The start of a cutting stretch belongs to the cutting bounds (it is already in the overall ones). */
  cutStart(): void {
    this.stretch();
    addBox(this.cB, 6, this.pos, false);
  }
  /** Adds an end point (or arc extreme) to the program bounds; NaN axes are skipped by the comparisons. */
  point(p: Float64Array, cut: boolean): void {
    this.stretch();
    addBox(this.cB, 0, p, cut);
    if (this.machine !== undefined && this.originSource.size > 0) this.travel(p);
  }

  travel(p: Float64Array): void {
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
    if (!(mask & ((1 << la) | (1 << lb)))) {
      this.say(R.arcInvalid, "error", line, `arc with no end point in the ${planeName} plane`);
      return;
    }
    const sa = pos[ia]!, sb = pos[ib]!, ea = tgt[ia]!, eb = tgt[ib]!;
    if (sa !== sa || sb !== sb || ea !== ea || eb !== eb) {
      this.say(R.arcStartUnknown, "warning", line, "arc from a position that is not known: it is not drawn");
      this.mlen = 0;
      this.account(line, K_ARC);
      pos[0] = tgt[0]!;
      pos[1] = tgt[1]!;
      pos[2] = tgt[2]!;
      return;
    }
    const out = this.arcOut;
    const hasR = (this.mask & B_R) !== 0;
    const hasCentre = (this.mask & ((1 << oa) | (1 << ob))) !== 0;
    if (hasR && hasCentre) {
      this.say(R.arcInvalid, "error", line, "arc with both R and a centre (I/J/K)");
      return;
    }
    if (hasR) {
      const r = lv[L_R]! * sc;
      const st = arcFromRadius(sa, sb, ea, eb, r, cw, out);
      if (st !== ARC_OK) {
        this.say(R.arcInvalid, "error", line,
          st === ARC_RADIUS_TOO_SMALL
            ? `radius R${fmt(lv[L_R]!)} is shorter than half the distance to the end point`
            : "radius-format arc whose end point is its start point");
        return;
      }
    } else {
      if (!hasCentre) {
        this.say(R.arcInvalid, "error", line, "arc with neither R nor a centre offset (I/J/K)");
        return;
      }
      const ci = this.mask & (1 << oa) ? lv[oa]! * sc : 0;
      const cj = this.mask & (1 << ob) ? lv[ob]! * sc : 0;
      if (!arcFromCenter(sa, sb, ea, eb, ci, cj, cw, out)) {
        this.say(R.arcInvalid, "error", line, "arc centre is at the start point");
        return;
      }
      // [NIST] 3.5.3.2: the end must be as far from the centre as the start
      const tolArc = (this.progInch ? 0.0002 * MM_PER_INCH : 0.002) * (this.units === "inch" ? 1 / MM_PER_INCH : 1);
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
    if (dc !== dc) dc = 0;
    const rs = r * sweep;
    const length = Math.sqrt(rs * rs + dc * dc);
    this.mlen = length;
    this.account(line, K_ARC);
    if (!this.lastCut) this.cutStart();
    this.lastCut = true;
    // exact bounds: extremes inside the sweep, then the end point
    const np = arcExtremes(ca, cb, r, a0, sweep, cw, this.pts);
    const p3 = this.tmp;
    for (let k = 0; k < np; k++) {
      p3[ia] = this.pts[k * 2]!;
      p3[ib] = this.pts[k * 2 + 1]!;
      p3[ic] = NaN;
      this.point(p3, true);
    }
    this.point(tgt, true);
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
  cycAxis(): number {
    return this.plane === 17 ? 2 : this.plane === 18 ? 1 : 0;
  }
  cycle(line: number, motion: number, mask: number): void {
    const lv = this.lv;
    const sc = this.sc;
    const pos = this.pos;
    this.counts.cycles++;
    if (this.comp !== 40) this.say(R.compInvalid, "error", line, "canned cycle with cutter compensation on");
    this.cutChecks(line);
    let ia: number, ib: number, ic: number, la: number, lb: number, lc: number;
    if (this.plane === 17) {
      ia = 0; ib = 1; ic = 2; la = L_X; lb = L_Y; lc = L_Z;
    } else if (this.plane === 18) {
      ia = 2; ib = 0; ic = 1; la = L_Z; lb = L_X; lc = L_Y;
    } else {
      ia = 1; ib = 2; ic = 0; la = L_Y; lb = L_Z; lc = L_X;
    }
    const m = this.mask;
    let reps = 1;
    if (m & B_L) {
      const l = lv[L_L]!;
      if (!(l >= 1) || l !== Math.floor(l)) {
        this.say(R.cycleInvalid, "error", line, `L${fmt(l)}: the repeat count must be a positive integer`);
        return;
      }
      reps = Math.min(l, 100000);
    } else if (m & B_K && motion !== 870) {
      const k = lv[L_K]!;
      if (k >= 1 && k === Math.floor(k)) reps = Math.min(k, 100000);
    }
    const oldC = pos[ic]!;
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
      this.notEvaluatedAxes();
      return;
    }
    if (rr < zz) {
      this.say(R.cycleRBelowZ, "error", line, `R plane ${fmt(rr / sc)} is below the bottom ${fmt(zz / sc)}`);
      return;
    }
    if (m & B_Q) this.cycQ = lv[L_Q]! * sc;
    if (m & B_P) this.cycP = lv[L_P]!;
    const peck = motion === 730 || motion === 830;
    if (peck && !(this.cycQ > 0)) {
      this.say(R.cycleInvalid, "error", line, `${fmtCode(motion)} needs a positive Q peck depth`);
      return;
    }
    if (this.inverseTime) {
      this.say(R.cycleInvalid, "error", line, "canned cycle in G93 inverse time mode");
    }
    if (motion === 840 && this.spindleDir !== 3) {
      this.say(R.cycleInvalid, "error", line, "G84 tapping needs the spindle turning clockwise (M3)");
    }
    const clear = this.retractOld ? (oldC > rr ? oldC : rr) : rr;
    this.cycA = ia;
    this.cycB = ib;
    this.cycC = ic;
    // preliminary: up to R if below it
    if (oldC < rr || oldC !== oldC) {
      this.cycMove(line, K_CYCLE_RAPID, pos[ia]!, pos[ib]!, rr);
    }
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
      this.cycMove(line, K_CYCLE_RAPID, a, b, pos[ic]!);
      if (pos[ic] !== rr) this.cycMove(line, K_CYCLE_RAPID, a, b, rr);
      if (peck) {
        const q = this.cycQ;
        for (let d = rr - q; d > zz; d -= q) {
          this.cycMove(line, K_CYCLE_FEED, a, b, d);
          if (motion === 830) {
            this.cycMove(line, K_CYCLE_RAPID, a, b, rr);
            this.cycMove(line, K_CYCLE_RAPID, a, b, d + backoff);
          } else {
            this.cycMove(line, K_CYCLE_RAPID, a, b, d + backoff);
          }
        }
        this.cycMove(line, K_CYCLE_FEED, a, b, zz);
        this.cycMove(line, K_CYCLE_RAPID, a, b, clear);
      } else if (motion === 810 || motion === 820 || motion === 860 || motion === 870 || motion === 880) {
        this.cycMove(line, K_CYCLE_FEED, a, b, zz);
        if ((motion === 820 || motion === 860 || motion === 880) && this.cycP > 0) this.addDwell(this.cycP);
        this.cycMove(line, K_CYCLE_RAPID, a, b, clear);
      } else {
        // G84 G85 G89: feed in, feed out to R
        this.cycMove(line, K_CYCLE_FEED, a, b, zz);
        if (motion === 890 && this.cycP > 0) this.addDwell(this.cycP);
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
    this.linear(line, kind);
  }

  // ---- G28/G30 and G53 -----------------------------------------------------------------------------------------
  home(line: number, second: boolean): void {
    const mask = this.mask;
    if (this.comp !== 40) this.say(R.compInvalid, "error", line, `${second ? "G30" : "G28"} with cutter compensation on`);
    if (mask & B_XYZ) {
      this.target(mask);
      this.linear(line, K_RAPID);
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
    if (this.comp !== 40) this.say(R.compInvalid, "error", line, "G53 with cutter compensation on");
    if (this.motion !== 0 && this.motion !== 10) {
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
  /** A move to machine coordinates `mc` (NaN = axis not moved); `axes` bit i set when axis i moves. */
  machineLeg(line: number, mc: Float64Array, axes: number): void {
    const o = this.origins.get(this.offNum);
    const pos = this.pos;
    this.machineCount++;
    this.counts.machine++;
    this.lastCut = false;
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
        const ob = this.curOff() * SSTRIDE;
        this.gS[S_RAPID_S]! += t;
        this.gS[S_TOTAL_S]! += total;
        this.tS[tb + S_RAPID_S]! += t;
        this.tS[tb + S_TOTAL_S]! += total;
        this.oS[ob + S_RAPID_S]! += t;
        this.oS[ob + S_TOTAL_S]! += total;
      }
      const e = this.tgt;
      e[0] = nx;
      e[1] = ny;
      e[2] = nz;
      this.seg(line, K_MACHINE, e);
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
    if (!this.absolute) this.say(R.incrementalLeftOn, "warning", line, "G91 incremental is in force at the end of the program");
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
      this.motion = 10;
    }
  }
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
        let v = 0;
        let digits = 0;
        while (q < n && b[q]! >= 48 && b[q]! <= 57 && digits < 12) {
          v = v * 10 + b[q]! - 48;
          q++;
          digits++;
        }
        if (digits > 0 && !map.has(v)) {
          let e = q;
          while (e < n && b[e] !== 10 && b[e] !== 13) e++;
          if (e < n && b[e] === 13) e++;
          if (e < n && b[e] === 10) e++;
          map.set(v, { pos: e, line: line + 1 });
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
    if (!(reps >= 1) || reps !== Math.floor(reps)) {
      this.say(R.subprogramInvalid, "error", line, `repeat count ${fmt(reps)} is not a positive integer`);
      return;
    }
    if (this.labels === null) this.labels = this.findLabels();
    const target = this.labels.get(prog);
    if (!target) {
      this.say(R.subprogramMissing, "error", line, `subprogram O${prog} is not in the file`);
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
      if (q === this.ce || b[q] === 32 || b[q] === 9 || b[q] === 45 || b[q] === 58 || b[q] === 61 || b[q] === 44) {
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
    const m = /^T\s*(\d+)\b[\s\-:=,]*/i.exec(text);
    if (m && Number(m[1]) === t) text = text.slice(m[0].length).trim();
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
    if (!this.ended) {
      if (this.sawBlock) {
        if (!this.absolute) this.say(R.incrementalLeftOn, "warning", lines, "G91 incremental is in force at the end of the file");
        if (this.comp !== 40) this.say(R.compLeftOn, "warning", lines, "cutter compensation is still on at the end of the file");
      }
      this.say(R.programEndMissing, "warning", lines, "the program has no M2/M30 end");
    }
    const prev = this.runs[this.runs.length - 1];
    if (prev && prev.endSeg < 0) prev.endSeg = this.tpN;
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
  // parts: fixture comparison and tool order
  const cutOffsets = new Set<number>();
  for (const r of e.runs) cutOffsets.add(r.offset);
  const parts = options.parts ?? Math.max(1, cutOffsets.size);
  const loads = e.tools.map((t) => t.loads);
  const toolOrder = classifyToolOrder(e.runs, loads, parts);
  if (e.wantPath && !e.tpFull && cutOffsets.size >= 2 && parts >= 2) {
    const tol = e.units === "inch" ? 0.0001 : 0.001;
    for (const m of compareFixtures(toolpath, e.runs, tol)) {
      const t = e.tools[m.tool];
      const o1 = e.offsets[m.refOffset];
      const o2 = e.offsets[m.offset];
      if (!t || !o1 || !o2) continue;
      e.say(R.fixtureMismatch, "warning", m.line,
        `T${t.number} cuts differently under ${offsetCode(o2.num)} than under ${offsetCode(o1.num)}: ${m.reason}`);
    }
  }
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
  return {
    version: 1,
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
