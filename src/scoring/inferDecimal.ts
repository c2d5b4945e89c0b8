import { parseText } from './parseCell.js';
import type { DecimalMode, DecimalReading, RawCell } from './types.js';

/** 0: says nothing; 1: decimal comma; 2: decimal point; 3: ambiguous ("1.480" or "1,480"). */
const NONE = 0;
const COMMA = 1;
const POINT = 2;
const AMBIGUOUS = 3;

/**
 * What one text cell says about the decimal separator, from where its `,` and `.` sit:
 * both present -> the later one is the decimal ("1.480,00" comma, "1,480.00" point); one kind
 * present once with other than three digits after it -> decimal ("12,5" comma, "12.50" point); one
 * kind present more than once -> thousands ("1.234.567" comma, "1,234,567" point); once with exactly
 * three digits after ("1.480") -> ambiguous. Text with letters other than a currency code, or that
 * reads as no number either way, says nothing.
 */
export function decimalEvidence(text: string): 0 | 1 | 2 | 3 {
  let lastComma = -1;
  let lastDot = -1;
  let commas = 0;
  let dots = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === 44) { commas++; lastComma = i; }
    else if (c === 46) { dots++; lastDot = i; }
  }
  if (commas === 0 && dots === 0) return NONE;
  let kind: 0 | 1 | 2 | 3;
  if (commas > 0 && dots > 0) kind = lastComma > lastDot ? COMMA : POINT;
  else {
    const sep = commas > 0 ? lastComma : lastDot;
    const count = commas > 0 ? commas : dots;
    const isComma = commas > 0;
    if (count > 1) kind = isComma ? POINT : COMMA;
    else {
      let digits = 0;
      for (let i = sep + 1; i < text.length; i++) {
        const c = text.charCodeAt(i);
        if (c >= 48 && c <= 57) digits++;
        else break;
      }
      if (digits === 3 && sep > 0 && text.charCodeAt(sep - 1) >= 48 && text.charCodeAt(sep - 1) <= 57) kind = AMBIGUOUS;
      else kind = isComma ? COMMA : POINT;
    }
  }
  // Confirm the cell is a number under the reading it points to (cheap for plain numeric text).
  if (kind === AMBIGUOUS) return parseText(text, false).ok || parseText(text, true).ok ? AMBIGUOUS : NONE;
  if (commas + dots === 1 && isDigitsAndOneSeparator(text)) return kind;
  return parseText(text, kind === COMMA).ok ? kind : NONE;
}

/** Digits and the one separator only, with a digit: certainly a number, no full parse needed ("185.23"). */
function isDigitsAndOneSeparator(text: string): boolean {
  let digits = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c >= 48 && c <= 57) digits++;
    else if (c !== 44 && c !== 46) return false;
  }
  return digits > 0;
}

/**
 * Decides the decimal separator of one column from all its text cells (numbers stored as numbers
 * say nothing). `mode` 'comma' / 'point' is taken as given. In 'auto': cells that can only be
 * decimal comma ("12,5", "1.480,00") against cells that can only be decimal point ("12.50",
 * "1,480.00"); the side with more cells wins, a tie or no evidence gives decimal point. Ambiguous
 * cells ("1.480") follow the decision. Cost O(total text length); never throws.
 */
export function inferDecimal(cells: ArrayLike<RawCell>, mode: DecimalMode = 'auto'): DecimalReading {
  let commaCells = 0;
  let pointCells = 0;
  let ambiguousCells = 0;
  let commaExample: string | null = null;
  let pointExample: string | null = null;
  let ambiguousExample: string | null = null;
  const n = cells.length;
  for (let r = 0; r < n; r++) {
    const c = cells[r];
    if (typeof c !== 'string') continue;
    const e = decimalEvidence(c);
    if (e === COMMA) {
      commaCells++;
      commaExample ??= c.trim();
    } else if (e === POINT) {
      pointCells++;
      pointExample ??= c.trim();
    } else if (e === AMBIGUOUS) {
      ambiguousCells++;
      ambiguousExample ??= c.trim();
    }
  }
  const separator = mode === 'auto' ? (commaCells > pointCells ? 'comma' : 'point') : mode;
  const how = mode !== 'auto' ? 'given' : commaCells + pointCells > 0 ? 'inferred' : 'default';
  return {
    separator,
    how,
    commaCells,
    pointCells,
    ambiguousCells,
    example: separator === 'comma' ? commaExample : pointExample,
    otherExample: separator === 'comma' ? pointExample : commaExample,
    ambiguousExample,
  };
}
