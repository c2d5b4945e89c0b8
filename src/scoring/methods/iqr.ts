import type { Fallback } from '../types.js';
import { type Fit, NO_FIT, type ScoringMethod } from './method.js';

/**
 * IQR fences (Tukey): lower fence Q1 - k x IQR, upper fence Q3 + k x IQR, IQR = Q3 - Q1, with
 * type-7 quartiles (what QUARTILE.INC computes), default k = 1.5. The score is how many IQRs
 * beyond the fence a value lies: (x - upper fence) / IQR above, (x - lower fence) / IQR below
 * (negative), 0 between the fences. Flagged when beyond a fence on a side the direction looks at.
 * The cutoff of this method is k.
 *
 * Source: J. W. Tukey, "Exploratory Data Analysis", Addison-Wesley 1977 (fences at 1.5 steps);
 * quartiles per Hyndman & Fan (1996) type 7.
 *
 * Degenerate populations (documented choice): IQR = 0 (the middle half of the group is one
 * amount) -> the group has no spread of its own, and nothing is borrowed from other groups (the
 * whole column's IQR, used before, moved a group's fences when unrelated groups changed and kept a
 * group of small amounts beside large ones from ever being flagged). With an ignore-within amount
 * the unit is that amount: fences Q1 - k x floor and Q3 + k x floor ('iqr-zero',
 * 'spread-zero-used-floor'); without one the population is not scored ('iqr-zero', 'no-spread').
 * Empty population: not scored.
 */
export const iqrMethod: ScoringMethod = {
  id: 'iqr',
  kind: 'fence',
  defaultCutoff: 1.5,
  scoreName: 'IQRs beyond the fence',
  source: 'Tukey (1977) fences with Hyndman & Fan (1996) type-7 quartiles',
  fit(s, k, direction, _column, floor = 0) {
    if (s.n === 0) return NO_FIT;
    const fallbacks: Fallback[] = [];
    let iqr = s.q3 - s.q1;
    if (!(iqr > 0)) {
      fallbacks.push('iqr-zero', floor > 0 ? 'spread-zero-used-floor' : 'no-spread');
      iqr = floor;
      if (!(iqr > 0)) return { ...NO_FIT, unit: s.unit, center: s.median, q1: s.q1, q3: s.q3, fallbacks };
    }
    const fit: Fit = {
      kind: 'fence', unit: s.unit, center: s.median, scale: iqr, q1: s.q1, q3: s.q3, lowScale: iqr, highScale: iqr,
      lower: direction !== 'high' ? s.q1 - k * iqr : NaN,
      upper: direction !== 'low' ? s.q3 + k * iqr : NaN,
      fallbacks,
    };
    return fit;
  },
};
