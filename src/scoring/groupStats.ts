/**
 * Per-group results of `scoreTable` (engine internal): one GroupStats per group, from its fit
 * (centre, scale and bounds in real units), its flag count, fallbacks, chance rate and whether the
 * cutoff can be reached at its size. The descriptive statistics are `describe.ts`.
 */
import { chanceRate } from './chanceRate.js';
import { maxAttainableZ } from './methods/classic.js';
import { maxReach } from './maxReach.js';
import type { Fit } from './methods/method.js';
import type { Grouping } from './groups.js';
import { NREASONS, reasonCounts } from './parseColumn.js';
import { POP_COLUMN, POP_NAMES } from './fitGroups.js';
import { real, type Summary } from './summary.js';
import type { Fallback, GroupStats, Population, ScoreOptions } from './types.js';

/** Sum of `values` over the groups whose population code is `pop` (-1: all groups). */
export function sumOf(values: Int32Array, popOf: Uint8Array, pop: number): number {
  let sum = 0;
  for (let g = 0; g < values.length; g++) if (pop < 0 || popOf[g] === pop) sum += values[g];
  return sum;
}

/** Who a population is: key, label, rows, usable values, exclusions. */
export type StatsHead = Pick<GroupStats, 'key' | 'label' | 'keyParts' | 'rows' | 'n' | 'excluded'>;

/** One GroupStats per group. */
export function buildGroups(
  grouping: Grouping, count: Int32Array, gCounts: Int32Array, fits: readonly Fit[], summaries: readonly (Summary | null)[], logScale: boolean, flaggedPerGroup: Int32Array,
  groupFallbacks: readonly Fallback[][], popOf: Uint8Array, opts: Required<ScoreOptions>, nAll: number,
): GroupStats[] {
  const nGroups = count.length;
  const { start } = grouping;
  const groups: GroupStats[] = new Array<GroupStats>(nGroups);
  for (let g = 0; g < nGroups; g++) {
    const n = count[g];
    groups[g] = groupStats(
      { key: grouping.keys[g], label: grouping.labels[g], keyParts: grouping.keyParts[g], rows: start[g + 1] - start[g], n, excluded: reasonCounts(gCounts, g * NREASONS) },
      fits[g], summaries[g], logScale, flaggedPerGroup[g], groupFallbacks[g], POP_NAMES[popOf[g]], opts, popOf[g] === POP_COLUMN ? nAll : n,
    );
  }
  return groups;
}

/**
 * A GroupStats: the population `head`, scored with `fit` (centre, scale and bounds in real units,
 * bounds in original units) fitted on `summary` (null when pooled or not scored), against a population of `popN` usable values (its own n, or the
 * wider population's when pooled): the chance rate and reachability are those of that size.
 */
export function groupStats(
  head: StatsHead, fit: Fit, summary: Summary | null, logScale: boolean, flagged: number, fallbacks: readonly Fallback[], population: Population,
  opts: Required<ScoreOptions>, popN: number,
): GroupStats {
  const scored = fit.kind !== 'none';
  const chance = scored ? chanceRate(opts.method, opts.cutoff, opts.direction, popN) : null;
  const unreachable = scored && maxReach(opts.method, popN) <= opts.cutoff;
  if (unreachable && !fallbacks.includes('cutoff-unreachable')) fallbacks = [...fallbacks, 'cutoff-unreachable'];
  return {
    ...head,
    medcouple: summary !== null && Number.isFinite(summary.medcouple) ? summary.medcouple : null,
    fenceFrom: fit.kind === 'fence' ? { low: real(fit.q1, fit.unit), high: real(fit.q3, fit.unit) } : null,
    center: scored ? real(fit.center, fit.unit) : null,
    scale: scored && fit.scale > 0 ? real(fit.scale, fit.unit) : null,
    lower: scored ? bound(fit.lower, fit.unit, logScale) : null,
    upper: scored ? bound(fit.upper, fit.unit, logScale) : null,
    flagged,
    fallbacks,
    population,
    maxAttainableZ: head.n >= 2 ? maxAttainableZ(head.n) : null,
    chanceRate: chance === null ? null : chance.rate,
    chanceRateAtMost: chance !== null && chance.atMost,
    unreachable,
  };
}

function bound(x: number, unit: number, logScale: boolean): number | null {
  if (Number.isNaN(x)) return null;
  const v = x * unit;
  const b = logScale ? Math.exp(v) : v;
  return Number.isFinite(b) ? b : null;
}
