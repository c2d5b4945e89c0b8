import { CHANCE_SIZES, CHANCE_TABLE } from './chanceRateTable.js';
import type { Direction, MethodId } from './types.js';

/** A chance rate and whether it is only an upper bound (no chance flag in the simulation). */
export interface ChanceRate {
  /** Share of claims flagged by chance (0..1). */
  readonly rate: number;
  /** true when the simulation saw no chance flag: `rate` is then the rule-of-three bound 3 / trials. */
  readonly atMost: boolean;
}

/**
 * Share of claims flagged by chance in a group of n when the amounts are normally distributed (on
 * the log scale: log-normally), for the method, cutoff and direction used: read from a seeded
 * simulation of the engine itself (`chanceRateTable.ts`, made by scripts/simulate-chance-rates.mjs,
 * 500,000 simulated claims per group size and method). Between simulated group sizes the rate is
 * interpolated linearly in log n; above the largest (2,000) the largest is used. Between simulated
 * cutoffs it is interpolated linearly in log(rate) (linearly when a side is 0); below the smallest
 * cutoff the smallest's rate is used, above the largest the largest's. One direction is half of
 * both (normal data are symmetric). No chance flag in the simulation: the rule-of-three upper bound
 * 3 / trials, `atMost` true (B. D. Jovanovic & P. S. Levy, "A look at the rule of three", The
 * American Statistician 51(2), 1997).
 *
 * Groups of 1 or 2: 0 (no score of 1 or 2 values can pass a cutoff of 1 or more: robust z is at most
 * 0.6745, classic z 0.7071, the fence methods 0.5 there; cutoffs below 1 are looked up as n = 3).
 * Cost O(sizes + cutoffs). n < 1 or a non-finite cutoff -> null.
 */
export function chanceRate(method: MethodId, cutoff: number, direction: Direction, n: number): ChanceRate | null {
  if (!(n >= 1) || !Number.isFinite(cutoff)) return null;
  const half = direction === 'both' ? 1 : 0.5;
  if (n < 3 && cutoff >= 1) return { rate: 0, atMost: false };
  const t = CHANCE_TABLE[method];
  const sizes = CHANCE_SIZES;
  const m = Math.max(n, sizes[0]);
  let hi = sizes.findIndex((s) => s >= m);
  if (hi < 0) hi = sizes.length - 1;
  const lo = sizes[hi] === m || hi === 0 ? hi : hi - 1;
  const atSize = (i: number): ChanceRate => atCutoff(t.cutoffs, t.events[i], t.trials[i], cutoff);
  const a = atSize(lo);
  if (lo === hi || m >= sizes[sizes.length - 1]) return { rate: a.rate * half, atMost: a.atMost };
  const b = atSize(hi);
  const w = (Math.log(m) - Math.log(sizes[lo])) / (Math.log(sizes[hi]) - Math.log(sizes[lo]));
  return { rate: (a.rate + w * (b.rate - a.rate)) * half, atMost: a.atMost && b.atMost };
}

function atCutoff(cutoffs: readonly number[], events: readonly number[], trials: number, c: number): ChanceRate {
  const rateAt = (i: number): ChanceRate => (events[i] > 0 ? { rate: events[i] / trials, atMost: false } : { rate: 3 / trials, atMost: true });
  if (c <= cutoffs[0]) return rateAt(0);
  const last = cutoffs.length - 1;
  if (c >= cutoffs[last]) return rateAt(last);
  let j = 1;
  while (cutoffs[j] < c) j++;
  const a = rateAt(j - 1);
  const b = rateAt(j);
  const w = (c - cutoffs[j - 1]) / (cutoffs[j] - cutoffs[j - 1]);
  if (a.atMost || b.atMost) return { rate: a.rate + w * (b.rate - a.rate), atMost: true };
  return { rate: Math.exp(Math.log(a.rate) + w * (Math.log(b.rate) - Math.log(a.rate))), atMost: false };
}
