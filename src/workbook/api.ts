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
  /**
   * 0-based data row of the selection when the reviewer selected cells of one claim row inside
   * the table (the follow-up view shows that claim); null otherwise. Optional for older callers.
   */
  readonly selectedRow?: number | null;
}

/** What the reviewer chose; saved in workbook.settings and offered again next period (src/pipeline/settings.ts). */
export type RunSettings = Settings;

/** What the log sheet records about a run besides its settings (the add-in's cutoff field and budget). */
export interface RunRecord {
  /** The reviewer's reason for a cutoff other than the last run's; empty or absent = none given. */
  readonly cutoffReason?: string;
  /** The review budget (claims) that set the cutoff; null or absent = set by hand. */
  readonly budget?: number | null;
}

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

/** One claim row as the sheet shows it, for the follow-up view. */
export interface ClaimRecord {
  /** 0-based data row. */
  readonly row: number;
  /** The reviewer's own columns, in sheet order, as displayed text (dates as formatted). */
  readonly fields: readonly { readonly header: string; readonly text: string }[];
  /** The "why" cell of each value column (as written by the last run). */
  readonly reasons: readonly { readonly valueColumn: string; readonly text: string }[];
}

/** What a selection change means for the follow-up view. */
export interface SelectionFollow {
  /**
   * False when the selection is not in the last run's block (other sheet, other cells, the block
   * moved, or no run yet): the pane should detect the table again.
   */
  readonly inResults: boolean;
  /** 0-based data row when one row of the data is selected; null otherwise. */
  readonly row: number | null;
  /** That row as the sheet shows it (as readClaim gives it); null when `row` is null. */
  readonly claim: ClaimRecord | null;
  /** The follow-up list's entry of the selected row and of each row asked for (null: neither flagged nor marked). */
  readonly rows: readonly { readonly row: number; readonly exception: Exception | null }[];
}

/** Review choices kept in the workbook (asked once): who marks, and which columns the follow-up view shows. */
export interface ReviewPrefs {
  /** Initials or name the reviewer typed; null until asked. Office gives add-ins no user identity without sign-in. */
  readonly reviewer: string | null;
  /** Columns shown beside each claim in the follow-up view; null = our guess. */
  readonly detailColumns: readonly string[] | null;
}

/** Errors the pane shows: the pipeline's one user-facing error type. */
export { TailmarkError } from '../pipeline/errors.js';

export interface WorkbookLayer {
  /** Read the current selection and detect the table around it. */
  detect(): Promise<DetectedTable>;
  /** Read the chosen columns (for previewing cutoffs in the pane without writing). */
  readForPreview(table: DetectedTable, settings: RunSettings): Promise<PreviewData>;
  /** Score and write results, highlights, notes and log. Cancelling via `signal` leaves the workbook unchanged. */
  run(table: DetectedTable, settings: RunSettings, onProgress?: (p: RunProgress) => void, signal?: AbortSignal, record?: RunRecord): Promise<RunSummary>;
  /**
   * Remove everything Tailmark added. `includeNotes` also deletes the notes sheet. `keepMarks`
   * leaves the status and note columns in place as plain cells (no dropdown, no highlighting).
   */
  remove(includeNotes: boolean, keepMarks?: boolean): Promise<void>;
  /**
   * The reviewer's statuses and notes with who saved each last and when (from the log sheet), as
   * rows of text, header first (src/report/marksExport.ts). `toSheet` also copies them to a new
   * sheet, the reviewer's own from then on (runs and remove leave it alone); its name is returned.
   */
  exportMarks(toSheet: boolean): Promise<MarksExport>;
  loadSettings(): Promise<RunSettings | null>;
  listExceptions(): Promise<readonly Exception[]>;
  /** One claim row as displayed, for the follow-up view. */
  readClaim(row: number): Promise<ClaimRecord>;
  loadReviewPrefs(): Promise<ReviewPrefs>;
  saveReviewPrefs(prefs: ReviewPrefs): Promise<void>;
  /**
   * After a selection change in the sheet: the selected claim and the follow-up list's entries
   * of that row and of `refresh` (rows whose marks may have been edited in the sheet). At most 2
   * syncs, cells of those rows only. `inResults: false` means: detect the table again.
   */
  followSelection(refresh: readonly number[]): Promise<SelectionFollow>;
  /** Select the sheet row of a data row. */
  selectRow(row: number): Promise<void>;
  /** Set the status (label) and/or note of data rows. */
  mark(rows: readonly number[], status: string | null, note: string | null): Promise<void>;
  /** Subscribe to selection changes; returns an unsubscribe function. */
  onSelectionChanged(handler: () => void): Promise<() => void>;
}

/** What exportMarks() read (and where it copied it). */
export interface MarksExport {
  /** Header first; every cell text. */
  readonly rows: readonly (readonly string[])[];
  /** The new sheet's name when copied to a sheet, else null. */
  readonly sheet: string | null;
}

/** Raw columns for the pane's live preview (no writes). */
export interface PreviewData {
  readonly valueColumns: readonly { readonly name: string; readonly cells: readonly RawCell[] }[];
  readonly groupColumns: readonly { readonly name: string; readonly cells: readonly RawCell[] }[];
}
