/**
 * A small in-memory cache of program file bytes by SHA-256. Stored bytes never change (content-addressed, and a
 * trigger refuses updates), so a cached copy is always right. The upload route puts the bytes it just stored, so
 * the in-process worker analyses them without reading them back; downloads and compares reuse recent files.
 *
 * It lives on globalThis because the app's route handlers (bundled by Next) and the worker (loaded by scripts/serve.ts)
 * are separate module instances in one process. No "server-only": the worker imports it.
 */
const KEY = Symbol.for("cyclegate.fileCache");

/** Total bytes kept (the newest files win). */
export const FILE_CACHE_BYTES = 64 * 1024 * 1024;

interface Cache {
  map: Map<string, Buffer>;
  bytes: number;
}

function cache(): Cache {
  const g = globalThis as unknown as Record<symbol, Cache | undefined>;
  g[KEY] ??= { map: new Map(), bytes: 0 };
  return g[KEY];
}

export function getCachedFile(sha256: string): Buffer | null {
  const c = cache();
  const hit = c.map.get(sha256);
  if (!hit) return null;
  // Most recently used last.
  c.map.delete(sha256);
  c.map.set(sha256, hit);
  return hit;
}

export function putCachedFile(sha256: string, bytes: Buffer): void {
  if (bytes.length > FILE_CACHE_BYTES / 2) return;
  const c = cache();
  const old = c.map.get(sha256);
  if (old) {
    c.map.delete(sha256);
    c.bytes -= old.length;
  }
  c.map.set(sha256, bytes);
  c.bytes += bytes.length;
  for (const [key, value] of c.map) {
    if (c.bytes <= FILE_CACHE_BYTES) break;
    c.map.delete(key);
    c.bytes -= value.length;
  }
}
