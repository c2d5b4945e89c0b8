import { medianInPlace } from './median.js';
import { toFloat64Copy } from './quickselect.js';

/**
 * Scale constant that makes 1.4826 x MAD a consistent estimator of the standard deviation for
 * normal data: 1 / Phi^-1(3/4) = 1 / 0.674489750... = 1.482602218... Rounded to 1.4826 as R's
 * `mad()` default (`constant = 1.4826`) and Iglewicz & Hoaglin's modified z-score
 * (0.6745 = 1 / 1.4826, to four decimals). `inverseNormal(0.75)` reproduces it (see tests).
 */
export const MAD_NORMAL_CONSTANT = 1.4826;

/**
 * dev[i] = |a[i] - center| for i < n (`dev` may be `a` itself); returns the sum of those
 * deviations (n x the mean absolute deviation around `center`). O(n).
 */
export function absDeviations(a: ArrayLike<number>, n: number, center: number, dev: Float64Array): number {
  let sum = 0;
  for (let i = 0; i < n; i++) {
    const d = Math.abs(a[i] - center);
    dev[i] = d;
    sum += d;
  }
  return sum;
}

/**
 * Raw (unscaled) median absolute deviation: MAD = median_i |x_i - median(x)|. Multiply by
 * `MAD_NORMAL_CONSTANT` (1.4826) for a normal-consistent scale; `mad(xs, MAD_NORMAL_CONSTANT)`
 * equals R's `mad(x)` and `mad(xs)` equals R's `mad(x, constant = 1)`. The engine computes its
 * MADs with the same two steps (`medianInPlace`, `absDeviations`, then `medianInPlace`).
 *
 * Cost: O(n) expected (two quickselects on a Float64Array copy; the input is never mutated).
 * Degenerate input: empty -> NaN; a sample where more than half the values are equal -> 0 (the
 * engine then falls back to the mean absolute deviation, see `meanAbsoluteDeviation`).
 * Source: F. R. Hampel, "The influence curve and its role in robust estimation", JASA 69, 1974;
 * B. Iglewicz & D. C. Hoaglin, "How to Detect and Handle Outliers", ASQC 1993.
 */
export function mad(xs: ArrayLike<number>, constant = 1): number {
  const a = toFloat64Copy(xs);
  const n = a.length;
  if (n === 0) return NaN;
  const med = medianInPlace(a, n);
  absDeviations(a, n, med, a);
  return constant * medianInPlace(a, n);
}
