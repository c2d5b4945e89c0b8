/**
 * The row pass for fence fits (IQR, adjusted boxplot, skew-aware fences) of groups on the plain
 * unit (engine internal, used by `scoreTable`): per row, with the group's Q1, Q3 and the unit of
 * each side (lowScale, highScale),
 *
 *   tHigh = (x - Q3) / highScale,  tLow = (Q1 - x) / lowScale,
 *   score = tHigh - cutoff above the upper fence, -(tLow - cutoff) below the lower one, 0 between,
 *
 * and the distance in units that is compared with the cutoff (`reach`: the larger of the two, or the
 * one side scored). The same rule as the general path in `scoreTable`, with each group's four
 * numbers read from one array (4g .. 4g + 3) and no per-row test of the group's kind.
 *
 * Only rows of groups marked FAST_FENCE in `fast` are written; excluded rows are skipped.
 * Returns how many rows were scored. Cost O(rows).
 */
export const FAST_FENCE = 2;

const MAX = Number.MAX_VALUE;

export function scoreFenceRows(
  fence: Float64Array, fast: Uint8Array, popOf: Uint8Array, groupOf: Int32Array, cutoff: number, hi: number, lo: number,
  exclusion: Uint8Array, y: Float64Array, scores: Float64Array, flagged: Uint8Array, population: Uint8Array, reach: Float64Array, flaggedPerGroup: Int32Array,
): number {
  const n = y.length;
  const both = hi === 1 && lo === 1;
  let count = 0;
  for (let r = 0; r < n; r++) {
    const g = groupOf[r];
    if (fast[g] !== FAST_FENCE || exclusion[r] !== 0) continue;
    const v = y[r];
    const o = 4 * g;
    let tHigh = (v - fence[o]) / fence[o + 1];
    if (tHigh > MAX) tHigh = MAX;
    else if (tHigh < -MAX) tHigh = -MAX;
    let tLow = (fence[o + 2] - v) / fence[o + 3];
    if (tLow > MAX) tLow = MAX;
    else if (tLow < -MAX) tLow = -MAX;
    scores[r] = tHigh > cutoff ? tHigh - cutoff : tLow > cutoff ? cutoff - tLow : 0;
    const t = both ? (tHigh > tLow ? tHigh : tLow) : hi === 1 ? tHigh : tLow;
    reach[r] = t;
    population[r] = popOf[g];
    count++;
    // Flags are rare: this branch predicts well, and `flagged` is zero already (a new array).
    if (t > cutoff) {
      flagged[r] = 1;
      flaggedPerGroup[g]++;
    }
  }
  return count;
}
