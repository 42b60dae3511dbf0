import { describe, expect, it } from "vitest";
import { checkCount, checkGaps, gapMessages, hasGaps, inLoadOrder, programNumberValue, shaGroups } from "./run-checklist";

const required = { offsets: ["G54", "G55"], tools: [3, 1, 7] };

describe("checkGaps", () => {
  it("names every box not ticked and every one ticked that the program does not call", () => {
    const g = checkGaps(required, { identity: false, offsets: ["G55", "G57"], tools: [1, 12], dryRun: false });
    expect(g).toEqual({ identity: true, offsets: ["G54"], tools: [3, 7], dryRun: true, strayOffsets: ["G57"], strayTools: [12] });
    expect(hasGaps(g)).toBe(true);
    const m = gapMessages(g);
    expect(Object.keys(m).sort()).toEqual(["dryRun", "identity", "offsets", "tools"]);
    expect(m.offsets!.join(" ")).toContain("G54");
    expect(m.offsets!.join(" ")).toContain("G57");
    expect(m.tools!.join(" ")).toMatch(/T3, T7/);
    expect(m.tools!.join(" ")).toContain("T12");
  });

  it("has no gap when everything is ticked, in any order", () => {
    const g = checkGaps(required, { identity: true, offsets: ["G55", "G54"], tools: [7, 3, 1], dryRun: true });
    expect(hasGaps(g)).toBe(false);
    expect(gapMessages(g)).toEqual({});
  });

  it("counts identity, each offset, each tool and the dry run", () => {
    expect(checkCount(required)).toBe(7);
    expect(checkCount({ offsets: [], tools: [] })).toBe(2);
  });
});

describe("inLoadOrder", () => {
  it("puts a tool used without a change first, then the others by their first load", () => {
    const tools = [
      { number: 1, firstLine: 10 },
      { number: 2, firstLine: 40 },
      { number: 5, firstLine: 5 },
      { number: 3, firstLine: 70 },
    ];
    // Loads: T3, T1, T2, T3 again; T5 was in the spindle from the start.
    expect(inLoadOrder(tools, [3, 1, 2, 3]).map((t) => t.number)).toEqual([5, 3, 1, 2]);
    // No sequence: by first line.
    expect(inLoadOrder(tools, []).map((t) => t.number)).toEqual([5, 1, 2, 3]);
  });
});

describe("identity helpers", () => {
  it("splits a SHA-256 into 16 groups of four", () => {
    const sha = "0123456789abcdef".repeat(4);
    const groups = shaGroups(sha);
    expect(groups).toHaveLength(16);
    expect(groups.join("")).toBe(sha);
    expect(groups[1]).toBe("4567");
  });

  it("reads the number of a program number", () => {
    expect(programNumberValue("O0412")).toBe(412);
    expect(programNumberValue("O1001")).toBe(1001);
    expect(programNumberValue("1001")).toBe(1001);
    expect(programNumberValue("O0000")).toBe(0);
    expect(programNumberValue("FH-22")).toBeNull();
  });
});
