/**
 * Bad input never crashes or hangs the engine, and the text check turns away what is not a text program with a reason.
 * The CLI prints JSON for a program and, for a binary file, one line on stderr and exit code 2.
 */
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { analyzeProgram, checkTextProgram, type JsonToolpath } from "../../lib/gcode/index";

/** Deterministic bytes (xorshift32), so a failure can be reproduced. */
function noise(n: number, seed = 0x9e3779b9): Uint8Array {
  const out = new Uint8Array(n);
  let s = seed >>> 0;
  for (let i = 0; i < n; i++) {
    s ^= s << 13;
    s >>>= 0;
    s ^= s >>> 17;
    s ^= s << 5;
    s >>>= 0;
    out[i] = s & 0xff;
  }
  return out;
}

const enc = (s: string) => new TextEncoder().encode(s);

const rejected: Array<[string, Uint8Array, RegExp]> = [
  ["binary data", noise(64 * 1024), /binary|NUL|control|UTF-8/i],
  ["NUL bytes inside a program", enc("G21 G90\nG0 X1\u0000Y2\nM30\n"), /NUL/i],
  ["invalid UTF-8", Uint8Array.from([0x47, 0x30, 0x20, 0x58, 0xff, 0xfe, 0x31, 0x0a]), /UTF-8/i],
  ["a truncated UTF-8 sequence", Uint8Array.from([...enc("(DURCHMESSER "), 0xc3]), /UTF-8/i],
  ["0 bytes", new Uint8Array(0), /empty/i],
];

describe("the text check", () => {
  for (const [what, bytes, reason] of rejected) {
    it(`rejects ${what} with a reason`, () => {
      const r = checkTextProgram(bytes);
      expect(r.ok).toBe(false);
      if (!r.ok) {
        expect(r.reason).toMatch(reason);
        expect(r.reason).not.toMatch(/\n/);
      }
    });
  }

  it("accepts a program with CR, LF and CRLF endings, tabs, non-ASCII comments and a tape end mark", () => {
    const r = checkTextProgram(enc("%\r\nO1000 (Ø 10 FRÄSER)\rG21\tG90\nG0 X0\r\nM30\n%\n"));
    expect(r).toEqual({ ok: true });
  });
});

describe("the engine on bad input", () => {
  for (const [what, bytes] of rejected) {
    it(`does not throw on ${what}`, () => {
      expect(() => analyzeProgram(bytes)).not.toThrow();
    });
  }

  it("does not throw on a NUL-filled megabyte", () => {
    expect(() => analyzeProgram(new Uint8Array(1 << 20))).not.toThrow();
  });

  it("reads a 1 MB line, flags it as too long and carries on", () => {
    const long = `G1 X10 F100 (${"A".repeat(1 << 20)})`;
    const a = analyzeProgram(["G21 G90 G17 G94 G54", "G0 X0 Y0 Z0", long, "G1 Y10", "M30"].join("\n"));
    expect(a.lineCount).toBe(5);
    expect(a.findings.some((f) => f.rule === "line-too-long" && f.line === 3)).toBe(true);
    // Derived: 10 along X on the long line, then 10 along Y.
    expect(a.feedLength).toBeCloseTo(20, 9);
  });

  it("survives a 1 MB line of words", () => {
    const words = "X1 ".repeat(350_000);
    const a = analyzeProgram(["G21 G90 G17 G94 G54", `G0 ${words}`, "M30"].join("\n"));
    expect(a.lineCount).toBe(3);
    expect(a.findings.some((f) => f.line === 2 && f.severity === "error")).toBe(true);
  });

  it("analyses a generated 50 MB program without hanging", { timeout: 60_000 }, () => {
    const header = "%\nO9999 (GENERATED)\nG21 G90 G17 G94 G40 G49 G80\nT1 M6\nS5000 M3\nG54 G0 X0 Y0\nG43 H1 Z5\nG1 Z-1 F1000\n";
    const pair = "G1 X10.000 Y0.000\nG1 X0.000 Y0.000\n"; // 36 bytes, two 10 mm feeds
    const pairs = Math.ceil((50 * 1024 * 1024) / pair.length);
    const footer = "G0 Z5\nM5\nM30\n%\n";
    const bytes = Buffer.allocUnsafe(header.length + pairs * pair.length + footer.length);
    let o = bytes.write(header, 0, "latin1");
    const unit = Buffer.from(pair, "latin1");
    for (let i = 0; i < pairs; i++) o += unit.copy(bytes, o);
    bytes.write(footer, o, "latin1");
    expect(bytes.length).toBeGreaterThanOrEqual(50 * 1024 * 1024);
    expect(checkTextProgram(bytes)).toEqual({ ok: true });
    const a = analyzeProgram(bytes);
    expect(a.byteLength).toBe(bytes.length);
    // Lines: 8 header + 2 per pair + 4 footer.
    expect(a.lineCount).toBe(8 + 2 * pairs + 4);
    // Derived: plunge 6 (Z5 -> Z-1) and 20 mm per pair.
    expect(a.feedLength).toBeCloseTo(6 + 20 * pairs, 0);
    expect(a.endLine).toBe(8 + 2 * pairs + 3);
  });
});

describe("the CLI", () => {
  const root = join(__dirname, "..", "..");
  const tmp = mkdtempSync(join(tmpdir(), "cyclegate-cli-"));
  afterAll(() => rmSync(tmp, { recursive: true, force: true }));
  const cli = (...args: string[]) =>
    spawnSync("npm", ["run", "--silent", "analyze", "--", ...args], { cwd: root, encoding: "utf8", timeout: 60_000 });

  it("prints the analysis as JSON with --json", { timeout: 60_000 }, () => {
    const r = cli(join(root, "tests", "fixtures", "two-vise-by-tool.nc"), "--json");
    expect(r.stderr).toBe("");
    expect(r.status).toBe(0);
    const a = JSON.parse(r.stdout) as Record<string, unknown>;
    for (const key of ["units", "lineCount", "workOffsets", "tools", "bounds", "feedLength", "rapidLength", "time", "findings", "toolpath"]) {
      expect(a, key).toHaveProperty(key);
    }
    expect(a.units).toBe("mm");
    expect((a.workOffsets as Array<{ code: string }>).map((w) => w.code)).toEqual(["G54", "G55"]);
    // The toolpath travels as base64 of little-endian typed arrays (types.ts JsonToolpath); decoded, it is the
    // toolpath analyzeProgram returns for the same file.
    const tp = a.toolpath as JsonToolpath;
    expect(tp.encoding).toBe("base64-le");
    const direct = analyzeProgram(readFileSync(join(root, "tests", "fixtures", "two-vise-by-tool.nc"))).toolpath;
    expect(tp.segmentCount).toBe(direct.segmentCount);
    const bytes = (b64: string) => {
      const b = Buffer.from(b64, "base64");
      return b.buffer.slice(b.byteOffset, b.byteOffset + b.length);
    };
    expect(new Float32Array(bytes(tp.positions))).toEqual(direct.positions);
    expect(new Uint32Array(bytes(tp.line))).toEqual(direct.line);
    expect(new Uint8Array(bytes(tp.kind))).toEqual(direct.kind);
    expect(new Uint16Array(bytes(tp.tool))).toEqual(direct.tool);
    expect(new Uint8Array(bytes(tp.offset))).toEqual(direct.offset);
  });

  it("prints a readable report without --json, and exits 1 when there are errors", { timeout: 60_000 }, () => {
    const r = cli(join(root, "tests", "fixtures", "rules", "feed-missing.nc"));
    expect(r.status).toBe(1);
    expect(r.stdout).toMatch(/feed-missing/);
    expect(() => JSON.parse(r.stdout)).toThrow();
  });

  it("exits 2 with one line on stderr for a binary file", { timeout: 60_000 }, () => {
    const file = join(tmp, "image.nc");
    writeFileSync(file, noise(4096, 12345));
    const r = cli(file, "--json");
    expect(r.status).toBe(2);
    expect(r.stdout).toBe("");
    const lines = r.stderr.trimEnd().split("\n");
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/binary|NUL|control|UTF-8/i);
  });

  it("exits 2 with one line on stderr for an empty file", { timeout: 60_000 }, () => {
    const file = join(tmp, "empty.nc");
    writeFileSync(file, "");
    const r = cli(file);
    expect(r.status).toBe(2);
    expect(r.stderr.trimEnd().split("\n")).toHaveLength(1);
    expect(r.stderr).toMatch(/empty/i);
  });
});
