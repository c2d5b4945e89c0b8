/**
 * The reviewer's marks as a list to keep before removing results: one line per claim with a
 * status other than the default or a note, with who saved it last and when (from the log sheet's
 * "Status set" / "Note set" lines, src/report/log.ts). Written as a sheet by the add-in and as CSV
 * text by the pane. Pure.
 */
import { LOG_HEADER } from './log.js';
import type { PlanCell } from './types.js';

export const MARKS_EXPORT_HEADER: readonly string[] = ['Claim', 'Sheet row', 'Status', 'Note', 'Last saved by', 'Last saved (UTC)'];

/** Name of the sheet the add-in copies marks to (a new one each time; it is the reviewer's afterwards). */
export const MARKS_SHEET_PREFIX = 'Tailmark marks';

export interface MarkToKeep {
  /** The claim as the log names it: its ID, or "sheet row N" without an ID column. */
  readonly claim: string;
  /** 1-based sheet row. */
  readonly sheetRow: number;
  readonly status: string;
  readonly note: string;
}

/** Who saved each claim's mark last and when, from log lines (rows of LOG_HEADER cells, oldest first). */
export function lastSavedBy(lines: readonly (readonly PlanCell[])[]): Map<string, { who: string; when: string }> {
  const ev = LOG_HEADER.indexOf('Event');
  const claim = LOG_HEADER.indexOf('Claim');
  const who = LOG_HEADER.indexOf('Who');
  const when = LOG_HEADER.indexOf('When (UTC)');
  const out = new Map<string, { who: string; when: string }>();
  for (const l of lines) {
    if (l[ev] !== 'Status set' && l[ev] !== 'Note set') continue;
    const c = l[claim];
    if (c === null || c === undefined || c === '') continue;
    out.set(String(c), { who: String(l[who] ?? ''), when: String(l[when] ?? '') });
  }
  return out;
}

/** The export's rows (header first), all text. */
export function marksExportGrid(marks: readonly MarkToKeep[], saved: ReadonlyMap<string, { who: string; when: string }>): string[][] {
  return [
    [...MARKS_EXPORT_HEADER],
    ...marks.map((m) => {
      const s = saved.get(m.claim);
      return [m.claim, String(m.sheetRow), m.status, m.note, s?.who ?? '', s?.when ?? ''];
    }),
  ];
}

/**
 * CSV text (RFC 4180: comma, CRLF, fields with a comma, quote or line break quoted, quotes doubled),
 * with a UTF-8 byte-order mark so spreadsheet programs read accents right. A field starting with
 * =, +, - or @ gets a leading apostrophe, so opening the file never turns a note into a formula
 * (OWASP "CSV injection" advice).
 */
export function toCsv(rows: readonly (readonly string[])[]): string {
  const field = (v: string) => {
    const safe = /^[=+\-@]/.test(v) ? `'${v}` : v;
    return /[",\r\n]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
  };
  return '\uFEFF' + rows.map((r) => r.map(field).join(',')).join('\r\n') + '\r\n';
}
