/** Binary search over sorted numbers (plain or typed arrays), on binary-search-bounds. */
import bounds from "binary-search-bounds";

/**
 * The package's numeric form, `(array, y, lo, hi)` with `hi` inclusive: without a comparator it compares with
 * `x - y` and takes lo and hi in the comparator's place (its bundled types only declare the comparator form).
 */
type NumericSearch = (a: ArrayLike<number>, y: number, lo: number, hi: number) => number;
const ge = bounds.ge as unknown as NumericSearch;
const eq = bounds.eq as unknown as NumericSearch;

/** The first index in [0, end) whose value is >= v, or `end` when there is none. */
export function lowerBound(a: ArrayLike<number>, v: number, end = a.length): number {
  return ge(a, v, 0, end - 1);
}

/** The index of v in a sorted array, or -1. */
export function indexOfSorted(a: ArrayLike<number>, v: number): number {
  return eq(a, v, 0, a.length - 1);
}
