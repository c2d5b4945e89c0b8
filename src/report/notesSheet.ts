/**
 * One workbook format, whatever host writes it: the notes sheet's layout and the line that says
 * "made by Tailmark" with the format's version. The Office.js writer (src/workbook) and both xlsx
 * writers (src/files) lay the notes out with `notesGrid` and recognise an earlier run's sheet with
 * `notesFormatOf`, so either host re-scores the other's workbook in place.
 *
 * Where the marker lives: cell A1 of the notes sheet (and of the add-in's run log) starts with
 * "Tailmark notes · workbook format N". It reads as a plain title, and code reads N from it; no
 * internal token is shown. Earlier forms are still recognised (the add-in's "(tm:notes:v1)" title
 * and the batch command's first section title), so workbooks from before keep being updated in place.
 */
import type { NotesSection, NotesSheet, PlanCell } from './types.js';

/** Bump when the layout of our columns or notes changes in a way an older reader would misread. */
export const WORKBOOK_FORMAT = 1;

const NOTES_PREFIX = 'Tailmark notes · workbook format ';
const LOG_PREFIX = 'Tailmark run log · workbook format ';

export const NOTES_TITLE = `${NOTES_PREFIX}${WORKBOOK_FORMAT} · rewritten on every run; keep your own notes on another sheet.`;
export const LOG_TITLE = `${LOG_PREFIX}${WORKBOOK_FORMAT} · one line per run, cutoff change and saved status or note, newest last; lines are never rewritten.`;

/** Earlier forms of A1 that also mean "ours" (format 1 in all but name). */
const LEGACY_NOTES = [/\(tm:notes:v1\)/, /^What was done$/];
const LEGACY_LOG = [/\(tm:log:v1\)/];

function formatOf(a1: unknown, prefix: string, legacy: readonly RegExp[]): number | null {
  if (typeof a1 !== 'string') return null;
  if (a1.startsWith(prefix)) {
    const n = Number.parseInt(a1.slice(prefix.length), 10);
    return Number.isInteger(n) && n >= 1 ? n : null;
  }
  return legacy.some((re) => re.test(a1)) ? 1 : null;
}

/** The workbook format of a notes sheet whose A1 holds `a1`, or null when the sheet is not ours. */
export function notesFormatOf(a1: unknown): number | null {
  return formatOf(a1, NOTES_PREFIX, LEGACY_NOTES);
}

/** The workbook format of a run-log sheet whose A1 holds `a1`, or null when the sheet is not ours. */
export function logFormatOf(a1: unknown): number | null {
  return formatOf(a1, LOG_PREFIX, LEGACY_LOG);
}

export interface NotesGrid {
  /** Rows padded to `width`; row 0 is the title (the marker), row 1 the caution. */
  readonly rows: PlanCell[][];
  readonly width: number;
  /** Rows (0-based) that are section titles. */
  readonly titleRows: readonly number[];
  /** Rows that are table headers. */
  readonly headerRows: readonly number[];
}

/** The notes sheet as a grid: title, caution, then each section (title, rows, a blank row). */
export function notesGrid(notes: NotesSheet, caution: string, extra: readonly NotesSection[] = []): NotesGrid {
  const rows: PlanCell[][] = [[NOTES_TITLE], [caution], []];
  const titleRows: number[] = [];
  const headerRows: number[] = [];
  for (const s of [...notes.sections, ...extra]) {
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
