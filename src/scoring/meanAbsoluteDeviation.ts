import { absDeviations } from './mad.js';
import { medianInPlace } from './median.js';
import { toFloat64Copy } from './quickselect.js';

/**
 * Factor that turns the mean absolute deviation into a normal-consistent scale:
 * E|X - mu| = sigma * sqrt(2 / pi) for normal X, so sigma = sqrt(pi / 2) x meanAD = 1.2533 x meanAD.
 * Used as the scale when MAD = 0 (fallback 'mad-zero-used-meanad'), as in the modified z-score
 * convention 1.253314 x MeanAD (IBM SPSS documentation of the modified z-score; also discussed by
 * Iglewicz & Hoaglin 1993).
 */
export const MEANAD_NORMAL_CONSTANT = Math.sqrt(Math.PI / 2);

/**
 * Mean absolute deviation around the median: (1/n) sum_i |x_i - median(x)|, computed as the
 * engine does (`medianInPlace`, then `absDeviations`).
 *
 * Cost: O(n) expected (one quickselect for the median on a copy, one pass).
 * Degenerate input: empty -> NaN; all values equal -> 0.
 * Source: the mean absolute deviation about the median (e.g. NIST/SEMATECH e-Handbook of
 * Statistical Methods, 1.3.5.6 "Measures of Scale", "average absolute deviation").
 */
export function meanAbsoluteDeviation(xs: ArrayLike<number>): number {
  const a = toFloat64Copy(xs);
  const n = a.length;
  if (n === 0) return NaN;
  const med = medianInPlace(a, n);
  return absDeviations(a, n, med, a) / n;
}
