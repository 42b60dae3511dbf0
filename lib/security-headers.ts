/**
 * The security headers of every answer the app gives: pages, JSON, static files, error pages and
 * refusals. scripts/serve.ts sets them on each response before Next handles the request, with a
 * fresh nonce per request that Next reads back from the request's own Content-Security-Policy
 * header and puts on every script it renders. Plain module: serve.ts loads it outside Next.
 */

export interface SecurityHeaderOptions {
  /** Base64 random value, new for every request. */
  nonce: string;
  /** `next dev`: React's dev build needs eval, and dev styles are injected inline. */
  dev: boolean;
  /** APP_URL is https: ask browsers to stay on https. */
  https: boolean;
}

/**
 * The Content-Security-Policy. Scripts only with this answer's nonce (and what they load:
 * 'strict-dynamic'); no eval outside `next dev`. Room for what the app grows into: Web Workers from
 * the app or blob: URLs (the analysis engine in the browser), data:/blob: images, the fonts shipped
 * with the app, fetch and XHR uploads to the app's own API. Nothing may frame the app.
 */
export function contentSecurityPolicy({ nonce, dev, https }: SecurityHeaderOptions): string {
  const directives: [string, ...string[]][] = [
    ["default-src", "'self'"],
    ["script-src", "'self'", `'nonce-${nonce}'`, "'strict-dynamic'", ...(dev ? ["'unsafe-eval'"] : [])],
    // A nonce would switch 'unsafe-inline' off, so dev gets one or the other.
    ["style-src", "'self'", dev ? "'unsafe-inline'" : `'nonce-${nonce}'`],
    // style="..." attributes in server-rendered markup (progress bars, virtual lists, charts): they can only
    // change how a page looks, never run code, and React escapes what goes into them.
    ["style-src-attr", "'unsafe-inline'"],
    ["img-src", "'self'", "data:", "blob:"],
    ["font-src", "'self'"],
    ["connect-src", "'self'"],
    ["worker-src", "'self'", "blob:"],
    ["media-src", "'self'"],
    ["manifest-src", "'self'"],
    ["object-src", "'none'"],
    ["base-uri", "'none'"],
    ["form-action", "'self'"],
    ["frame-ancestors", "'none'"],
    // Only behind https: on plain http (a shop LAN) it would send every request to a port nobody serves.
    ...(https ? [["upgrade-insecure-requests"] as [string]] : []),
  ];
  return directives.map((d) => d.join(" ")).join("; ");
}

/** The build's content-hashed files, which Next itself marks immutable; every other answer is never stored. */
export const isBuildAsset = (path: string) => path.startsWith("/_next/static/");

/** Every security header of an answer to `path`, by name. */
export function securityHeaders(opts: SecurityHeaderOptions & { path: string }): Record<string, string> {
  return {
    "Content-Security-Policy": contentSecurityPolicy(opts),
    "X-Frame-Options": "DENY",
    "X-Content-Type-Options": "nosniff",
    "Referrer-Policy": "same-origin",
    "Cross-Origin-Opener-Policy": "same-origin",
    "Cross-Origin-Resource-Policy": "same-origin",
    "Permissions-Policy": "camera=(), microphone=(), geolocation=(), payment=(), usb=(), serial=(), hid=()",
    ...(!isBuildAsset(opts.path) && { "Cache-Control": "no-store" }),
    ...(opts.https && { "Strict-Transport-Security": "max-age=31536000" }),
  };
}

/**
 * Next drops Content-Encoding (and Content-Length) from what a route handler answers, so a route that sends a body
 * it compressed itself (the toolpath route's cached brotli, the file route's gzip) names the coding in this header
 * instead, and scripts/serve.ts turns it into Content-Encoding as the headers go out. Such answers also carry
 * `Cache-Control: no-transform`, so nothing on the way compresses them again.
 */
export const PRECOMPRESSED_HEADER = "x-cyclegate-encoding";

/** The parts of an outgoing answer finalHeaders touches (node:http's ServerResponse has them). */
export interface OutgoingHeaders {
  hasHeader(name: string): boolean;
  getHeader(name: string): unknown;
  setHeader(name: string, value: string): unknown;
  removeHeader(name: string): void;
}

/**
 * Just before an answer's headers go out: `Cache-Control` from `securityHeaders` unless the answer set its own (a
 * route handler that revalidates with an ETag), and Content-Encoding for a precompressed body. `late` are headers
 * passed to writeHead itself, which are applied after this runs.
 */
export function finalHeaders(res: OutgoingHeaders, cacheControl: string | undefined, late: unknown): void {
  const lateNames =
    late && typeof late === "object"
      ? Array.isArray(late)
        ? late.filter((_, i) => i % 2 === 0).map((n) => String(n).toLowerCase())
        : Object.keys(late).map((n) => n.toLowerCase())
      : [];
  if (cacheControl && !res.hasHeader("cache-control") && !lateNames.includes("cache-control")) res.setHeader("Cache-Control", cacheControl);
  const coding = res.getHeader(PRECOMPRESSED_HEADER);
  if (coding !== undefined) {
    res.removeHeader(PRECOMPRESSED_HEADER);
    if (coding === "br" || coding === "gzip") res.setHeader("Content-Encoding", coding);
  }
}
