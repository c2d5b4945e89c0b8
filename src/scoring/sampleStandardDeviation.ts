/**
 * Sample SD from the corrected two-pass sums around a provisional mean m0: `ss` = sum (x_i - m0)^2
 * and `c` = sum (x_i - m0) over n values; s = sqrt((ss - c^2 / n) / (n - 1)). n < 2 -> NaN; a
 * variance that rounds to 0 or below -> 0. The engine's one SD formula (every SD it reports ends here).
 */
export function sdFromSums(n: number, ss: number, c: number): number {
  if (n < 2) return NaN;
  const v = (ss - (c * c) / n) / (n - 1);
  return v > 0 ? Math.sqrt(v) : 0;
}

/**
 * Mean and sample SD of `a[from .. from + n - 1]` given their plain sum (first pass): one more pass
 * accumulates the deviations from m0 = sum / n, the mean is m0 + (sum of deviations) / n and the SD
 * `sdFromSums`. n >= 1.
 */
export function meanAndSd(a: ArrayLike<number>, from: number, n: number, sum: number): { mean: number; sd: number } {
  const m0 = sum / n;
  let ss = 0;
  let c = 0;
  const to = from + n;
  for (let i = from; i < to; i++) {
    const d = a[i] - m0;
    ss += d * d;
    c += d;
  }
  return { mean: m0 + c / n, sd: sdFromSums(n, ss, c) };
}

/** Plain sum of `a[from .. from + n - 1]`. */
export function sumOf(a: ArrayLike<number>, from: number, n: number): number {
  let s = 0;
  for (let i = from; i < from + n; i++) s += a[i];
  return s;
}

/**
 * Sample standard deviation with Bessel's correction:
 * s = sqrt( (sum (x_i - m)^2 - (sum (x_i - m))^2 / n) / (n - 1) ), the corrected two-pass
 * algorithm, numerically stable (no catastrophic cancellation of the textbook sum-of-squares form).
 *
 * Cost: O(n), two passes. Degenerate input: n < 2 -> NaN; all values equal -> 0. Inputs must be
 * finite numbers. The engine computes every SD it reports with the same two functions
 * (`meanAndSd`, `sdFromSums`).
 * Source: T. F. Chan, G. H. Golub & R. J. LeVeque, "Algorithms for computing the sample variance:
 * analysis and recommendations", The American Statistician 37(3):242-247, 1983 (eq. 1.7).
 * Same result as R's `sd()` and simple-statistics' `sampleStandardDeviation`.
 */
export function sampleStandardDeviation(xs: ArrayLike<number>): number {
  const n = xs.length;
  if (n < 2) return NaN;
  return meanAndSd(xs, 0, n, sumOf(xs, 0, n)).sd;
}
