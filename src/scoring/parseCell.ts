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
export const CURRENCY_SYMBOLS = '£$€¥₹₩₽¢₺₴₦₱₪₫₡₲₵₸';
/**
 * ISO 4217 alphabetic codes accepted before or after an amount (upper case). The list of current
 * codes is written from memory of ISO 4217; a code that is not here ("CLM", "KST") is never taken
 * for a currency, so reference codes such as "CLM-0001" stay text.
 */
export const CURRENCY_CODES: ReadonlySet<string> = new Set(
  ('AED AFN ALL AMD ANG AOA ARS AUD AWG AZN BAM BBD BDT BGN BHD BIF BMD BND BOB BRL BSD BTN BWP BYN BZD ' +
    'CAD CDF CHF CLP CNY COP CRC CUP CVE CZK DJF DKK DOP DZD EGP ERN ETB EUR FJD FKP GBP GEL GHS GIP GMD ' +
    'GNF GTQ GYD HKD HNL HTG HUF IDR ILS INR IQD IRR ISK JMD JOD JPY KES KGS KHR KMF KPW KRW KWD KYD KZT ' +
    'LAK LBP LKR LRD LSL LYD MAD MDL MGA MKD MMK MNT MOP MRU MUR MVR MWK MXN MYR MZN NAD NGN NIO NOK NPR ' +
    'NZD OMR PAB PEN PGK PHP PKR PLN PYG QAR RON RSD RUB RWF SAR SBD SCR SDG SEK SGD SHP SLE SOS SRD SSP ' +
    'STN SYP SZL THB TJS TMT TND TOP TRY TTD TWD TZS UAH UGX USD UYU UZS VES VND VUV WST XAF XCD XOF XPF ' +
    'YER ZAR ZMW ZWL').split(' '),
);
const SIGN_CHARS = '-+\u2212\u2013'; // hyphen-minus, plus, minus sign, en dash (pasted from documents)
const MINUS_CHARS = '-\u2212\u2013';

/**
 * Decimal point; thousands groups of three after `,`, an apostrophe or a space, one kind per number:
 * 1,234,567.89 | 1'234.50 | 1 234.5 | 1234.5 | .5 | 120.
 */
const POINT_NUMBER = /^(?:\d{1,3}([,' ])\d{3}(?:\1\d{3})*(?:\.\d*)?|\d+(?:\.\d*)?|\.\d+)$/;
/** Decimal comma; thousands groups after `.`, an apostrophe or a space: 1.234.567,89 | 1 234,5 | 1234,5 | ,5 */
const COMMA_NUMBER = /^(?:\d{1,3}([.' ])\d{3}(?:\1\d{3})*(?:,\d*)?|\d+(?:,\d*)?|,\d+)$/;
/** Space-like characters used as thousands separators (non-breaking, narrow no-break, thin, figure). */
const SPACE_LIKE = /[\u00a0\u202f\u2009\u2007]/g;

const isSpace = (ch: string): boolean =>
  ch === ' ' || ch === '\u00a0' || ch === '\u202f' || ch === '\u2007' || ch === '\u2009' || ch === '\t';
const isUpper = (c: number): boolean => c >= 65 && c <= 90;
const isLetterCode = (c: number): boolean => (c >= 65 && c <= 90) || (c >= 97 && c <= 122);

/** Length of a currency marker at the start of `s` (0 if none): a symbol, "US$"-style, or an ISO code not glued to a sign or letter. */
function currencyAtStart(s: string): number {
  if (CURRENCY_SYMBOLS.includes(s[0])) return 1;
  if (!isUpper(s.charCodeAt(0))) return 0;
  if (s[1] === '$') return 2;
  if (isUpper(s.charCodeAt(1)) && s[2] === '$') return 3;
  if (s.length > 3 && isUpper(s.charCodeAt(1)) && isUpper(s.charCodeAt(2)) && CURRENCY_CODES.has(s.slice(0, 3))) {
    const next = s[3];
    // "EUR 12", "EUR12", "EUR(12)" are amounts; "EURO" is not.
    if (isSpace(next) || (next >= '0' && next <= '9') || next === '.' || next === ',' || next === '(') return 3;
    // A code glued to a sign is an amount only with a separator after it ("EUR-1'234.50", as de-CH
    // writes negatives); "EUR-0001" is a reference code.
    if (SIGN_CHARS.includes(next) && /[.,'\u2019]/.test(s.slice(4))) return 3;
  }
  return 0;
}

/** Length of a currency marker at the end of `s` (0 if none): a symbol, "US$"/"$US", or an ISO code after a digit or space. */
function currencyAtEnd(s: string): number {
  const n = s.length;
  // "12 US$", "12 A$" (symbol with a country prefix), "12 $US" (as French writes it).
  const m = /(?:^|[\d\s])([A-Z]{1,2}\$|\$[A-Z]{1,2})$/.exec(s);
  if (m !== null) return m[1].length;
  if (CURRENCY_SYMBOLS.includes(s[n - 1])) return 1;
  if (n > 3 && CURRENCY_CODES.has(s.slice(n - 3))) {
    const before = s[n - 4];
    if (isSpace(before) || (before >= '0' && before <= '9')) return 3;
  }
  return 0;
}

/**
 * Turns one raw cell into a number or a reason why it is not one. Never throws.
 *
 * - number: finite -> the value; NaN / +-Infinity -> 'non-finite'.
 * - null / undefined / whitespace-only text -> 'blank'.
 * - boolean, and the texts TRUE / FALSE (any case, as CSV files carry them) -> 'boolean'.
 * - Date (valid or not) -> 'date'. A `CellError` object or an Excel error literal as text
 *   (#N/A, #VALUE!, #DIV/0!, #REF!, #NAME?, #NUM!, #NULL!, #SPILL!, #CALC!, #GETTING_DATA, ...) -> 'error'.
 * - Text that reads as an amount: surrounding spaces (incl. non-breaking and narrow no-break space),
 *   one currency marker before or after (a symbol such as £ $ € ¥, "US$"/"A$"-style, or an ISO 4217
 *   code such as EUR, GBP), thousands separators in groups of three (`,` with a decimal point, `.`
 *   with `decimalComma`; an apostrophe or a space-like character with either), one sign: leading or
 *   trailing minus ("-120", "120.00-", Unicode minus), or accounting parentheses "(120.00)" ->
 *   negative. Thousands groups must be well formed ("1,23" is text, not 123).
 * - Text with any other letter is never a number: "CLM-0001", "KST-10", "A12", "1E5" stay 'text'
 *   (reference codes are text; scientific notation is not how amounts are written).
 * - Anything else -> 'text'.
 *
 * Which decimal separator a column uses is decided for the whole column by `inferDecimal`.
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

/** The text path of `parseCell`. Cost O(length of the text). */
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
    if (currencies === 0) {
      const m = currencyAtStart(s);
      if (m > 0) {
        currencies++;
        s = s.slice(m);
        continue;
      }
    }
    break;
  }
  // ...and from the back.
  for (;;) {
    if (s.length === 0) return TEXT;
    const ch = s[s.length - 1];
    if (MINUS_CHARS.includes(ch)) {
      signs++;
      negative = !negative;
      s = s.slice(0, -1);
      continue;
    }
    if (isSpace(ch)) { s = s.slice(0, -1); continue; }
    if (currencies === 0) {
      const m = currencyAtEnd(s);
      if (m > 0) {
        currencies++;
        s = s.slice(0, s.length - m);
        continue;
      }
    }
    break;
  }
  if (signs > 1) return TEXT;
  let normalized: string;
  const plain = s.replace(SPACE_LIKE, ' ').replace(/\u2019/g, "'");
  if (decimalComma) {
    if (!COMMA_NUMBER.test(plain)) return TEXT;
    normalized = plain.replace(/[.' ]/g, '').replace(',', '.');
  } else {
    if (!POINT_NUMBER.test(plain)) return TEXT;
    normalized = plain.replace(/[,' ]/g, '');
  }
  const v = Number(normalized);
  if (Number.isNaN(v)) return TEXT;
  if (!Number.isFinite(v)) return NON_FINITE;
  return { ok: true, value: negative ? -v : v };
}

/** True when `text` holds an ASCII letter (a cheap pre-check: such text is a number only with a currency code). */
export function hasLetter(text: string): boolean {
  for (let i = 0; i < text.length; i++) if (isLetterCode(text.charCodeAt(i))) return true;
  return false;
}
