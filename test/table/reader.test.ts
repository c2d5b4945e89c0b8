import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { sniffDelimiter, type CsvDelimiter } from '../../src/table/csv.js';
import { readDelimited, tableRows } from '../../src/table/delimited.js';
import { detectEncoding, fixWindows1252 } from '../../src/table/encoding.js';
import { findHeaderRow } from '../../src/table/header.js';
import { isTotalLabel } from '../../src/table/totals.js';

// Expected values are written by hand from the rules each function states (RFC 4180 quoting; the
// byte-order marks of the Unicode standard; Windows-1252 bytes 0x80 = euro sign, 0xA3 = pound sign,
// 0xE9 = e acute as in the WHATWG Encoding Standard's index, from memory).

describe('sniffDelimiter', () => {
  it('comma, semicolon, tab and pipe, with quotes respected and title lines ignored', () => {
    expect(sniffDelimiter('a,b,c\n1,2,3\n')).toBe(',');
    expect(sniffDelimiter('a;b;c\n1,5;2,5;3\n')).toBe(';');
    expect(sniffDelimiter('a\tb\n1\t2\n')).toBe('\t');
    expect(sniffDelimiter('a|b|c\n1|2|3\n')).toBe('|');
    expect(sniffDelimiter('"x;y;z",b\n"1;2",3\n')).toBe(',');
    expect(sniffDelimiter('Claims report, first quarter\n\nID;Amount;Team\n1;2,5;A\n2;3,5;B\n')).toBe(';');
  });
});

describe('detectEncoding', () => {
  it('byte-order marks, UTF-16 without a mark, valid UTF-8, else Windows-1252', () => {
    expect(detectEncoding(Uint8Array.from([0xef, 0xbb, 0xbf, 0x61]))).toEqual({ encoding: 'utf-8', bomBytes: 3, how: 'byte-order mark' });
    expect(detectEncoding(Uint8Array.from([0xff, 0xfe, 0x61, 0]))).toMatchObject({ encoding: 'utf-16le', bomBytes: 2 });
    expect(detectEncoding(Uint8Array.from([0xfe, 0xff, 0, 0x61]))).toMatchObject({ encoding: 'utf-16be', bomBytes: 2 });
    expect(detectEncoding(Uint8Array.from([0x61, 0, 0x62, 0, 0x2c, 0, 0x63, 0]))).toMatchObject({ encoding: 'utf-16le', bomBytes: 0 });
    expect(detectEncoding(Buffer.from('Café £ €'))).toMatchObject({ encoding: 'utf-8', how: 'valid UTF-8' });
    expect(detectEncoding(Uint8Array.from([0x43, 0x61, 0x66, 0xe9]))).toMatchObject({ encoding: 'windows-1252', how: 'not valid UTF-8' });
    expect(detectEncoding(Uint8Array.from([0x43, 0xe9]), 'utf-8')).toMatchObject({ encoding: 'utf-8', how: 'given' });
  });
  it('Windows-1252 high bytes are the euro sign and friends, not C1 controls', () => {
    const t = readDelimited(Uint8Array.from([0x41, 0x0a, 0x80, 0xa3, 0xe9, 0x93, 0x94]), 'x.csv');
    expect(tableRows(t)).toEqual([['A'], ['€£é\u201c\u201d']]);
    expect(fixWindows1252('plain')).toBe('plain');
  });
});

describe('findHeaderRow', () => {
  it('skips a title, an export date and blank rows; keeps row 0 when it is the header', () => {
    const data = [['X1', 'Ana', 'CC-10', '12.50'], ['X2', 'Bo', 'CC-20', '8.00']];
    expect(findHeaderRow([['ID', 'Name', 'Centre', 'Amount'], ...data])).toBe(0);
    expect(findHeaderRow([['Expense claims Q1'], ['Exported', '2025-04-01'], [], ['ID', 'Name', 'Centre', 'Amount'], ...data])).toBe(3);
    expect(findHeaderRow([['Department:', 'Finance', 'Period:', 'Q1'], [], ['ID', 'Name', 'Centre', 'Amount', 'Notes', 'Date'], ['X1', 'Ana', 'CC', '1', 'n', 'd']])).toBe(2);
    expect(findHeaderRow([[], []])).toBe(-1);
    expect(findHeaderRow([['Amount'], ['12'], ['13']])).toBe(0);
  });
});

describe('isTotalLabel', () => {
  it('whole-cell totals labels only', () => {
    for (const t of ['Total', 'TOTAL', 'Grand total', 'Totals:', 'Total EUR', 'Summe', 'Gesamt', ' Subtotal ']) expect(isTotalLabel(t), t).toBe(true);
    for (const t of ['Total travel costs', 'Summer offsite', 'Ana', 'totally', 'Sums owed to Bo']) expect(isTotalLabel(t), t).toBe(false);
  });
});

/** Write a table as delimited text the way exporters do (RFC 4180 quoting when needed, or always). */
function write(rows: string[][], d: CsvDelimiter, quoteAll: boolean, eol: string): string {
  const q = (f: string) => (quoteAll || f.includes(d) || /["\r\n]/.test(f) || f !== f.trim() ? `"${f.replace(/"/g, '""')}"` : f);
  return rows.map((r) => r.map(q).join(d)).join(eol) + eol;
}

function encode(text: string, enc: 'utf-8' | 'utf-8-bom' | 'utf-16le' | 'utf-16be'): Uint8Array {
  if (enc === 'utf-8') return Buffer.from(text);
  if (enc === 'utf-8-bom') return Buffer.from(`\ufeff${text}`);
  const le = Buffer.from(`\ufeff${text}`, 'utf16le');
  if (enc === 'utf-16le') return le;
  const be = Buffer.alloc(le.length);
  for (let i = 0; i < le.length; i += 2) {
    be[i] = le[i + 1];
    be[i + 1] = le[i];
  }
  return be;
}

describe('property: any table written with any supported delimiter, quoting, encoding and line end reads back to the same cells', () => {
  const cell = fc.stringMatching(/^[A-Za-z0-9 .,;|\t"'€£éü\n-]{1,8}$/).filter((s) => s.trim() !== '' && s === s.trim());
  const header = fc.uniqueArray(fc.stringMatching(/^[A-Z][a-z]{1,6}$/), { minLength: 2, maxLength: 5 });
  it('round trip', () => {
    fc.assert(
      fc.property(
        header.chain((h) => fc.tuple(fc.constant(h), fc.array(fc.array(cell, { minLength: h.length, maxLength: h.length }), { minLength: 2, maxLength: 12 }))),
        fc.constantFrom<CsvDelimiter>(',', ';', '\t', '|'),
        fc.boolean(),
        fc.constantFrom('\r\n', '\n', '\r'),
        fc.constantFrom<'utf-8' | 'utf-8-bom' | 'utf-16le' | 'utf-16be'>('utf-8', 'utf-8-bom', 'utf-16le', 'utf-16be'),
        ([h, body], d, quoteAll, eol, enc) => {
          const rows = [h, ...body];
          const t = readDelimited(encode(write(rows, d, quoteAll, eol), enc), 'p.csv', { delimiter: d, headerRow: 1 });
          expect(tableRows(t)).toEqual(rows);
        },
      ),
      { seed: 20261202, numRuns: 400 },
    );
  });
  it('the delimiter is sniffed right when the cells hold no delimiter characters', () => {
    const plainCell = fc.stringMatching(/^[A-Za-z0-9 .'€éü-]{1,8}$/).filter((s) => s.trim() !== '' && s === s.trim());
    fc.assert(
      fc.property(
        header.chain((h) => fc.tuple(fc.constant(h), fc.array(fc.array(plainCell, { minLength: h.length, maxLength: h.length }), { minLength: 2, maxLength: 12 }))),
        fc.constantFrom<CsvDelimiter>(',', ';', '\t', '|'),
        fc.constantFrom('\r\n', '\n'),
        ([h, body], d, eol) => {
          const rows = [h, ...body];
          const t = readDelimited(encode(write(rows, d, false, eol), 'utf-8'), 'p.csv');
          expect({ d: t.delimiter, rows: tableRows(t) }).toEqual({ d, rows });
        },
      ),
      { seed: 20261202, numRuns: 300 },
    );
  });
});
