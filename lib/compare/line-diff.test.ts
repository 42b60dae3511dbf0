import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { lineDiff, splitLines } from "./line-diff";

const enc = (lines: string[], eol = "\n") => new TextEncoder().encode(lines.map((l) => l + eol).join(""));

/** Rebuilds the new file from the old one and the hunks (with the whole file as context, every line is in a hunk). */
function apply(a: string[], d: ReturnType<typeof lineDiff>): string[] {
  const out: string[] = [];
  let ai = 1;
  for (const h of d.hunks) {
    while (ai < h.aStart) out.push(a[ai++ - 1]!);
    for (const l of h.lines) {
      if (l.kind === "context") {
        expect(l.text).toBe(a[l.a! - 1]);
        out.push(l.text);
        ai++;
      } else if (l.kind === "removed") {
        expect(l.text).toBe(a[l.a! - 1]);
        ai++;
      } else out.push(l.text);
    }
  }
  while (ai <= a.length) out.push(a[ai++ - 1]!);
  return out;
}

describe("splitLines", () => {
  it("ends a line at CR, LF and CRLF, like the engine", () => {
    expect(splitLines(new TextEncoder().encode("a\rb\nc\r\nd")).count).toBe(4);
    expect(splitLines(new TextEncoder().encode("a\n")).count).toBe(1);
    expect(splitLines(new Uint8Array(0)).count).toBe(0);
  });
});

describe("lineDiff", () => {
  it("reports identical files as identical", () => {
    const d = lineDiff(enc(["G0 X1", "G1 Y2"]), enc(["G0 X1", "G1 Y2"], "\r\n"));
    expect(d).toMatchObject({ identical: true, added: 0, removed: 0, hunks: [] });
  });

  it("gives line numbers of both sides with context", () => {
    const a = ["%", "O1", "G0 X0", "G1 X1", "G1 X2", "G1 X3", "G1 X4", "M30"];
    const b = ["%", "O1", "G0 X0", "G1 X1", "G1 X2.5", "G1 X3", "G1 X4", "M30"];
    const d = lineDiff(enc(a), enc(b), { context: 1 });
    expect(d.added).toBe(1);
    expect(d.removed).toBe(1);
    expect(d.hunks).toEqual([
      {
        aStart: 4,
        aCount: 3,
        bStart: 4,
        bCount: 3,
        lines: [
          { kind: "context", a: 4, b: 4, text: "G1 X1" },
          { kind: "removed", a: 5, b: null, text: "G1 X2" },
          { kind: "added", a: null, b: 5, text: "G1 X2.5" },
          { kind: "context", a: 6, b: 6, text: "G1 X3" },
        ],
      },
    ]);
  });

  it("turns the old file into the new one (property, small alphabets force repeated lines)", () => {
    const line = fc.constantFrom("G0 Z5", "G1 X1", "G1 X2", "M3 S900", "(NOTE)", "", "G2 X1 Y1 R1");
    fc.assert(
      fc.property(fc.array(line, { maxLength: 60 }), fc.array(line, { maxLength: 60 }), (a, b) => {
        const d = lineDiff(enc(a), enc(b), { context: 1_000_000 });
        expect(apply(a, d)).toEqual(b);
        const removed = d.hunks.flatMap((h) => h.lines).filter((l) => l.kind === "removed").length;
        expect(removed).toBe(d.removed);
      }),
      { numRuns: 300 },
    );
  });

  it("finds 200 scattered changes in 200,000 unique lines exactly", () => {
    const a = Array.from({ length: 200_000 }, (_, i) => `G1 X${i}.5 Y${(i * 7) % 1000}`);
    const b = a.slice();
    for (let k = 0; k < 200; k++) b[k * 997 + 13] = `G1 X${k} Y-1 (changed)`;
    const d = lineDiff(enc(a), enc(b));
    expect(d.added).toBe(200);
    expect(d.removed).toBe(200);
    expect(d.hunks).toHaveLength(200);
    expect(d.hunks[0]!.lines.find((l) => l.kind === "added")).toEqual({ kind: "added", a: null, b: 14, text: "G1 X0 Y-1 (changed)" });
  });

  it("cuts the hunks at maxLines but keeps the counts exact", () => {
    const a = Array.from({ length: 1000 }, (_, i) => `N${i}`);
    const b = a.map((l) => `${l} X1`);
    const d = lineDiff(enc(a), enc(b), { maxLines: 50 });
    expect(d.truncated).toBe(true);
    expect(d.added).toBe(1000);
    expect(d.hunks.flatMap((h) => h.lines)).toHaveLength(50);
  });
});
