// Items 4 and 8: the headers serve.ts puts on every answer and what it refuses before Next.
import { describe, expect, it } from "vitest";
import { ACTION_BODY_LIMIT_BYTES, gateRequest } from "./request-gate";
import { contentSecurityPolicy, securityHeaders } from "./security-headers";

describe("gateRequest", () => {
  const req = (method: string, url: string, headers: Record<string, string> = {}) => gateRequest({ method, url, headers });
  it("refuses methods the app does not serve with 405 and Allow", () => {
    for (const m of ["TRACE", "TRACK", "CONNECT", "PROPFIND", "MKCOL"]) {
      expect(req(m, "/api/health")).toMatchObject({ status: 405, error: `${m} is not supported here.`, headers: { Allow: "GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS" } });
    }
    for (const m of ["TRACE", "OPTIONS", "PUT", "PATCH", "DELETE"]) {
      expect(req(m, "/sign-in?next=/")).toMatchObject({ status: 405, headers: { Allow: "GET, HEAD, POST" } });
    }
    for (const m of ["GET", "HEAD", "POST", "PUT", "PATCH", "DELETE", "OPTIONS"]) expect(req(m, "/api/health")).toBeNull();
    for (const m of ["GET", "HEAD"]) expect(req(m, "/machines")).toBeNull();
  });
  it("bounds server-action bodies (POSTs outside /api) by their Content-Length", () => {
    expect(req("POST", "/sign-in", { "content-length": String(ACTION_BODY_LIMIT_BYTES) })).toBeNull();
    expect(req("POST", "/sign-in?next=/", { "content-length": String(ACTION_BODY_LIMIT_BYTES + 1) })).toMatchObject({ status: 413 });
    expect(req("POST", "/admin/users/3", { "content-length": "1e9" })).toMatchObject({ status: 413 });
    expect(req("POST", "/sign-in", { "transfer-encoding": "chunked" })).toMatchObject({ status: 411 });
    expect(req("POST", "/api/session", { "content-length": String(10 * ACTION_BODY_LIMIT_BYTES) })).toBeNull();
  });
});

describe("security headers", () => {
  const prod = securityHeaders({ nonce: "abc123", dev: false, https: false, path: "/machines" });
  it("forbid framing, sniffing, eval and foreign scripts in production", () => {
    const csp = prod["Content-Security-Policy"]!;
    expect(csp).toContain("frame-ancestors 'none'");
    expect(csp).toContain("script-src 'self' 'nonce-abc123' 'strict-dynamic'");
    expect(csp).not.toContain("unsafe-eval");
    // Inline code and <style> elements need the nonce; only style attributes are allowed inline.
    expect(csp).toMatch(/script-src [^;]*/);
    expect(/script-src [^;]*/.exec(csp)![0]).not.toContain("unsafe-inline");
    expect(/style-src [^;]*/.exec(csp)![0]).not.toContain("unsafe-inline");
    expect(csp).toContain("style-src-attr 'unsafe-inline'");
    expect(csp).not.toContain("upgrade-insecure-requests");
    expect(prod).toMatchObject({ "X-Frame-Options": "DENY", "X-Content-Type-Options": "nosniff", "Cache-Control": "no-store" });
    expect(prod["Strict-Transport-Security"]).toBeUndefined();
  });
  it("leave room for the worker, the 3D view's images, the fonts and uploads", () => {
    const csp = prod["Content-Security-Policy"]!;
    for (const d of ["worker-src 'self' blob:", "img-src 'self' data: blob:", "font-src 'self'", "connect-src 'self'"]) expect(csp).toContain(d);
  });
  it("relax only what next dev needs, and add https-only headers behind https", () => {
    const dev = contentSecurityPolicy({ nonce: "n", dev: true, https: false });
    expect(dev).toContain("'unsafe-eval'");
    expect(dev).toContain("style-src 'self' 'unsafe-inline'");
    const tls = securityHeaders({ nonce: "n", dev: false, https: true, path: "/" });
    expect(tls["Content-Security-Policy"]).toContain("upgrade-insecure-requests");
    expect(tls["Strict-Transport-Security"]).toBe("max-age=31536000");
  });
  it("leave the build's hashed files to Next's own immutable caching", () => {
    expect(securityHeaders({ nonce: "n", dev: false, https: false, path: "/_next/static/chunks/a.js" })["Cache-Control"]).toBeUndefined();
    expect(securityHeaders({ nonce: "n", dev: false, https: false, path: "/api/machines" })["Cache-Control"]).toBe("no-store");
  });
});
