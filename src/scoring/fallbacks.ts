/**
 * What each fallback means, in one sentence: the one description the row explanations
 * (explainRow) and the notes sheet's group table (src/report/plan.ts) both show, so they always
 * agree with each other and with the bounds the method computed (src/scoring/methods).
 */
import type { Fallback } from './types.js';

export const FALLBACK_WORDS: Record<Fallback, string> = {
  'mad-zero-used-iqr':
    "More than half the values share the median (MAD = 0), so the scale is the group's own IQR / 1.349 instead (normal-consistent, as R's IQR documentation gives; unusual claims cannot widen it while they are fewer than a quarter of the group).",
  'spread-zero-used-floor':
    "The middle half of the group is one amount (no spread of its own), so the unit is the ignore-within amount: a claim's score is its distance from that amount in ignore-within amounts (nothing is borrowed from other groups).",
  'no-spread':
    'The middle half of the group is one amount (no spread of its own), so no score can be measured and nothing is flagged; set an ignore-within amount to flag claims that differ from that amount by more.',
  'sd-zero': 'The standard deviation is 0 (all values equal), so nothing can be flagged.',
  'iqr-zero':
    "The group's IQR is 0 (its middle half is one amount), so it has no spread of its own to draw fences with.",
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
