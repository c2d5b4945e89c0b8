import { chanceRate } from './chanceRate.js';
import { maxAttainableZ } from './methods/classic.js';
import { maxReach } from './maxReach.js';
import { getMethod } from './methods/index.js';
import type { Fit, ScoringMethod } from './methods/method.js';
import { floorUnit, NO_FIT } from './methods/method.js';
import { groupRows, type Grouping } from './groups.js';
import { DescriptiveStore, lazyGroupStats, SCORING_FIELDS, type StatsTail } from './lazyStats.js';
import { parseCell } from './parseCell.js';
import { inferDecimal } from './inferDecimal.js';
import { FAST_FENCE, scoreFenceRows } from './scoreFenceRows.js';
import { applyMoneyFloor, moneyCentre } from './moneyFloor.js';
import { summarizeFor } from './summarizeFor.js';
import { constantSummary, EMPTY_SUMMARY, isExtreme, real, type Summary } from './summary.js';
import {
  type ColumnScores,
  type DecimalMode,
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
 * Fills in defaults (DEFAULT_OPTIONS, the method's default cutoff). The settings a user chose are
 * checked once, by the pipeline (src/pipeline/settings.ts); what reaches the engine is assumed valid,
 * and a value outside the contract is a programming error (RangeError, not a message for users).
 */
export function resolveOptions(options: ScoreOptions): Required<ScoreOptions> {
  const given = Object.fromEntries(Object.entries(options ?? {}).filter(([, v]) => v !== undefined)) as Partial<ScoreOptions>;
  const merged = { ...DEFAULT_OPTIONS, ...given };
  const method = getMethod(merged.method);
  const cutoff = merged.cutoff ?? method.defaultCutoff;
  const minGroupSize = merged.minGroupSize;
  if (!(cutoff >= 0) || !Number.isFinite(cutoff) || !(minGroupSize >= 1) || !((merged.ignoreWithin ?? 0) >= 0) || !Number.isFinite(merged.ignoreWithin ?? 0) || !['high', 'low', 'both'].includes(merged.direction) || !['pool', 'skip'].includes(merged.smallGroups)) {
    throw new RangeError(`scoreTable: options outside the engine's contract (${JSON.stringify(merged)}); validate settings with src/pipeline first`);
  }
  return {
    method: merged.method,
    cutoff,
    direction: merged.direction,
    logScale: merged.logScale === true,
    minGroupSize: Math.ceil(minGroupSize),
    smallGroups: merged.smallGroups,
    decimalComma: merged.decimalComma === true,
    decimal: merged.decimalComma === true ? 'comma' : decimalMode(merged.decimal),
    ignoreWithin: merged.ignoreWithin ?? 0,
  };
}

function decimalMode(m: unknown): DecimalMode {
  if (m === undefined || m === 'auto' || m === 'comma' || m === 'point') return m ?? 'auto';
  throw new Error(`Unknown decimal separator setting "${String(m)}": use auto, comma or point.`);
}

/**
 * Scores every value column of a table per peer group.
 *
 * Pipeline (no per-row object or string allocation on the hot path):
 * 1. group once per table (`groupRows`: key columns coded to small integers, several combined
 *    into one numeric code; group sizes -> counting-sort offsets), shared by every value column;
 * 2. per value column, parse each cell once into a Float64Array (plain finite numbers take a
 *    fast path without `parseCell`), with an exclusion code per row;
 * 3. classic (no order statistic needed): per-group count, sum, min and max accumulated in row
 *    order while parsing, then one more row-order pass for the corrected two-pass SD
 *    (`classicInRowOrder`), with no group-ordered copy. Robust and IQR: counting sort, scattering
 *    the usable scoring values into group order in the column's `scores` array, used as the work
 *    buffer before the scoring pass overwrites every row of it (no extra 8 bytes per row, and its
 *    memory pages are touched once rather than those of a separate buffer as well);
 * 4. per group, compute only what the method scores with (`summarizeFor`: robust median and MAD,
 *    IQR quartiles; quickselect in place on the group's slice of that buffer) — O(n) per
 *    group — and let the method fit centre / scale / bounds;
 * 5. score and flag every row in one pass in row order (per-group fits flattened to typed arrays).
 * Groups with fewer than `minGroupSize` usable values are compared with the whole column
 * ('pool') or left unscored ('skip').
 *
 * Laziness: the other descriptive fields of each `GroupStats` (e.g. mean and SD under robust,
 * median, MAD and quartiles under classic; all of them on log scale, where they are in original
 * units) are computed on first read and cached (see `lazyStats.ts`) from a group-ordered copy
 * that is itself built on the first such read from the column's `values`, `exclusion` and
 * `groupOf` (so callers must not mutate those, see `ColumnScores`); they are own enumerable
 * accessor properties, so JSON, spread and `in` see them. `ColumnScores.pooled` (the whole
 * column as one population) is likewise built on first read, unless scoring needed it (a pooled
 * small group, or an IQR group borrowing the column's IQR), in which case its fit is computed
 * while scoring (which builds the copy then). A read never changes a score or flag.
 *
 * Cost: O(rows x (key columns + value columns)) expected time; memory about 27 bytes per row per
 * value column (8 more on log scale), plus 4 bytes per row of grouping and, once a lazy field is read, 8 per row of group-ordered copy.
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
  const columns = input.valueColumns.map((c) => scoreColumn(c.name, c.cells, grouping, opts, method));
  return { options: opts, rowCount, groupColumns: input.groupColumns.map((c) => c.name), columns };
}

const R = (reason: ExclusionReason): number => EXCLUSION_REASONS.indexOf(reason);
const [R_BLANK, R_ERROR, R_BOOLEAN, R_DATE, R_TEXT, R_NON_FINITE, R_LOG] = [
  R('blank'), R('error'), R('boolean'), R('date'), R('text'), R('non-finite'), R('not-positive-for-log'),
];

/** Exclusion counts by reason (one object literal: built once per group, so kept cheap). */
function reasonCounts(counts: Int32Array, offset: number): Record<ExclusionReason, number> {
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

const KIND_NONE = 0;
const KIND_Z = 1;
const KIND_FENCE = 2;
const POP_NAMES: readonly Population[] = ['none', 'group', 'column'];

function dedupe(fallbacks: readonly Fallback[]): Fallback[] {
  const out: Fallback[] = [];
  for (const f of fallbacks) if (!out.includes(f)) out.push(f);
  return out;
}

function scoreColumn(
  name: string,
  cells: ArrayLike<RawCell>,
  grouping: Grouping,
  opts: Required<ScoreOptions>,
  method: ScoringMethod,
): ColumnScores {
  const rowCount = cells.length;
  const values = new Float64Array(rowCount);
  const exclusion = new Uint8Array(rowCount);
  const logScale = opts.logScale;
  const y = logScale ? new Float64Array(rowCount) : values;
  const { start, groupOf } = grouping;
  const nGroups = grouping.keys.length;
  const decimal = inferDecimal(cells, opts.decimal);
  const decimalComma = decimal.separator === 'comma';
  // Every row of `scores` is written by the scoring pass (`scoreRows`); before that, robust and
  // IQR use it as the group-ordered work buffer the fits select in place.
  const scores = new Float64Array(rowCount);
  const gCounts = new Int32Array(nGroups * NREASONS);
  const count = new Int32Array(nGroups);
  const colCounts = new Int32Array(NREASONS);
  // Classic needs no order statistic: its mean and SD are accumulated per group in row order
  // (`classicInRowOrder`), and the group-ordered copy is built only if a lazy field needs it.
  const rowOrder = method.id === 'classic';
  let yOrdered: Float64Array | null = null;
  let pre: Summary[] | null = null;
  let nAll: number;
  if (rowOrder) {
    // 1. Parse each cell once, accumulating per-group count, sum, min and max on the way.
    const acc = new Float64Array(4 * nGroups);
    for (let g = 0; g < nGroups; g++) {
      acc[4 * g + 1] = Infinity;
      acc[4 * g + 2] = -Infinity;
    }
    if (logScale) {
      parseColumn(cells, values, y, exclusion, logScale, decimalComma);
      accumulate(groupOf, exclusion, y, acc, count, gCounts);
    } else {
      parseAndAccumulate(cells, groupOf, values, exclusion, acc, count, gCounts, decimalComma);
    }
    nAll = tallyCounts(count, gCounts, colCounts);
    pre = classicInRowOrder(groupOf, exclusion, y, acc, count, start);
  } else {
    // 1-2. Parse each cell once and scatter the usable scoring values (ln on log scale) into
    //    group order in the column's `scores` array (counting sort: one sequential pass, one
    //    write cursor per group), counting exclusions per group. Linear scale does parse and
    //    scatter in one pass. The fits select in place there (destroying it), so the lazy
    //    statistics build their own copy from the column's results when first read.
    yOrdered = scores;
    const cursor = start.slice(0, nGroups);
    if (logScale) {
      parseColumn(cells, values, y, exclusion, logScale, decimalComma);
      scatter(groupOf, exclusion, y, yOrdered, cursor, gCounts);
    } else {
      parseAndScatter(cells, groupOf, values, exclusion, yOrdered, cursor, gCounts, decimalComma);
    }
    for (let g = 0; g < nGroups; g++) count[g] = cursor[g] - start[g];
    nAll = tallyCounts(count, gCounts, colCounts);
  }
  // The group-ordered copy (original units), from the column's own result arrays, built on first
  // need (see ColumnScores: result arrays must not be mutated by callers).
  const store = new DescriptiveStore(() => buildOrdered(values, exclusion, groupOf, start, count), start, count, nAll);

  // The whole column's fit: computed while scoring when a group needs it, else on the first read
  // of `pooled`; from the store's group-ordered values (ln applied on log scale: the same values
  // scored), group by group.
  let colFit: { s: Summary; fit: Fit } | null = null;
  const column = (): { s: Summary; fit: Fit } => {
    if (colFit !== null) return colFit;
    const all = logScale ? store.gather(Math.log) : store.gather();
    const s = summarizeFor(method.id, all, 0, nAll, all);
    colFit = { s, fit: method.fit(s, opts.cutoff, opts.direction, () => s, floorUnit(opts.ignoreWithin, s.median, s.unit, logScale)) };
    return colFit;
  };

  // 3. Fit each group on what its method needs.
  const fits: Fit[] = new Array<Fit>(nGroups);
  const scoringSummaries: (Summary | null)[] = new Array<Summary | null>(nGroups);
  const groupFallbacks: Fallback[][] = new Array<Fallback[]>(nGroups);
  const flat: FlatFits = {
    fast: new Uint8Array(nGroups), cs: new Float64Array(2 * nGroups), kind: new Uint8Array(nGroups), popOf: new Uint8Array(nGroups),
    unit: new Float64Array(nGroups), center: new Float64Array(nGroups), scale: new Float64Array(nGroups), q1: new Float64Array(nGroups), q3: new Float64Array(nGroups),
    lowScale: new Float64Array(nGroups), highScale: new Float64Array(nGroups), fence: new Float64Array(4 * nGroups),
  };
  fitGroups(method, opts, yOrdered, pre, start, count, column, fits, scoringSummaries, groupFallbacks, flat);
  const popOf = flat.popOf;

  // 4. Score every row in row order.
  const flagged = new Uint8Array(rowCount);
  const population = new Uint8Array(rowCount);
  const reach = method.kind === 'fence' ? new Float64Array(rowCount).fill(NaN) : undefined;
  const flaggedPerGroup = new Int32Array(nGroups);
  const scoredRows = scoreRows(
    flat, groupOf, opts.cutoff, opts.direction,
    exclusion, y, scores, flagged, population, reach, flaggedPerGroup,
  );
  // 4b. The money floor: claims within it of their population's centre are not flagged.
  const withinPerGroup = new Int32Array(nGroups);
  let withinFloor: Uint8Array | undefined;
  if (opts.ignoreWithin > 0) {
    const centreOf = Float64Array.from(fits, (f) => (f.kind === 'none' ? NaN : moneyCentre(f.center, f.unit, logScale)));
    withinFloor = applyMoneyFloor(opts.ignoreWithin, values, population, groupOf, centreOf, flagged, flaggedPerGroup, withinPerGroup);
  }

  // 5. Per-group results (descriptive fields lazy).
  const bits = SCORING_FIELDS[method.id];
  const groups = buildGroups(grouping, count, gCounts, store, scoringSummaries, bits, fits, logScale, flaggedPerGroup, withinPerGroup, groupFallbacks, popOf, opts, nAll);
  const flaggedRows = sumOf(flaggedPerGroup, popOf, -1);
  const pooledFlagged = sumOf(flaggedPerGroup, popOf, POP_COLUMN);

  // The whole column as one population, built on first read (its fit is computed then if scoring
  // did not need it).
  let pooled: GroupStats | null = null;
  const pooledStats = (): GroupStats => {
    if (pooled !== null) return pooled;
    const whole = column();
    pooled = lazyGroupStats(
      { key: '', label: WHOLE_COLUMN_LABEL, keyParts: [], rows: rowCount, n: nAll, excluded: reasonCounts(colCounts, 0) },
      store, -1, logScale ? null : whole.s, bits,
      statsTail(whole.fit, logScale, pooledFlagged, sumOf(withinPerGroup, popOf, POP_COLUMN), dedupe(whole.fit.fallbacks), whole.fit.kind === 'none' ? 'none' : 'column', nAll, opts, nAll),
      logScale,
    );
    return pooled;
  };

  const col: Record<string, unknown> = {
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
    decimal,
  };
  Object.defineProperty(col, 'pooled', { enumerable: true, configurable: true, get: pooledStats });
  col.excludedCounts = reasonCounts(colCounts, 0);
  col.scoredRows = scoredRows;
  col.flaggedRows = flaggedRows;
  if (reach !== undefined) col.fenceMultiple = reach;
  if (withinFloor !== undefined) col.withinFloor = withinFloor;
  return col as unknown as ColumnScores;
}

/**
 * Fits every group on the statistics its method needs (classic: the summaries `pre` computed in
 * row order; otherwise `summarizeFor` in place on the group's slice of `yOrdered`, which it
 * permutes and overwrites); small groups take the whole column's fit ('pool') or none
 * ('skip'). Writes the fits, and the same flattened to typed arrays for the row pass, into the
 * arrays given (a plain return after the loop: see `codeKeyColumn` on deoptimization).
 */
function fitGroups(
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
      fit = method.fit(s, opts.cutoff, opts.direction, columnSummary, floorUnit(opts.ignoreWithin, s.median, s.unit, opts.logScale));
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
    scoringSummaries[g] = opts.logScale ? null : s;
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
    const fastFence = fit.kind === 'fence' && fit.unit === 1;
    flat.fast[g] = fast ? 1 : fastFence ? FAST_FENCE : 0;
    flat.fence.set(fastFence ? [fit.q3, fit.highScale, fit.q1, fit.lowScale] : [NaN, NaN, NaN, NaN], 4 * g);
    flat.cs[2 * g] = fast ? fit.center : NaN;
    flat.cs[2 * g + 1] = fast ? fit.scale : NaN;
  }
}

/** Sums the exclusions per reason of every group into `colCounts`; returns the usable values of the column. */
function tallyCounts(count: Int32Array, gCounts: Int32Array, colCounts: Int32Array): number {
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
function buildOrdered(values: Float64Array, exclusion: Uint8Array, groupOf: Int32Array, start: Int32Array, count: Int32Array): Float64Array {
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
 * Linear scale, classic: parse every cell (plain finite numbers on a fast path without a call,
 * other cells through `parseCell`) and accumulate per group, in row order, the usable count and,
 * at `acc[4g ..]`, sum, min and max (min and max start at +/-Infinity); exclusions are counted per
 * group and reason in `gCounts`. Same parsing as `parseColumn`.
 */
function parseAndAccumulate(
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
function accumulate(groupOf: Int32Array, exclusion: Uint8Array, y: Float64Array, acc: Float64Array, count: Int32Array, gCounts: Int32Array): void {
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
function classicInRowOrder(groupOf: Int32Array, exclusion: Uint8Array, y: Float64Array, acc: Float64Array, count: Int32Array, start: Int32Array): Summary[] {
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
        const v = n >= 2 ? (ss - (c * c) / n) / (n - 1) : NaN;
        const sd = n >= 2 ? (v > 0 ? Math.sqrt(v) : 0) : NaN;
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

/** Sum of `values` over the groups whose population code is `pop` (-1: all groups). */
function sumOf(values: Int32Array, popOf: Uint8Array, pop: number): number {
  let sum = 0;
  for (let g = 0; g < values.length; g++) if (pop < 0 || popOf[g] === pop) sum += values[g];
  return sum;
}

/** One GroupStats per group, descriptive fields lazy (see lazyStats.ts). */
function buildGroups(
  grouping: Grouping, count: Int32Array, gCounts: Int32Array, store: DescriptiveStore, scoringSummaries: readonly (Summary | null)[],
  bits: number, fits: readonly Fit[], logScale: boolean, flaggedPerGroup: Int32Array, withinPerGroup: Int32Array, groupFallbacks: readonly Fallback[][], popOf: Uint8Array,
  opts: Required<ScoreOptions>, nAll: number,
): GroupStats[] {
  const nGroups = count.length;
  const { start } = grouping;
  const groups: GroupStats[] = new Array<GroupStats>(nGroups);
  for (let g = 0; g < nGroups; g++) {
    const n = count[g];
    groups[g] = lazyGroupStats(
      { key: grouping.keys[g], label: grouping.labels[g], keyParts: grouping.keyParts[g], rows: start[g + 1] - start[g], n, excluded: reasonCounts(gCounts, g * NREASONS) },
      store, g, scoringSummaries[g], bits,
      statsTail(fits[g], logScale, flaggedPerGroup[g], withinPerGroup[g], groupFallbacks[g], POP_NAMES[popOf[g]], n, opts, popOf[g] === POP_COLUMN ? nAll : n),
      logScale,
    );
  }
  return groups;
}

/**
 * Linear scale: parse and scatter in one pass. Plain finite numbers take the fast path (no call);
 * other cells go through `parseCell`. Same results as `parseColumn` followed by `scatter`.
 */
function parseAndScatter(
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
function scatter(groupOf: Int32Array, exclusion: Uint8Array, y: Float64Array, yOrdered: Float64Array, cursor: Int32Array, gCounts: Int32Array): void {
  const n = y.length;
  for (let r = 0; r < n; r++) {
    const g = groupOf[r];
    const e = exclusion[r];
    if (e === 0) yOrdered[cursor[g]++] = y[r];
    else gCounts[g * NREASONS + e - 1]++;
  }
}

/** The fit-derived fields of a GroupStats: centre, scale and bounds in real (bounds: original) units, and the rest. */
function statsTail(
  fit: Fit, logScale: boolean, flagged: number, withinFloor: number, fallbacks: readonly Fallback[], population: Population, n: number,
  opts: Required<ScoreOptions>, popN: number,
): StatsTail {
  const scored = fit.kind !== 'none';
  const chance = scored ? chanceRate(opts.method, opts.cutoff, opts.direction, popN) : null;
  const unreachable = scored && maxReach(opts.method, popN) <= opts.cutoff;
  if (unreachable && !fallbacks.includes('cutoff-unreachable')) fallbacks = [...fallbacks, 'cutoff-unreachable'];
  return {
    center: scored ? real(fit.center, fit.unit) : null,
    scale: scored && fit.scale > 0 ? real(fit.scale, fit.unit) : null,
    lower: scored ? bound(fit.lower, fit.unit, logScale) : null,
    upper: scored ? bound(fit.upper, fit.unit, logScale) : null,
    flagged,
    fallbacks,
    population,
    maxAttainableZ: n >= 2 ? maxAttainableZ(n) : null,
    chanceRate: chance === null ? null : chance.rate,
    chanceRateAtMost: chance !== null && chance.atMost,
    unreachable,
    withinFloor,
  };
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

const MAX = Number.MAX_VALUE;

/** Per-group fits as typed arrays, so the row pass reads numbers, not objects. */
interface FlatFits {
  /** 1 where the group takes the fast row path: a z fit with unit 1 and scale > 0; FAST_FENCE: a fence fit with unit 1 (`scoreFenceRows`). */
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
  /** Fence fits on the plain unit (`fast` = FAST_FENCE): Q3, highScale, Q1, lowScale of group g at 4g .. 4g + 3. */
  readonly fence: Float64Array;
}

/**
 * Scores every usable row against its group's fit, in row order; returns how many were scored.
 * Fast path (`scoreFastRows`) for the usual z fit, then the general rule (`scoreOtherRows`) for
 * the rest (IQR fences, extreme-magnitude units, no spread). Flags are branch-free (comparison
 * results combined as 0/1 integers and written for every row), since a flag depends on the data
 * and would otherwise be a mispredicted branch.
 */
function scoreRows(
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
  if (reach !== undefined && fits.fast.includes(FAST_FENCE)) {
    count += scoreFenceRows(fits.fence, fits.fast, fits.popOf, groupOf, cutoff, hi, lo, exclusion, y, scores, flagged, population, reach, flaggedPerGroup);
  }
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
    if (exclusion[r] !== 0 || k === KIND_NONE || fast[g] !== 0) continue;
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

function bound(x: number, unit: number, logScale: boolean): number | null {
  if (Number.isNaN(x)) return null;
  const v = x * unit;
  const b = logScale ? Math.exp(v) : v;
  return Number.isFinite(b) ? b : null;
}
