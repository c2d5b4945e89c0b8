/**
 * The plan: what a run writes into a workbook, decided once and applied by every sink
 * (Office.js writer, xlsx writer, JSON). Pure data; sinks only translate it.
 */

import type { ScoreResult, SourceTable } from '../scoring/types.js';
import type { ColumnDescription } from '../scoring/describe.js';
/** A cell value a sink writes. Strings are always written as text (never as formulas). */
export type PlanCell = string | number | boolean | null;

export type PlanColumnKind = 'score' | 'flag' | 'reason' | 'status' | 'note';

export interface PlanColumn {
  /** Header text, our own naming, e.g. "Amount · tail score". */
  readonly header: string;
  readonly kind: PlanColumnKind;
  /** Which value column this result belongs to (null for status/note, which are per claim). */
  readonly valueColumn: string | null;
  /**
   * One entry per data row. For `status` and `note` the plan holds the default for new rows
   * (status for flagged rows without a mark, empty otherwise); sinks keep existing marks.
   */
  readonly values: readonly PlanCell[];
  /** Excel number format for the column, e.g. "0.00". */
  readonly numberFormat?: string;
  /** Suggested width in characters. */
  readonly width?: number;
}

/** Review statuses: the dropdown in the status column. Our own words. */
export interface ReviewStatus {
  readonly id: 'open' | 'asked' | 'cleared' | 'escalated';
  readonly label: string;
  /** Plain description shown in the pane and the notes sheet. */
  readonly meaning: string;
}

/** A fill + font pair in our own palette (hex, no '#'). */
export interface Swatch {
  readonly fill: string;
  readonly font: string;
}

/**
 * A conditional-format rule, expressed against column roles; sinks resolve roles to
 * column letters with `ruleFormula` (src/report) so every sink writes the same formula.
 */
export interface HighlightRule {
  /** Our marker: every formula we write contains this text, which is how we recognise our rules. */
  readonly id: string;
  readonly state: 'open' | 'asked' | 'cleared' | 'escalated';
  readonly swatch: Swatch;
  /** Which status labels trigger it (open also triggers on empty status for a flagged row). */
  readonly statusLabels: readonly string[];
  /** Rules apply to the data rows across data columns and our columns. */
  readonly priority: number;
}

export interface NotesSection {
  readonly title: string;
  /** Rows of cells; the first row of a table section is its header row. */
  readonly rows: readonly (readonly PlanCell[])[];
  /** True when `rows[0]` is a table header. */
  readonly table?: boolean;
}

export interface NotesSheet {
  readonly name: string;
  readonly sections: readonly NotesSection[];
}

export interface RunLogEntry {
  readonly when: string;
  readonly source: string;
  readonly method: string;
  readonly cutoff: number;
  readonly rowsScored: number;
  readonly flagged: number;
  /** The method's default cutoff (a first run's "previous cutoff" in the log). */
  readonly defaultCutoff: number;
}

export interface Plan {
  readonly columns: readonly PlanColumn[];
  readonly statuses: readonly ReviewStatus[];
  readonly rules: readonly HighlightRule[];
  readonly notes: NotesSheet;
  readonly log: RunLogEntry;
  /** The caution shown wherever results are shown. */
  readonly caution: string;
  /** What the plan was made from, for sinks that report the numbers themselves (JSON). */
  readonly result: ScoreResult;
  /** The descriptive statistics of each value column's groups and whole column (`describeColumn`), in the order of `result.columns`. */
  readonly descriptions: readonly ColumnDescription[];
  readonly table: SourceTable;
  readonly idColumn: string | null;
}
