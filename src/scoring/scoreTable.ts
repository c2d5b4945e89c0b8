import { getMethod } from './methods/index.js';
import type { Fit, ScoringMethod } from './methods/method.js';
import { groupRows, type Grouping } from './groups.js';
import { inferDecimal } from './inferDecimal.js';
import { summarizeFor } from './summarizeFor.js';
import type { Summary } from './summary.js';
import { accumulate, gatherColumn, NREASONS, parseAndAccumulate, parseAndScatter, parseColumn, reasonCounts, scatter, tallyCounts } from './parseColumn.js';
import { classicInRowOrder } from './classicRowOrder.js';
import { dedupe, fitGroups, POP_COLUMN } from './fitGroups.js';
import { scoreRows, type FlatFits } from './scoreRows.js';
import { buildGroups, groupStats, sumOf } from './groupStats.js';
import {
  type ColumnScores,
  type DecimalMode,
  DEFAULT_OPTIONS,
  type Fallback,
  type GroupStats,
  type RawCell,
  type ScoreInput,
  type ScoreOptions,
  type ScoreResult,
} from './types.js';

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
  if (!(cutoff >= 0) || !Number.isFinite(cutoff) || !(minGroupSize >= 1) || !['high', 'low', 'both'].includes(merged.direction) || !['pool', 'skip'].includes(merged.smallGroups)) {
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
 * The descriptive statistics of the groups (median, MAD, mean, SD, quartiles, medcouple, in the
 * amounts' own units) are not computed here: `describeColumn` (describe.ts) computes them when a
 * host asks (the plan does, for the notes sheet and --json). `ColumnScores.pooled` (the whole
 * column as one population) is built on first read, unless scoring needed it (a pooled small
 * group, or an IQR group borrowing the column's IQR), in which case its fit is computed while
 * scoring. A read never changes a score or flag.
 *
 * Files: parsing and group order `parseColumn.ts`, classic's row-order sums `classicRowOrder.ts`,
 * the fits `fitGroups.ts`, the row pass `scoreRows.ts`, the per-group results `groupStats.ts`.
 *
 * Cost: O(rows x (key columns + value columns)) expected time; memory about 27 bytes per row per
 * value column (8 more on log scale), plus 4 bytes per row of grouping.
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
  // (`classicInRowOrder`), with no group-ordered copy.
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
    //    scatter in one pass. The fits select in place there (destroying it); `describeColumn`
    //    builds its own copy from the column's results.
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
  // The whole column's fit: computed while scoring when a group needs it, else on the first read
  // of `pooled`; from the column's usable values (ln on log scale: the same values scored), group
  // by group.
  let colFit: { s: Summary; fit: Fit } | null = null;
  const column = (): { s: Summary; fit: Fit } => {
    if (colFit !== null) return colFit;
    const all = gatherColumn(values, exclusion, groupOf, count, logScale);
    const s = summarizeFor(method.id, all, 0, nAll, all);
    colFit = { s, fit: method.fit(s, opts.cutoff, opts.direction, () => s) };
    return colFit;
  };

  // 3. Fit each group on what its method needs.
  const fits: Fit[] = new Array<Fit>(nGroups);
  const scoringSummaries: (Summary | null)[] = new Array<Summary | null>(nGroups);
  const groupFallbacks: Fallback[][] = new Array<Fallback[]>(nGroups);
  const flat: FlatFits = {
    fast: new Uint8Array(nGroups), cs: new Float64Array(2 * nGroups), kind: new Uint8Array(nGroups), popOf: new Uint8Array(nGroups),
    unit: new Float64Array(nGroups), center: new Float64Array(nGroups), scale: new Float64Array(nGroups), q1: new Float64Array(nGroups), q3: new Float64Array(nGroups),
    lowScale: new Float64Array(nGroups), highScale: new Float64Array(nGroups),
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

  // 5. Per-group results.
  const groups = buildGroups(grouping, count, gCounts, fits, scoringSummaries, logScale, flaggedPerGroup, groupFallbacks, popOf, opts, nAll);
  const flaggedRows = sumOf(flaggedPerGroup, popOf, -1);
  const pooledFlagged = sumOf(flaggedPerGroup, popOf, POP_COLUMN);

  // The whole column as one population, built on first read (its fit is computed then if scoring
  // did not need it).
  let pooled: GroupStats | null = null;
  const pooledStats = (): GroupStats => {
    if (pooled !== null) return pooled;
    const whole = column();
    pooled = groupStats(
      { key: '', label: WHOLE_COLUMN_LABEL, keyParts: [], rows: rowCount, n: nAll, excluded: reasonCounts(colCounts, 0) },
      whole.fit, whole.s, logScale, pooledFlagged, dedupe(whole.fit.fallbacks), whole.fit.kind === 'none' ? 'none' : 'column', opts, nAll,
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
  return col as unknown as ColumnScores;
}
