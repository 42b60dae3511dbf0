/**
 * The words of the language: letters and their bits, line flags, keywords, the modal-group tables of both dialects
 * and the G codes the logic names. Codes are kept x10 (G80 is 800, G54.1 is 541) so that a line's G words fit an
 * Int32Array; the tables map a code x10 to its modal group.
 *
 * Files that use these in their hot paths copy them into module constants (`const { L_X } = codes`): a bundler
 * or loader may turn each use of an imported binding into a property or getter access, which the scan should not pay.
 */
import { MotionKind, NO_TOOL } from "./types";

// motion kinds and the no-tool index, as plain numbers
export const K_RAPID: number = MotionKind.Rapid, K_FEED: number = MotionKind.Feed, K_ARC: number = MotionKind.Arc;
export const K_CYCLE_FEED: number = MotionKind.CycleFeed, K_CYCLE_RAPID: number = MotionKind.CycleRapid;
export const K_MACHINE: number = MotionKind.Machine, K_JUMP: number = MotionKind.Jump;
export const NO_TOOL_IDX: number = NO_TOOL;

// ---- letters -------------------------------------------------------------------------------------------------
export const L_A = 0, L_B = 1, L_C = 2, L_D = 3, L_F = 5, L_G = 6, L_H = 7, L_I = 8, L_J = 9, L_K = 10, L_L = 11;
export const L_M = 12, L_N = 13, L_O = 14, L_P = 15, L_Q = 16, L_R = 17, L_S = 18, L_T = 19, L_X = 23, L_Y = 24, L_Z = 25;
export const B_X = 1 << L_X, B_Y = 1 << L_Y, B_Z = 1 << L_Z;
export const B_XYZ = B_X | B_Y | B_Z;
export const B_AXES = B_XYZ | (1 << L_A) | (1 << L_B) | (1 << L_C);
export const B_F = 1 << L_F, B_S = 1 << L_S, B_T = 1 << L_T, B_N = 1 << L_N, B_O = 1 << L_O;
export const B_D = 1 << L_D, B_H = 1 << L_H, B_I = 1 << L_I, B_J = 1 << L_J, B_K = 1 << L_K, B_L = 1 << L_L;
export const B_P = 1 << L_P, B_Q = 1 << L_Q, B_R = 1 << L_R;
export const B_IJK = B_I | B_J | B_K;
export const B_IJKR = B_IJK | B_R;
export const B_KNOWN = B_AXES | B_D | B_F | B_H | B_I | B_J | B_K | B_L | B_N | B_O | B_P | B_Q | B_R | B_S | B_T;
export const AXIS_OF_LETTER = [L_X, L_Y, L_Z];

// ---- line flags ------------------------------------------------------------------------------------------------
export const F_EXPR = 1, F_KEYWORD = 2, F_BADWORD = 4, F_BADCHAR = 8, F_BLOCKDEL = 16, F_PERCENT = 32;
export const F_BADCOMMENT = 64, F_OVERFLOW = 128, F_BADCODE = 256, F_TEXT = 512, F_KWEXPR = 1024;
/** Flags that make a line a code line even without a word. */
export const F_CODE = F_EXPR | F_KEYWORD | F_BADWORD | F_BADCHAR | F_OVERFLOW | F_BADCODE | F_TEXT | F_KWEXPR;

// ---- keywords: o-word control and macro syntax ------------------------------------------------------------------
export const KW_SUB = 1, KW_ENDSUB = 2, KW_CALL = 3, KW_RETURN = 4, KW_IF = 5, KW_ELSEIF = 6, KW_ELSE = 7, KW_ENDIF = 8;
export const KW_WHILE = 9, KW_ENDWHILE = 10, KW_DO = 11, KW_REPEAT = 12, KW_ENDREPEAT = 13, KW_BREAK = 14, KW_CONTINUE = 15;
/** Keywords that stand alone on a macro line (GOTO 10, END 1). */
export const KW_MACRO = 16;
/** Keywords that only belong inside an expression or a condition (EQ, SIN, THEN ...): at or above this id. */
export const KW_EXPR = 17;
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
export function keywordAt(b: Uint8Array, s: number, e: number): number {
  if (e - s > 10) return 0;
  let h = 0;
  for (let i = s; i < e; i++) h = h * 27 + ((b[i]! | 32) - 96);
  return KEYWORDS.get(h) ?? 0;
}
/** Key of a named o-word `o<name>`: a negative number, so that it never meets a numbered O. Case does not matter. */
export function nameKey(b: Uint8Array, s: number, e: number): number {
  let h = 0;
  for (let i = s; i < e; i++) {
    const c = b[i]!;
    h = (h * 131 + (c >= 65 && c <= 90 ? c + 32 : c)) % 1099511627776;
  }
  return -1 - h;
}

export const MAX_WORDS = 48;
// toolpath chunks: small programs stay in a chunk that grows x4; past CHUNK_MAX, full chunks go to the columns
export const CHUNK_MIN = 256;
export const CHUNK_MAX = 16384;
export const NIST_LINE_LENGTH = 256;
export const MAX_CHORDS = 10000;

// ---- modal groups ([NIST] table 4, and the common dialect's) ------------------------------------------------------
export const GG_NONMODAL = 0, GG_MOTION = 1, GG_PLANE = 2, GG_DIST = 3, GG_FEEDMODE = 5, GG_UNITS = 6, GG_COMP = 7;
export const GG_LENGTH = 8, GG_RETURN = 10, GG_OFFSET = 12, GG_PATH = 13, GG_MACRO = 14;
/** Common dialect: G80 cancels a cycle without being a motion mode. */
export const GG_CANCEL = 15;
/** Common dialect: G90.1 / G91.1 arc centre mode. */
export const GG_ARCMODE = 16;
export const GG_COUNT = 17;
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
export const G_GROUP_STRICT = groupTable(false);
export const G_GROUP_COMMON = groupTable(true);
export const M_GROUP = new Int8Array(100).fill(-1);
for (const c of [0, 1, 2, 30, 60, 98, 99]) M_GROUP[c] = 4;
M_GROUP[6] = 6;
for (const c of [3, 4, 5, 19]) M_GROUP[c] = 7;
for (const c of [7, 8, 9]) M_GROUP[c] = 8;
for (const c of [48, 49]) M_GROUP[c] = 9;

// named codes (x10) used in the logic
export const G0 = 0, G1 = 10, G2 = 20, G3 = 30, G4 = 40, G10 = 100, G28 = 280, G30 = 300, G38_2 = 382, G52 = 520, G53 = 530;
export const G73 = 730, G74 = 740, G76 = 760, G80 = 800, G81 = 810, G82 = 820, G83 = 830, G84 = 840, G86 = 860, G87 = 870;
export const G88 = 880, G89 = 890, G90 = 900, G90_1 = 901, G92 = 920, G92_1 = 921, G92_2 = 922, G92_3 = 923, G98 = 980;
export const G21 = 210, G20 = 200, G40 = 400, G49 = 490, G17 = 170, G54_1 = 541, G93 = 930;
export const G15 = 150, G16 = 160, G50 = 500, G50_1 = 501, G51 = 510, G51_1 = 511, G68 = 680, G69 = 690;
/** The coordinate transforms of the common dialect (not applied by the engine). */
export function isTransform(code: number): boolean {
  return code === G68 || code === G51 || code === G51_1 || code === G16;
}
/** True for the canned cycles (G73, G74, G76, G81-G89). */
export function isCycle(code: number): boolean {
  return code === G73 || code === G74 || code === G76 || (code >= G81 && code <= G89);
}
export function isArc(code: number): boolean {
  return code === G2 || code === G3;
}

export const MM_PER_INCH = 25.4;

/** What the flow is skipping: nothing, an O-label body (to M99), an o-word sub body (to endsub), a control block. */
export const SKIP_NONE = 0, SKIP_M99_BODY = 1, SKIP_SUB_BODY = 2, SKIP_CONTROL = 3;

/** Letters of a letter mask, "X, Y". */
export function letters(mask: number): string {
  let s = "";
  for (let i = 0; i < 26; i++) if (mask & (1 << i)) s += (s ? ", " : "") + String.fromCharCode(65 + i);
  return s;
}
/** "G54.1" from 541. */
export function fmtCode(code10: number): string {
  return code10 % 10 === 0 ? `G${code10 / 10}` : `G${Math.floor(code10 / 10)}.${code10 % 10}`;
}
/** A number for a message, to 4 decimals. */
export function fmt(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  return String(Math.round(x * 10000) / 10000);
}
/** "G55", "G59.2", "G54.1 P7" from a coordinate system number. */
export function offsetCode(num: number): string {
  if (num >= 1 && num <= 6) return `G${53 + num}`;
  if (num >= 7 && num <= 9) return `G59.${num - 6}`;
  return `G54.1 P${num - 100}`;
}
