/**
 * What each fallback means, in one sentence: the one description the row explanations
 * (explainRow) and the notes sheet's group table (src/report/plan.ts) both show, so they always
 * agree with each other and with the bounds the method computed (src/scoring/methods).
 */
import type { Fallback } from './types.js';

export const FALLBACK_WORDS: Record<Fallback, string> = {
  'mad-zero-used-meanad': 'More than half the values share the median (MAD = 0), so the scale is 1.2533 x the mean absolute deviation around the median instead.',
  'no-spread': 'Every value equals the median (no spread), so nothing can be flagged.',
  'sd-zero': 'The standard deviation is 0 (all values equal), so nothing can be flagged.',
  'iqr-zero':
    "The group's IQR is 0, so its fences are Q1 - k x and Q3 + k x the whole column's IQR (scores count the column's IQRs); if the column's IQR is 0 too, the group is not scored.",
  'small-pooled': 'The group is smaller than the minimum size, so its claims are compared with the whole column.',
  'small-widened':
    'The group is smaller than the minimum size, so its claims are compared with a wider peer group: the claims that share its other key values, across every value of the key column(s) let go (see "Compared with").',
  'small-skipped': 'The group is smaller than the minimum size, so its claims are left unscored.',
  'cutoff-unreachable': 'In a group of this size no score of this method can pass the cutoff, whatever the amounts (classic z: (n - 1)/sqrt(n) <= cutoff, Shiffler 1988; other methods: maxReach.ts).',
};

/** The sentence for a fallback (see FALLBACK_WORDS). */
export function describeFallback(f: Fallback): string {
  return FALLBACK_WORDS[f];
}
