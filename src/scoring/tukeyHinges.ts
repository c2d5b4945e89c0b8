/**
 * Tukey's hinges, the quartiles of R's `fivenum` (and of the adjusted boxplot's reference
 * implementation, robustbase `adjboxStats`): with the sorted sample x(1) <= ... <= x(n) and
 * d = floor((n + 3) / 2) / 2, the lower hinge is (x(floor d) + x(ceil d)) / 2 and the upper hinge
 * (x(n + 1 - floor d) + x(n + 1 - ceil d)) / 2: the medians of the lower and upper halves, each half
 * including the median when n is odd. They can differ from QUARTILE.INC (type 7): for
 * 1, 2, 4, 7, 8, 9, 10, 12 the hinges are 3 and 9.5, type 7 gives 3.5 and 9.25.
 *
 * Cost: O(n log n) (a sort of a copy; `tukeyHingesSorted` is O(1) on sorted data).
 * Degenerate input: empty -> NaN, NaN; n = 1 -> that value twice. Inputs must be finite numbers.
 * Source: J. W. Tukey, "Exploratory Data Analysis", Addison-Wesley 1977; R `stats::fivenum`.
 */
export function tukeyHinges(xs: ArrayLike<number>): { low: number; high: number } {
  const a = new Float64Array(xs.length);
  for (let i = 0; i < xs.length; i++) a[i] = xs[i];
  a.sort();
  return tukeyHingesSorted(a, a.length);
}

/** Tukey's hinges of `sorted[0..n-1]` (sorted ascending). O(1). */
export function tukeyHingesSorted(sorted: ArrayLike<number>, n: number): { low: number; high: number } {
  if (n === 0) return { low: NaN, high: NaN };
  const d = Math.floor((n + 3) / 2) / 2; // 1-based position of the lower hinge
  const a = Math.floor(d) - 1;
  const b = Math.ceil(d) - 1;
  const low = sorted[a] + (sorted[b] - sorted[a]) / 2;
  const high = sorted[n - 1 - b] + (sorted[n - 1 - a] - sorted[n - 1 - b]) / 2;
  return { low, high };
}
