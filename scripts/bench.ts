/**
 * npm run bench: speed and memory of the analysis engine on a generated 1,000,000-line posted program, beside a
 * minimal hand-written tokenizer over the same bytes and two registry packages (gcode-parser's parseLine loop and
 * gcode-toolpath), in one run. Prints figures and PASS/FAIL against the targets; it is a benchmark, not a test.
 */
import { execFileSync } from "node:child_process";
import { writeFileSync, mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { performance } from "node:perf_hooks";
import { parseLine } from "gcode-parser";
import Toolpath from "gcode-toolpath";
import { analyzeProgram } from "../lib/gcode";
import { benchProgram } from "./bench-program";

const LINES = Number(process.env.BENCH_LINES ?? 1_000_000);
const SLICE = 100_000;
const ROUNDS = 7;

/** The floor: reads every word (letter + hand-parsed number) and folds it into a checksum. */
function minimalTokenizer(b: Uint8Array): number {
  let sum = 0;
  let lines = 0;
  const n = b.length;
  let p = 0;
  while (p < n) {
    const c = b[p]!;
    if (c === 10) {
      lines++;
      p++;
      continue;
    }
    if (c === 40) {
      while (p < n && b[p] !== 41 && b[p] !== 10) p++;
      continue;
    }
    const L = (c | 32) - 97;
    if (L >= 0 && L < 26) {
      p++;
      let neg = false;
      if (b[p] === 45) {
        neg = true;
        p++;
      }
      let m = 0;
      let dec = -1;
      while (p < n) {
        const d = b[p]! - 48;
        if (d >= 0 && d <= 9) {
          m = m * 10 + d;
          if (dec >= 0) dec++;
        } else if (d === -2 && dec < 0) dec = 0;
        else break;
        p++;
      }
      let v = dec > 0 ? m / 10 ** dec : m;
      if (neg) v = -v;
      sum += v * (L + 1);
      continue;
    }
    p++;
  }
  return sum + lines;
}

/**
 * Best time in seconds of each contender over ROUNDS rounds; every round runs each contender once, in turn, so that
 * a slow spell of a shared machine falls on all of them rather than on whichever was being timed.
 */
function bestOfRounds(fns: (() => unknown)[]): number[] {
  const t = fns.map(() => Infinity);
  for (let r = 0; r < ROUNDS; r++) {
    fns.forEach((fn, i) => {
      const t0 = performance.now();
      fn();
      const dt = performance.now() - t0;
      if (dt < t[i]!) t[i] = dt;
    });
  }
  return t.map((x) => x / 1000);
}

const fmtRate = (lines: number, bytes: number, s: number): string =>
  `${(lines / s / 1e6).toFixed(2).padStart(7)} M lines/s ${(bytes / s / 1e6).toFixed(1).padStart(8)} MB/s ${(s * 1000).toFixed(1).padStart(9)} ms`;
const verdict = (ok: boolean): string => (ok ? "PASS" : "FAIL");

function main(): void {
  const t0 = performance.now();
  const text = benchProgram(LINES);
  const bytes = new TextEncoder().encode(text);
  const lineCount = LINES;
  console.log(`synthetic program: ${lineCount.toLocaleString("en")} lines, ${(bytes.length / 1e6).toFixed(1)} MB (generated in ${((performance.now() - t0) / 1000).toFixed(1)} s)`);

  // slice for the packages: the first SLICE lines would be all header and contour; take a spread instead. Picked
  // without splitting the whole text, so that a million line strings do not sit in the heap (and slow every full
  // gc) while the analysis is timed.
  const sliceLines: string[] = [];
  const stride = Math.max(1, Math.floor(lineCount / SLICE));
  for (let i = 0, at = 0; at < text.length && sliceLines.length < SLICE; i++) {
    const end = text.indexOf("\n", at);
    const next = end < 0 ? text.length : end + 1;
    if (i % stride === 0) sliceLines.push(text.slice(at, end < 0 ? text.length : end));
    at = next;
  }
  const sliceText = sliceLines.join("\n");
  const sliceBytes = new TextEncoder().encode(sliceText).length;
  const scale = lineCount / sliceLines.length;

  // warm up
  minimalTokenizer(bytes);
  analyzeProgram(bytes.subarray(0, 2_000_000));
  let analysis = analyzeProgram(bytes);
  const [tTok, tAna, tParserSlice, tToolpathSlice] = bestOfRounds([
    () => minimalTokenizer(bytes),
    () => {
      analysis = analyzeProgram(bytes);
    },
    () => {
      let words = 0;
      for (const l of sliceLines) words += parseLine(l).words.length;
      return words;
    },
    () => {
      let segs = 0;
      const tp = new Toolpath({
        addLine: () => {
          segs++;
        },
        addArcCurve: () => {
          segs++;
        },
      });
      tp.loadFromStringSync(sliceText);
      return segs;
    },
  ]) as [number, number, number, number];
  const tParser = tParserSlice * scale;
  const tToolpath = tToolpathSlice * scale;

  console.log("");
  console.log(`minimal tokenizer         ${fmtRate(lineCount, bytes.length, tTok)}`);
  console.log(`analyzeProgram (full)     ${fmtRate(lineCount, bytes.length, tAna)}   segments ${analysis.toolpath.segmentCount.toLocaleString("en")}, findings ${analysis.findingCounts.reduce((s, c) => s + c.count, 0)}`);
  console.log(`gcode-parser parseLine    ${fmtRate(lineCount, bytes.length, tParser)}   (timed on a ${sliceLines.length.toLocaleString("en")}-line slice, ${(sliceBytes / 1e6).toFixed(1)} MB, scaled x${scale.toFixed(1)})`);
  console.log(`gcode-toolpath            ${fmtRate(lineCount, bytes.length, tToolpath)}   (timed on the same slice, scaled x${scale.toFixed(1)})`);

  // memory in a child with --expose-gc
  const dir = mkdtempSync(join(tmpdir(), "cyclegate-bench-"));
  const file = join(dir, "bench.nc");
  writeFileSync(file, bytes);
  let mem: {
    lines: number; inputBytes: number; retained: number; beforeGc: number; peakRssDelta: number; retainedRss: number;
    resizable: boolean; segments: number; toolpathBytes: number;
  };
  try {
    const out = execFileSync(process.execPath, ["--expose-gc", "--import", "tsx", join(dirname(fileURLToPath(import.meta.url)), "bench-memory.ts"), file], {
      encoding: "utf8",
      env: { ...process.env, NODE_OPTIONS: "" },
      maxBuffer: 1 << 20,
    });
    mem = JSON.parse(out.trim().split("\n").pop()!);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  const perLine = (x: number): string => (x / mem.lines).toFixed(1);
  console.log("");
  console.log(`memory (child, --expose-gc, input bytes read before the baseline)`);
  console.log(`  retained by the analysis (heapUsed+external, after gc)            ${perLine(mem.retained)} bytes/line  (${(mem.retained / 1e6).toFixed(1)} MB; toolpath buffers ${(mem.toolpathBytes / 1e6).toFixed(1)} MB for ${mem.segments.toLocaleString("en")} segments${mem.resizable ? "; RESIZABLE buffers, not in external" : ""})`);
  console.log(`  retained, as RSS growth after gc                                    ${perLine(mem.retainedRss)} bytes/line`);
  console.log(`  right after the run, before gc (includes garbage)                    ${perLine(mem.beforeGc)} bytes/line`);
  console.log(`  peak RSS growth during the run (sampled every 1 ms from a worker)    ${perLine(mem.peakRssDelta)} bytes/line`);
  console.log(`  input bytes themselves                                               ${perLine(mem.inputBytes)} bytes/line`);
  // the target is the peak: the larger of what stays and what the run touched at most (RSS sees every buffer)
  const peak = Math.max(mem.retained, mem.retainedRss, mem.peakRssDelta);

  const ratioTok = tAna / tTok;
  const ratioParser = tParser / tAna;
  const ratioToolpath = tToolpath / tAna;
  console.log("");
  console.log("targets");
  console.log(`  analysis within 3x the minimal tokenizer          ${ratioTok.toFixed(2)}x        ${verdict(ratioTok <= 3)}`);
  console.log(`  at least 5x faster than gcode-parser parseLine    ${ratioParser.toFixed(1)}x faster  ${verdict(ratioParser >= 5)}`);
  console.log(`  at least 5x faster than gcode-toolpath            ${ratioToolpath.toFixed(1)}x faster  ${verdict(ratioToolpath >= 5)}`);
  console.log(`  peak memory under 64 bytes/line (analysis peak, incl. toolpath)    ${perLine(peak)}  ${verdict(peak / mem.lines < 64)}`);
  console.log(`  ... counting the input bytes too (the target)                      ${perLine(peak + mem.inputBytes)}  ${verdict((peak + mem.inputBytes) / mem.lines < 64)}`);
}

main();
