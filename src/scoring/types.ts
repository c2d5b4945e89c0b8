/**
 * Shared types of the scoring engine. Every host (add-in, batch command, sandbox) speaks these.
 *
 * Row results are struct-of-arrays (typed arrays indexed by data row, 0-based, header excluded)
 * so that a 1,048,575-row sheet scores within the memory budget; explanations are produced on
 * demand by `explainRow` rather than stored per row.
 */

/** An error value read from a spreadsheet cell, e.g. `#N/A`, `#VALUE!`, `#DIV/0!`. */
export interface CellError {
  readonly kind: 'error';
  readonly code: string;
}

/** A raw cell as a source hands it over, before parsing. */
export type RawCell = number | string | boolean | Date | CellError | null | undefined;

/** Why a cell did not become a number. Order is stable: the numeric code is the index. */
export const EXCLUSION_REASONS = [
  'blank',
  'error',
  'boolean',
  'date',
  'text',
  'non-finite',
  'not-positive-for-log',
] as const;
export type ExclusionReason = (typeof EXCLUSION_REASONS)[number];

/** Plain-words label of each reason, for notes and summaries. */
export const EXCLUSION_LABELS: Record<ExclusionReason, string> = {
  blank: 'blank cell',
  error: 'error value (e.g. #N/A, #VALUE!)',
  boolean: 'TRUE/FALSE instead of an amount',
  date: 'a date, not an amount',
  text: 'text that is not a number',
  'non-finite': 'not a finite number (NaN or infinity)',
  'not-positive-for-log': 'zero or negative amount (log scale needs amounts above 0)',
};

export type ParseResult =
  | { readonly ok: true; readonly value: number }
  | { readonly ok: false; readonly reason: ExclusionReason };

export interface ParseOptions {
  /** Treat `,` as the decimal separator and `.`/space as thousands separators ("1.234,50"). */
  readonly decimalComma?: boolean;
}

/** How a column's decimal separator is chosen: decided from the column's cells ('auto'), or given. */
export const DECIMAL_MODES = ['auto', 'comma', 'point'] as const;
export type DecimalMode = (typeof DECIMAL_MODES)[number];

/** The decimal separator a column was read with, and why (see `inferDecimal`). */
export interface DecimalReading {
  readonly separator: 'comma' | 'point';
  /** 'given' by the user, 'inferred' from the cells, or the 'default' (point) when no cell said. */
  readonly how: 'given' | 'inferred' | 'default';
  /** Text cells that read only with a decimal comma ("12,5", "1.480,00"). */
  readonly commaCells: number;
  /** Text cells that read only with a decimal point ("12.50", "1,480.00"). */
  readonly pointCells: number;
  /** Text cells that read either way ("1.480"); they follow the decision. */
  readonly ambiguousCells: number;
  /** First cell that supports the decision, the first that goes against it, the first ambiguous one. */
  readonly example: string | null;
  readonly otherExample: string | null;
  readonly ambiguousExample: string | null;
}

/** Every scoring method; hosts (CLI options, saved settings, the pane) take the list from here. */
export const METHOD_IDS = ['robust', 'classic', 'iqr', 'adjusted', 'skew'] as const;
export type MethodId = (typeof METHOD_IDS)[number];
export const DIRECTIONS = ['high', 'low', 'both'] as const;
export type Direction = (typeof DIRECTIONS)[number];
/** What happens to groups smaller than `minGroupSize`: score against the whole column, or leave unscored. */
export const SMALL_GROUP_POLICIES = ['pool', 'skip'] as const;
export type SmallGroupPolicy = (typeof SMALL_GROUP_POLICIES)[number];

export interface ScoreOptions {
  readonly method: MethodId;
  /** Cutoff on the method's score; defaults per method (robust 3.5, classic 3, IQR and adjusted k = 1.5). */
  readonly cutoff?: number;
  readonly direction: Direction;
  /** Score ln(x) instead of x; amounts <= 0 are excluded with reason `not-positive-for-log`. */
  readonly logScale: boolean;
  readonly minGroupSize: number;
  readonly smallGroups: SmallGroupPolicy;
  /** Older form of `decimal: 'comma'`; when true it wins over `decimal`. */
  readonly decimalComma?: boolean;
  /** Decimal separator of text cells, per value column; default 'auto' (decided from each column's cells). */
  readonly decimal?: DecimalMode;
}

export const DEFAULT_OPTIONS: Omit<ScoreOptions, 'method'> & { method: MethodId } = {
  method: 'skew',
  direction: 'both',
  logScale: false,
  minGroupSize: 8,
  smallGroups: 'pool',
  decimalComma: false,
  decimal: 'auto',
};

/** Which population a row was compared with. Numeric code = index. */
export const POPULATIONS = ['none', 'group', 'column'] as const;
export type Population = (typeof POPULATIONS)[number];

/** A fallback the engine had to take for a group, reported per group. */
export type Fallback =
  /** MAD was 0; the scale is 1.2533 x mean absolute deviation around the median. */
  | 'mad-zero-used-meanad'
  /** MAD and mean absolute deviation were both 0: every value equals the centre, nothing flagged. */
  | 'no-spread'
  /** SD was 0 (classic): nothing flagged. */
  | 'sd-zero'
  /** IQR was 0; what that means is worded once, in FALLBACK_WORDS (src/scoring/fallbacks.ts). */
  | 'iqr-zero'
  /** Group smaller than the minimum size: compared with the whole column. */
  | 'small-pooled'
  /** Group smaller than the minimum size: left unscored. */
  | 'small-skipped'
  /** No score can reach the cutoff in a population of this size, whatever the amounts (`maxReach.ts`; classic z: (n-1)/sqrt(n) <= cutoff, Shiffler 1988). */
  | 'cutoff-unreachable';

/**
 * How one population (a group, or the whole column) was scored. NaN never appears: undefined
 * figures are null. Its descriptive statistics (median, MAD, mean, SD, quartiles, medcouple) are
 * `describeColumn` (describe.ts), computed when a host asks for them.
 */
export interface GroupStats {
  /** Stable key: key column values joined by U+001F after trimming. */
  readonly key: string;
  /** What a reviewer reads, e.g. "CC-410 / Travel"; blank keys show as "(blank)". */
  readonly label: string;
  /** Key column values after trimming, one per group column. */
  readonly keyParts: readonly string[];
  /** Rows in the group (scored or excluded). */
  readonly rows: number;
  /** Numeric values used (after exclusions). */
  readonly n: number;
  readonly excluded: Readonly<Record<ExclusionReason, number>>;
  /**
   * The medcouple the method scored this group's own values with (adjusted, skew: of the scoring
   * values, ln amounts on log scale); null when the method used none or the group was not scored on
   * its own. Every group's medcouple, whatever the method, is in `describeColumn`.
   */
  readonly medcouple: number | null;
  /**
   * Fence methods: the quartiles the fences are measured from (IQR: Q1 and Q3, type 7; adjusted
   * and skew: Tukey's hinges), on the scoring scale like `center`; null for the z methods.
   */
  readonly fenceFrom: { readonly low: number | null; readonly high: number | null } | null;
  /** Centre and scale the method used (median and scaled MAD / mean and SD / Q1..Q3 with IQR). On the log scale if logScale. */
  readonly center: number | null;
  readonly scale: number | null;
  /** Values outside [lower, upper] are flagged (in the original units, even on log scale). null = no bound that side. */
  readonly lower: number | null;
  readonly upper: number | null;
  readonly flagged: number;
  readonly fallbacks: readonly Fallback[];
  /** Which population this group's rows were scored against. */
  readonly population: Population;
  /** Largest |classic z| attainable in a sample of n, (n - 1)/sqrt(n); null when n < 2. */
  readonly maxAttainableZ: number | null;
  /**
   * Share of claims expected to be flagged by chance in the population this group was scored
   * against, at its size, under the method, cutoff and direction used, for normally (log scale:
   * log-normally) distributed amounts: from a seeded simulation of the engine (`chanceRate.ts`).
   * null when not scored.
   */
  readonly chanceRate: number | null;
  /** true when `chanceRate` is only an upper bound (the simulation saw no chance flag). */
  readonly chanceRateAtMost: boolean;
  /** No claim of this group can reach the cutoff, whatever the amounts (`maxReach.ts`); also listed as 'cutoff-unreachable'. */
  readonly unreachable: boolean;
}

/**
 * Results for one value column. Arrays are indexed by data row (0-based).
 *
 * The typed arrays (`values`, `scores`, `flagged`, `exclusion`, `groupOf`, `population`,
 * `fenceMultiple`) are owned by the result: callers must not mutate them (copy first, e.g.
 * `Float64Array.from(col.scores)`), because `pooled` (computed on first read) and
 * `describeColumn` read `values`, `exclusion` and `groupOf`.
 */
export interface ColumnScores {
  readonly column: string;
  readonly method: MethodId;
  readonly cutoff: number;
  readonly direction: Direction;
  readonly logScale: boolean;
  /** Parsed value (NaN where excluded). */
  readonly values: Float64Array;
  /** Score (NaN where not scored). Hosts must turn NaN into an empty cell / null. */
  readonly scores: Float64Array;
  /** 1 where flagged. */
  readonly flagged: Uint8Array;
  /** 0 = not excluded; otherwise 1 + index into EXCLUSION_REASONS. */
  readonly exclusion: Uint8Array;
  /** Index into `groups` for every row. */
  readonly groupOf: Int32Array;
  /** Index into POPULATIONS per row. */
  readonly population: Uint8Array;
  readonly groups: readonly GroupStats[];
  /** The whole column as one population (used for pooled small groups). */
  readonly pooled: GroupStats;
  readonly excludedCounts: Readonly<Record<ExclusionReason, number>>;
  readonly scoredRows: number;
  readonly flaggedRows: number;
  /**
   * IQR method only (added, optional): per row, the largest k at which the row would still be
   * flagged in the column's direction, i.e. (y - Q3)/IQR above, (Q1 - y)/IQR below (the larger for
   * 'both'); NaN where not scored. Lets `countFlaggedAt` / `cutoffForBudget` work for IQR without a re-run.
   */
  readonly fenceMultiple?: Float64Array;
  /** The decimal separator the column's text cells were read with, and why. */
  readonly decimal: DecimalReading;
}

/** Input to the engine: a table of raw cells, by column. */
export interface ScoreInput {
  /** One array of raw cells per value column, all the same length (number of data rows). */
  readonly valueColumns: readonly { readonly name: string; readonly cells: ArrayLike<RawCell> }[];
  /** Zero or more key columns (e.g. cost centre, category), same length. */
  readonly groupColumns: readonly { readonly name: string; readonly cells: ArrayLike<RawCell> }[];
}

export interface ScoreResult {
  readonly options: Required<ScoreOptions>;
  readonly rowCount: number;
  readonly groupColumns: readonly string[];
  readonly columns: readonly ColumnScores[];
}

/**
 * What every source (Excel selection, .xlsx/.csv file, sandbox workbook) yields: header names and
 * raw cells by column, plus where the data sits on its sheet so results can be written beside it.
 */
export interface SourceTable {
  /** Human description of the source, e.g. "claims.xlsx, sheet Claims, A1:H5001". */
  readonly source: string;
  readonly sheetName: string;
  readonly headers: readonly string[];
  /** Column-major raw cells: columns[c][r] is data row r (0-based, header excluded) of column c. */
  readonly columns: readonly (readonly RawCell[])[];
  readonly rowCount: number;
  /** 1-based sheet row of the header row. Data row r sits on sheet row headerRow + 1 + r. */
  readonly headerRow: number;
  /** 0-based sheet column index of the first column of the table. */
  readonly firstColumn: number;
}
