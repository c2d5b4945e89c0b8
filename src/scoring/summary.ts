import { absDeviations } from './mad.js';
import { medianInPlace } from './median.js';
import { typeSevenWithin } from './quantile.js';
import { meanAndSd } from './sampleStandardDeviation.js';

/**
 * Every statistic of one population, computed in one go on a scratch buffer (engine internal).
 *
 * All figures are in units of `unit`, a power of two chosen so that the largest |value| lies in
 * [1, 2) whenever the data are extremely large or extremely small (|x| > 2^500 or < 2^-500);
 * otherwise unit = 1. Dividing by a power of two is exact, so this changes no digit, but it keeps
 * sums, squares and differences from overflowing to Infinity or underflowing to 0. Undefined
 * statistics are NaN here (the engine reports them as null).
 */
export interface Summary {
  readonly n: number;
  readonly unit: number;
  readonly median: number;
  readonly mad: number;
  readonly meanAbsDev: number;
  readonly mean: number;
  readonly sd: number;
  readonly q1: number;
  readonly q3: number;
  /** Tukey's hinges (R `fivenum`), used by the adjusted boxplot; NaN when not computed. */
  readonly hingeLow: number;
  readonly hingeHigh: number;
  /** Medcouple (see `medcouple.ts`); NaN when not computed. */
  readonly medcouple: number;
}

const BIG = 2 ** 500;
const SMALL = 2 ** -500;

/**
 * True when a population spanning [min, max] has magnitudes beyond 2^±500, where squares and
 * products would overflow or underflow: such populations are summarised after an exact rescale.
 */
export function isExtreme(min: number, max: number): boolean {
  const maxAbs = Math.max(Math.abs(min), Math.abs(max));
  return maxAbs > BIG || maxAbs < SMALL;
}

/** The exact power-of-two unit values are divided by when `isExtreme(min, max)`; 1 otherwise. */
export function powerOfTwoUnit(min: number, max: number): number {
  if (!isExtreme(min, max)) return 1;
  const unit = 2 ** Math.floor(Math.log2(Math.max(Math.abs(min), Math.abs(max))));
  return !Number.isFinite(unit) || unit === 0 ? 1 : unit;
}

/** n values all equal to v: every statistic is exact and the spread is 0 (SD undefined for n = 1). */
export function constantSummary(n: number, v: number): Summary {
  return { n, unit: 1, median: v, mad: 0, meanAbsDev: 0, mean: v, sd: n >= 2 ? 0 : NaN, q1: v, q3: v, hingeLow: v, hingeHigh: v, medcouple: 0 };
}

export const EMPTY_SUMMARY: Summary = { n: 0, unit: 1, median: NaN, mad: NaN, meanAbsDev: NaN, mean: NaN, sd: NaN, q1: NaN, q3: NaN, hingeLow: NaN, hingeHigh: NaN, medcouple: NaN };

/**
 * Summarises `buf[0..n-1]` (finite numbers). Rearranges and may rescale `buf`; overwrites
 * `dev[0..n-1]`. Cost O(n) expected: quickselects for the median (n), Q1 and Q3 (within the halves
 * the median left, n/2 each) and the MAD (n), and three passes.
 */
export function summarize(buf: Float64Array, n: number, dev: Float64Array): Summary {
  if (n === 0) return EMPTY_SUMMARY;
  let min = buf[0];
  let max = buf[0];
  let sum = 0;
  for (let i = 0; i < n; i++) {
    const v = buf[i];
    if (v < min) min = v;
    else if (v > max) max = v;
    sum += v;
  }
  if (min === max) return constantSummary(n, min);
  const unit = powerOfTwoUnit(min, max);
  if (unit !== 1) {
    sum = 0;
    for (let i = 0; i < n; i++) sum += (buf[i] /= unit);
  }
  // Mean and SD: corrected two-pass (Chan, Golub & LeVeque 1983), one pass after the sum.
  const { mean, sd } = meanAndSd(buf, 0, n, sum);
  // Median, then Q1 and Q3 (type 7) selected within the halves the median selection left.
  const k = (n - 1) >> 1;
  const median = medianInPlace(buf, n);
  const q1 = typeSevenWithin(buf, n, 0.25, 0, k);
  const q3 = typeSevenWithin(buf, n, 0.75, k, n - 1);
  // Mean absolute deviation around the median and MAD.
  const sad = absDeviations(buf, n, median, dev);
  const mad = medianInPlace(dev, n);
  return { n, unit, median, mad, meanAbsDev: sad / n, mean, sd, q1, q3, hingeLow: NaN, hingeHigh: NaN, medcouple: NaN };
}

/** A summary figure back in real units, or null when undefined or not representable. */
export function real(x: number, unit: number): number | null {
  const v = x * unit;
  return Number.isFinite(v) ? v : null;
}
