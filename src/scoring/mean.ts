import { meanAndSd, sumOf } from './sampleStandardDeviation.js';

/**
 * Arithmetic mean with one correction pass: m = (1/n) sum x_i, then m += (1/n) sum (x_i - m).
 * The correction removes most of the rounding error of the first sum (the "corrected two-pass"
 * idea of Chan, Golub & LeVeque, "Algorithms for computing the sample variance", The American
 * Statistician 37(3), 1983), so n equal values give exactly that value in practice. The engine's
 * means come from the same pass (`meanAndSd`).
 *
 * Cost: O(n), two passes. Degenerate input: empty -> NaN. Inputs must be finite numbers.
 * Source: definition of the sample mean; correction pass as cited above.
 */
export function mean(xs: ArrayLike<number>): number {
  const n = xs.length;
  if (n === 0) return NaN;
  return meanAndSd(xs, 0, n, sumOf(xs, 0, n)).mean;
}
