import { describe, expect, it } from 'vitest';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { detectDelimiter, parseCsv } from '../../src/files/csv.js';
import { readTable } from '../../src/files/read.js';
import { TailmarkError } from '../../src/pipeline/errors.js';

// Expected records follow RFC 4180 section 2 (rules 1-7), written out by hand.
describe('parseCsv (RFC 4180)', () => {
  it('splits records on CRLF and fields on commas (rules 1, 4)', () => {
    expect(parseCsv('aaa,bbb,ccc\r\nzzz,yyy,xxx\r\n')).toEqual([
      ['aaa', 'bbb', 'ccc'],
      ['zzz', 'yyy', 'xxx'],
    ]);
  });

  it('accepts a last record without a line break (rule 2)', () => {
    expect(parseCsv('a,b\r\nc,d')).toEqual([
      ['a', 'b'],
      ['c', 'd'],
    ]);
  });

  it('accepts LF and lone CR line ends', () => {
    expect(parseCsv('a,b\nc,d\n')).toEqual([['a', 'b'], ['c', 'd']]);
    expect(parseCsv('a,b\rc,d')).toEqual([['a', 'b'], ['c', 'd']]);
  });

  it('keeps commas, CRLF and LF inside quoted fields (rule 6)', () => {
    expect(parseCsv('"a,1","line1\r\nline2","x\ny"\r\nnext,2,3')).toEqual([
      ['a,1', 'line1\r\nline2', 'x\ny'],
      ['next', '2', '3'],
    ]);
  });

  it('reads a doubled quote inside a quoted field as one quote (rule 7)', () => {
    expect(parseCsv('"He said ""see receipt""",b')).toEqual([['He said "see receipt"', 'b']]);
    expect(parseCsv('""""')).toEqual([['"']]);
  });

  it('keeps empty fields, including a quoted empty last field', () => {
    expect(parseCsv('a,,c\r\n,,\r\nx,""')).toEqual([
      ['a', '', 'c'],
      ['', '', ''],
      ['x', ''],
    ]);
  });

  it('strips a UTF-8 byte-order mark', () => {
    expect(parseCsv('\uFEFFClaim ID,Amount\r\nX1,"1,234.50"\r\n')).toEqual([
      ['Claim ID', 'Amount'],
      ['X1', '1,234.50'],
    ]);
  });

  it('keeps a stray quote inside an unquoted field as a character', () => {
    expect(parseCsv('5" pipe,3')).toEqual([['5" pipe', '3']]);
  });

  it('throws on a quoted field that never closes, naming the line it opened on', () => {
    const text = 'a,b\r\nc,"open\r\nstill open';
    expect(() => parseCsv(text)).toThrow(TailmarkError);
    try {
      parseCsv(text);
    } catch (e) {
      expect((e as TailmarkError).line).toBe(2);
    }
  });

  it('gives no records for empty input', () => {
    expect(parseCsv('')).toEqual([]);
    expect(parseCsv('\uFEFF')).toEqual([]);
  });

  it('detects ; and tab delimiters from the first record, ignoring quoted ones', () => {
    expect(detectDelimiter('a;b;c\n1,5;2,5;3')).toBe(';');
    expect(detectDelimiter('a\tb\n')).toBe('\t');
    expect(detectDelimiter('"x;y;z",b\n')).toBe(',');
    expect(parseCsv('Amount;Group\r\n"1.234,50";A')).toEqual([['Amount', 'Group'], ['1.234,50', 'A']]);
  });
});

describe('readTable on CSV', () => {
  const dir = mkdtempSync(join(tmpdir(), 'tailmark-csv-'));

  it('uses the first non-empty row as the header and keeps cells as strings', async () => {
    const p = join(dir, 'claims.csv');
    writeFileSync(p, '\uFEFF\r\n,,\r\nClaim ID,Amount,Notes\r\nA1,"1,234.50",\r\nA2,(120.00),"=not a formula"\r\n\r\n');
    const t = await readTable(p);
    expect(t.headers).toEqual(['Claim ID', 'Amount', 'Notes']);
    expect(t.headerRow).toBe(3);
    expect(t.firstColumn).toBe(0);
    expect(t.rowCount).toBe(2);
    expect(t.columns[1]).toEqual(['1,234.50', '(120.00)']);
    expect(t.columns[2]).toEqual([null, '=not a formula']);
  });

  it('names empty and repeated headers so every column can be addressed', async () => {
    const p = join(dir, 'dupes.csv');
    writeFileSync(p, 'Amount,,Amount\n1,2,3\n');
    const t = await readTable(p);
    expect(t.headers).toEqual(['Amount', 'Column B', 'Amount (2)']);
  });

  it('rejects an empty file and a file of blank lines with a clear message', async () => {
    const empty = join(dir, 'empty.csv');
    writeFileSync(empty, '');
    await expect(readTable(empty)).rejects.toThrow(/empty/);
    const blank = join(dir, 'blank.csv');
    writeFileSync(blank, '\r\n,,\r\n');
    await expect(readTable(blank)).rejects.toThrow(/empty/);
  });

  it('reports an unclosed quote with the file name and line', async () => {
    const p = join(dir, 'broken.csv');
    writeFileSync(p, 'a,b\n"x,1\n');
    await expect(readTable(p)).rejects.toThrow(/broken\.csv: CSV line 2/);
  });
});
