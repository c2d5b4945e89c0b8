/**
 * The contract between the task pane and the workbook layer. The pane receives an object of this
 * shape (backed by real Excel, or by the sandbox in tests and the preview page) and never calls
 * Office.js itself.
 */
import type { RawCell } from '../scoring/types.js';
import type { Settings } from '../pipeline/settings.js';

export type ColumnGuess = 'amount' | 'key' | 'id' | 'date' | 'text' | 'empty';

export interface DetectedColumn {
  /** 0-based index within the detected range. */
  readonly index: number;
  readonly header: string;
  readonly guess: ColumnGuess;
  /** Share of non-blank cells that parse as numbers, 0..1. */
  readonly numericShare: number;
  /** Distinct non-blank values (capped count is fine). */
  readonly distinct: number;
}

export interface DetectedTable {
  readonly sheetName: string;
  /** A1 address of the whole range including header, e.g. "Claims!A1:H5001". */
  readonly address: string;
  /** Excel table name when the data is an Excel table. */
  readonly tableName: string | null;
  /** Number of data rows (header excluded). */
  readonly rowCount: number;
  readonly columns: readonly DetectedColumn[];
  /** True when our result columns are already present (a previous run). */
  readonly hasResults: boolean;
}

/** What the reviewer chose; saved in workbook.settings and offered again next period (src/pipeline/settings.ts). */
export type RunSettings = Settings;

export interface RunProgress {
  readonly phase: 'reading' | 'scoring' | 'writing' | 'highlighting' | 'notes';
  /** 0..1 */
  readonly fraction: number;
}

export interface GroupSummary {
  readonly label: string;
  readonly n: number;
  readonly flagged: number;
  readonly cutoffUnreachable: boolean;
  readonly fallbacks: readonly string[];
}

export interface RunSummary {
  readonly rowsScored: number;
  readonly flagged: number;
  readonly groups: readonly GroupSummary[];
  /** Excluded cells by reason label. */
  readonly excluded: readonly { readonly reason: string; readonly count: number }[];
  readonly notesSheet: string;
  readonly syncs: number;
}

export interface Exception {
  /** 0-based data row. */
  readonly row: number;
  readonly claimId: string | null;
  readonly group: string;
  readonly value: number | null;
  readonly score: number | null;
  readonly status: string;
  readonly note: string;
}

/** Errors the pane shows: the pipeline's one user-facing error type. */
export { TailmarkError } from '../pipeline/errors.js';

export interface WorkbookLayer {
  /** Read the current selection and detect the table around it. */
  detect(): Promise<DetectedTable>;
  /** Read the chosen columns (for previewing cutoffs in the pane without writing). */
  readForPreview(table: DetectedTable, settings: RunSettings): Promise<PreviewData>;
  /** Score and write results, highlights, notes and log. Cancelling via `signal` leaves the workbook unchanged. */
  run(table: DetectedTable, settings: RunSettings, onProgress?: (p: RunProgress) => void, signal?: AbortSignal): Promise<RunSummary>;
  /** Remove everything Tailmark added. `includeNotes` also deletes the notes sheet. */
  remove(includeNotes: boolean): Promise<void>;
  loadSettings(): Promise<RunSettings | null>;
  listExceptions(): Promise<readonly Exception[]>;
  /** Select the sheet row of a data row. */
  selectRow(row: number): Promise<void>;
  /** Set the status (label) and/or note of data rows. */
  mark(rows: readonly number[], status: string | null, note: string | null): Promise<void>;
  /** Subscribe to selection changes; returns an unsubscribe function. */
  onSelectionChanged(handler: () => void): Promise<() => void>;
}

/** Raw columns for the pane's live preview (no writes). */
export interface PreviewData {
  readonly valueColumns: readonly { readonly name: string; readonly cells: readonly RawCell[] }[];
  readonly groupColumns: readonly { readonly name: string; readonly cells: readonly RawCell[] }[];
}
