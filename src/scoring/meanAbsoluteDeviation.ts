import { median } from './median.js';

/**
 * Factor that turns the mean absolute deviation into a normal-consistent scale:
 * E|X - mu| = sigma * sqrt(2 / pi) for normal X, so sigma = sqrt(pi / 2) x meanAD = 1.2533 x meanAD.
 * A descriptive statistic of the notes (GroupStats.meanAbsDev). It is no longer the scale when
 * MAD = 0 (see methods/robust.ts): the claims it should catch widen it.
 */
export const MEANAD_NORMAL_CONSTANT = Math.sqrt(Math.PI / 2);

/** Mean absolute deviation of `a[0..n-1]` around `center`. O(n); does not change `a`. n = 0 -> NaN. */
export function meanAbsDevAround(a: Float64Array, n: number, center: number): number {
  if (n <= 0) return NaN;
  let s = 0;
  for (let i = 0; i < n; i++) s += Math.abs(a[i] - center);
  return s / n;
}

/**
 * Mean absolute deviation around the median: (1/n) sum_i |x_i - median(x)|.
 *
 * Cost: O(n) expected (one quickselect for the median on a copy, one pass).
 * Degenerate input: empty -> NaN; all values equal -> 0.
 * Source: the mean absolute deviation about the median (e.g. NIST/SEMATECH e-Handbook of
 * Statistical Methods, 1.3.5.6 "Measures of Scale", "average absolute deviation").
 */
export function meanAbsoluteDeviation(xs: ArrayLike<number>): number {
  const n = xs.length;
  if (n === 0) return NaN;
  const med = median(xs);
  let s = 0;
  for (let i = 0; i < n; i++) s += Math.abs(xs[i] - med);
  return s / n;
}
