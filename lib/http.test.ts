import { describe, expect, it } from "vitest";
import { crossOriginWrite } from "./http";

const req = (method: string, headers: Record<string, string>) =>
  new Request("http://127.0.0.1:3000/api/programs/1/revisions", { method, headers: { host: "127.0.0.1:3000", ...headers } });

describe("crossOriginWrite", () => {
  it("refuses writes from another origin of the same host, which a SameSite=Lax cookie does not stop", () => {
    expect(crossOriginWrite(req("POST", { origin: "http://127.0.0.1:8080" }))).toBe(true);
    expect(crossOriginWrite(req("POST", { "sec-fetch-site": "same-site" }))).toBe(true);
    expect(crossOriginWrite(req("DELETE", { "sec-fetch-site": "cross-site", origin: "http://evil.example" }))).toBe(true);
    expect(crossOriginWrite(req("PUT", { origin: "null" }))).toBe(true); // sandboxed frames and file: pages
    expect(crossOriginWrite(req("POST", { origin: "not a url" }))).toBe(true);
  });

  it("lets the app's own pages, tools without browser marks and API tokens through", () => {
    expect(crossOriginWrite(req("POST", { origin: "http://127.0.0.1:3000", "sec-fetch-site": "same-origin" }))).toBe(false);
    expect(crossOriginWrite(req("POST", {}))).toBe(false); // curl, a CAM post
    expect(crossOriginWrite(req("POST", { "sec-fetch-site": "none" }))).toBe(false); // typed by the user
    expect(crossOriginWrite(req("POST", { authorization: "Bearer cg_x", origin: "http://127.0.0.1:8080" }))).toBe(false);
  });

  it("never refuses a read", () => {
    for (const m of ["GET", "HEAD", "OPTIONS"]) expect(crossOriginWrite(req(m, { origin: "http://evil.example", "sec-fetch-site": "cross-site" }))).toBe(false);
  });
});
