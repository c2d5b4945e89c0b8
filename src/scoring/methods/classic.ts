import type { Fallback } from '../types.js';
import { NO_FIT, type ScoringMethod, zFit } from './method.js';

/** Largest |classic z| attainable in a sample of n, (n - 1) / sqrt(n) (Shiffler 1988). */
export function maxAttainableZ(n: number): number {
  return (n - 1) / Math.sqrt(n);
}

/**
 * Classic z: z = (x - mean) / s with the sample SD s (n - 1), default cutoff 3 (the "three-sigma"
 * rule: common practice; e.g. NIST/SEMATECH e-Handbook 1.3.5.17 discusses it and its masking).
 *
 * A few large values inflate both the mean and s, so they can hide each other ("masking"); the
 * robust method does not suffer from this. In a sample of n, |z| can never exceed (n - 1)/sqrt(n)
 * (R. E. Shiffler, "Maximum Z scores and outliers", The American Statistician 42(1):79-80, 1988),
 * so with n <= 10 a cutoff of 3 can never be reached: reported as 'cutoff-unreachable'.
 *
 * Degenerate populations: s = 0 (all values equal) or n = 1 -> scores 0, nothing flagged
 * ('sd-zero'). Empty population: not scored.
 */
export const classicMethod: ScoringMethod = {
  id: 'classic',
  kind: 'z',
  defaultCutoff: 3,
  scoreName: 'classic z',
  source: 'Standard score (x - mean) / SD; maximum attainable |z| from Shiffler (1988)',
  fit(s, cutoff, direction) {
    if (s.n === 0) return NO_FIT;
    const fallbacks: Fallback[] = [];
    const sd = s.sd;
    if (!(sd > 0)) fallbacks.push('sd-zero');
    if (maxAttainableZ(s.n) <= cutoff) fallbacks.push('cutoff-unreachable');
    return zFit(s, s.mean, sd > 0 ? sd : 0, cutoff, direction, fallbacks);
  },
};
