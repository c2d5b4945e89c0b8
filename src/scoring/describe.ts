/**
 * Describing a population: every descriptive statistic of a group (or of the whole column) that
 * the notes sheet, `--json` and the pane show beside the scores, computed by one explicit function
 * when a host asks for it, not while scoring.
 *
 * Why not while scoring (or lazily): scoring needs only what each method fits on (`summarizeFor`);
 * a real run's notes sheet reads every statistic of every group anyway, so computing them on first
 * read saved nothing there, and the pane's live preview reads none of them. `bench/describe.ts`
 * measured it (figures in DEVELOPERS.md).
 */
import { MAD_NORMAL_CONSTANT } from './mad.js';
import { medcoupleSorted } from './medcouple.js';
import { real, summarize } from './summary.js';
import type { ColumnScores } from './types.js';

/** The descriptive statistics of one population, in the amounts' own units; null where undefined. */
export interface Description {
  /** Amounts used (usable values). */
  readonly n: number;
  readonly median: number | null;
  readonly mad: number | null;
  /** 1.4826 x MAD. */
  readonly scaledMad: number | null;
  /** Mean absolute deviation around the median. */
  readonly meanAbsDev: number | null;
  readonly mean: number | null;
  /** Sample SD (n - 1); null when n < 2. */
  readonly sd: number | null;
  /** Type-7 quartiles (Hyndman & Fan 1996; Excel's QUARTILE.INC). */
  readonly q1: number | null;
  readonly q3: number | null;
  /**
   * Medcouple (Brys, Hubert & Struyf 2004): robust skewness in [-1, 1], > 0 when the upper tail is
   * longer. Of the scoring values (ln amounts on log scale).
   */
  readonly medcouple: number | null;
}

/** The descriptions of one value column: one per group (index of `ColumnScores.groups`) and the whole column. */
export interface ColumnDescription {
  readonly groups: readonly Description[];
  readonly whole: Description;
}

const EMPTY: Description = { n: 0, median: null, mad: null, scaledMad: null, meanAbsDev: null, mean: null, sd: null, q1: null, q3: null, medcouple: null };

/**
 * Describes the population `buf[0..n-1]` (finite amounts, original units). Overwrites `buf` and
 * `dev[0..n-1]`. `log`: the medcouple is of ln(amount) (every amount is above 0 then).
 * Cost O(n log n): `summarize` (O(n): quickselects and passes), then one sort for the medcouple.
 */
export function describePopulation(buf: Float64Array, n: number, dev: Float64Array, log: boolean): Description {
  if (n === 0) return EMPTY;
  const s = summarize(buf, n, dev);
  // summarize may have divided buf by its power-of-two unit (exact): sort what is there.
  const sorted = buf.subarray(0, n).sort();
  if (log) for (let i = 0; i < n; i++) sorted[i] = Math.log(sorted[i] * s.unit);
  const mc = medcoupleSorted(sorted, n);
  const mad = real(s.mad, s.unit);
  const scaled = mad === null ? null : MAD_NORMAL_CONSTANT * mad;
  return {
    n,
    median: real(s.median, s.unit),
    mad,
    scaledMad: scaled !== null && Number.isFinite(scaled) ? scaled : null,
    meanAbsDev: real(s.meanAbsDev, s.unit),
    mean: real(s.mean, s.unit),
    sd: n >= 2 ? real(s.sd, s.unit) : null,
    q1: real(s.q1, s.unit),
    q3: real(s.q3, s.unit),
    medcouple: Number.isFinite(mc) ? mc : null,
  };
}

/**
 * Describes every group of a scored column and the whole column, from the column's own results
 * (`values` where `exclusion` is 0, grouped by `groupOf`). Cost: O(rows) to put the values in group
 * order, O(n log n) per group and O(N log N) for the whole column (N usable values); memory 3 x 8
 * bytes per usable value while it runs.
 */
export function describeColumn(col: ColumnScores): ColumnDescription {
  const nGroups = col.groups.length;
  const { values, exclusion, groupOf } = col;
  const start = new Int32Array(nGroups + 1);
  for (let r = 0; r < values.length; r++) if (exclusion[r] === 0) start[groupOf[r] + 1]++;
  for (let g = 0; g < nGroups; g++) start[g + 1] += start[g];
  const total = start[nGroups];
  const ordered = new Float64Array(total);
  const cursor = start.slice(0, nGroups);
  for (let r = 0; r < values.length; r++) if (exclusion[r] === 0) ordered[cursor[groupOf[r]]++] = values[r];
  const scratch = new Float64Array(total);
  const dev = new Float64Array(total);
  const groups = new Array<Description>(nGroups);
  for (let g = 0; g < nGroups; g++) {
    const n = start[g + 1] - start[g];
    scratch.set(ordered.subarray(start[g], start[g + 1]));
    groups[g] = describePopulation(scratch, n, dev, col.logScale);
  }
  return { groups, whole: describePopulation(ordered, total, dev, col.logScale) };
}

/**
 * Describes the population of rows for which `member(row)` is true (usable values only), e.g. the
 * group a claim was compared with in the pane's follow-up view. O(rows + n log n).
 */
export function describeRows(col: ColumnScores, member: (row: number) => boolean): Description {
  const picked: number[] = [];
  for (let r = 0; r < col.values.length; r++) if (col.exclusion[r] === 0 && member(r)) picked.push(col.values[r]);
  const buf = Float64Array.from(picked);
  return describePopulation(buf, buf.length, new Float64Array(buf.length), col.logScale);
}
