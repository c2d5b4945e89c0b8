import { sdFromSums } from './sampleStandardDeviation.js';
import { summarizeFor } from './summarizeFor.js';
import { buildOrdered } from './parseColumn.js';
import { constantSummary, EMPTY_SUMMARY, isExtreme, type Summary } from './summary.js';

/**
 * Classic summaries (mean and sample SD) of every group without a group-ordered copy: given the
 * per-group count, sum, min and max of the usable `y` (`acc`, see `parseAndAccumulate`), one more
 * pass in row order accumulates, per group, sum (y - m0)^2 and sum (y - m0) around m0 = sum / n:
 * the corrected two-pass algorithm (Chan, Golub & LeVeque 1983), as `summarizeFor('classic')`.
 * A group's usable values in row order are exactly its slice of a (stable) counting sort, so
 * every figure equals `summarizeFor` on that slice to the last bit. Groups of extreme magnitude
 * (|y| > 2^500 or < 2^-500, which `summarizeFor` rescales by a power of two) are summarised by
 * `summarizeFor` itself on a group-ordered copy built for them only when there is one.
 * Cost O(rows + groups).
 */
export function classicInRowOrder(groupOf: Int32Array, exclusion: Uint8Array, y: Float64Array, acc: Float64Array, count: Int32Array, start: Int32Array): Summary[] {
  const nGroups = count.length;
  // m0 per group, and 2 accumulators (ss, c) per group at 2g, 2g + 1.
  const m0 = new Float64Array(nGroups);
  const sc = new Float64Array(2 * nGroups);
  let extreme = false;
  let needPass = false;
  for (let g = 0; g < nGroups; g++) {
    const n = count[g];
    const min = acc[4 * g + 1];
    const max = acc[4 * g + 2];
    if (n > 0 && min !== max && isExtreme(min, max)) extreme = true;
    if (n > 0 && min !== max) needPass = true;
    m0[g] = acc[4 * g] / n;
  }
  if (needPass) deviations(groupOf, exclusion, y, m0, sc);
  let ordered: Float64Array | null = null;
  if (extreme) ordered = buildOrdered(y, exclusion, groupOf, start, count);
  const out: Summary[] = new Array<Summary>(nGroups);
  for (let g = 0; g < nGroups; g++) {
    const n = count[g];
    const min = acc[4 * g + 1];
    const max = acc[4 * g + 2];
    if (n === 0) out[g] = EMPTY_SUMMARY;
    else if (min === max) out[g] = constantSummary(n, min);
    else {
      if (ordered !== null && isExtreme(min, max)) {
        const slice = ordered.subarray(start[g], start[g] + n);
        out[g] = summarizeFor('classic', slice, 0, n, slice);
      } else {
        const ss = sc[2 * g];
        const c = sc[2 * g + 1];
        const mean = m0[g] + c / n;
        const sd = sdFromSums(n, ss, c);
        out[g] = { n, unit: 1, median: NaN, mad: NaN, meanAbsDev: NaN, mean, sd, q1: NaN, q3: NaN, hingeLow: NaN, hingeHigh: NaN, medcouple: NaN };
      }
    }
  }
  return out;
}

/** sc[2g] += (y - m0[g])^2 and sc[2g + 1] += y - m0[g] over the usable rows, in row order. */
function deviations(groupOf: Int32Array, exclusion: Uint8Array, y: Float64Array, m0: Float64Array, sc: Float64Array): void {
  const n = y.length;
  for (let r = 0; r < n; r++) {
    if (exclusion[r] !== 0) continue;
    const g = groupOf[r];
    const d = y[r] - m0[g];
    sc[2 * g] += d * d;
    sc[2 * g + 1] += d;
  }
}
