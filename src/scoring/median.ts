import { minOfRange, quickselect, toFloat64Copy } from './quickselect.js';

/**
 * Median of `a[0..n-1]`, rearranging that range (quickselect). Even n: mean of the two middle order
 * statistics, computed as lo + (hi - lo) / 2 so that it cannot overflow. Afterwards `a` is
 * partitioned around position (n - 1) >> 1 (smaller values before it, larger after), which the
 * engine's quartiles rely on (`typeSevenWithin`). The engine's one median of unsorted values.
 * Cost O(n) expected. Empty (n = 0): NaN. MUTATES `a`.
 */
export function medianInPlace(a: Float64Array, n: number): number {
  if (n <= 0) return NaN;
  const k = (n - 1) >> 1;
  quickselect(a, k, 0, n - 1);
  const lo = a[k];
  if (n % 2 === 1) return lo;
  const hi = minOfRange(a, k + 1, n - 1);
  return lo + (hi - lo) / 2;
}

/**
 * Median: the middle order statistic (odd n) or the mean of the two middle ones (even n). Equals
 * Hyndman & Fan type-7 quantile at p = 0.5 and R's `median()`.
 *
 * Cost: O(n) expected (quickselect on a Float64Array copy; the input is never mutated).
 * Degenerate input: empty -> NaN. Inputs must be finite numbers.
 * Source: R. J. Hyndman & Y. Fan, "Sample quantiles in statistical packages", The American
 * Statistician 50(4), 1996.
 */
export function median(xs: ArrayLike<number>): number {
  const a = toFloat64Copy(xs);
  return medianInPlace(a, a.length);
}

/** Median of `sorted[0..n-1]` (sorted ascending), as `medianInPlace`. O(1). n = 0 -> NaN. */
export function medianSorted(sorted: ArrayLike<number>, n: number): number {
  if (n <= 0) return NaN;
  const k = (n - 1) >> 1;
  const lo = sorted[k];
  return n % 2 === 1 ? lo : lo + (sorted[k + 1] - lo) / 2;
}
