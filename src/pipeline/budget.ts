/**
 * "I can review N claims": the cutoff that keeps the flags within a review budget, as a valid
 * setting (above 0, src/pipeline/settings.ts) or a plain answer why there is none.
 */
import { cutoffForBudget, countFlaggedAt } from '../scoring/cutoff.js';
import type { ScoreResult } from '../scoring/types.js';

export type BudgetAnswer =
  /** Use this cutoff: at most `budget` claims of the first value column are flagged. */
  | { readonly kind: 'cutoff'; readonly cutoff: number }
  /** Every claim any positive cutoff could flag (`flaggable`) fits: the budget does not set a cutoff. */
  | { readonly kind: 'all-fit'; readonly flaggable: number }
  /** No value column, or a budget that is not a whole number of 0 or more. */
  | { readonly kind: 'none' };

/**
 * The smallest cutoff, rounded up to 2 decimals, at which at most `budget` claims of the first value
 * column are flagged (a higher cutoff never flags more, so rounding up keeps the budget). When the
 * budget covers every claim that can be flagged at all, the only such "cutoff" would be 0, which is
 * not a cutoff (it flags every claim off the centre): the answer is 'all-fit' and the cutoff stays.
 */
export function cutoffForReviewBudget(result: ScoreResult, budget: number): BudgetAnswer {
  const col = result.columns[0];
  if (!col || !Number.isInteger(budget) || budget < 0) return { kind: 'none' };
  const c = cutoffForBudget(col, budget);
  if (!Number.isFinite(c)) return { kind: 'none' };
  if (c <= 0) return { kind: 'all-fit', flaggable: countFlaggedAt(col, 0).total };
  let r = Math.ceil(c * 100 - 1e-9) / 100;
  if (r < c) r += 0.01;
  return { kind: 'cutoff', cutoff: r };
}
