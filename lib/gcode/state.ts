/**
 * The state of one analysis run. One object holds it all, for speed: the scan's hot loop and the moves it calls
 * read and write plain fields of a single object. Its methods live in files by concern (the way acorn splits its
 * parser), each adding to Engine.prototype and declaring what it adds:
 *
 *   scan.ts         reading a line's words, byte by byte
 *   block.ts        one block: its modal groups in the order of execution, words that do not belong
 *   flow.ts         program flow: O labels, subprograms, o-word control, skipped bodies, program end
 *   settings.ts     options, machine profile and report units
 *   modal.ts        plain modal settings: feed, speed, compensation, dwell, coordinate transforms
 *   tools.ts        tools, tool length offsets, work offsets, shifts, tool descriptions
 *   motion.ts       straight moves, the definition of a cut, G28/G30 and G53
 *   arcs.ts         G2/G3
 *   cycles.ts       canned cycles
 *   accounting.ts   lengths, times, bounds and cutting runs of each move
 *   path-writer.ts  the toolpath columns
 *   findings.ts     counting and listing findings, coverage, the checks at the end
 *
 * The fields below are grouped by the file that owns them (writes them); others only read them.
 */
import type { AnalyzeOptions, Dialect, Finding, MachineProfile, ToolChange, Units } from "./types";
import { RULE_IDS } from "./types";
import type { CutRun } from "./parts";
import type { ToolpathColumn } from "./toolpath";
import { CHUNK_MAX, CHUNK_MIN, G80, G_GROUP_COMMON, G_GROUP_STRICT, GG_COUNT, MAX_WORDS, NO_TOOL_IDX, SKIP_NONE } from "./codes";
import { SSTRIDE, newBounds } from "./bounds";

/** A subprogram call on the stack. */
export interface Frame {
  retPos: number;
  retLine: number;
  bodyPos: number;
  bodyLine: number;
  left: number;
  callLine: number;
}

/** A tool description and where it came from (higher prio wins: T line 3, the line after it 2, header 1). */
export interface Desc {
  text: string;
  line: number;
  prio: number;
}

/** The analysis run: one instance per analyzeProgram call. */
export class Engine {
  readonly b: Uint8Array;
  readonly n: number;

  // ---- scan.ts: the current line's words ----
  readonly lv = new Float64Array(26); // value per letter
  readonly gc = new Int32Array(MAX_WORDS); // G codes x10, in line order
  readonly mc = new Int32Array(MAX_WORDS); // M codes
  mask = 0; // bit per letter present (G and M apart)
  dup = 0; // letters given twice
  flags = 0; // F_* line flags
  gN = 0;
  mN = 0;
  line = 0;
  ls = 0; // line start and end byte
  le = 0;
  cs = -1; // first comment's text, bytes [cs, ce)
  ce = -1;
  kw = 0; // first keyword on the line
  bad = -1; // where the first word error starts
  codeLines = 0; // coverage: code lines met on the pass through the file

  // ---- block.ts ----
  readonly gWord = new Int32Array(GG_COUNT); // code seen per modal group on the line

  // ---- settings.ts: options, machine, report units ----
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
  tol = 0.01; // chord tolerance
  cap = 50; // findings listed per rule
  wantPath = true;
  wantTime = false; // option segmentTimes: the toolpath's time columns
  defaultRapid = false;
  defaultAccel = false;
  assumptions: string[] = [];
  lateAssumptions: string[] = []; // found during the run (a G91 start point)

  // ---- modal.ts, block.ts: modal state (report units, part coordinates) ----
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
  comp = 40;
  compD = NaN;
  retractOld = true; // G98
  xform = 0; // code (x10) of an active coordinate transform that is not applied, or 0
  incSince = 0; // line of the M6 that G91 was left on across, or 0

  // ---- motion.ts: where the tool is ----
  readonly pos = new Float64Array([NaN, NaN, NaN]);
  readonly inc = new Float64Array(3); // the increments of an incremental move whose start is unknown
  readonly tgt = new Float64Array(3); // target of the move being run
  readonly tmp = new Float64Array(3);
  zHome = true; // Z is at the home (tool change) position: where a program starts and every M6 leaves it
  committed = false; // a move, an origin or a shift happened: the report units are fixed
  firstMotion = true;
  movedAbsolute = false; // a move ran in G90 (so G91 across a tool change was not meant)
  moveWatch = true; // the next move needs watchMove (first move, after a tool change, under a transform)
  relAxes = 0; // axes measured from an unset start point (a program in G91 from its start)
  lastCut = false; // the last move was a cut
  cutNow = false; // the move being accounted is a cut

  // ---- arcs.ts ----
  readonly arcOut = new Float64Array(6);
  readonly pts = new Float64Array(8);

  // ---- cycles.ts ----
  cycR = NaN;
  cycZ = NaN;
  cycQ = NaN;
  cycP = 0;
  cycInit = NaN; // common dialect: the initial level, where the cycle started
  cycA = 0; // the cycle's plane axes
  cycB = 1;
  cycC = 2;

  // ---- tools.ts: tools, length offsets, work offsets, shifts ----
  selectedT = -1;
  toolIdx = NO_TOOL_IDX; // index into tools (loaded)
  toolSlot = 0; // accumulator slot: 0 = no tool
  lengthMode = 49;
  lengthH = NaN;
  lengthSinceChange = false;
  offNum = 1;
  offIdx = -1;
  offSelected = false;
  readonly shift92 = new Float64Array(3);
  readonly shift52 = new Float64Array(3);
  readonly shift = new Float64Array(3);
  saved92 = new Float64Array(3);
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
  readonly decoder = new TextDecoder("utf-8");

  // ---- flow.ts: program flow, subprograms, skipping ----
  ended = false;
  stopped = false; // the execution limit was reached
  endLine: number | null = null;
  tail = false; // after the end: only subprogram bodies are read
  programNumber: number | null = null;
  sawBlock = false;
  percentSeen = 0;
  lastMainLine = 0;
  labels: Map<number, { pos: number; line: number }> | null = null;
  stack: Frame[] = [];
  jump = -1;
  jumpLine = 0;
  blocks = 0;
  blockLimit: number;
  skipKind = SKIP_NONE; // subprogram bodies that are not called, o-word control blocks
  skipKey = 0;
  skipEnd = 0; // keyword that ends an o-word control block
  skipLine0 = 0;
  skipCount = 0;
  skipAxes = 0;
  pend = new Int32Array(0); // code lines of a body being skipped in the main flow (not evaluated if it never ends)
  pendN = 0;

  // ---- findings.ts ----
  findings: Finding[] = [];
  readonly fCount = new Int32Array(RULE_IDS.length);
  readonly fSev = new Int8Array(RULE_IDS.length);
  neBits: Uint8Array | null = null; // coverage: code lines not evaluated
  neCount = 0;
  lineCount = 0;
  // once per stretch (until the state that caused them changes)
  feedMissingSaid = false;
  spindleSaid = false;
  manualSpindleSaid = false;
  toolSaid = false;
  lengthSaid = false;
  offsetSaid = false;
  unitsSaid = false;
  overTravelSaid = 0;

  // ---- accounting.ts: sums and bounds ----
  readonly gS = new Float64Array(SSTRIDE); // program
  readonly gB = newBounds(1);
  readonly mB = newBounds(1); // machine moves
  tS = new Float64Array(SSTRIDE * 16); // per tool slot
  tB = newBounds(16);
  oS = new Float64Array(SSTRIDE * 8); // per offset
  oB = newBounds(8);
  // The current stretch (one tool slot under one offset): a move's sums and bounds go here, and are folded into the
  // program, tool and offset accumulators when the tool or the offset changes (and at the end), so that a move
  // updates one set of accumulators instead of three.
  readonly cS = new Float64Array(SSTRIDE);
  readonly cB = newBounds(1);
  curSlot = -1;
  curOi = -1;
  mlen = 0; // length of the move being accounted
  accTool = -1;
  accOff = -1;
  tFeedMin: number[] = [];
  tFeedMax: number[] = [];
  tSpinMin: number[] = [];
  tSpinMax: number[] = [];
  rangeFeed = NaN;
  rangeSpin = NaN;
  rangeTool = -1;
  feedLen = 0;
  rapidLen = 0;
  machineLen = 0;
  machineCount = 0;
  machineLines: number[] = [];
  counts = { rapid: 0, feed: 0, arc: 0, cycles: 0, machine: 0 };
  // the program's clock (the same additions as the total time), and the start and end of the motion being written
  clock = 0;
  t0 = 0;
  t1 = 0;
  spinMin = Infinity;
  spinMax = -Infinity;
  stops = { programStops: 0, optionalStops: 0, lines: [] as number[] };
  // cutting runs (one tool under one offset) and cut stretches, for the multi-part checks
  runs: CutRun[] = [];
  lastRunTool = -2;
  lastRunOff = -2;
  runBlocks = 0; // cut blocks of the current run
  runBase = 0; // cut blocks of the current run's tool and offset in earlier runs
  readonly blocksOf = new Map<number, number>();
  cutBlock = -1;
  approach = 0; // first line after the last cut that starts the way to the next one (0: not yet)
  stretches = new Int32Array(96); // per cut stretch: tool * 256 + offset, approach line, cut blocks before it
  stretchN = 0;
  stretchBlock = -1;

  // ---- path-writer.ts: segments and vertices go into plain chunks; full chunks are appended to the columns ----
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
  cT0: Float32Array<ArrayBuffer>; // segmentTimes only: start and end of each segment's motion
  cT1: Float32Array<ArrayBuffer>;
  colPos: ToolpathColumn<Float32Array<ArrayBuffer>> | null = null;
  colLine: ToolpathColumn<Uint32Array<ArrayBuffer>> | null = null;
  colKind: ToolpathColumn<Uint8Array<ArrayBuffer>> | null = null;
  colTool: ToolpathColumn<Uint16Array<ArrayBuffer>> | null = null;
  colOff: ToolpathColumn<Uint8Array<ArrayBuffer>> | null = null;
  colT0: ToolpathColumn<Float32Array<ArrayBuffer>> | null = null;
  colT1: ToolpathColumn<Float32Array<ArrayBuffer>> | null = null;
  lvx = NaN; // the last vertex written
  lvy = NaN;
  lvz = NaN;
  tpFull = false;

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
    this.wantTime = this.wantPath && opt.segmentTimes === true;
    this.blockLimit = 2_000_000 + (this.n >>> 1);
    this.tpLimit = 8_000_000 + (this.n >>> 3);
    const cap = this.wantPath ? Math.min(CHUNK_MAX, Math.max(CHUNK_MIN, this.n >>> 4)) : 0;
    this.capS = this.capV = cap;
    this.cPos = new Float32Array(cap * 3);
    this.cLine = new Uint32Array(cap);
    this.cKind = new Uint8Array(cap);
    this.cTool = new Uint16Array(cap);
    this.cOff = new Uint8Array(cap);
    this.cT0 = new Float32Array(this.wantTime ? cap : 0);
    this.cT1 = new Float32Array(this.wantTime ? cap : 0);
  }
}
