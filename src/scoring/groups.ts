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
 * The key text of one cell: strings trimmed and in Unicode normalization form NFC (so "é" typed as
 * one code point and as "e" + combining accent are one group), numbers via String(), booleans TRUE/FALSE, Dates as
 * ISO date (YYYY-MM-DD, UTC), error cells as their code; blank -> '' (labelled "(blank)").
 */
export function keyPart(cell: RawCell): string {
  if (cell === null || cell === undefined) return '';
  if (typeof cell === 'string') return cell.trim().normalize('NFC');
  if (typeof cell === 'number') return String(cell);
  if (typeof cell === 'boolean') return cell ? 'TRUE' : 'FALSE';
  if (cell instanceof Date) return Number.isNaN(cell.getTime()) ? '(invalid date)' : cell.toISOString().slice(0, 10);
  if (typeof cell === 'object' && typeof (cell as { code?: unknown }).code === 'string') return (cell as { code: string }).code;
  return String(cell);
}

/** A value no cell can hold: the "no previous cell" marker of the last-key cache. */
const NO_CELL: unique symbol = Symbol('no cell');

/**
 * Codes one key column: `out[r]` = index into `parts` (filled here with the distinct key parts,
 * trimmed text, see `keyPart`), numbered in order of first appearance.
 *
 * Fast paths, none allocating per row: a last-cell cache (sorted sheets repeat the previous key;
 * used when the first rows show runs of equal keys);
 * text cells are looked up by the raw string in a prototype-free object used as a dictionary
 * (about 2.5x faster than a Map on string keys in V8), so each distinct text is trimmed once;
 * numbers, booleans and blanks in a Map on the raw value; Dates and error cells (objects, which a
 * Map would compare by identity) through `keyPart`. Two cells share a code exactly when their key
 * parts are equal ("A", " A" and "A "; the number 1 and the text "1"). With `count`, returns
 * the rows per code (group sizes, without a second pass; may be longer than `parts`, the rest 0).
 * Hot loops here and below end in plain returns: code after a long loop that the optimizing
 * compiler has no type feedback for makes it deoptimize on every early call.
 * Cost O(rows) expected.
 */
function codeKeyColumn(cells: ArrayLike<RawCell>, rowCount: number, out: Int32Array, parts: string[], count: boolean): Int32Array {
  let counts: Int32Array<ArrayBuffer> = new Int32Array(count ? 256 : 0);
  const byPart = new Map<string, number>();
  const byText = Object.create(null) as Record<string, number | undefined>;
  const byValue = new Map<RawCell, number>();
  const codeOf = (part: string): number => {
    let c = byPart.get(part);
    if (c === undefined) {
      c = parts.length;
      parts.push(part);
      byPart.set(part, c);
    }
    return c;
  };
  // The last-cell cache pays when runs of equal keys are common (sheets sorted by cost centre);
  // on shuffled keys comparing two different strings costs more than it saves, so it is used
  // only when the first rows show runs.
  const useLast = repeatsOften(cells, rowCount);
  let last: RawCell | typeof NO_CELL = NO_CELL;
  let lastCode = 0;
  for (let r = 0; r < rowCount; r++) {
    const cell = cells[r];
    if (useLast && cell === last) {
      out[r] = lastCode;
      if (count) counts[lastCode]++;
      continue;
    }
    let code: number | undefined;
    if (typeof cell === 'string') {
      code = byText[cell];
      if (code === undefined) {
        code = codeOf(cell.trim().normalize('NFC'));
        byText[cell] = code;
      }
    } else if (typeof cell === 'object' && cell !== null) {
      code = codeOf(keyPart(cell));
    } else {
      code = byValue.get(cell);
      if (code === undefined) {
        code = codeOf(keyPart(cell));
        byValue.set(cell, code);
      }
    }
    out[r] = code;
    if (count) {
      if (code >= counts.length) counts = grown(counts);
      counts[code]++;
    }
    last = cell;
    lastCode = code;
  }
  return counts;
}

/** True when at least a quarter of the first 4,096 rows repeat the key of the row before. */
function repeatsOften(cells: ArrayLike<RawCell>, rowCount: number): boolean {
  const m = Math.min(rowCount, 4096);
  let repeats = 0;
  for (let r = 1; r < m; r++) if (cells[r] === cells[r - 1]) repeats++;
  return repeats * 4 >= m;
}

/** A copy of `a` twice as long (the rest zero). */
function grown(a: Int32Array<ArrayBuffer>): Int32Array<ArrayBuffer> {
  const b = new Int32Array(Math.max(256, 2 * a.length));
  b.set(a);
  return b;
}

/**
 * Combines per-row codes in place: `acc[r]` (values 0..accCount-1) with `codes[r]` (0..count-1)
 * becomes a dense code of the pair, numbered in order of first appearance. The pair is one number
 * acc x count + code (below rows^2 < 2^53, so exact); looked up in a direct table when that is
 * small enough (Int32Array of code + 1, 0 = unseen), else in a Map keyed by that number.
 * Fills `firstRow` with the first row of each distinct pair and returns the rows per pair
 * (possibly longer than the number of pairs). Cost O(rows).
 */
function combineCodes(
  acc: Int32Array, accCount: number, codes: Int32Array, count: number, rowCount: number, firstRow: number[],
): Int32Array {
  let counts: Int32Array<ArrayBuffer> = new Int32Array(256);
  const size = accCount * count;
  if (size <= Math.max(1 << 16, 2 * rowCount)) {
    const table = new Int32Array(size);
    for (let r = 0; r < rowCount; r++) {
      const pair = acc[r] * count + codes[r];
      let g = table[pair] - 1;
      if (g < 0) {
        g = firstRow.length;
        firstRow.push(r);
        table[pair] = g + 1;
        if (g >= counts.length) counts = grown(counts);
      }
      acc[r] = g;
      counts[g]++;
    }
  } else {
    const map = new Map<number, number>();
    for (let r = 0; r < rowCount; r++) {
      const pair = acc[r] * count + codes[r];
      let g = map.get(pair);
      if (g === undefined) {
        g = firstRow.length;
        firstRow.push(r);
        map.set(pair, g);
        if (g >= counts.length) counts = grown(counts);
      }
      acc[r] = g;
      counts[g]++;
    }
  }
  return counts;
}

/**
 * Assigns every row to a group. Zero key columns: one group "(all rows)" (key ''). Otherwise the
 * key is the trimmed key parts joined by U+001F and the label the parts joined by " / ", blank
 * parts shown as "(blank)". Groups are numbered in order of first appearance.
 *
 * Method (no per-row string or object allocation): each key column is coded to small integers
 * (`codeKeyColumn`); several key columns are combined pairwise into one numeric code per row
 * (`combineCodes`), so no joined key text is built per row; key texts and labels are made once
 * per group. Group sizes are counted on the way and give the counting-sort offsets `start`.
 *
 * Cost: O(rows x key columns) expected time; 4 bytes per row (plus 4 per row of scratch with
 * several key columns).
 */
export function groupRows(groupColumns: readonly { readonly cells: ArrayLike<RawCell> }[], rowCount: number): Grouping {
  const groupOf = new Int32Array(rowCount);
  const keys: string[] = [];
  const labels: string[] = [];
  const keyParts: string[][] = [];
  const addGroup = (parts: string[]): void => {
    keys.push(parts.join(KEY_SEPARATOR));
    keyParts.push(parts);
    labels.push(parts.map((p) => (p === '' ? BLANK_KEY_LABEL : p)).join(LABEL_SEPARATOR));
  };
  // Rows per group, counted while coding.
  let sizes: Int32Array;
  if (groupColumns.length === 0) {
    addGroup([]);
    labels[0] = ALL_ROWS_LABEL;
    sizes = Int32Array.of(rowCount);
  } else if (groupColumns.length === 1) {
    const parts: string[] = [];
    sizes = codeKeyColumn(groupColumns[0].cells, rowCount, groupOf, parts, true);
    for (const part of parts) addGroup([part]);
  } else {
    let count = 0;
    {
      const parts: string[] = [];
      codeKeyColumn(groupColumns[0].cells, rowCount, groupOf, parts, false);
      count = parts.length;
    }
    const codes = new Int32Array(rowCount);
    let firstRow: number[] = [];
    sizes = new Int32Array(0);
    for (let c = 1; c < groupColumns.length; c++) {
      const parts: string[] = [];
      codeKeyColumn(groupColumns[c].cells, rowCount, codes, parts, false);
      firstRow = [];
      sizes = combineCodes(groupOf, count, codes, parts.length, rowCount, firstRow);
      count = firstRow.length;
    }
    for (const r of firstRow) addGroup(groupColumns.map((col) => keyPart(col.cells[r])));
  }
  const start = offsets(sizes, keys.length);
  return { groupOf, keys, labels, keyParts, start };
}

/** start[g] = rows in groups before g (length groups + 1). */
function offsets(sizes: Int32Array, nGroups: number): Int32Array {
  const start = new Int32Array(nGroups + 1);
  for (let g = 0; g < nGroups; g++) start[g + 1] = start[g] + sizes[g];
  return start;
}
