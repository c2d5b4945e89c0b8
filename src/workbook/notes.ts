/**
 * The notes sheet (rewritten in place each run) and the run-log sheet (one row appended per run).
 * Both carry a marker in A1 so we recognise them as ours; a sheet of that name without the marker
 * is the user's and is never touched (TailmarkError 'name-clash').
 */
import { PALETTE, type NotesSheet, type PlanCell } from '../report/index.js';

export { LOG_HEADER, LOG_MARKER, LOG_SHEET_NAME, LOG_TITLE, isLogMarker } from '../report/index.js';
export const NOTES_MARKER = 'tm:notes:v1';
export const NOTES_TITLE = `Tailmark notes (${NOTES_MARKER}) · rewritten on every run; keep your own notes on another sheet.`;

export function isNotesMarker(v: unknown): boolean {
  return typeof v === 'string' && v.includes(NOTES_MARKER);
}

export interface NotesGrid {
  /** Rows padded to `width`. */
  readonly rows: PlanCell[][];
  readonly width: number;
  /** Rows (0-based) that are section titles. */
  readonly titleRows: readonly number[];
  /** Rows that are table headers. */
  readonly headerRows: readonly number[];
}

export function notesGrid(notes: NotesSheet, caution: string): NotesGrid {
  const rows: PlanCell[][] = [[NOTES_TITLE], [caution], []];
  const titleRows: number[] = [];
  const headerRows: number[] = [];
  for (const s of notes.sections) {
    titleRows.push(rows.length);
    rows.push([s.title]);
    s.rows.forEach((r, i) => {
      if (s.table && i === 0) headerRows.push(rows.length);
      rows.push([...r]);
    });
    rows.push([]);
  }
  const width = Math.max(1, ...rows.map((r) => r.length));
  for (const r of rows) while (r.length < width) r.push(null);
  return { rows, width, titleRows, headerRows };
}


/** A cell for Range.values: null stays empty (""), text is written under the text format "@". */
export function toCellValue(v: PlanCell): string | number | boolean {
  if (v === null) return '';
  if (typeof v === 'number' && !Number.isFinite(v)) return '';
  return v;
}

/** Number format per cell: text format for strings, so "=x" stays text. */
export function formatFor(v: PlanCell, numeric = 'General'): string {
  return typeof v === 'string' ? '@' : numeric;
}

export const TITLE_SWATCH = PALETTE.title;
export const HEADER_SWATCH = PALETTE.header;
