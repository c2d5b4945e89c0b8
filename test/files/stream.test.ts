import { describe, expect, it } from 'vitest';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import ExcelJS from 'exceljs';
import { parseCsv } from '../../src/files/csv.js';
import { CsvChunkParser, forEachCsvRecord } from '../../src/files/csv-stream.js';
import { readTable } from '../../src/files/read.js';
import { readTableStreaming } from '../../src/files/stream-read.js';
import { TailmarkError } from '../../src/pipeline/errors.js';

const dir = mkdtempSync(join(tmpdir(), 'tailmark-stream-'));

/** Parse `text` fed in the given pieces. */
function chunked(text: string, cuts: number[], delimiter: ',' | ';' = ','): string[][] {
  const out: string[][] = [];
  const p = new CsvChunkParser(delimiter, (r) => out.push(r));
  let at = 0;
  for (const c of [...cuts].sort((a, b) => a - b)) {
    p.push(text.slice(at, c));
    at = c;
  }
  p.push(text.slice(at));
  p.end();
  return out;
}

describe('CsvChunkParser', () => {
  // The reference is parseCsv, whose grammar test/files/csv.test.ts checks against RFC 4180 by hand.
  it('gives the records parseCsv gives, however the text is cut into chunks (property)', () => {
    const alphabet = fc.constantFrom('a', 'b', '1', ',', '"', '\r', '\n', ' ', 'é');
    fc.assert(
      fc.property(fc.array(alphabet, { maxLength: 60 }), fc.array(fc.nat(60), { maxLength: 8 }), (chars, rawCuts) => {
        const text = chars.join('');
        const cuts = rawCuts.map((c) => Math.min(c, text.length));
        let expected: string[][] | 'error';
        try {
          expected = parseCsv(text, { delimiter: ',' });
        } catch {
          expected = 'error';
        }
        let got: string[][] | 'error';
        try {
          got = chunked(text, cuts);
        } catch {
          got = 'error';
        }
        expect(got).toEqual(expected);
      }),
      { numRuns: 3000, seed: 20261201 },
    );
  });

  it('keeps a CR pending across an empty chunk (found by the property above: "\\r" | "" | "\\n")', () => {
    expect(chunked('\r\n', [1, 1])).toEqual(parseCsv('\r\n', { delimiter: ',' }));
    expect(chunked('a\r\nb', [2, 2, 2])).toEqual([['a'], ['b']]);
    expect(chunked('"x""y"', [3, 3])).toEqual([['x"y']]);
  });

  it('handles CRLF, a doubled quote and a closing quote split across chunks', () => {
    const text = 'a,"x""y"\r\nb,"z"\r\n';
    for (let cut = 0; cut <= text.length; cut++) {
      expect(chunked(text, [cut])).toEqual([['a', 'x"y'], ['b', 'z']]);
    }
  });

  it('names the line where an unclosed quote opened, even when a line break falls between chunks', () => {
    const text = 'a,b\r\nc,d\r\ne,"open\r\nstill';
    for (const cut of [4, 5, 9, 10, 16, 17]) {
      try {
        chunked(text, [cut]);
        expect.unreachable();
      } catch (e) {
        expect(e).toBeInstanceOf(TailmarkError);
        expect((e as TailmarkError).line).toBe(3);
      }
    }
  });
});

describe('forEachCsvRecord', () => {
  it('reads a file in small chunks: BOM dropped, delimiter detected, multi-byte text intact', async () => {
    const p = join(dir, 'semi.csv');
    writeFileSync(p, '\uFEFFTeam;Amount;Note\r\nNord;"1.234,50";Café ☕\r\nSüd;99,00;"two\nlines"\r\n');
    const got: string[][] = [];
    await forEachCsvRecord(p, (r) => void got.push(r), { chunkBytes: 3 });
    expect(got).toEqual([
      ['Team', 'Amount', 'Note'],
      ['Nord', '1.234,50', 'Café ☕'],
      ['Süd', '99,00', 'two\nlines'],
    ]);
  });
});

describe('readTableStreaming gives the table readTable gives', () => {
  it('on an .xlsx with a header below row 1, formulas, errors, rich text, links and dates', async () => {
    const wb = new ExcelJS.Workbook();
    wb.addWorksheet('Cover').getCell('A1').value = 'Invented cover sheet';
    const ws = wb.addWorksheet('Data');
    ws.getCell('B3').value = 'Ref';
    ws.getCell('C3').value = { richText: [{ text: 'Amo', font: { bold: true } }, { text: 'unt' }] };
    ws.getCell('D3').value = 'When';
    ws.getCell('B4').value = 'R1';
    ws.getCell('C4').value = { formula: 'SUM(1,2)', result: 3 };
    ws.getCell('D4').value = new Date(Date.UTC(2025, 1, 14));
    ws.getCell('D4').numFmt = 'dd mmm yyyy';
    ws.getCell('B5').value = { text: 'R2', hyperlink: 'https://example.invalid/r2' };
    ws.getCell('C5').value = { formula: '1/0', result: { error: '#DIV/0!' } };
    ws.getCell('B6').value = 'R3';
    ws.getCell('C6').value = { error: '#N/A' };
    ws.getCell('B7').value = 'R4';
    ws.getCell('C7').value = '1,234.50';
    ws.getCell('D7').value = true;
    ws.getCell('F5').value = 'beside the table';
    const p = join(dir, 'fixture.xlsx');
    await wb.xlsx.writeFile(p);

    const a = await readTable(p, { sheet: 'Data' });
    const b = await readTableStreaming(p, { sheet: 'Data' });
    for (const k of ['source', 'sheetName', 'headers', 'columns', 'rowCount', 'headerRow', 'firstColumn'] as const) {
      expect(b[k], k).toEqual(a[k]);
    }
    // Hand-checked, as in xlsx.test.ts.
    expect(b.columns[1]).toEqual([3, { kind: 'error', code: '#DIV/0!' }, { kind: 'error', code: '#N/A' }, '1,234.50']);
    expect(b.streamed?.busyColumns).toEqual([5]); // F holds a value within the table's rows
    expect(b.streamed?.sheetNames).toEqual(['Cover', 'Data']);
  });

  it('keeps only the columns asked for (plus our review columns), and passes the caller error on', async () => {
    const p = join(dir, 'keep.csv');
    writeFileSync(p, 'Ref,Team,Amount,Tailmark status\nR1,A,10,Cleared\nR2,A,12,\n');
    const t = await readTableStreaming(p, { keep: (h) => [h.indexOf('Amount')] });
    expect(t.columns[2]).toEqual(['10', '12']);
    expect(t.columns[3]).toEqual(['Cleared', null]);
    expect(t.columns[0]).toEqual([]);
    expect(t.streamed?.kept).toEqual([false, false, true, true]);
    const boom = new Error('no such header');
    await expect(readTableStreaming(p, { keep: () => { throw boom; } })).rejects.toBe(boom);
  });

  it('on CSV: the same header, rows, blanks and sheet name as readTable', async () => {
    const p = join(dir, 'claims.csv');
    writeFileSync(p, '\uFEFF\r\n,,\r\nClaim ID,Amount,Notes\r\nA1,"1,234.50",\r\nA2,(120.00),"=not a formula"\r\n , ,\r\n\r\n');
    const a = await readTable(p);
    const b = await readTableStreaming(p);
    for (const k of ['source', 'sheetName', 'headers', 'columns', 'rowCount', 'headerRow', 'firstColumn'] as const) {
      expect(b[k], k).toEqual(a[k]);
    }
  });

  it('rejects the same bad inputs with the same messages', async () => {
    const junk = join(dir, 'junk.xlsx');
    writeFileSync(junk, 'not a workbook at all');
    await expect(readTableStreaming(junk)).rejects.toThrow(/cannot read junk\.xlsx as an \.xlsx workbook/);
    const blank = join(dir, 'blank.csv');
    writeFileSync(blank, '\n\n , \n');
    await expect(readTableStreaming(blank)).rejects.toThrow(/is empty \(no header row found\)/);
    const broken = join(dir, 'broken.csv');
    writeFileSync(broken, 'a,b\n"x,1\n');
    await expect(readTableStreaming(broken)).rejects.toThrow(/broken\.csv: CSV line 2/);
    const wb = new ExcelJS.Workbook();
    wb.addWorksheet('Only').getCell('A1').value = 'x';
    const p = join(dir, 'one.xlsx');
    await wb.xlsx.writeFile(p);
    await expect(readTableStreaming(p, { sheet: 'Other' })).rejects.toThrow(/sheet "Other" not found in one\.xlsx; sheets: "Only"/);
  });
});
