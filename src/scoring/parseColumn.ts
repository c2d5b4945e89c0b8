/**
 * Parsing a value column (engine internal, the hot path of `scoreTable`): each cell parsed once
 * into a Float64Array with an exclusion code per row, and, on the way, either scattered into group
 * order (counting sort) or accumulated per group in row order (classic), with exclusions counted
 * per group and reason.
 */
import { parseCell } from './parseCell.js';
import { EXCLUSION_REASONS, type ExclusionReason, type RawCell } from './types.js';

export const REASON_CODE: Record<ExclusionReason, number> = Object.fromEntries(
  EXCLUSION_REASONS.map((r, i) => [r, i + 1]),
) as Record<ExclusionReason, number>;
const LOG_CODE = REASON_CODE['not-positive-for-log'];
/** Exclusion reasons: `gCounts[g * NREASONS + code - 1]` counts group g's cells left out with that code. */
export const NREASONS = EXCLUSION_REASONS.length;

const R = (reason: ExclusionReason): number => EXCLUSION_REASONS.indexOf(reason);
const [R_BLANK, R_ERROR, R_BOOLEAN, R_DATE, R_TEXT, R_NON_FINITE, R_LOG] = [
  R('blank'), R('error'), R('boolean'), R('date'), R('text'), R('non-finite'), R('not-positive-for-log'),
];

/** Exclusion counts by reason (one object literal: built once per group, so kept cheap). */
export function reasonCounts(counts: Int32Array, offset: number): Record<ExclusionReason, number> {
  return {
    blank: counts[offset + R_BLANK],
    error: counts[offset + R_ERROR],
    boolean: counts[offset + R_BOOLEAN],
    date: counts[offset + R_DATE],
    text: counts[offset + R_TEXT],
    'non-finite': counts[offset + R_NON_FINITE],
    'not-positive-for-log': counts[offset + R_LOG],
  };
}

/**
 * Parses a column into `values` (and `y` = ln(values) on log scale), writing exclusion codes.
 * Plain finite numbers take a branch-light fast path; everything else goes through `parseCell`.
 */
export function parseColumn(
  cells: ArrayLike<RawCell>, values: Float64Array, y: Float64Array, exclusion: Uint8Array, logScale: boolean, decimalComma: boolean,
): void {
  const n = values.length;
  let slow = false;
  for (let r = 0; r < n; r++) {
    const c = cells[r];
    if (typeof c === 'number' && c - c === 0) values[r] = c;
    else {
      values[r] = NaN;
      exclusion[r] = 255; // marker: parse on the slow path below
      slow = true;
    }
  }
  if (slow) {
    const parseOptions = { decimalComma };
    for (let r = 0; r < n; r++) {
      if (exclusion[r] !== 255) continue;
      const p = parseCell(cells[r], parseOptions);
      if (p.ok) {
        values[r] = p.value;
        exclusion[r] = 0;
      } else exclusion[r] = REASON_CODE[p.reason];
    }
  }
  if (logScale) {
    for (let r = 0; r < n; r++) {
      if (exclusion[r] !== 0) {
        y[r] = NaN;
        continue;
      }
      const v = values[r];
      if (v > 0) y[r] = Math.log(v);
      else {
        values[r] = NaN;
        y[r] = NaN;
        exclusion[r] = LOG_CODE;
      }
    }
  }
}

/**
 * Linear scale: parse and scatter in one pass. Plain finite numbers take the fast path (no call);
 * other cells go through `parseCell`. Same results as `parseColumn` followed by `scatter`.
 */
export function parseAndScatter(
  cells: ArrayLike<RawCell>, groupOf: Int32Array, values: Float64Array, exclusion: Uint8Array,
  ordered: Float64Array, cursor: Int32Array, gCounts: Int32Array, decimalComma: boolean,
): void {
  const n = values.length;
  const parseOptions = { decimalComma };
  for (let r = 0; r < n; r++) {
    const c = cells[r];
    const g = groupOf[r];
    if (typeof c === 'number' && c - c === 0) {
      values[r] = c;
      ordered[cursor[g]++] = c;
      continue;
    }
    const p = parseCell(c, parseOptions);
    if (p.ok) {
      values[r] = p.value;
      ordered[cursor[g]++] = p.value;
    } else {
      values[r] = NaN;
      const e = REASON_CODE[p.reason];
      exclusion[r] = e;
      gCounts[g * NREASONS + e - 1]++;
    }
  }
}

/**
 * Counting-sort scatter: usable scoring value of row r goes to `yOrdered[cursor[g]++]`; excluded
 * rows are counted per group and reason in `gCounts`. One sequential pass. Kept a function of its
 * own so that the JIT optimizes it as a whole.
 */
export function scatter(groupOf: Int32Array, exclusion: Uint8Array, y: Float64Array, yOrdered: Float64Array, cursor: Int32Array, gCounts: Int32Array): void {
  const n = y.length;
  for (let r = 0; r < n; r++) {
    const g = groupOf[r];
    const e = exclusion[r];
    if (e === 0) yOrdered[cursor[g]++] = y[r];
    else gCounts[g * NREASONS + e - 1]++;
  }
}

/**
 * Linear scale, classic: parse every cell (plain finite numbers on a fast path without a call,
 * other cells through `parseCell`) and accumulate per group, in row order, the usable count and,
 * at `acc[4g ..]`, sum, min and max (min and max start at +/-Infinity); exclusions are counted per
 * group and reason in `gCounts`. Same parsing as `parseColumn`.
 */
export function parseAndAccumulate(
  cells: ArrayLike<RawCell>, groupOf: Int32Array, values: Float64Array, exclusion: Uint8Array,
  acc: Float64Array, count: Int32Array, gCounts: Int32Array, decimalComma: boolean,
): void {
  const n = values.length;
  const parseOptions = { decimalComma };
  for (let r = 0; r < n; r++) {
    const c = cells[r];
    const g = groupOf[r];
    let v: number;
    if (typeof c === 'number' && c - c === 0) v = c;
    else {
      const p = parseCell(c, parseOptions);
      if (!p.ok) {
        values[r] = NaN;
        const e = REASON_CODE[p.reason];
        exclusion[r] = e;
        gCounts[g * NREASONS + e - 1]++;
        continue;
      }
      v = p.value;
    }
    values[r] = v;
    count[g]++;
    const o = 4 * g;
    acc[o] += v;
    if (v < acc[o + 1]) acc[o + 1] = v;
    if (v > acc[o + 2]) acc[o + 2] = v;
  }
}

/** As `parseAndAccumulate`, on already parsed scoring values `y` (usable where `exclusion` is 0). */
export function accumulate(groupOf: Int32Array, exclusion: Uint8Array, y: Float64Array, acc: Float64Array, count: Int32Array, gCounts: Int32Array): void {
  const n = y.length;
  for (let r = 0; r < n; r++) {
    const g = groupOf[r];
    const e = exclusion[r];
    if (e !== 0) {
      gCounts[g * NREASONS + e - 1]++;
      continue;
    }
    const v = y[r];
    count[g]++;
    const o = 4 * g;
    acc[o] += v;
    if (v < acc[o + 1]) acc[o + 1] = v;
    if (v > acc[o + 2]) acc[o + 2] = v;
  }
}

/** Sums the exclusions per reason of every group into `colCounts`; returns the usable values of the column. */
export function tallyCounts(count: Int32Array, gCounts: Int32Array, colCounts: Int32Array): number {
  let nAll = 0;
  for (let g = 0; g < count.length; g++) {
    nAll += count[g];
    for (let i = 0; i < NREASONS; i++) colCounts[i] += gCounts[g * NREASONS + i];
  }
  return nAll;
}

/**
 * The usable values of a column (original units, from `values` where `exclusion` is 0) in group
 * order, each group's in row order (counting sort on `start`; `count` = usable values per group).
 */
export function buildOrdered(values: Float64Array, exclusion: Uint8Array, groupOf: Int32Array, start: Int32Array, count: Int32Array): Float64Array {
  let total = 0;
  for (let g = 0; g < count.length; g++) total += count[g];
  // Positions are those of `start` (rows, usable or not) so the slices match the store's offsets.
  const ordered = new Float64Array(total === 0 ? 0 : start[start.length - 1]);
  const cursor = start.slice(0, count.length);
  const n = values.length;
  for (let r = 0; r < n; r++) if (exclusion[r] === 0) ordered[cursor[groupOf[r]]++] = values[r];
  return ordered;
}

/**
 * Every usable value of a column (`values` where `exclusion` is 0; ln of it when `log`), group by
 * group in group order, each group's in row order, packed (no gaps): the whole column as one
 * population. O(rows).
 */
export function gatherColumn(values: Float64Array, exclusion: Uint8Array, groupOf: Int32Array, count: Int32Array, log: boolean): Float64Array {
  const nGroups = count.length;
  const cursor = new Int32Array(nGroups);
  let total = 0;
  for (let g = 0; g < nGroups; g++) {
    cursor[g] = total;
    total += count[g];
  }
  const out = new Float64Array(total);
  const n = values.length;
  for (let r = 0; r < n; r++) if (exclusion[r] === 0) out[cursor[groupOf[r]]++] = log ? Math.log(values[r]) : values[r];
  return out;
}
