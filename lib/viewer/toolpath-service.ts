/**
 * Where the toolpath route gets its answers: a small cache by ETag (the same bytes, engine and options always give
 * the same answer) in front of the builder. scripts/serve.ts offers a builder on a thread of its own, so a
 * million-line program never stalls the app's other requests; without one (tests that call the route in-process)
 * the answer is built inline. Requests for an answer being built wait for that one build.
 *
 * On globalThis because route handlers (bundled by Next) and scripts/serve.ts are separate module instances.
 */
import { createHash } from "node:crypto";
import type { AnalyzeOptions } from "../gcode/types";
import { ENGINE_VERSION } from "../gcode/version";
import { buildToolpathAnswer, type ToolpathAnswer } from "./toolpath-answer";
import { TOOLPATH_FORMAT_VERSION } from "./toolpath-format";

export interface ToolpathBuilder {
  toolpath(bytes: Uint8Array, options: AnalyzeOptions): Promise<ToolpathAnswer>;
}

/** Compressed answers kept, in bytes (the 1,000,000-line bench program takes about 5 MB both ways). */
export const TOOLPATH_CACHE_BYTES = 64 * 1024 * 1024;

interface Registry {
  builder: ToolpathBuilder | null;
  cache: Map<string, ToolpathAnswer>;
  bytes: number;
  building: Map<string, Promise<ToolpathAnswer>>;
}

const KEY = Symbol.for("cyclegate.toolpaths");

function registry(): Registry {
  const g = globalThis as unknown as Record<symbol, Registry | undefined>;
  g[KEY] ??= { builder: null, cache: new Map(), bytes: 0, building: new Map() };
  return g[KEY];
}

/** scripts/serve.ts offers its thread (null withdraws it). */
export function offerToolpathBuilder(builder: ToolpathBuilder | null): void {
  registry().builder = builder;
}

/**
 * The answer's ETag: the file's SHA-256, the engine version, the layout version and a digest of the options (machine
 * profile, safe Z, parts per cycle), so a change to any of them is a new answer.
 */
export function toolpathEtag(sha256: string, options: AnalyzeOptions): string {
  const opts = createHash("sha256").update(JSON.stringify(options)).digest("hex").slice(0, 16);
  return `"${sha256}-e${ENGINE_VERSION}-f${TOOLPATH_FORMAT_VERSION}-${opts}"`;
}

/** The cached answer for `etag`, if any (most recently used last). */
export function cachedToolpath(etag: string): ToolpathAnswer | null {
  const r = registry();
  const hit = r.cache.get(etag);
  if (!hit) return null;
  r.cache.delete(etag);
  r.cache.set(etag, hit);
  return hit;
}

const sizeOf = (a: ToolpathAnswer) => a.br.byteLength + a.gzip.byteLength;

/** Builds (once, however many ask at the same time) and caches the answer for `etag`. */
export function toolpathAnswer(etag: string, loadBytes: () => Promise<Uint8Array>, options: AnalyzeOptions): Promise<ToolpathAnswer> {
  const hit = cachedToolpath(etag);
  if (hit) return Promise.resolve(hit);
  const r = registry();
  const pending = r.building.get(etag);
  if (pending) return pending;
  const job = (async () => {
    const bytes = await loadBytes();
    const answer = r.builder ? await r.builder.toolpath(bytes, options) : buildToolpathAnswer(bytes, options);
    const size = sizeOf(answer);
    if (size <= TOOLPATH_CACHE_BYTES / 4) {
      r.cache.set(etag, answer);
      r.bytes += size;
      for (const [k, v] of r.cache) {
        if (r.bytes <= TOOLPATH_CACHE_BYTES) break;
        r.cache.delete(k);
        r.bytes -= sizeOf(v);
      }
    }
    return answer;
  })().finally(() => r.building.delete(etag));
  r.building.set(etag, job);
  return job;
}
