import type { ParseOptions, ParseResult, RawCell } from './types.js';

/** Excel's error literals (upper case). A text cell holding exactly one of these counts as an error cell. */
export const EXCEL_ERROR_LITERALS: readonly string[] = [
  '#N/A', '#VALUE!', '#DIV/0!', '#REF!', '#NAME?', '#NUM!', '#NULL!', '#SPILL!', '#CALC!', '#GETTING_DATA',
  '#FIELD!', '#BLOCKED!', '#CONNECT!', '#BUSY!', '#UNKNOWN!', '#EXTERNAL!', '#PYTHON!',
];
const ERROR_SET = new Set(EXCEL_ERROR_LITERALS);

const BLANK: ParseResult = { ok: false, reason: 'blank' };
const ERROR: ParseResult = { ok: false, reason: 'error' };
const BOOLEAN: ParseResult = { ok: false, reason: 'boolean' };
const DATE: ParseResult = { ok: false, reason: 'date' };
const TEXT: ParseResult = { ok: false, reason: 'text' };
const NON_FINITE: ParseResult = { ok: false, reason: 'non-finite' };

/** Currency symbols accepted before or after the amount. */
const CURRENCY_SYMBOLS = '£$€¥₹₩₽¢';
/** A currency marker: a symbol, an optional 1-2 letter prefix plus "$" (US$, A$, HK$), or a 3-letter code (EUR, GBP). */
const CURRENCY_RE = new RegExp(`^(?:[A-Z]{1,2}\\$|[${CURRENCY_SYMBOLS}]|[A-Z]{3})`);
const CURRENCY_END_RE = new RegExp(`(?:[A-Z]{1,2}\\$|[${CURRENCY_SYMBOLS}]|[A-Z]{3})$`);
const SIGN_CHARS = '-+\u2212\u2013'; // hyphen-minus, plus, minus sign, en dash (pasted from documents)

/** Decimal point, optional comma thousands groups: 1,234,567.89 | 1234.5 | .5 | 120. | 1.2E+03 */
const DOT_NUMBER = /^(?:\d{1,3}(?:,\d{3})+(?:\.\d*)?|\d+(?:\.\d*)?(?:[eE][+-]?\d+)?|\.\d+(?:[eE][+-]?\d+)?)$/;
/** Decimal comma, optional "." or space thousands groups: 1.234.567,89 | 1 234,5 | 1234,5 | ,5 */
const COMMA_NUMBER = /^(?:\d{1,3}(?:\.\d{3})+(?:,\d*)?|\d{1,3}(?: \d{3})+(?:,\d*)?|\d+(?:,\d*)?|,\d+)$/;

const isSpace = (ch: string): boolean => ch === ' ' || ch === '\u00a0' || ch === '\u202f' || ch === '\u2007' || ch === '\t';

/**
 * Turns one raw cell into a number or a reason why it is not one. Never throws.
 *
 * - number: finite -> the value; NaN / +-Infinity -> 'non-finite'.
 * - null / undefined / whitespace-only text -> 'blank'.
 * - boolean, and the texts TRUE / FALSE (any case, as CSV files carry them) -> 'boolean'.
 * - Date (valid or not) -> 'date'. A `CellError` object or an Excel error literal as text
 *   (#N/A, #VALUE!, #DIV/0!, #REF!, #NAME?, #NUM!, #NULL!, #SPILL!, #CALC!, #GETTING_DATA, ...) -> 'error'.
 * - Text that reads as an amount: surrounding spaces (incl. non-breaking and narrow no-break space),
 *   one currency marker before or after (£ $ € ¥ ₹ ₩ ₽ ¢, US$/A$-style, or a 3-letter upper-case
 *   code such as EUR, GBP), thousands separators (`,`; with `decimalComma`: `.` or space), one sign:
 *   leading or trailing minus ("-120", "120.00-", Unicode minus), or accounting parentheses
 *   "(120.00)" -> negative. Thousands groups must be well formed ("1,23" is text, not 123).
 * - Anything else -> 'text'.
 */
export function parseCell(raw: RawCell, options?: ParseOptions): ParseResult {
  if (typeof raw === 'number') return Number.isFinite(raw) ? { ok: true, value: raw } : NON_FINITE;
  if (raw === null || raw === undefined) return BLANK;
  if (typeof raw === 'string') return parseText(raw, options?.decimalComma === true);
  if (typeof raw === 'boolean') return BOOLEAN;
  if (raw instanceof Date) return DATE;
  if (typeof raw === 'object' && (raw as { kind?: unknown }).kind === 'error') return ERROR;
  return TEXT;
}

/** Fast path used by the engine: returns the number, or NaN and writes nothing else. See `parseCell`. */
export function parseText(text: string, decimalComma: boolean): ParseResult {
  let s = text.trim();
  if (s.length === 0) return BLANK;
  const first = s.charCodeAt(0);
  if (first === 35 /* # */) return ERROR_SET.has(s.toUpperCase()) ? ERROR : TEXT;
  if (s.length <= 5) {
    const u = s.toUpperCase();
    if (u === 'TRUE' || u === 'FALSE') return BOOLEAN;
  }
  let negative = false;
  let signs = 0;
  let currencies = 0;
  if (s.length >= 2 && s[0] === '(' && s[s.length - 1] === ')') {
    negative = true;
    signs++;
    s = s.slice(1, -1).trim();
  }
  // Strip sign / currency / spaces from the front.
  for (;;) {
    if (s.length === 0) return TEXT;
    const ch = s[0];
    if (SIGN_CHARS.includes(ch)) {
      signs++;
      if (ch !== '+') negative = !negative;
      s = s.slice(1);
      continue;
    }
    if (isSpace(ch)) { s = s.slice(1); continue; }
    const m = CURRENCY_RE.exec(s);
    if (m !== null && currencies === 0) {
      currencies++;
      s = s.slice(m[0].length);
      continue;
    }
    break;
  }
  // ...and from the back.
  for (;;) {
    if (s.length === 0) return TEXT;
    const ch = s[s.length - 1];
    if (ch === '-' || ch === '\u2212' || ch === '\u2013') {
      signs++;
      negative = !negative;
      s = s.slice(0, -1);
      continue;
    }
    if (isSpace(ch)) { s = s.slice(0, -1); continue; }
    const m = CURRENCY_END_RE.exec(s);
    if (m !== null && currencies === 0) {
      currencies++;
      s = s.slice(0, s.length - m[0].length);
      continue;
    }
    break;
  }
  if (signs > 1) return TEXT;
  let normalized: string;
  if (decimalComma) {
    const spaced = s.replace(/[\u00a0\u202f\u2007]/g, ' ');
    if (!COMMA_NUMBER.test(spaced)) return TEXT;
    normalized = spaced.replace(/[. ]/g, '').replace(',', '.');
  } else {
    if (!DOT_NUMBER.test(s)) return TEXT;
    normalized = s.replace(/,/g, '');
  }
  const v = Number(normalized);
  if (Number.isNaN(v)) return TEXT;
  if (!Number.isFinite(v)) return NON_FINITE;
  return { ok: true, value: negative ? -v : v };
}
