/**
 * What scripts/serve.ts refuses before Next sees a request, so the answer is a clear 4xx rather
 * than Next's 500: methods the app does not serve, and server-action bodies over the limit.
 * Plain module: serve.ts and next.config.ts load it outside Next.
 */
import type { IncomingHttpHeaders } from "node:http";

/** The largest server-action body (a form post to a page). next.config.ts gives Next the same limit. */
export const ACTION_BODY_LIMIT_BYTES = 1024 * 1024;

/** Methods a route handler under /api may answer (Next answers 405 itself for one a route does not export). */
export const API_METHODS = ["GET", "HEAD", "POST", "PUT", "PATCH", "DELETE", "OPTIONS"] as const;
/** Methods a page answers: reading it, and its server actions (POST). */
export const PAGE_METHODS = ["GET", "HEAD", "POST"] as const;

export interface GateRefusal {
  status: 405 | 411 | 413;
  error: string;
  headers?: Record<string, string>;
}

/**
 * The refusal for a request the app must not pass on, or null. Outside /api only GET, HEAD and POST
 * are served (TRACE, OPTIONS, DELETE... on a page are a 405); under /api only API_METHODS. A POST
 * outside /api is a server action: it must say how long it is (browsers always do), at most
 * ACTION_BODY_LIMIT_BYTES. Route handlers check their own bodies (lib/http.ts, readJson, readBodyBytes).
 */
export function gateRequest(req: { method?: string; url?: string; headers: IncomingHttpHeaders }): GateRefusal | null {
  const method = req.method ?? "GET";
  const path = (req.url ?? "/").split("?")[0] ?? "/";
  const api = path === "/api" || path.startsWith("/api/");
  const allowed: readonly string[] = api ? API_METHODS : PAGE_METHODS;
  if (!allowed.includes(method)) {
    return { status: 405, error: `${method} is not supported here.`, headers: { Allow: allowed.join(", ") } };
  }
  if (method !== "POST" || api) return null;
  const length = req.headers["content-length"];
  if (length === undefined) {
    return req.headers["transfer-encoding"] ? { status: 411, error: "Send the form with a Content-Length." } : null;
  }
  if (!/^\d{1,15}$/.test(length) || Number(length) > ACTION_BODY_LIMIT_BYTES) {
    return { status: 413, error: `The request body is too large (at most ${formatBytes(ACTION_BODY_LIMIT_BYTES)}).` };
  }
  return null;
}

/** "64 KB", "1 MB": a byte limit as a person reads it in an error message. */
export function formatBytes(n: number): string {
  return n >= 1024 * 1024 ? `${+(n / 1024 / 1024).toFixed(1)} MB` : `${+(n / 1024).toFixed(1)} KB`;
}
