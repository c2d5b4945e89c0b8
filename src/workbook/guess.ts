/**
 * Header-row detection and column-role guesses from a sample of cells. Pure.
 *
 * Guesses (a starting point the reviewer confirms in the pane; rules of thumb, common practice, no source):
 *  - empty:  no non-blank cell;
 *  - date:   most non-blank cells are dates (numbers shown with a date format);
 *  - id:     every non-blank value distinct and the header reads like an identifier
 *            ("id", "ref", "no", "number", "#", "code"), or text with every value distinct;
 *  - amount: at least 80 % of non-blank cells read as numbers, and money-like (see guessColumn);
 *  - key:    repeated short labels (see guessColumn);
 *  - text:   anything else.
 */
import { inferDecimal, parseCell } from '../scoring/index.js';
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

/** Headers that name money (rule of thumb, common practice, no source). */
const MONEY_HEADER = /amount|total|cost|price|value|sum|paid|spend|spent|fee|fare|expense|claim(?!\s*(?:id|no|ref|number|#))|net|gross|vat|tax|eur|usd|gbp|chf|betrag|montant|importe|importo|bedrag|[£$€¥]/i;
/** Dates written as text: 2025-01-31, 31.01.2025, 1/31/25. */
const DATE_TEXT = /^\s*(?:\d{4}-\d{1,2}-\d{1,2}(?:[ T]\d{1,2}:\d{2}(?::\d{2})?)?|\d{1,2}[./-]\d{1,2}[./-]\d{2,4})\s*$/;

/**
 * Guess one column's role from its sample cells (rules of thumb, common practice, no source):
 * - date: most cells are dates, or text written as dates;
 * - id: distinct values and an identifier-like header, or distinct text, or distinct whole numbers
 *   that run in steps of one (row numbers, sequential claim numbers);
 * - amount: at least 80 % of cells read as numbers (the decimal separator decided for the whole
 *   sample), and they look like money: not all whole numbers between 1900 and 2100 (years), and not
 *   whole-number codes that repeat (cost-centre numbers such as 4100) unless the header names money;
 * - key: text (or whole-number codes) with a sensible number of repeated labels: at least two
 *   labels, at most half as many labels as cells and at most 500, most cells sharing their label
 *   with another, and short labels (free-text notes are neither);
 * - text: anything else.
 */
export function guessColumn(index: number, header: string, cells: readonly RawCell[]): DetectedColumn {
  const decimalComma = inferDecimal(cells).separator === 'comma';
  let nonBlank = 0;
  let dates = 0;
  let texts = 0;
  let textChars = 0;
  const numbers: number[] = [];
  const seen = new Map<string, number>();
  for (const cell of cells) {
    if (cell === null || cell === undefined || (typeof cell === 'string' && cell.trim() === '')) continue;
    nonBlank++;
    if (cell instanceof Date || (typeof cell === 'string' && DATE_TEXT.test(cell))) dates++;
    else {
      const p = parseCell(cell, { decimalComma });
      if (p.ok) numbers.push(p.value);
      else if (typeof cell === 'string') {
        texts++;
        textChars += cell.length;
      }
    }
    if (seen.size < DISTINCT_CAP) {
      const k = cellText(cell).toLowerCase();
      seen.set(k, (seen.get(k) ?? 0) + 1);
    }
  }
  const numeric = numbers.length;
  const numericShare = nonBlank === 0 ? 0 : numeric / nonBlank;
  const distinct = seen.size;
  const allDistinct = nonBlank >= 2 && distinct === nonBlank;
  const whole = numeric > 0 && numbers.every((v) => Number.isInteger(v));
  const years = whole && numbers.every((v) => v >= 1900 && v <= 2100);
  const sorted = whole ? [...numbers].sort((a, b) => a - b) : [];
  const sequential = whole && numeric >= 3 && sorted.every((v, i) => i === 0 || v - sorted[i - 1] === 1);
  let repeated = 0;
  for (const c of seen.values()) if (c > 1) repeated += c;
  const labelsRepeat = nonBlank >= 2 && distinct >= 2 && distinct <= Math.min(500, Math.max(1, nonBlank / 2)) && repeated >= nonBlank * 0.5;
  const moneyHeader = MONEY_HEADER.test(header) && !ID_HEADER.test(header);
  let guess: ColumnGuess;
  if (nonBlank === 0) guess = 'empty';
  else if (dates / nonBlank >= 0.8) guess = 'date';
  else if (allDistinct && ID_HEADER.test(header)) guess = 'id';
  else if (numericShare >= 0.8 && allDistinct && sequential && !moneyHeader) guess = 'id';
  else if (numericShare >= 0.8 && !years && (moneyHeader || !(whole && labelsRepeat && sorted[0] >= 100))) guess = 'amount';
  else if (allDistinct && texts > 0) guess = 'id';
  else if (labelsRepeat && (texts > 0 || whole) && (texts === 0 || textChars / texts <= 40)) guess = 'key';
  else guess = 'text';
  return { index, header, guess, numericShare, distinct };
}
