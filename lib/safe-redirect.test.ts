// Item 1: the one check for a caller-given redirect path (sign-in page and action).
import { describe, expect, it } from "vitest";
import { safeRedirectPath } from "./safe-redirect";

describe("safeRedirectPath", () => {
  it.each([
    ["/", "/"],
    ["/audit?page=2", "/audit?page=2"],
    ["/admin/users/7#reset", "/admin/users/7#reset"],
    ["/machines/./x/../", "/machines/"],
    ["/a%20b", "/a%20b"],
  ])("keeps %j as %j", (raw, expected) => {
    expect(safeRedirectPath(raw)).toBe(expected);
  });

  it.each([
    "//evil.example",
    "/\\evil.example",
    "/\t/evil.example",
    "/\t\\evil.example",
    "\t//evil.example",
    "/.//evil.example",
    "/..//evil.example",
    "/%2e%2e//evil.example",
    "/x/..//evil.example",
    "/%09/evil.example",
    "/%5Cevil.example",
    "/audit\nLocation: //evil.example",
    "/audit\r",
    "/audit%0d%0a",
    "/\u0000",
    "/\u007f",
    "/\u0085",
    "https://evil.example/",
    "http:/evil.example",
    "evil.example",
    "javascript:alert(1)",
    "",
    `/${"a".repeat(2048)}`,
  ])("refuses %j", (raw) => {
    expect(safeRedirectPath(raw)).toBe("/");
  });

  it("refuses what is not a string, and uses the fallback given", () => {
    for (const v of [undefined, null, 7, ["/audit"], { href: "/audit" }]) expect(safeRedirectPath(v)).toBe("/");
    expect(safeRedirectPath("//x", "/machines")).toBe("/machines");
  });
});
