/**
 * Header-row detection and column-role guesses from a sample of cells. Pure.
 *
 * Guesses (a starting point the reviewer confirms in the pane; rules of thumb, common practice, no source):
 *  - empty:  no non-blank cell;
 *  - date:   most non-blank cells are dates (numbers shown with a date format);
 *  - id:     every non-blank value distinct and the header reads like an identifier
 *            ("id", "ref", "no", "number", "#", "code"), or text with every value distinct;
 *  - amount: at least 80 % of non-blank cells read as numbers;
 *  - key:    text with few distinct values (at most half the non-blank cells, and at most 500);
 *  - text:   anything else.
 */
import { parseCell } from '../scoring/index.js';
import type { RawCell } from '../scoring/types.js';
import type { ColumnGuess, DetectedColumn } from './api.js';
import { columnLetters } from './a1.js';
import { cellText } from './cells.js';

const ID_HEADER = /(^|[^a-z])(id|ref|reference|no|nr|number|num|code|#)([^a-z]|$)/i;
const DISTINCT_CAP = 100_000;

/** True when the first row reads as a header: all non-blank cells are text that is not a number, at least one of them. */
export function looksLikeHeader(first: readonly RawCell[], rest: readonly (readonly RawCell[])[]): boolean {
  let texts = 0;
  for (let c = 0; c < first.length; c++) {
    const cell = first[c];
    if (cell === null || cell === undefined || (typeof cell === 'string' && cell.trim() === '')) continue;
    if (typeof cell !== 'string') return false;
    if (parseCell(cell).ok) {
      // A numeric text header ("2024") is allowed only if the column below is not numeric.
      const below = rest.map((r) => r[c]).filter((c) => c !== null && c !== undefined);
      if (below.length > 0 && below.every((c) => parseCell(c).ok)) return false;
    }
    texts++;
  }
  return texts > 0;
}

/** Header names for the detected columns: blank headers become "Column D", duplicates get " (2)". */
export function headerNames(first: readonly RawCell[], firstColumn: number, hasHeader: boolean): string[] {
  const seen = new Map<string, number>();
  return first.map((cell, i) => {
    let name = hasHeader ? cellText(cell) : '';
    if (name === '') name = `Column ${columnLetters(firstColumn + i)}`;
    const key = name.toLowerCase();
    const n = (seen.get(key) ?? 0) + 1;
    seen.set(key, n);
    return n === 1 ? name : `${name} (${n})`;
  });
}

/** Guess one column's role from its sample cells. */
export function guessColumn(index: number, header: string, cells: readonly RawCell[]): DetectedColumn {
  let nonBlank = 0;
  let numeric = 0;
  let dates = 0;
  let texts = 0;
  const distinct = new Set<string>();
  for (const cell of cells) {
    if (cell === null || cell === undefined || (typeof cell === 'string' && cell.trim() === '')) continue;
    nonBlank++;
    if (cell instanceof Date) dates++;
    else if (parseCell(cell).ok) numeric++;
    else if (typeof cell === 'string') texts++;
    if (distinct.size < DISTINCT_CAP) distinct.add(cellText(cell).toLowerCase());
  }
  const numericShare = nonBlank === 0 ? 0 : numeric / nonBlank;
  let guess: ColumnGuess;
  const allDistinct = nonBlank >= 2 && distinct.size === nonBlank;
  if (nonBlank === 0) guess = 'empty';
  else if (dates / nonBlank >= 0.8) guess = 'date';
  else if (allDistinct && ID_HEADER.test(header)) guess = 'id';
  else if (numericShare >= 0.8) guess = 'amount';
  else if (allDistinct && texts > 0) guess = 'id';
  else if (texts > 0 && nonBlank >= 2 && distinct.size <= Math.min(500, Math.max(1, nonBlank / 2))) guess = 'key';
  else guess = 'text';
  return { index, header, guess, numericShare, distinct: distinct.size };
}
