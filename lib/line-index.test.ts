import { describe, expect, it } from "vitest";
import { countLines } from "./program-file";
import { LineIndex } from "./line-index";

const enc = (s: string) => new TextEncoder().encode(s);

describe("LineIndex", () => {
  it("splits on LF, CR and CRLF like the engine and drops the endings", () => {
    const bytes = enc("G21\r\nG90\rG0 X1\nM30");
    const idx = new LineIndex(bytes, countLines(bytes));
    expect(idx.lineCount).toBe(4);
    expect([0, 1, 2, 3].map((i) => idx.line(i))).toEqual(["G21", "G90", "G0 X1", "M30"]);
  });

  it("keeps empty lines and a file ending in a line break", () => {
    const bytes = enc("%\n\nO1\n");
    const idx = new LineIndex(bytes, countLines(bytes));
    expect(idx.lineCount).toBe(3);
    expect([0, 1, 2].map((i) => idx.line(i))).toEqual(["%", "", "O1"]);
    expect(idx.line(3)).toBe("");
  });

  it("indexes only as far as asked", () => {
    const lines = Array.from({ length: 100_000 }, (_, i) => `N${i + 1} G1 X${i}`);
    const bytes = enc(lines.join("\n"));
    const idx = new LineIndex(bytes, lines.length);
    expect(idx.line(9)).toBe("N10 G1 X9");
    expect(idx.indexedLines).toBeLessThan(20);
    expect(idx.line(99_999)).toBe("N100000 G1 X99999");
    expect(idx.line(500)).toBe("N501 G1 X500");
  });

  it("cuts very long lines and decodes UTF-8", () => {
    const bytes = enc(`(Ø 6 mm end mill)\n${"X".repeat(5000)}\n`);
    const idx = new LineIndex(bytes, 2);
    expect(idx.line(0)).toBe("(Ø 6 mm end mill)");
    const long = idx.line(1, 100);
    expect(long).toHaveLength(101);
    expect(long.endsWith("…")).toBe(true);
  });
});
