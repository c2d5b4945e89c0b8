import { medcoupleSorted } from './medcouple.js';
import { absDeviations } from './mad.js';
import { medianInPlace, medianSorted } from './median.js';
import { typeSevenWithin } from './quantile.js';
import { meanAndSd } from './sampleStandardDeviation.js';
import { tukeyHingesSorted } from './tukeyHinges.js';
import { constantSummary, EMPTY_SUMMARY, powerOfTwoUnit, type Summary } from './summary.js';
import type { MethodId } from './types.js';


/**
 * The statistics one method needs to score a population, and no others (engine internal, the
 * hot path of `scoreTable`); the fields a method does not need are NaN here (every statistic of
 * a group, whatever the method, is `describeColumn`, describe.ts):
 * - robust: median and MAD, and the mean absolute deviation around the median (its sum comes
 *   free with the deviation pass the MAD needs; the method uses it only when MAD = 0);
 * - classic: mean and sample SD (corrected two-pass, Chan, Golub & LeVeque 1983), no copy;
 * - iqr: median, Q1 and Q3 (type 7, Hyndman & Fan 1996);
 * - adjusted and skew: median, Tukey's hinges and the medcouple, from one sort of the group (O(n log n)).
 *
 * Reads `src[from .. from+n-1]` (finite numbers) without changing it; `scratch` (length >= n) is
 * overwritten. `scratch` may be `src` itself when `from` = 0 and the caller does not need `src`
 * afterwards. Same units convention as `summarize` (a power-of-two `unit` for extreme magnitudes,
 * so no digit changes). Every value equals what `summarize` gives for the same figure.
 *
 * Cost: O(n) expected. robust: one copy, two quickselects (median, then MAD on the deviations);
 * classic: two passes; iqr: one copy, three quickselects within shrinking ranges.
 * Degenerate input: n = 0 -> EMPTY_SUMMARY; all values equal -> every field exact (spread 0).
 */
export function summarizeFor(method: MethodId, src: Float64Array, from: number, n: number, scratch: Float64Array): Summary {
  if (n === 0) return EMPTY_SUMMARY;
  const to = from + n;
  let min = src[from];
  let max = min;
  let sum = 0;
  for (let i = from; i < to; i++) {
    const v = src[i];
    if (v < min) min = v;
    else if (v > max) max = v;
    sum += v;
  }
  if (min === max) return constantSummary(n, min);
  const unit = powerOfTwoUnit(min, max);
  if (method === 'classic') {
    let a = src;
    let lo = from;
    if (unit !== 1) {
      sum = 0;
      for (let i = 0; i < n; i++) sum += (scratch[i] = src[from + i] / unit);
      a = scratch;
      lo = 0;
    }
    const { mean, sd } = meanAndSd(a, lo, n, sum);
    return { n, unit, median: NaN, mad: NaN, meanAbsDev: NaN, mean, sd, q1: NaN, q3: NaN, hingeLow: NaN, hingeHigh: NaN, medcouple: NaN };
  }
  if (unit === 1) {
    if (scratch !== src) scratch.set(src.subarray(from, to));
  } else {
    for (let i = 0; i < n; i++) scratch[i] = src[from + i] / unit;
  }
  if (method === 'adjusted' || method === 'skew') {
    // One sort gives the median, Tukey's hinges and the medcouple.
    const sorted = scratch.subarray(0, n).sort();
    const { low, high } = tukeyHingesSorted(sorted, n);
    const median = medianSorted(sorted, n);
    const mc = medcoupleSorted(sorted, n);
    return { n, unit, median, mad: NaN, meanAbsDev: NaN, mean: NaN, sd: NaN, q1: NaN, q3: NaN, hingeLow: low, hingeHigh: high, medcouple: mc };
  }
  const k = (n - 1) >> 1;
  const median = medianInPlace(scratch, n);
  if (method === 'iqr') {
    const q1 = typeSevenWithin(scratch, n, 0.25, 0, k);
    const q3 = typeSevenWithin(scratch, n, 0.75, k, n - 1);
    return { n, unit, median, mad: NaN, meanAbsDev: NaN, mean: NaN, sd: NaN, q1, q3, hingeLow: NaN, hingeHigh: NaN, medcouple: NaN };
  }
  // robust: deviations from the median (read from the scratch, which holds the same values,
  // permuted and scaled), then their median.
  const sad = absDeviations(scratch, n, median, scratch);
  const mad = medianInPlace(scratch, n);
  return { n, unit, median, mad, meanAbsDev: sad / n, mean: NaN, sd: NaN, q1: NaN, q3: NaN, hingeLow: NaN, hingeHigh: NaN, medcouple: NaN };
}
