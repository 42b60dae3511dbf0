import { describe, expect, it } from "vitest";
import { indexOfSorted, lowerBound } from "./search";

/** Checked against the definition by a linear scan (first index whose value is >= v). */
const linearLowerBound = (a: ArrayLike<number>, v: number, end = a.length) => {
  for (let i = 0; i < end; i++) if (a[i]! >= v) return i;
  return end;
};

describe("binary search over sorted numbers", () => {
  const a = new Float32Array([0.5, 1, 1, 1, 2.5, 7, 7, 9]);
  it("lowerBound equals a linear scan, over the whole array and a prefix of it", () => {
    for (const v of [-1, 0.5, 0.7, 1, 2, 2.5, 7, 8, 9, 10]) {
      expect(lowerBound(a, v)).toBe(linearLowerBound(a, v));
      expect(lowerBound(a, v, 5)).toBe(linearLowerBound(a, v, 5));
    }
    expect(lowerBound(new Uint32Array(0), 3)).toBe(0);
  });
  it("indexOfSorted finds present values and answers -1 for absent ones", () => {
    const b = [2, 4, 8, 16];
    expect(b.map((v) => indexOfSorted(b, v))).toEqual([0, 1, 2, 3]);
    expect([1, 3, 17].map((v) => indexOfSorted(b, v))).toEqual([-1, -1, -1]);
    expect(indexOfSorted([], 1)).toBe(-1);
  });
});
