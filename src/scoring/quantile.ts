import { minOfRange, quickselect, toFloat64Copy } from './quickselect.js';

/**
 * Type-7 quantile of `a[0..n-1]`, rearranging that range (quickselect). MUTATES `a`.
 * Several calls on the same buffer are fine: each works on whatever permutation it finds.
 */
export function quantileInPlace(a: Float64Array, n: number, p: number): number {
  if (n <= 0 || !(p >= 0 && p <= 1)) return NaN;
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  quickselect(a, lo, 0, n - 1);
  const xlo = a[lo];
  const frac = h - lo;
  if (frac === 0 || lo + 1 >= n) return xlo;
  const xhi = minOfRange(a, lo + 1, n - 1);
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
  return quantileInPlace(a, a.length, p);
}
