import type { RawCell } from './types.js';

/** Label of a blank key part. */
export const BLANK_KEY_LABEL = '(blank)';
/** Label of the single group formed when there are no key columns. */
export const ALL_ROWS_LABEL = '(all rows)';
/** Separator of key parts in `GroupStats.key` (ASCII unit separator, never typed in a cell). */
export const KEY_SEPARATOR = '\u001f';
/** Separator of key parts in a group label. */
export const LABEL_SEPARATOR = ' / ';

/** The rows of a table assigned to groups, computed once per table and shared by all value columns. */
export interface Grouping {
  /** Group index of every row. */
  readonly groupOf: Int32Array;
  readonly keys: readonly string[];
  readonly labels: readonly string[];
  readonly keyParts: readonly (readonly string[])[];
  /**
   * Counting-sort offsets: group g owns positions start[g] .. start[g+1]-1 of any group-ordered
   * buffer (start[g+1] - start[g] = rows in group g). Length = groups + 1.
   */
  readonly start: Int32Array;
}

/**
 * The key text of one cell: strings trimmed, numbers via String(), booleans TRUE/FALSE, Dates as
 * ISO date (YYYY-MM-DD, UTC), error cells as their code; blank -> '' (labelled "(blank)").
 */
export function keyPart(cell: RawCell): string {
  if (cell === null || cell === undefined) return '';
  if (typeof cell === 'string') return cell.trim();
  if (typeof cell === 'number') return String(cell);
  if (typeof cell === 'boolean') return cell ? 'TRUE' : 'FALSE';
  if (cell instanceof Date) return Number.isNaN(cell.getTime()) ? '(invalid date)' : cell.toISOString().slice(0, 10);
  if (typeof cell === 'object' && typeof (cell as { code?: unknown }).code === 'string') return (cell as { code: string }).code;
  return String(cell);
}

/**
 * Assigns every row to a group. Zero key columns: one group "(all rows)" (key ''). Otherwise the
 * key is the trimmed key parts joined by U+001F and the label the parts joined by " / ", blank
 * parts shown as "(blank)". Groups are numbered in order of first appearance.
 *
 * Cost: O(rows x key columns) with one Map lookup per row (one key column: a lookup on the raw
 * cell), plus an O(rows) count of group sizes.
 */
export function groupRows(groupColumns: readonly { readonly cells: ArrayLike<RawCell> }[], rowCount: number): Grouping {
  const groupOf = new Int32Array(rowCount);
  const keys: string[] = [];
  const labels: string[] = [];
  const keyParts: string[][] = [];
  const addGroup = (key: string, parts: string[]): number => {
    keys.push(key);
    keyParts.push(parts);
    labels.push(parts.map((p) => (p === '' ? BLANK_KEY_LABEL : p)).join(LABEL_SEPARATOR));
    return keys.length - 1;
  };
  if (groupColumns.length === 0) {
    addGroup('', []);
    labels[0] = ALL_ROWS_LABEL;
  } else if (groupColumns.length === 1) {
    // One key column: a first-level Map on the raw cell itself (strings and numbers compare by
    // value in a Map), so each distinct cell is trimmed and formatted once, not once per row.
    const cells = groupColumns[0].cells;
    const byCell = new Map<RawCell, number>();
    const byKey = new Map<string, number>();
    for (let r = 0; r < rowCount; r++) {
      const cell = cells[r];
      let g = byCell.get(cell);
      if (g === undefined) {
        const key = keyPart(cell);
        g = byKey.get(key);
        if (g === undefined) {
          g = addGroup(key, [key]);
          byKey.set(key, g);
        }
        // Objects (Dates, error cells) compare by identity in a Map: do not cache them.
        if (typeof cell !== 'object' || cell === null) byCell.set(cell, g);
      }
      groupOf[r] = g;
    }
  } else {
    const byKey = new Map<string, number>();
    const ncol = groupColumns.length;
    const parts: string[] = new Array(ncol);
    for (let r = 0; r < rowCount; r++) {
      let key = '';
      for (let c = 0; c < ncol; c++) {
        const part = keyPart(groupColumns[c].cells[r]);
        parts[c] = part;
        key = c === 0 ? part : key + KEY_SEPARATOR + part;
      }
      let g = byKey.get(key);
      if (g === undefined) {
        g = addGroup(key, parts.slice());
        byKey.set(key, g);
      }
      groupOf[r] = g;
    }
  }
  const nGroups = keys.length;
  const start = new Int32Array(nGroups + 1);
  for (let r = 0; r < rowCount; r++) start[groupOf[r] + 1]++;
  for (let g = 0; g < nGroups; g++) start[g + 1] += start[g];
  return { groupOf, keys, labels, keyParts, start };
}
