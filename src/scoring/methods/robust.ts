import { MAD_NORMAL_CONSTANT } from '../mad.js';
import { MEANAD_NORMAL_CONSTANT } from '../meanAbsoluteDeviation.js';
import type { Fallback } from '../types.js';
import { NO_FIT, type ScoringMethod, zFit } from './method.js';

/**
 * Robust z (modified z-score): z = (x - median) / (1.4826 x MAD), flagged beyond the cutoff,
 * default 3.5. Same as Iglewicz & Hoaglin's M_i = 0.6745 (x_i - median) / MAD, since
 * 0.6745 = 1 / 1.4826 to four decimals.
 *
 * Source: B. Iglewicz & D. C. Hoaglin, "How to Detect and Handle Outliers", ASQC Basic References
 * in Quality Control vol. 16, 1993 (|M_i| > 3.5 labels potential outliers); NIST/SEMATECH
 * e-Handbook of Statistical Methods, section 1.3.5.17 "Detection of Outliers".
 *
 * Degenerate populations: MAD = 0 -> scale 1.2533 x mean absolute deviation around the median
 * (fallback 'mad-zero-used-meanad'); if that is 0 too, every value equals the median: scores 0,
 * nothing flagged, no bounds ('no-spread'). Empty population: not scored.
 */
export const robustMethod: ScoringMethod = {
  id: 'robust',
  kind: 'z',
  defaultCutoff: 3.5,
  scoreName: 'robust z',
  source: 'Iglewicz & Hoaglin (1993); NIST/SEMATECH e-Handbook of Statistical Methods, 1.3.5.17',
  fit(s, cutoff, direction) {
    if (s.n === 0) return NO_FIT;
    const fallbacks: Fallback[] = [];
    let scale = MAD_NORMAL_CONSTANT * s.mad;
    if (!(s.mad > 0)) {
      scale = MEANAD_NORMAL_CONSTANT * s.meanAbsDev;
      fallbacks.push(scale > 0 ? 'mad-zero-used-meanad' : 'no-spread');
    }
    return zFit(s, s.median, scale, cutoff, direction, fallbacks);
  },
};
