import { minOfRange, quickselect, toFloat64Copy } from './quickselect.js';

/**
 * Type-7 quantile p of buf[0..n-1] when its order-statistic positions lie within [left, right] and
 * that range already holds exactly the elements of those ranks (left of it smaller, right larger):
 * [0, n - 1] for any buffer, or a half that a median selection left (`medianInPlace`). Rearranges
 * that range (quickselect). The engine's one quantile.
 */
export function typeSevenWithin(buf: Float64Array, n: number, p: number, left: number, right: number): number {
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  quickselect(buf, lo, left, right);
  const xlo = buf[lo];
  const frac = h - lo;
  if (frac === 0 || lo + 1 >= n) return xlo;
  // The next order statistic is the smallest element after position lo; elements beyond `right`
  // are all >= buf[right], so only (lo, right] needs scanning when lo < right.
  const xhi = lo + 1 <= right ? minOfRange(buf, lo + 1, right) : minOfRange(buf, lo + 1, n - 1);
  return xlo + frac * (xhi - xlo);
}

/**
 * Sample quantile, Hyndman & Fan (1996) definition 7: with the sorted sample x(1) <= ... <= x(n),
 * h = (n - 1)p + 1 and Q(p) = x(floor h) + (h - floor h)(x(floor h + 1) - x(floor h)).
 * This is R's default `quantile(type = 7)`, NumPy's default, and what Excel's QUARTILE.INC and
 * PERCENTILE.INC compute (QUARTILE.INC(data, 1) = quantile(data, 0.25)).
 *
 * Cost: O(n) expected (quickselect on a Float64Array copy; the input is never mutated).
 * Degenerate input: empty, or p outside [0, 1] -> NaN; n = 1 -> that value.
 * Source: R. J. Hyndman & Y. Fan, "Sample quantiles in statistical packages", The American
 * Statistician 50(4):361-365, 1996.
 */
export function quantile(xs: ArrayLike<number>, p: number): number {
  const a = toFloat64Copy(xs);
  const n = a.length;
  if (n === 0 || !(p >= 0 && p <= 1)) return NaN;
  return typeSevenWithin(a, n, p, 0, n - 1);
}
