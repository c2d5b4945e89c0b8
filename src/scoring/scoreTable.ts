import { maxAttainableZ } from './methods/classic.js';
import { getMethod } from './methods/index.js';
import type { Fit, ScoringMethod } from './methods/method.js';
import { NO_FIT } from './methods/method.js';
import { MAD_NORMAL_CONSTANT } from './mad.js';
import { groupRows, type Grouping } from './groups.js';
import { parseCell } from './parseCell.js';
import { EMPTY_SUMMARY, real, summarize, type Summary } from './summary.js';
import {
  type ColumnScores,
  DEFAULT_OPTIONS,
  type Direction,
  EXCLUSION_REASONS,
  type ExclusionReason,
  type Fallback,
  type GroupStats,
  type Population,
  type RawCell,
  type ScoreInput,
  type ScoreOptions,
  type ScoreResult,
} from './types.js';

const REASON_CODE: Record<ExclusionReason, number> = Object.fromEntries(
  EXCLUSION_REASONS.map((r, i) => [r, i + 1]),
) as Record<ExclusionReason, number>;
const LOG_CODE = REASON_CODE['not-positive-for-log'];
const POP_NONE = 0;
const POP_GROUP = 1;
const POP_COLUMN = 2;
const NREASONS = EXCLUSION_REASONS.length;

/** Label of the whole-column population (`ColumnScores.pooled`). */
export const WHOLE_COLUMN_LABEL = '(whole column)';

/**
 * Fills in defaults (DEFAULT_OPTIONS, the method's default cutoff) and checks the options,
 * throwing an Error that names the bad option.
 */
export function resolveOptions(options: ScoreOptions): Required<ScoreOptions> {
  const given = Object.fromEntries(Object.entries(options ?? {}).filter(([, v]) => v !== undefined)) as Partial<ScoreOptions>;
  const merged = { ...DEFAULT_OPTIONS, ...given };
  const method = getMethod(merged.method);
  if (merged.direction !== 'high' && merged.direction !== 'low' && merged.direction !== 'both') {
    throw new Error(`Unknown direction "${String(merged.direction)}": use high, low or both.`);
  }
  if (merged.smallGroups !== 'pool' && merged.smallGroups !== 'skip') {
    throw new Error(`Unknown small-group policy "${String(merged.smallGroups)}": use pool or skip.`);
  }
  const cutoff = merged.cutoff ?? method.defaultCutoff;
  if (typeof cutoff !== 'number' || !Number.isFinite(cutoff) || cutoff < 0) {
    throw new Error(
      method.id === 'iqr'
        ? `The IQR multiplier k must be a number of 0 or more (got ${String(cutoff)}).`
        : `The cutoff must be a number of 0 or more (got ${String(cutoff)}).`,
    );
  }
  const minGroupSize = merged.minGroupSize;
  if (typeof minGroupSize !== 'number' || !Number.isFinite(minGroupSize) || minGroupSize < 1) {
    throw new Error(`The minimum group size must be a whole number of 1 or more (got ${String(minGroupSize)}).`);
  }
  return {
    method: merged.method,
    cutoff,
    direction: merged.direction,
    logScale: merged.logScale === true,
    minGroupSize: Math.ceil(minGroupSize),
    smallGroups: merged.smallGroups,
    decimalComma: merged.decimalComma === true,
  };
}

/**
 * Scores every value column of a table per peer group.
 *
 * Pipeline (no per-row object allocation on the hot path):
 * 1. group once per table (`groupRows`: one Map lookup per row, group sizes -> counting-sort
 *    offsets), shared by every value column;
 * 2. per value column, parse each cell once into a Float64Array (`parseCell`; plain numbers take a
 *    fast path), with an exclusion code per row;
 * 3. counting sort: scatter the usable values into one group-ordered Float64Array scratch;
 * 4. per group, summarise its slice of that scratch (median, Q1, Q3 and MAD by quickselect;
 *    mean, SD, mean absolute deviation by passes) — O(n) per group — and let the method fit
 *    centre / scale / bounds;
 * 5. score and flag every row in row order.
 * Groups with fewer than `minGroupSize` usable values are compared with the whole column
 * ('pool') or left unscored ('skip'). The whole column is also summarised as one population
 * (`ColumnScores.pooled`).
 *
 * Cost: O(rows x (key columns + value columns)) expected time; memory about 26 bytes per row per
 * value column plus 16 bytes per row of scratch and grouping.
 *
 * Throws (with a message naming the column or option) when columns differ in length or an
 * option is invalid. Never mutates the input.
 */
export function scoreTable(input: ScoreInput, options: ScoreOptions): ScoreResult {
  const opts = resolveOptions(options);
  const method = getMethod(opts.method);
  const rowCount = input.valueColumns[0]?.cells.length ?? input.groupColumns[0]?.cells.length ?? 0;
  for (const c of [...input.valueColumns, ...input.groupColumns]) {
    if (c.cells.length !== rowCount) {
      throw new Error(`Column "${c.name}" has ${c.cells.length} rows but the table has ${rowCount}: all columns must be the same length.`);
    }
  }
  const grouping = groupRows(input.groupColumns, rowCount);
  const buf = new Float64Array(rowCount);
  const dev = new Float64Array(rowCount);
  const columns = input.valueColumns.map((c) => scoreColumn(c.name, c.cells, grouping, opts, method, buf, dev));
  return { options: opts, rowCount, groupColumns: input.groupColumns.map((c) => c.name), columns };
}

function reasonCounts(counts: Int32Array, offset: number): Record<ExclusionReason, number> {
  const out = {} as Record<ExclusionReason, number>;
  for (let i = 0; i < NREASONS; i++) out[EXCLUSION_REASONS[i]] = counts[offset + i];
  return out;
}

function scoreColumn(
  name: string,
  cells: ArrayLike<RawCell>,
  grouping: Grouping,
  opts: Required<ScoreOptions>,
  method: ScoringMethod,
  buf: Float64Array,
  dev: Float64Array,
): ColumnScores {
  const rowCount = cells.length;
  const values = new Float64Array(rowCount);
  const exclusion = new Uint8Array(rowCount);
  const logScale = opts.logScale;
  const y = logScale ? new Float64Array(rowCount) : values;

  // 1. Parse once.
  parseColumn(cells, values, y, exclusion, logScale, opts.decimalComma);

  // 2. The whole column as one population: counted now, summarised only when needed (a pooled
  //    small group, an IQR group borrowing the column's IQR, or the first read of `pooled`).
  const colCounts = new Int32Array(NREASONS);
  let nAll = 0;
  for (let r = 0; r < rowCount; r++) {
    const e = exclusion[r];
    if (e === 0) nAll++;
    else colCounts[e - 1]++;
  }
  // Summarised when a group first needs it (a pooled small group, an IQR group borrowing the
  // column's IQR), else once the groups are done; either way it reuses the `dev` scratch and a
  // scratch of its own only while `buf` is still in use by the groups.
  let colCache: { s: Summary; o: Summary; fit: Fit } | null = null;
  let groupsDone = false;
  const column = (): { s: Summary; o: Summary; fit: Fit } => {
    if (colCache !== null) return colCache;
    const b = groupsDone ? buf : new Float64Array(nAll);
    let k = 0;
    for (let r = 0; r < rowCount; r++) if (exclusion[r] === 0) b[k++] = y[r];
    const s = summarize(b.subarray(0, nAll), nAll, dev);
    const o = logScale ? summarizeOriginal(values, exclusion, b, dev) : s;
    colCache = { s, o, fit: NO_FIT };
    colCache.fit = method.fit(s, opts.cutoff, opts.direction, () => s);
    return colCache;
  };
  const columnSummary = (): Summary => column().s;

  const scores = new Float64Array(rowCount); // every row is written by scoreRows
  const flagged = new Uint8Array(rowCount);
  const population = new Uint8Array(rowCount);
  const reach = method.id === 'iqr' ? new Float64Array(rowCount).fill(NaN) : undefined;
  const { start, groupOf } = grouping;
  const nGroups = grouping.keys.length;

  // 3. Scatter usable values into group order (one sequential pass; writes go to one cursor per
  //    group, which stays cache-friendly where a per-group gather of random rows would not).
  const cursor = start.slice(0, nGroups);
  const gCounts = new Int32Array(nGroups * NREASONS);
  const orig = logScale ? new Float64Array(rowCount) : null;
  for (let r = 0; r < rowCount; r++) {
    const g = groupOf[r];
    const e = exclusion[r];
    if (e === 0) {
      const at = cursor[g]++;
      buf[at] = y[r];
      if (orig !== null) orig[at] = values[r];
    } else gCounts[g * NREASONS + e - 1]++;
  }

  // 4. Summarise and fit each group.
  const fits: Fit[] = new Array(nGroups);
  const popOf = new Uint8Array(nGroups);
  const groupN = new Int32Array(nGroups);
  const groupSummaries: Summary[] = new Array(nGroups);
  const groupFallbacks: Fallback[][] = new Array(nGroups);
  for (let g = 0; g < nGroups; g++) {
    const from = start[g];
    const n = cursor[g] - from;
    groupN[g] = n;
    const s = summarize(buf.subarray(from, from + n), n, dev);
    groupSummaries[g] = logScale && orig !== null ? summarize(orig.subarray(from, from + n), n, dev) : s;
    let fit: Fit;
    let popCode: number;
    const fallbacks: Fallback[] = [];
    if (n >= opts.minGroupSize) {
      fit = method.fit(s, opts.cutoff, opts.direction, columnSummary);
      popCode = fit.kind === 'none' ? POP_NONE : POP_GROUP;
      fallbacks.push(...fit.fallbacks);
    } else if (opts.smallGroups === 'pool' && n > 0) {
      fit = column().fit;
      popCode = fit.kind === 'none' ? POP_NONE : POP_COLUMN;
      fallbacks.push('small-pooled', ...fit.fallbacks);
    } else {
      fit = NO_FIT;
      popCode = POP_NONE;
      if (n > 0) fallbacks.push(opts.smallGroups === 'pool' ? 'small-pooled' : 'small-skipped');
    }
    fits[g] = fit;
    popOf[g] = popCode;
    groupFallbacks[g] = fallbacks;
  }

  groupsDone = true;
  const whole = column();

  // 5. Score every row in row order.
  const flaggedPerGroup = new Int32Array(nGroups);
  const scoredRows = scoreRows(fits, popOf, groupOf, opts.cutoff, opts.direction, exclusion, y, scores, flagged, population, reach, flaggedPerGroup);
  let flaggedRows = 0;
  let pooledFlagged = 0;
  const groups: GroupStats[] = new Array(nGroups);
  const popNames: Population[] = ['none', 'group', 'column'];
  for (let g = 0; g < nGroups; g++) {
    flaggedRows += flaggedPerGroup[g];
    if (popOf[g] === POP_COLUMN) pooledFlagged += flaggedPerGroup[g];
    groups[g] = makeStats(
      grouping.keys[g], grouping.labels[g], grouping.keyParts[g], start[g + 1] - start[g], groupN[g],
      reasonCounts(gCounts, g * NREASONS), groupSummaries[g], fits[g], logScale, flaggedPerGroup[g], groupFallbacks[g], popNames[popOf[g]],
    );
  }

  const pooled = makeStats(
    '', WHOLE_COLUMN_LABEL, [], rowCount, nAll, reasonCounts(colCounts, 0), whole.o, whole.fit, logScale, pooledFlagged,
    [...whole.fit.fallbacks], whole.fit.kind === 'none' ? 'none' : 'column',
  );
  const col: ColumnScores = {
    column: name,
    method: opts.method,
    cutoff: opts.cutoff,
    direction: opts.direction,
    logScale,
    values,
    scores,
    flagged,
    exclusion,
    groupOf,
    population,
    groups,
    pooled,
    excludedCounts: reasonCounts(colCounts, 0),
    scoredRows,
    flaggedRows,
    ...(reach !== undefined ? { fenceMultiple: reach } : {}),
  };
  return col;
}

/**
 * Parses a column into `values` (and `y` = ln(values) on log scale), writing exclusion codes.
 * Plain finite numbers take a branch-light fast path; everything else goes through `parseCell`.
 */
function parseColumn(
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

/** Summary of the original (not log) values of the usable rows, for the descriptive fields on log scale. */
function summarizeOriginal(values: Float64Array, exclusion: Uint8Array, buf: Float64Array, dev: Float64Array): Summary {
  let n = 0;
  for (let r = 0; r < values.length; r++) if (exclusion[r] === 0) buf[n++] = values[r];
  return n === 0 ? EMPTY_SUMMARY : summarize(buf.subarray(0, n), n, dev);
}

const MAX = Number.MAX_VALUE;
const clamp = (x: number): number => (x > MAX ? MAX : x < -MAX ? -MAX : x);

/** Scores every usable row against its group's fit, in row order; returns how many were scored. */
function scoreRows(
  fits: readonly Fit[], popOf: Uint8Array, groupOf: Int32Array, cutoff: number, direction: Direction,
  exclusion: Uint8Array, y: Float64Array, scores: Float64Array, flagged: Uint8Array, population: Uint8Array,
  reach: Float64Array | undefined, flaggedPerGroup: Int32Array,
): number {
  const hi = direction !== 'low';
  const lo = direction !== 'high';
  const n = y.length;
  let count = 0;
  for (let r = 0; r < n; r++) {
    const g = groupOf[r];
    const fit = fits[g];
    if (exclusion[r] !== 0 || fit.kind === 'none') {
      scores[r] = NaN;
      continue;
    }
    count++;
    population[r] = popOf[g];
    const v = y[r] / fit.unit;
    if (fit.kind === 'z') {
      const scale = fit.scale;
      if (!(scale > 0)) {
        scores[r] = 0;
        continue;
      }
      const z = clamp((v - fit.center) / scale);
      scores[r] = z;
      if ((hi && z > cutoff) || (lo && z < -cutoff)) {
        flagged[r] = 1;
        flaggedPerGroup[g]++;
      }
    } else {
      const iqr = fit.scale;
      const tHigh = clamp((v - fit.q3) / iqr);
      const tLow = clamp((fit.q1 - v) / iqr);
      let score = 0;
      if (tHigh > cutoff) score = tHigh - cutoff;
      else if (tLow > cutoff) score = -(tLow - cutoff);
      scores[r] = score;
      const t = hi && lo ? Math.max(tHigh, tLow) : hi ? tHigh : tLow;
      if (reach !== undefined) reach[r] = t;
      if (t > cutoff) {
        flagged[r] = 1;
        flaggedPerGroup[g]++;
      }
    }
  }
  return count;
}

function bound(x: number, unit: number, logScale: boolean): number | null {
  if (Number.isNaN(x)) return null;
  const v = x * unit;
  const b = logScale ? Math.exp(v) : v;
  return Number.isFinite(b) ? b : null;
}

function makeStats(
  key: string, label: string, keyParts: readonly string[], rows: number, n: number,
  excluded: Record<ExclusionReason, number>, o: Summary, fit: Fit, logScale: boolean, flagged: number,
  fallbacks: Fallback[], population: Population,
): GroupStats {
  const u = o.unit;
  const mad = n > 0 ? real(o.mad, u) : null;
  const scaledMad = mad === null ? null : Number.isFinite(MAD_NORMAL_CONSTANT * mad) ? MAD_NORMAL_CONSTANT * mad : null;
  const scored = fit.kind !== 'none';
  return {
    key,
    label,
    keyParts,
    rows,
    n,
    excluded,
    median: n > 0 ? real(o.median, u) : null,
    mad,
    scaledMad,
    meanAbsDev: n > 0 ? real(o.meanAbsDev, u) : null,
    mean: n > 0 ? real(o.mean, u) : null,
    sd: n > 1 ? real(o.sd, u) : null,
    q1: n > 0 ? real(o.q1, u) : null,
    q3: n > 0 ? real(o.q3, u) : null,
    center: scored ? real(fit.center, fit.unit) : null,
    scale: scored && fit.scale > 0 ? real(fit.scale, fit.unit) : null,
    lower: scored ? bound(fit.lower, fit.unit, logScale) : null,
    upper: scored ? bound(fit.upper, fit.unit, logScale) : null,
    flagged,
    fallbacks: [...new Set(fallbacks)],
    population,
    maxAttainableZ: n >= 2 ? maxAttainableZ(n) : null,
  };
}
