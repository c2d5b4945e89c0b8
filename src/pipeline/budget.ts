/**
 * "I can review N claims": the cutoff that flags at most N distinct rows across every value column
 * scored, as close to N as ties allow, as a valid setting (above 0, src/pipeline/settings.ts) or a
 * plain answer why there is none. The cutoff is the engine's exact number: a host may show it
 * rounded, but must run with this value (rounding it would change what is flagged).
 */
import { reachOfRows } from '../scoring/cutoff.js';
import { formatCutoff } from '../scoring/format.js';
import type { ScoreResult } from '../scoring/types.js';

export type BudgetAnswer =
  /**
   * Use this cutoff: `flagged` (at most `budget`) distinct rows are flagged in at least one value
   * column; when fewer than `budget`, the next `tied` rows all reach exactly the cutoff, so no
   * cutoff flags some of them without all (which would go over the budget).
   */
  | { readonly kind: 'cutoff'; readonly cutoff: number; readonly budget: number; readonly flagged: number; readonly tied: number }
  /** Every claim any positive cutoff could flag (`flaggable` distinct rows) fits: the budget does not set a cutoff. */
  | { readonly kind: 'all-fit'; readonly budget: number; readonly flaggable: number }
  /** No value column, or a budget that is not a whole number of 0 or more. */
  | { readonly kind: 'none' };

/**
 * With each row's reach r_i (the largest cutoff at which it is still flagged, the largest over the
 * value columns: a row counts once however many columns flag it) sorted t(1) >= t(2) >= ..., the
 * answer is t(budget + 1): a row is flagged when its reach exceeds the cutoff, so exactly the rows
 * above t(budget + 1) are, at most `budget` of them, fewer only when rows tie at t(budget + 1).
 * When the budget covers every row that can be flagged at all, the only such cutoff would be 0,
 * which is not a cutoff (it flags every claim off the centre): the answer is 'all-fit'.
 * Cost O(rows x value columns + k log k) for the k rows that can be flagged.
 */
export function cutoffForReviewBudget(result: ScoreResult, budget: number): BudgetAnswer {
  if (result.columns.length === 0 || !Number.isInteger(budget) || budget < 0) return { kind: 'none' };
  const reach = reachOfRows(result);
  const positive: number[] = [];
  for (let r = 0; r < reach.length; r++) if (reach[r] > 0) positive.push(reach[r]);
  if (positive.length <= budget) return { kind: 'all-fit', budget, flaggable: positive.length };
  positive.sort((a, b) => b - a);
  const cutoff = positive[budget];
  let flagged = 0;
  while (flagged < positive.length && positive[flagged] > cutoff) flagged++;
  let tied = 0;
  while (flagged + tied < positive.length && positive[flagged + tied] === cutoff) tied++;
  return { kind: 'cutoff', cutoff, budget, flagged, tied };
}

/** What a budget did, in one sentence for the notes, the batch command and the pane. */
export function describeBudget(a: BudgetAnswer): string {
  if (a.kind === 'none') return 'No cutoff can be set from that budget.';
  if (a.kind === 'all-fit') {
    return `Review budget ${a.budget}: all ${a.flaggable} claims that any cutoff could flag fit, so the budget does not set the cutoff.`;
  }
  const base = `Review budget ${a.budget}: cutoff ${formatCutoff(a.cutoff)} (exactly ${a.cutoff}) flags ${a.flagged} claim${a.flagged === 1 ? '' : 's'} (rows flagged in any value column)`;
  if (a.flagged === a.budget) return `${base}.`;
  return `${base}, ${a.budget - a.flagged} short of the budget: the next ${a.tied} claims are tied at exactly the cutoff, so flagging one would flag all ${a.tied} and go over it.`;
}
