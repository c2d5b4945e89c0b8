/**
 * Merged cells in a peer-group (key) column (issue 12): a report layout merges a label over the
 * rows it applies to, and every cell of the area but the first reads as blank. The reviewer sees
 * one label spanning those rows, so that is what it means: each row an area covers takes the
 * area's value. Both hosts fill the same way and say so in the notes ("Reading the input").
 */
import type { RawCell } from '../scoring/types.js';

/** A merged area over data rows `from` .. `to` (0-based, inclusive) of table column `col`. */
export interface MergedArea {
  readonly col: number;
  readonly from: number;
  readonly to: number;
  /** As the sheet names it, e.g. "C2:C41". */
  readonly ref: string;
}

/**
 * Fill the blank cells of each merged area in the key columns `keyColumns` with the area's first
 * cell (in place; the caller's table is its own read of the source). Returns one notes line per
 * column that had merged areas.
 */
export function fillMergedKeys(headers: readonly string[], columns: RawCell[][], areas: readonly MergedArea[], keyColumns: readonly number[]): string[] {
  const notes: string[] = [];
  for (const g of keyColumns) {
    const spans = areas.filter((m) => m.col === g && m.to > m.from);
    if (spans.length === 0) continue;
    const cells = columns[g];
    let filled = 0;
    for (const m of spans) {
      const v = cells[m.from];
      for (let r = m.from + 1; r <= m.to && r < cells.length; r++) {
        if (cells[r] === null || cells[r] === undefined || cells[r] === '') {
          cells[r] = v;
          filled++;
        }
      }
    }
    const refs = spans.slice(0, 5).map((m) => m.ref).join(', ') + (spans.length > 5 ? ', ...' : '');
    notes.push(`${headers[g]}: ${filled} cell${filled === 1 ? '' : 's'} in ${spans.length} merged area${spans.length === 1 ? '' : 's'} (${refs}) took the merged value, so every row of an area is in the group its label names`);
  }
  return notes;
}

/** The notes line when the host cannot report merged areas (the key columns were read as they are). */
export function mergedUncheckedNote(headers: readonly string[], why: string): string {
  return `${headers.join(', ')}: merged cells could not be checked (${why}); a label merged over several rows counts for its first row only, the others read as blank`;
}
