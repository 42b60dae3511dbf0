import { describe, expect, it } from "vitest";
import { finalHeaders, PRECOMPRESSED_HEADER, securityHeaders } from "./security-headers";

/** A node:http-like header store. */
function outgoing(initial: Record<string, string> = {}) {
  const h = new Map(Object.entries(initial).map(([k, v]) => [k.toLowerCase(), v]));
  return {
    h,
    hasHeader: (n: string) => h.has(n.toLowerCase()),
    getHeader: (n: string) => h.get(n.toLowerCase()),
    setHeader: (n: string, v: string) => h.set(n.toLowerCase(), v),
    removeHeader: (n: string) => void h.delete(n.toLowerCase()),
  };
}

describe("headers settled as an answer goes out", () => {
  const cache = securityHeaders({ nonce: "n", dev: false, https: false, path: "/api/x" })["Cache-Control"];

  it("never stores an answer that says nothing, and keeps a route's own Cache-Control", () => {
    expect(cache).toBe("no-store");
    const plain = outgoing();
    finalHeaders(plain, cache, undefined);
    expect(plain.h.get("cache-control")).toBe("no-store");
    const own = outgoing({ "Cache-Control": "private, no-cache, no-transform" });
    finalHeaders(own, cache, undefined);
    expect(own.h.get("cache-control")).toBe("private, no-cache, no-transform");
    const late = outgoing();
    finalHeaders(late, cache, { "cache-control": "public, max-age=31536000, immutable" });
    expect(late.h.has("cache-control")).toBe(false);
    const build = securityHeaders({ nonce: "n", dev: false, https: false, path: "/_next/static/x.js" });
    expect(build["Cache-Control"]).toBeUndefined();
  });

  it("turns a precompressed body's marker into Content-Encoding, and only for br and gzip", () => {
    const br = outgoing({ [PRECOMPRESSED_HEADER]: "br" });
    finalHeaders(br, cache, undefined);
    expect(br.h.get("content-encoding")).toBe("br");
    expect(br.h.has(PRECOMPRESSED_HEADER)).toBe(false);
    const odd = outgoing({ [PRECOMPRESSED_HEADER]: "identity; evil" });
    finalHeaders(odd, cache, undefined);
    expect(odd.h.has("content-encoding")).toBe(false);
    expect(odd.h.has(PRECOMPRESSED_HEADER)).toBe(false);
  });
});
