/**
 * The row pass of `scoreTable` (engine internal): every usable row scored and flagged against its
 * group's fit, in row order, the per-group fits flattened to typed arrays (`FlatFits`).
 */
import type { Direction } from './types.js';

export const KIND_NONE = 0;
export const KIND_Z = 1;
export const KIND_FENCE = 2;

const MAX = Number.MAX_VALUE;

/** Per-group fits as typed arrays, so the row pass reads numbers, not objects. */
export interface FlatFits {
  /** 1 where the group takes the fast row path: a z fit with unit 1 and scale > 0. */
  readonly fast: Uint8Array;
  /** Fast path: centre and scale of group g at 2g and 2g + 1 (one array: fewer loads per row); NaN for groups that are not fast. */
  readonly cs: Float64Array;
  readonly kind: Uint8Array;
  readonly popOf: Uint8Array;
  readonly unit: Float64Array;
  readonly center: Float64Array;
  readonly scale: Float64Array;
  readonly q1: Float64Array;
  readonly q3: Float64Array;
  readonly lowScale: Float64Array;
  readonly highScale: Float64Array;
}

/**
 * Scores every usable row against its group's fit, in row order; returns how many were scored.
 * Fast path (`scoreFastRows`) for the usual z fit, then the general rule (`scoreOtherRows`) for
 * the rest (IQR fences, extreme-magnitude units, no spread). Flags are branch-free (comparison
 * results combined as 0/1 integers and written for every row), since a flag depends on the data
 * and would otherwise be a mispredicted branch.
 */
export function scoreRows(
  fits: FlatFits, groupOf: Int32Array, cutoff: number, direction: Direction,
  exclusion: Uint8Array, y: Float64Array, scores: Float64Array, flagged: Uint8Array, population: Uint8Array,
  reach: Float64Array | undefined, flaggedPerGroup: Int32Array,
): number {
  const hi = direction !== 'low' ? 1 : 0;
  const lo = direction !== 'high' ? 1 : 0;
  const anyFast = fits.fast.includes(1);
  const anyOther = hasOther(fits.fast, fits.kind);
  let count = 0;
  if (anyFast) count += scoreFastRows(fits.cs, fits.popOf, groupOf, cutoff, hi, lo, y, scores, flagged, population, flaggedPerGroup);
  else scores.fill(NaN);
  if (anyOther) count += scoreOtherRows(fits, groupOf, cutoff, hi, lo, exclusion, y, scores, flagged, population, reach, flaggedPerGroup);
  return count;
}

/** True when some scored group is not fast. */
function hasOther(fast: Uint8Array, kind: Uint8Array): boolean {
  for (let g = 0; g < fast.length; g++) if (fast[g] === 0 && kind[g] !== KIND_NONE) return true;
  return false;
}

/**
 * z = (y - centre) / scale for every row, branch-free: rows of groups that are not fast have
 * centre and scale NaN in `cs`, and excluded rows have y = NaN, so their z is NaN (score NaN, not
 * flagged, population 0, not counted) without a test per row.
 */
function scoreFastRows(
  cs: Float64Array, popOf: Uint8Array, groupOf: Int32Array, cutoff: number, hi: number, lo: number,
  y: Float64Array, scores: Float64Array, flagged: Uint8Array, population: Uint8Array, flaggedPerGroup: Int32Array,
): number {
  const n = y.length;
  let count = 0;
  for (let r = 0; r < n; r++) {
    const g = groupOf[r];
    let z = (y[r] - cs[2 * g]) / cs[2 * g + 1];
    if (z > MAX) z = MAX;
    else if (z < -MAX) z = -MAX;
    scores[r] = z;
    const ok = +(z === z);
    population[r] = popOf[g] * ok;
    count += ok;
    // Flags are rare, so this branch predicts well; `flagged` is zero already (new array), so
    // only flagged rows are written (no page of it touched for nothing).
    if ((hi & +(z > cutoff)) | (lo & +(z < -cutoff))) {
      flagged[r] = 1;
      flaggedPerGroup[g]++;
    }
  }
  return count;
}

/** The general rule for rows of scored groups that are not fast (see `Fit`). */
function scoreOtherRows(
  fits: FlatFits, groupOf: Int32Array, cutoff: number, hi: number, lo: number,
  exclusion: Uint8Array, y: Float64Array, scores: Float64Array, flagged: Uint8Array, population: Uint8Array,
  reach: Float64Array | undefined, flaggedPerGroup: Int32Array,
): number {
  const { fast, kind, popOf, unit, center, scale, q1, q3, lowScale, highScale } = fits;
  const n = y.length;
  let count = 0;
  for (let r = 0; r < n; r++) {
    const g = groupOf[r];
    const k = kind[g];
    if (exclusion[r] !== 0 || k === KIND_NONE || fast[g] === 1) continue;
    count++;
    population[r] = popOf[g];
    const v = y[r] / unit[g];
    const sc = scale[g];
    if (k === KIND_Z) {
      if (!(sc > 0)) {
        scores[r] = 0;
        continue;
      }
      let z = (v - center[g]) / sc;
      if (z > MAX) z = MAX;
      else if (z < -MAX) z = -MAX;
      scores[r] = z;
      const f = (hi & +(z > cutoff)) | (lo & +(z < -cutoff));
      flagged[r] = f;
      flaggedPerGroup[g] += f;
    } else {
      let tHigh = (v - q3[g]) / highScale[g];
      if (tHigh > MAX) tHigh = MAX;
      else if (tHigh < -MAX) tHigh = -MAX;
      let tLow = (q1[g] - v) / lowScale[g];
      if (tLow > MAX) tLow = MAX;
      else if (tLow < -MAX) tLow = -MAX;
      let score = 0;
      if (tHigh > cutoff) score = tHigh - cutoff;
      else if (tLow > cutoff) score = -(tLow - cutoff);
      scores[r] = score;
      const t = hi === 1 && lo === 1 ? Math.max(tHigh, tLow) : hi === 1 ? tHigh : tLow;
      if (reach !== undefined) reach[r] = t;
      const f = +(t > cutoff);
      flagged[r] = f;
      flaggedPerGroup[g] += f;
    }
  }
  return count;
}
