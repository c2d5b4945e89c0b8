import type { Fit, ScoringMethod } from './methods/method.js';
import { NO_FIT } from './methods/method.js';
import { KIND_FENCE, KIND_NONE, KIND_Z, type FlatFits } from './scoreRows.js';
import { summarizeFor } from './summarizeFor.js';
import type { Summary } from './summary.js';
import type { Fallback, Population, ScoreOptions } from './types.js';

/** Population codes of `ColumnScores.population` (index into POPULATIONS). */
export const POP_NONE = 0;
export const POP_GROUP = 1;
export const POP_COLUMN = 2;
export const POP_NAMES: readonly Population[] = ['none', 'group', 'column'];

export function dedupe(fallbacks: readonly Fallback[]): Fallback[] {
  const out: Fallback[] = [];
  for (const f of fallbacks) if (!out.includes(f)) out.push(f);
  return out;
}

/**
 * Fits every group on the statistics its method needs (classic: the summaries `pre` computed in
 * row order; otherwise `summarizeFor` in place on the group's slice of `yOrdered`, which it
 * permutes and overwrites); small groups take the whole column's fit ('pool') or none
 * ('skip'). Writes the fits, and the same flattened to typed arrays for the row pass, into the
 * arrays given (a plain return after the loop: see `codeKeyColumn` on deoptimization).
 */
export function fitGroups(
  method: ScoringMethod, opts: Required<ScoreOptions>, yOrdered: Float64Array | null, pre: readonly Summary[] | null,
  start: Int32Array, count: Int32Array, column: () => { s: Summary; fit: Fit },
  fits: Fit[], scoringSummaries: (Summary | null)[], groupFallbacks: Fallback[][], flat: FlatFits,
): void {
  const nGroups = count.length;
  const columnSummary = (): Summary => column().s;
  for (let g = 0; g < nGroups; g++) {
    const n = count[g];
    let fit: Fit;
    let popCode: number;
    let fallbacks: Fallback[];
    let s: Summary | null = null;
    if (n >= opts.minGroupSize) {
      // In place on the group's slice (no scratch copy): only its order within the slice changes.
      if (pre !== null) s = pre[g];
      else if (yOrdered !== null) {
        const slice = yOrdered.subarray(start[g], start[g] + n);
        s = summarizeFor(method.id, slice, 0, n, slice);
      } else throw new Error('internal: no values to fit');
      fit = method.fit(s, opts.cutoff, opts.direction, columnSummary);
      popCode = fit.kind === 'none' ? POP_NONE : POP_GROUP;
      fallbacks = dedupe(fit.fallbacks);
    } else if (opts.smallGroups === 'pool' && n > 0) {
      fit = column().fit;
      popCode = fit.kind === 'none' ? POP_NONE : POP_COLUMN;
      fallbacks = dedupe(['small-pooled', ...fit.fallbacks]);
    } else {
      fit = NO_FIT;
      popCode = POP_NONE;
      fallbacks = n > 0 ? [opts.smallGroups === 'pool' ? 'small-pooled' : 'small-skipped'] : [];
    }
    fits[g] = fit;
    scoringSummaries[g] = s;
    groupFallbacks[g] = fallbacks;
    flat.popOf[g] = popCode;
    flat.kind[g] = fit.kind === 'z' ? KIND_Z : fit.kind === 'fence' ? KIND_FENCE : KIND_NONE;
    flat.unit[g] = fit.unit;
    flat.center[g] = fit.center;
    flat.scale[g] = fit.scale;
    flat.q1[g] = fit.q1;
    flat.q3[g] = fit.q3;
    flat.lowScale[g] = fit.lowScale;
    flat.highScale[g] = fit.highScale;
    const fast = fit.kind === 'z' && fit.unit === 1 && fit.scale > 0 && Number.isFinite(fit.center) && Number.isFinite(fit.scale);
    flat.fast[g] = fast ? 1 : 0;
    flat.cs[2 * g] = fast ? fit.center : NaN;
    flat.cs[2 * g + 1] = fast ? fit.scale : NaN;
  }
}
