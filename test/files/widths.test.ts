/**
 * Readable result columns in the batch command's .xlsx output (in-memory and row-by-row writers):
 * each result column's width shows its header. Widths are read back with SheetJS (independent of
 * ExcelJS, which writes them). Excel's width unit is one digit of the default font (Calibri 11:
 * 7 px, plus 5 px padding — Microsoft's column-width help, from memory); a bold header of n
 * characters is counted at 8 px a character (common practice, no source): (8 n + 5) / 7 units.
 */
import { describe, expect, it } from 'vitest';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import * as XLSX from 'xlsx';
import { NOTE_HEADER, STATUS_HEADER, resultHeaders } from '../../src/report/index.js';
import { readBook, run } from '../cli/helpers.js';
import { claimRows } from '../workbook/helpers.js';

const dir = mkdtempSync(join(tmpdir(), 'tailmark-widths-'));
const H = resultHeaders('Amount');
const OURS = [H.score, H.flag, H.reason, STATUS_HEADER, NOTE_HEADER];
const needChars = (text: string) => (8 * [...text].length + 5) / 7;
const ARGS = ['--value', 'Amount', '--group', 'Cost centre', '--group', 'Category', '--id', 'Claim ID'];

function csvFile(): Promise<string> {
  const p = join(dir, 'claims.csv');
  writeFileSync(p, claimRows(300).map((r) => r.join(',')).join('\n') + '\n');
  return Promise.resolve(p);
}

async function xlsxFile(): Promise<string> {
  const p = join(dir, 'claims.xlsx');
  const wb = new ExcelJS.Workbook();
  wb.addWorksheet('Claims').addRows(claimRows(300));
  await wb.xlsx.writeFile(p);
  return p;
}

/** Header text and width (characters) of each column of a sheet's first row. */
function headerWidths(path: string, sheet: string): Map<string, number | undefined> {
  const ws = readBook(path).Sheets[sheet];
  const cols = (ws['!cols'] ?? []) as { wch?: number; width?: number }[];
  const range = XLSX.utils.decode_range(ws['!ref']!);
  const out = new Map<string, number | undefined>();
  for (let c = range.s.c; c <= range.e.c; c++) {
    const cell = ws[XLSX.utils.encode_cell({ r: 0, c })] as XLSX.CellObject | undefined;
    if (cell) out.set(String(cell.v), cols[c]?.wch ?? cols[c]?.width);
  }
  return out;
}

describe('result column widths in the batch command output', () => {
  const cases: [string, () => Promise<string>, string[]][] = [
    ['.csv in, row-by-row writer', csvFile, []],
    ['.xlsx in, in-memory writer', xlsxFile, []],
    ['.xlsx in, row-by-row writer (--stream)', xlsxFile, ['--stream']],
  ];
  it.each(cases)('%s: every result column shows its header', async (_name, make, extra) => {
    const input = await make();
    const out = join(dir, `out-${extra.length}-${input.endsWith('.csv') ? 'csv' : 'xlsx'}.xlsx`);
    const r = await run('score', input, ...ARGS, ...extra, '--out', out, '--force');
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    const book = readBook(out);
    const sheet = book.SheetNames.find((n) => n === 'Claims' || n === 'claims') ?? book.SheetNames[0];
    const widths = headerWidths(out, sheet);
    for (const h of OURS) {
      expect(widths.has(h), `${h} not in the header row`).toBe(true);
      const w = widths.get(h);
      expect(w, `${h}: no width`).toBeDefined();
      expect(w!, `${h}: width ${w} < ${needChars(h).toFixed(2)}`).toBeGreaterThanOrEqual(needChars(h));
    }
  });
});
