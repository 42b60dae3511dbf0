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
