/**
 * Analysis started early, in the app process that received an upload, while the bytes are still being written to
 * the database. The job that runs after the commit takes the result when the bytes and every option match (the
 * key is the SHA-256 plus the options as JSON); otherwise it analyses as usual. Only where a worker runs inside the
 * app process (npm start) does it offer its analyser here; elsewhere nothing is started early.
 *
 * On globalThis because the route handlers (bundled by Next) and the worker (loaded by scripts/serve.ts) are separate
 * module instances in one process.
 */
import type { AnalyzeOptions } from "../gcode/types";
import type { StoredAnalysis } from "./analyser";

interface Registry {
  analyser: { analyse(bytes: Uint8Array, options: AnalyzeOptions): Promise<StoredAnalysis> } | null;
  results: Map<string, { result: Promise<StoredAnalysis>; at: number }>;
}

const KEY = Symbol.for("cyclegate.precompute");
/** A result nobody took within this time is dropped. */
const KEEP_MS = 5 * 60_000;

function registry(): Registry {
  const g = globalThis as unknown as Record<symbol, Registry | undefined>;
  g[KEY] ??= { analyser: null, results: new Map() };
  return g[KEY];
}

const keyOf = (sha256: string, options: AnalyzeOptions) => `${sha256}|${JSON.stringify(options)}`;

/** The in-process worker offers its analyser (null withdraws it). */
export function offerAnalyser(analyser: Registry["analyser"]): void {
  registry().analyser = analyser;
}

/** Starts analysing `bytes` now when an in-process analyser is on offer; returns whether it did. */
export function startEarlyAnalysis(sha256: string, bytes: Uint8Array, options: AnalyzeOptions): boolean {
  const r = registry();
  if (!r.analyser) return false;
  const now = Date.now();
  for (const [k, v] of r.results) if (now - v.at > KEEP_MS) r.results.delete(k);
  const key = keyOf(sha256, options);
  if (r.results.has(key)) return true;
  const result = r.analyser.analyse(bytes, options);
  // Nobody may be waiting yet; a failure only means the job analyses again.
  result.catch(() => undefined);
  r.results.set(key, { result, at: now });
  return true;
}

/** The early result for exactly these bytes and options, once (null when there is none). */
export function takeEarlyAnalysis(sha256: string, options: AnalyzeOptions): Promise<StoredAnalysis> | null {
  const r = registry();
  const key = keyOf(sha256, options);
  const hit = r.results.get(key);
  if (!hit) return null;
  r.results.delete(key);
  return hit.result;
}
