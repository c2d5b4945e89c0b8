import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { CURRENCY_CODES, decimalEvidence, inferDecimal, parseCell, scoreTable, type RawCell } from '../../src/scoring/index.js';

// Expected values are written by hand from how each locale writes numbers (issue 8's examples);
// the property tests take the formatted text from Intl.NumberFormat (ICU's locale data, outside
// this project) and check that it reads back to the number it was made from.

describe('decimalEvidence: what one cell says', () => {
  const cases: [string, 0 | 1 | 2 | 3][] = [
    ['12,5', 1], ['173,09', 1], ['1.480,00', 1], ['1.234.567', 1], ['12,50 €', 1],
    ['12.5', 2], ['1,480.00', 2], ['1,234,567', 2], ['$12.50', 2],
    ['1.480', 3], ['1,480', 3],
    ['120', 0], ['CLM-0001', 0], ['A1.5', 0], ['abc', 0], ['.', 0],
  ];
  for (const [text, want] of cases) it(JSON.stringify(text), () => expect(decimalEvidence(text)).toBe(want));
});

describe('inferDecimal: decided per column', () => {
  it('any "12,5" with no "12.5" means decimal comma, and "1.480" then reads as 1480', () => {
    const cells: RawCell[] = ['12,5', '1.480', '30', null, 7];
    const d = inferDecimal(cells);
    expect(d).toMatchObject({ separator: 'comma', how: 'inferred', commaCells: 1, pointCells: 0, ambiguousCells: 1, example: '12,5' });
    const col = scoreTable({ valueColumns: [{ name: 'Amount', cells }], groupColumns: [] }, { method: 'robust', direction: 'both', logScale: false, minGroupSize: 1, smallGroups: 'pool' }).columns[0];
    expect(Array.from(col.values)).toEqual([12.5, 1480, 30, NaN, 7]);
    expect(col.decimal.separator).toBe('comma');
  });
  it('"1.480,00" is unambiguous', () => {
    expect(inferDecimal(['1.480,00']).separator).toBe('comma');
  });
  it('"1.480" next to "12.50" reads as 1.48 (the column implies a decimal point)', () => {
    const cells: RawCell[] = ['12.50', '1.480'];
    expect(inferDecimal(cells)).toMatchObject({ separator: 'point', how: 'inferred', ambiguousCells: 1 });
  });
  it('no evidence: decimal point by default, and said so', () => {
    expect(inferDecimal(['1.480', 120, '75'])).toMatchObject({ separator: 'point', how: 'default', ambiguousCells: 1 });
  });
  it('a given mode wins over the cells', () => {
    expect(inferDecimal(['12.50'], 'comma')).toMatchObject({ separator: 'comma', how: 'given' });
  });
  it('mixed evidence: the larger side wins and the other side is counted', () => {
    expect(inferDecimal(['1,5', '2,5', '3.5'])).toMatchObject({ separator: 'comma', commaCells: 2, pointCells: 1, otherExample: '3.5' });
  });
  it('codes say nothing', () => {
    expect(inferDecimal(['CLM-0001', 'KST-10', 'A12'])).toMatchObject({ how: 'default', commaCells: 0, pointCells: 0, ambiguousCells: 0 });
  });
  it('--decimal-point / decimal: point keeps "1.480" as 1.48 even in a comma-looking column', () => {
    const col = scoreTable({ valueColumns: [{ name: 'A', cells: ['1.480', '12,5'] }], groupColumns: [] }, { method: 'robust', direction: 'both', logScale: false, minGroupSize: 1, smallGroups: 'pool', decimal: 'point' }).columns[0];
    expect(Array.from(col.values)).toEqual([1.48, NaN]);
  });
});

const LOCALES = ['en-US', 'en-GB', 'de-DE', 'fr-FR', 'de-CH', 'sv-SE', 'es-ES', 'it-IT', 'nl-NL', 'pt-BR', 'fr-CH', 'pl-PL', 'nb-NO', 'cs-CZ'];
const SEED = 20261202;

describe('property: numbers formatted in any supported locale parse back', () => {
  it('plain and currency formats, two decimals, a whole column per locale', () => {
    fc.assert(
      fc.property(
        fc.constantFrom(...LOCALES),
        fc.constantFrom<Intl.NumberFormatOptions>(
          { minimumFractionDigits: 2, maximumFractionDigits: 2 },
          { style: 'currency', currency: 'EUR' },
          { style: 'currency', currency: 'USD', currencySign: 'accounting' },
          { style: 'currency', currency: 'CHF', currencyDisplay: 'code' },
          { style: 'currency', currency: 'EUR', currencySign: 'accounting' },
          { style: 'currency', currency: 'USD', currencyDisplay: 'narrowSymbol' },
        ),
        fc.array(fc.integer({ min: -99_999_999_99, max: 99_999_999_99 }), { minLength: 1, maxLength: 30 }),
        (locale, style, cents) => {
          const fmt = new Intl.NumberFormat(locale, style);
          const cells = cents.map((c) => fmt.format(c / 100));
          const col = scoreTable({ valueColumns: [{ name: 'Amount', cells }], groupColumns: [] }, { method: 'robust', direction: 'both', logScale: false, minGroupSize: 1, smallGroups: 'pool' }).columns[0];
          expect({ locale, cells, values: Array.from(col.values) }).toEqual({ locale, cells, values: cents.map((c) => c / 100) });
        },
      ),
      { seed: SEED, numRuns: 400 },
    );
  });
});

/** Letters that are part of an accepted currency marker (ISO code or "US$"-style prefix) are removed; what letters remain? */
function lettersBeyondCurrency(s: string): boolean {
  let t = s.replace(/[A-Z]{1,2}\$|\$[A-Z]{1,2}/g, '');
  for (const code of CURRENCY_CODES) t = t.split(code).join('');
  return /[A-Za-z]/.test(t);
}

describe('property: no text containing a letter parses as a number', () => {
  const letter = fc.constantFrom(...'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz'.split(''));
  const piece = fc.oneof(fc.stringMatching(/^[0-9]{1,6}$/), fc.constantFrom('-', '.', ',', ' ', "'", '(', ')', '€', '$', '+'));
  const codeLike = fc.tuple(fc.array(piece, { maxLength: 4 }), fc.array(letter, { minLength: 1, maxLength: 4 }), fc.array(piece, { maxLength: 4 }))
    .map(([a, l, b]) => `${a.join('')}${l.join('')}${b.join('')}`);
  it('digits, signs and separators around letters that are not a currency code', () => {
    fc.assert(
      fc.property(fc.oneof(codeLike, fc.string({ maxLength: 12 })), (s) => {
        fc.pre(/[A-Za-z]/.test(s) && lettersBeyondCurrency(s));
        for (const decimalComma of [false, true]) {
          const p = parseCell(s, { decimalComma });
          expect({ s, decimalComma, ok: p.ok }).toEqual({ s, decimalComma, ok: false });
        }
      }),
      { seed: SEED, numRuns: 3000 },
    );
  });
  it('the codes of issue 8 in particular', () => {
    for (const s of ['CLM-0001', 'KST-10', 'FIN-200', 'A12', 'CC-20', 'X0000123']) {
      expect(parseCell(s)).toEqual({ ok: false, reason: 'text' });
      expect(parseCell(s, { decimalComma: true })).toEqual({ ok: false, reason: 'text' });
    }
  });
});
