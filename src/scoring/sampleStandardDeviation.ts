import { mean } from './mean.js';

/** Sample SD (n - 1) of `a[0..n-1]` around a precomputed mean `m`; corrected two-pass. n < 2 -> NaN. */
export function sampleSdAround(a: ArrayLike<number>, n: number, m: number): number {
  if (n < 2) return NaN;
  let ss = 0;
  let c = 0;
  for (let i = 0; i < n; i++) {
    const d = a[i] - m;
    ss += d * d;
    c += d;
  }
  const v = (ss - (c * c) / n) / (n - 1);
  return v > 0 ? Math.sqrt(v) : 0;
}

/**
 * Sample standard deviation with Bessel's correction:
 * s = sqrt( (sum (x_i - m)^2 - (sum (x_i - m))^2 / n) / (n - 1) ), the corrected two-pass
 * algorithm, numerically stable (no catastrophic cancellation of the textbook sum-of-squares form).
 *
 * Cost: O(n), three passes (two for the mean, one here). Degenerate input: n < 2 -> NaN;
 * all values equal -> 0. Inputs must be finite numbers.
 * Source: T. F. Chan, G. H. Golub & R. J. LeVeque, "Algorithms for computing the sample variance:
 * analysis and recommendations", The American Statistician 37(3):242-247, 1983 (eq. 1.7).
 * Same result as R's `sd()` and simple-statistics' `sampleStandardDeviation`.
 */
export function sampleStandardDeviation(xs: ArrayLike<number>): number {
  const n = xs.length;
  if (n < 2) return NaN;
  return sampleSdAround(xs, n, mean(xs));
}
