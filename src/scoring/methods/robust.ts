import { MAD_NORMAL_CONSTANT } from '../mad.js';
import type { Fallback } from '../types.js';
import { NO_FIT, type ScoringMethod, zFit } from './method.js';

/**
 * The normal-consistency factor of the IQR: for normal data Q3 - Q1 = 2 Phi^-1(3/4) sigma
 * = 1.3490 sigma, so IQR / 1.3490 estimates the standard deviation (R `stats::IQR` documentation:
 * "for a normal-consistent estimate of the standard deviation, use IQR(x) / 1.349").
 */
export const IQR_NORMAL_CONSTANT = 1.3489795003921634;

/**
 * Robust z (modified z-score): z = (x - median) / (1.4826 x MAD), flagged beyond the cutoff,
 * default 3.5. Same as Iglewicz & Hoaglin's M_i = 0.6745 (x_i - median) / MAD, since
 * 0.6745 = 1 / 1.4826 to four decimals.
 *
 * Source: B. Iglewicz & D. C. Hoaglin, "How to Detect and Handle Outliers", ASQC Basic References
 * in Quality Control vol. 16, 1993 (|M_i| > 3.5 labels potential outliers); NIST/SEMATECH
 * e-Handbook of Statistical Methods, section 1.3.5.17 "Detection of Outliers".
 *
 * Degenerate populations (documented choice): a fallback scale must come from the group itself
 * (never from other groups) and must not be widened by the very claims it should catch.
 * - MAD = 0 (more than half the values at the median): the group's own IQR (type-7 quartiles) /
 *   1.3490 ('mad-zero-used-iqr'). The IQR is the next robust scale (breakdown point 25 %, against
 *   the MAD's 50 %): claims that are fewer than a quarter of the group cannot widen it. The mean
 *   absolute deviation used before could be tripled by two large claims among identical ones.
 * - IQR = 0 too (the middle half of the group is one amount): no scale of the group's own exists
 *   that its unusual claims could not set. With an ignore-within amount the unit is that amount
 *   ('spread-zero-used-floor'): the score is the distance from the median in ignore-within
 *   amounts. Without one, scores are 0 and nothing is flagged ('no-spread').
 * Empty population: not scored.
 */
export const robustMethod: ScoringMethod = {
  id: 'robust',
  kind: 'z',
  defaultCutoff: 3.5,
  scoreName: 'robust z',
  source: 'Iglewicz & Hoaglin (1993); NIST/SEMATECH e-Handbook of Statistical Methods, 1.3.5.17',
  fit(s, cutoff, direction, _column, floor = 0) {
    if (s.n === 0) return NO_FIT;
    const fallbacks: Fallback[] = [];
    let scale = MAD_NORMAL_CONSTANT * s.mad;
    if (!(s.mad > 0)) {
      const iqr = s.q3 - s.q1;
      if (iqr > 0) {
        scale = iqr / IQR_NORMAL_CONSTANT;
        fallbacks.push('mad-zero-used-iqr');
      } else if (floor > 0) {
        scale = floor;
        fallbacks.push('spread-zero-used-floor');
      } else {
        scale = 0;
        fallbacks.push('no-spread');
      }
    }
    return zFit(s, s.median, scale, cutoff, direction, fallbacks);
  },
};
