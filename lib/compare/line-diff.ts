/**
 * A line diff that stays fast on programs of a million lines. Lines are hashed on the raw bytes (no strings until
 * a changed line is shown); the common head and tail are stripped; what is left is aligned on lines that occur
 * exactly once on each side (patience anchors: posted programs are full of unique coordinate lines), recursing
 * between anchors, and the small gaps left are diffed with Myers' algorithm (diff-sequences). Lines are split the
 * engine's way: CR, LF and CRLF each end a line; the line ending itself is not compared.
 */
import diffSequencesModule from "diff-sequences";
import { countLines } from "../program-file";

// diff-sequences is CommonJS with `exports.default`; bundlers unwrap it, Node's ESM loader does not.
type DiffSequence = typeof diffSequencesModule;
const diffSequence: DiffSequence =
  (diffSequencesModule as unknown as { default?: DiffSequence }).default ?? diffSequencesModule;

export interface DiffLine {
  kind: "context" | "removed" | "added";
  /** 1-based line in the old file, or null for an added line. */
  a: number | null;
  /** 1-based line in the new file, or null for a removed line. */
  b: number | null;
  text: string;
}

export interface DiffHunk {
  /** First old line shown (1-based) and how many old lines the hunk covers. */
  aStart: number;
  aCount: number;
  bStart: number;
  bCount: number;
  lines: DiffLine[];
}

export interface LineDiff {
  aLines: number;
  bLines: number;
  /** Lines only in the new file / only in the old one. */
  added: number;
  removed: number;
  identical: boolean;
  hunks: DiffHunk[];
  /** True when hunks were cut at `maxLines` (the counts above stay exact). */
  truncated: boolean;
}

export interface LineDiffOptions {
  /** Unchanged lines shown around each change (default 3). */
  context?: number;
  /** Most lines returned over all hunks (default 20,000). */
  maxLines?: number;
  /** Longest text returned per line, in characters (default 2,000; longer lines end with "…"). */
  maxLineChars?: number;
}

interface Lines {
  bytes: Uint8Array;
  start: Uint32Array;
  end: Uint32Array;
  hash: Int32Array;
  count: number;
}

/** Splits into lines and hashes each (FNV-1a, 32 bits); equality is always confirmed on the bytes. */
export function splitLines(bytes: Uint8Array): Lines {
  const n = bytes.length;
  const count = countLines(bytes);
  const start = new Uint32Array(count);
  const end = new Uint32Array(count);
  const hash = new Int32Array(count);
  let line = 0;
  let s = 0;
  let h = 0x811c9dc5 | 0;
  for (let i = 0; i < n; i++) {
    const c = bytes[i]!;
    if (c === 10 || c === 13) {
      start[line] = s;
      end[line] = i;
      hash[line] = h;
      line++;
      if (c === 13 && bytes[i + 1] === 10) i++;
      s = i + 1;
      h = 0x811c9dc5 | 0;
    } else {
      h = Math.imul(h ^ c, 0x01000193);
    }
  }
  if (line < count) {
    start[line] = s;
    end[line] = n;
    hash[line] = h;
  }
  return { bytes, start, end, hash, count };
}

function sameLine(A: Lines, i: number, B: Lines, j: number): boolean {
  if (A.hash[i] !== B.hash[j]) return false;
  const as = A.start[i]!;
  const len = A.end[i]! - as;
  const bs = B.start[j]!;
  if (B.end[j]! - bs !== len) return false;
  for (let k = 0; k < len; k++) if (A.bytes[as + k] !== B.bytes[bs + k]) return false;
  return true;
}

/** Below this many lines (both sides together) a gap goes straight to Myers. */
const MYERS_DIRECT = 2_000;
/** Above this, a gap with nothing in common found is reported as replaced rather than risk a quadratic run. */
const MYERS_LIMIT = 200_000;
/** How far (lines on both sides together) the walk looks for the point where the files agree again. */
const RESYNC_WINDOW = 400;
/** Lines that must agree after a resync point before the walk trusts it. */
const RESYNC_CONFIRM = 2;

/** Matched line pairs as runs: a[k], b[k], length n[k], in increasing order. */
class Runs {
  a: number[] = [];
  b: number[] = [];
  n: number[] = [];
  push(a: number, b: number, n: number) {
    const k = this.a.length - 1;
    if (k >= 0 && this.a[k]! + this.n[k]! === a && this.b[k]! + this.n[k]! === b) this.n[k]! += n;
    else {
      this.a.push(a);
      this.b.push(b);
      this.n.push(n);
    }
  }
}

function myers(A: Lines, B: Lines, a0: number, a1: number, b0: number, b1: number, out: Runs): void {
  if (a1 - a0 + (b1 - b0) > MYERS_LIMIT) return;
  diffSequence(
    a1 - a0,
    b1 - b0,
    (i, j) => sameLine(A, a0 + i, B, b0 + j),
    (n, i, j) => out.push(a0 + i, b0 + j, n),
  );
}

/**
 * Walks both files together. Where they disagree, looks for the nearest point (fewest lines skipped on both sides)
 * where they agree again for a few lines, and diffs the small gap exactly; a revision that changed lines here and
 * there costs one pass. When no such point is near, falls back to unique-line anchors over the rest (once).
 */
function alignRange(A: Lines, B: Lines, a0: number, a1: number, b0: number, b1: number, out: Runs, anchored = false): void {
  let i = a0;
  let j = b0;
  const agreeAt = (x: number, y: number) => {
    for (let c = 0; c <= RESYNC_CONFIRM; c++) {
      const ax = x + c;
      const by = y + c;
      if (ax >= a1 || by >= b1) return ax >= a1 && by >= b1 && c > 0;
      if (!sameLine(A, ax, B, by)) return false;
    }
    return true;
  };
  while (i < a1 && j < b1) {
    let head = 0;
    while (i + head < a1 && j + head < b1 && sameLine(A, i + head, B, j + head)) head++;
    if (head > 0) {
      out.push(i, j, head);
      i += head;
      j += head;
      continue;
    }
    let found = false;
    for (let k = 1; k <= RESYNC_WINDOW && !found; k++) {
      for (let x = 0; x <= k; x++) {
        const y = k - x;
        if (i + x >= a1 || j + y >= b1) continue;
        if (agreeAt(i + x, j + y)) {
          if (x > 0 && y > 0 && x + y <= MYERS_DIRECT) myers(A, B, i, i + x, j, j + y, out);
          i += x;
          j += y;
          found = true;
          break;
        }
      }
    }
    if (found) continue;
    if (!anchored) {
      alignByAnchors(A, B, i, a1, j, b1, out);
      return;
    }
    myers(A, B, i, a1, j, b1, out);
    return;
  }
}

/** Aligns on lines unique on both sides, then walks each gap between anchors. */
function alignByAnchors(A: Lines, B: Lines, a0: number, a1: number, b0: number, b1: number, out: Runs): void {
  const anchors = uniqueAnchors(A, B, a0, a1, b0, b1);
  if (!anchors) {
    myers(A, B, a0, a1, b0, b1, out);
    return;
  }
  let pa = a0;
  let pb = b0;
  for (let k = 0; k < anchors.length; k += 2) {
    const ai = anchors[k]!;
    const bi = anchors[k + 1]!;
    if (ai > pa && bi > pb) alignRange(A, B, pa, ai, pb, bi, out, true);
    out.push(ai, bi, 1);
    pa = ai + 1;
    pb = bi + 1;
  }
  if (pa < a1 && pb < b1) alignRange(A, B, pa, a1, pb, b1, out, true);
}

/**
 * Lines unique on both sides within the ranges, reduced to the longest chain increasing on both sides (patience).
 * Returns [a0, b0, a1, b1, ...] or null when there are none.
 */
function uniqueAnchors(A: Lines, B: Lines, a0: number, a1: number, b0: number, b1: number): number[] | null {
  // hash -> index in A (or -1 when the hash repeats), then confirmed against B.
  const inA = new Map<number, number>();
  for (let i = a0; i < a1; i++) {
    const h = A.hash[i]!;
    const seen = inA.get(h);
    inA.set(h, seen === undefined ? i : -1);
  }
  const inB = new Map<number, number>();
  for (let j = b0; j < b1; j++) {
    const h = B.hash[j]!;
    if (!inA.has(h)) continue;
    const seen = inB.get(h);
    inB.set(h, seen === undefined ? j : -1);
  }
  const pa: number[] = [];
  const pb: number[] = [];
  for (let i = a0; i < a1; i++) {
    const h = A.hash[i]!;
    if (inA.get(h) !== i) continue;
    const j = inB.get(h);
    if (j === undefined || j < 0 || !sameLine(A, i, B, j)) continue;
    pa.push(i);
    pb.push(j);
  }
  if (pa.length === 0) return null;
  // Longest increasing subsequence of pb (pa is increasing already), O(n log n).
  const tails: number[] = [];
  const prev = new Int32Array(pb.length).fill(-1);
  for (let k = 0; k < pb.length; k++) {
    const v = pb[k]!;
    let lo = 0;
    let hi = tails.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (pb[tails[mid]!]! < v) lo = mid + 1;
      else hi = mid;
    }
    if (lo > 0) prev[k] = tails[lo - 1]!;
    tails[lo] = k;
  }
  const chain: number[] = [];
  for (let k = tails[tails.length - 1]!; k >= 0; k = prev[k]!) chain.push(k);
  chain.reverse();
  const out: number[] = [];
  for (const k of chain) out.push(pa[k]!, pb[k]!);
  return out;
}

/** The diff of two files' bytes as hunks with line numbers. */
export function lineDiff(aBytes: Uint8Array, bBytes: Uint8Array, options: LineDiffOptions = {}): LineDiff {
  const context = options.context ?? 3;
  const maxLines = options.maxLines ?? 20_000;
  const maxChars = options.maxLineChars ?? 2_000;
  const A = splitLines(aBytes);
  const B = splitLines(bBytes);
  const runs = new Runs();
  alignRange(A, B, 0, A.count, 0, B.count, runs);
  // Sentinel run at the end, so every change sits before some run.
  runs.a.push(A.count);
  runs.b.push(B.count);
  runs.n.push(0);

  const decoder = new TextDecoder("utf-8");
  const text = (L: Lines, i: number) => {
    const s = decoder.decode(L.bytes.subarray(L.start[i]!, L.end[i]!));
    return s.length > maxChars ? `${s.slice(0, maxChars)}…` : s;
  };

  // Changes: between the end of one run and the start of the next.
  const changes: { a0: number; a1: number; b0: number; b1: number }[] = [];
  let ca = 0;
  let cb = 0;
  let added = 0;
  let removed = 0;
  for (let k = 0; k < runs.a.length; k++) {
    const ra = runs.a[k]!;
    const rb = runs.b[k]!;
    if (ra > ca || rb > cb) {
      changes.push({ a0: ca, a1: ra, b0: cb, b1: rb });
      removed += ra - ca;
      added += rb - cb;
    }
    ca = ra + runs.n[k]!;
    cb = rb + runs.n[k]!;
  }

  const hunks: DiffHunk[] = [];
  let emitted = 0;
  let truncated = false;
  let k = 0;
  while (k < changes.length && !truncated) {
    // Merge changes whose context would touch.
    let last = k;
    while (last + 1 < changes.length && changes[last + 1]!.a0 - changes[last]!.a1 <= 2 * context) last++;
    const first = changes[k]!;
    const aStart = Math.max(0, first.a0 - context);
    const bStart = first.b0 - (first.a0 - aStart);
    const lines: DiffLine[] = [];
    const push = (l: DiffLine) => {
      if (emitted >= maxLines) {
        truncated = true;
        return false;
      }
      lines.push(l);
      emitted++;
      return true;
    };
    let ai = aStart;
    let bi = bStart;
    for (let c = k; c <= last && !truncated; c++) {
      const ch = changes[c]!;
      while (ai < ch.a0 && push({ kind: "context", a: ai + 1, b: bi + 1, text: text(A, ai) })) {
        ai++;
        bi++;
      }
      while (ai < ch.a1 && !truncated && push({ kind: "removed", a: ai + 1, b: null, text: text(A, ai) })) ai++;
      while (bi < ch.b1 && !truncated && push({ kind: "added", a: null, b: bi + 1, text: text(B, bi) })) bi++;
    }
    const aEnd = Math.min(A.count, changes[last]!.a1 + context);
    while (!truncated && ai < aEnd && push({ kind: "context", a: ai + 1, b: bi + 1, text: text(A, ai) })) {
      ai++;
      bi++;
    }
    hunks.push({ aStart: aStart + 1, aCount: ai - aStart, bStart: bStart + 1, bCount: bi - bStart, lines });
    k = last + 1;
  }
  if (k < changes.length) truncated = true;
  return { aLines: A.count, bLines: B.count, added, removed, identical: added === 0 && removed === 0, hunks, truncated };
}
