/**
 * The notes sheet (rewritten in place each run) and the run-log sheet (one row appended per run).
 * Both say in A1 that they are ours and which workbook format they follow (src/report/notesSheet.ts,
 * shared with the batch command); a sheet of that name without it is the user's and is never
 * touched (TailmarkError 'name-clash').
 */
import { PALETTE, notesFormatOf, type PlanCell } from '../report/index.js';

export { LOG_HEADER, LOG_SHEET_NAME, LOG_TITLE, isLogMarker, notesGrid, type NotesGrid } from '../report/index.js';

/** True when A1 of a notes sheet says it is ours (any host, any format version; src/report/notesSheet.ts). */
export function isNotesMarker(v: unknown): boolean {
  return notesFormatOf(v) !== null;
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
