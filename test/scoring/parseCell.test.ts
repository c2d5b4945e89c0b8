import { describe, expect, it } from 'vitest';
import { EXCEL_ERROR_LITERALS, parseCell, type ParseResult, type RawCell } from '../../src/scoring/index.js';

const val = (v: number): ParseResult => ({ ok: true, value: v });
const no = (reason: string): ParseResult => ({ ok: false, reason } as ParseResult);

// Formats as they arrive in claim sheets and CSV exports (invented examples; no external source).
const cases: [RawCell, ParseResult, string][] = [
  [1234.5, val(1234.5), 'plain number'],
  [-0.01, val(-0.01), 'negative number (credit)'],
  [0, val(0), 'zero'],
  [NaN, no('non-finite'), 'NaN'],
  [Infinity, no('non-finite'), '+Infinity'],
  [-Infinity, no('non-finite'), '-Infinity'],
  [null, no('blank'), 'null'],
  [undefined, no('blank'), 'undefined'],
  ['', no('blank'), 'empty text'],
  ['   ', no('blank'), 'spaces only'],
  ['\u00a0\t\u00a0', no('blank'), 'non-breaking spaces and a tab only'],
  [true, no('boolean'), 'TRUE'],
  [false, no('boolean'), 'FALSE'],
  ['TRUE', no('boolean'), 'TRUE as text (CSV)'],
  ['false', no('boolean'), 'false as text'],
  [new Date(2024, 0, 31), no('date'), 'Date'],
  [new Date(NaN), no('date'), 'invalid Date'],
  [{ kind: 'error', code: '#N/A' }, no('error'), 'CellError object'],
  ['1234.50', val(1234.5), 'numeric text'],
  ['1,234.50', val(1234.5), 'thousands comma'],
  ['1,234,567.89', val(1234567.89), 'two thousands groups'],
  ['  1,234.50  ', val(1234.5), 'surrounding spaces'],
  ['\u00a01,234.50\u00a0', val(1234.5), 'surrounding non-breaking spaces'],
  ['\u202f99.10', val(99.1), 'narrow no-break space'],
  ['(120.00)', val(-120), 'accounting negative'],
  [' ( 120.00 ) ', val(-120), 'accounting negative with inner spaces'],
  ['(£1,200.00)', val(-1200), 'accounting negative with currency'],
  ['120.00-', val(-120), 'trailing minus'],
  ['-120', val(-120), 'leading minus'],
  ['\u2212120.5', val(-120.5), 'Unicode minus sign'],
  ['+75', val(75), 'leading plus'],
  ['£1,234.56', val(1234.56), 'pound prefix'],
  ['$1,234.56', val(1234.56), 'dollar prefix'],
  ['€99', val(99), 'euro prefix'],
  ['¥12,000', val(12000), 'yen prefix'],
  ['99.00 €', val(99), 'euro suffix with space'],
  ['EUR 1,234.50', val(1234.5), 'ISO code prefix'],
  ['1,234.50 GBP', val(1234.5), 'ISO code suffix'],
  ['GBP1234', val(1234), 'ISO code prefix, no space'],
  ['US$ 40', val(40), 'US$ prefix'],
  ['-$40.00', val(-40), 'minus before currency'],
  ['$-40.00', val(-40), 'minus after currency'],
  ['40.00 USD-', val(-40), 'code then trailing minus'],
  ['.5', val(0.5), 'leading decimal point'],
  ['120.', val(120), 'trailing decimal point'],
  ['1.5E+03', no('text'), 'scientific notation is text (a letter; issue 8: text with letters is never a number)'],
  ['007', val(7), 'leading zeros'],
  ['1,23', no('text'), 'malformed thousands group (not 123)'],
  ['12,34,567', no('text'), 'Indian-style grouping is not accepted with comma thousands'],
  ['1.234,50', no('text'), 'decimal-comma text without the option'],
  ['--5', no('text'), 'two signs'],
  ['(-5)', no('text'), 'parentheses and minus'],
  ['5-5', no('text'), 'minus inside'],
  ['£$5', no('text'), 'two currency markers'],
  ['abc', no('text'), 'word'],
  ['12 apples', no('text'), 'number and word'],
  ['N/A', no('text'), 'N/A without #'],
  ['$', no('text'), 'currency only'],
  ['()', no('text'), 'empty parentheses'],
  ['9'.repeat(400), no('non-finite'), 'overflowing numeric text'],
  // Issue 8: reference codes are text, whatever digits and hyphens they hold.
  ['CLM-0001', no('text'), 'claim reference code'],
  ['KST-10', no('text'), 'cost-centre code (trailing-minus rule must not fire)'],
  ['FIN-200', no('text'), 'department code'],
  ['A12', no('text'), 'cell-like code'],
  ['12A', no('text'), 'digits then a letter'],
  ['EUR-0001', no('text'), 'currency code glued to a hyphen is a code, not an amount'],
  ['EURO 12', no('text'), 'a word that starts like a code'],
  ['10-KST', no('text'), 'digits, hyphen, letters'],
  ["1'234.50", val(1234.5), 'apostrophe thousands (Swiss)'],
  ['1\u2019234.50', val(1234.5), 'right single quotation mark thousands'],
  ['1\u2009234.50', val(1234.5), 'thin-space thousands with a decimal point'],
  ['1 234 567', val(1234567), 'space thousands, no decimals'],
  ['1 23', no('text'), 'malformed space group'],
  ["1,234'567.00", no('text'), 'mixed thousands separators'],
  ['CHF 1\'234.50', val(1234.5), 'code and apostrophe thousands'],
  ['12.50$', val(12.5), 'symbol after'],
  ['12.50USD', val(12.5), 'code glued after digits'],
  ['(EUR 40.00)', val(-40), 'accounting negative with code'],
  ['#N/A', no('error'), 'error literal as text'],
  [' #div/0! ', no('error'), 'error literal, lower case with spaces'],
  ['#hashtag', no('text'), 'text starting with #'],
];

describe('parseCell: every format, including messy ones', () => {
  for (const [raw, expected, what] of cases) {
    it(`${what}: ${JSON.stringify(raw)}`, () => {
      expect(parseCell(raw)).toEqual(expected);
    });
  }
  it('every Excel error literal listed in the brief is an error', () => {
    for (const lit of ['#N/A', '#VALUE!', '#DIV/0!', '#REF!', '#NAME?', '#NUM!', '#NULL!', '#SPILL!', '#CALC!', '#GETTING_DATA']) {
      expect(EXCEL_ERROR_LITERALS).toContain(lit);
      expect(parseCell(lit)).toEqual(no('error'));
    }
  });
});

describe('parseCell with decimalComma', () => {
  const dc = { decimalComma: true };
  const dcCases: [string, ParseResult][] = [
    ['1.234,50', val(1234.5)],
    ['1 234,50', val(1234.5)],
    ['1\u00a0234,50', val(1234.5)],
    ['1\u202f234\u202f567,8', val(1234567.8)],
    ['1.234.567,89', val(1234567.89)],
    ['12,5', val(12.5)],
    ['(1.234,50)', val(-1234.5)],
    ['1.234,50-', val(-1234.5)],
    ['EUR 1.234,50', val(1234.5)],
    ['1.234,50 €', val(1234.5)],
    ['1234', val(1234)],
    ['1.23', no('text')],
    ['1,234.50', no('text')],
    ['1.480', val(1480)],
    ["1'234,50", val(1234.5)],
    ['1\u2009234,50', val(1234.5)],
    ['12,50 €', val(12.5)],
    ['12,50-', val(-12.5)],
    ['KST-10', no('text')],
  ];
  for (const [raw, expected] of dcCases) {
    it(JSON.stringify(raw), () => {
      expect(parseCell(raw, dc)).toEqual(expected);
    });
  }
});

describe('parseCell never throws', () => {
  it('odd objects become text', () => {
    expect(parseCell({} as unknown as RawCell)).toEqual(no('text'));
    expect(parseCell(Symbol('x') as unknown as RawCell)).toEqual(no('text'));
    expect(parseCell(10n as unknown as RawCell)).toEqual(no('text'));
  });
});
