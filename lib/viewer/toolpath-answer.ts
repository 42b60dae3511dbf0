/**
 * The toolpath route's answer for one revision: the engine run with segment times, encoded in the CGTP layout and
 * compressed both ways a browser may ask for (brotli, gzip), so a cached answer is sent without further work.
 * Node only (zlib); it runs on the app's toolpath thread (lib/jobs/analysis-thread-main.ts).
 */
import { brotliCompressSync, constants, gzipSync } from "node:zlib";
import { analyzeProgram } from "../gcode/index";
import type { AnalyzeOptions } from "../gcode/types";
import { viewerDataFromAnalysis } from "./from-analysis";
import { encodeToolpath } from "./toolpath-format";

export interface ToolpathAnswer {
  br: Uint8Array;
  gzip: Uint8Array;
  /** Bytes of the CGTP layout before compression. */
  size: number;
  segments: number;
  /** Milliseconds: the engine, the encoding, both compressions. */
  timing: { engine: number; encode: number; compress: number };
}

/** Brotli quality 5: on the bench program about a third of gzip's size in less time than gzip -6 (9 is 4x slower). */
const BROTLI_QUALITY = 5;

export function buildToolpathAnswer(bytes: Uint8Array, options: AnalyzeOptions): ToolpathAnswer {
  const t0 = performance.now();
  const analysis = analyzeProgram(bytes, { ...options, segmentTimes: true });
  const t1 = performance.now();
  const { path, meta } = viewerDataFromAnalysis(analysis);
  const raw = encodeToolpath(path, meta);
  const t2 = performance.now();
  const br = brotliCompressSync(raw, {
    params: { [constants.BROTLI_PARAM_QUALITY]: BROTLI_QUALITY, [constants.BROTLI_PARAM_SIZE_HINT]: raw.length },
  });
  const gzip = gzipSync(raw, { level: 6 });
  const t3 = performance.now();
  return {
    // own copies: zlib may hand back views of a shared pool, which a thread cannot transfer
    br: new Uint8Array(br),
    gzip: new Uint8Array(gzip),
    size: raw.length,
    segments: path.segmentCount,
    timing: { engine: t1 - t0, encode: t2 - t1, compress: t3 - t2 },
  };
}
