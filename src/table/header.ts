/**
 * Which row of a sheet or delimited file is the header, skipping report titles, export dates and
 * blank lines above it (pure). Rules of thumb (common practice, no source):
 * - a header row holds at least two filled cells (one when the table is one column wide), at least
 *   half of the widest row's count in the first rows;
 * - at least half of its filled cells are text that does not read as a number, and none is a date;
 * - it is about as wide as the row below it (at least 80 % of that row's filled cells), which a
 *   title line ("Claims report", "Exported 2025-04-01") is not.
 * The first row that passes is the header; when none does, the first non-empty row.
 * Cost O(cells in the first `HEADER_SEARCH_ROWS` rows).
 */
import { parseCell } from '../scoring/parseCell.js';
import type { RawCell } from '../scoring/types.js';

/** How many rows from the top are looked at. */
export const HEADER_SEARCH_ROWS = 50;

const filled = (v: RawCell): boolean => !(v === null || v === undefined || (typeof v === 'string' && v.trim() === ''));

interface RowShape {
  readonly count: number;
  readonly texts: number;
  readonly dates: number;
}

function shape(row: readonly RawCell[]): RowShape {
  let count = 0;
  let texts = 0;
  let dates = 0;
  for (const v of row) {
    if (!filled(v)) continue;
    count++;
    if (v instanceof Date) dates++;
    else if (typeof v === 'string' && !parseCell(v).ok) texts++;
  }
  return { count, texts, dates };
}

/**
 * Index (into `rows`) of the header row, or -1 when every row is empty. `rows` are the first rows
 * of the sheet, in order (a row may be sparse or empty).
 */
export function findHeaderRow(rows: readonly (readonly RawCell[])[]): number {
  const n = Math.min(rows.length, HEADER_SEARCH_ROWS);
  const shapes = Array.from({ length: n }, (_, i) => shape(rows[i]));
  const widest = Math.max(0, ...shapes.map((s) => s.count));
  let firstNonEmpty = -1;
  for (let i = 0; i < n; i++) {
    const s = shapes[i];
    if (s.count === 0) continue;
    if (firstNonEmpty < 0) firstNonEmpty = i;
    if (widest === 1) return i;
    if (s.count < 2 || s.count < widest * 0.5) continue;
    if (s.dates > 0 || s.texts < s.count * 0.5) continue;
    let next = i + 1;
    while (next < n && shapes[next].count === 0) next++;
    if (next < n && s.count < shapes[next].count * 0.8) continue;
    return i;
  }
  return firstNonEmpty;
}
