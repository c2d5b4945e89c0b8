import { describe, expect, it } from 'vitest';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import { columnLetter, readTable } from '../../src/files/read.js';

const dir = mkdtempSync(join(tmpdir(), 'tailmark-xlsx-'));

async function fixture(): Promise<string> {
  const wb = new ExcelJS.Workbook();
  wb.addWorksheet('Cover').getCell('A1').value = 'Invented cover sheet';
  const ws = wb.addWorksheet('Data');
  ws.getCell('B3').value = 'Ref';
  ws.getCell('C3').value = { richText: [{ text: 'Amo', font: { bold: true } }, { text: 'unt' }] };
  ws.getCell('D3').value = 'When';
  ws.getCell('B4').value = 'R1';
  ws.getCell('C4').value = { formula: 'SUM(1,2)', result: 3 };
  ws.getCell('D4').value = new Date(Date.UTC(2025, 1, 14));
  ws.getCell('B5').value = { text: 'R2', hyperlink: 'https://example.invalid/r2' };
  ws.getCell('C5').value = { formula: '1/0', result: { error: '#DIV/0!' } };
  ws.getCell('B6').value = 'R3';
  ws.getCell('C6').value = { error: '#N/A' };
  ws.getCell('B7').value = 'R4';
  ws.getCell('C7').value = '1,234.50';
  ws.getCell('D7').value = true;
  const p = join(dir, 'fixture.xlsx');
  await wb.xlsx.writeFile(p);
  return p;
}

describe('readTable on .xlsx', () => {
  it('finds the header row and columns, converts formulas, errors, rich text, links and dates', async () => {
    const p = await fixture();
    const t = await readTable(p, { sheet: 'Data' });
    expect(t.sheetName).toBe('Data');
    expect(t.headerRow).toBe(3);
    expect(t.firstColumn).toBe(1);
    expect(t.headers).toEqual(['Ref', 'Amount', 'When']);
    expect(t.rowCount).toBe(4);
    expect(t.columns[0]).toEqual(['R1', 'R2', 'R3', 'R4']);
    expect(t.columns[1]).toEqual([3, { kind: 'error', code: '#DIV/0!' }, { kind: 'error', code: '#N/A' }, '1,234.50']);
    expect(t.columns[2][0]).toEqual(new Date(Date.UTC(2025, 1, 14)));
    expect(t.columns[2][3]).toBe(true);
    expect(t.columns[2][1]).toBeNull();
    expect(t.source).toBe('fixture.xlsx, sheet Data, B3:D7');
  });

  it('reads the first sheet by default and lists the sheets when one is missing', async () => {
    const p = await fixture();
    const t = await readTable(p);
    expect(t.sheetName).toBe('Cover');
    await expect(readTable(p, { sheet: 'Claims' })).rejects.toThrow(/sheet "Claims" not found.*"Cover", "Data"/);
  });

  it('rejects a file that is not a workbook, and unsupported extensions', async () => {
    const bad = join(dir, 'bad.xlsx');
    writeFileSync(bad, 'this is not a zip');
    await expect(readTable(bad)).rejects.toThrow(/bad\.xlsx is a text file, not an \.xlsx workbook: .*rename it to end in \.csv/);
    const broken = join(dir, 'broken.xlsx');
    writeFileSync(broken, Buffer.concat([Buffer.from('PK\x03\x04'), Buffer.from('xl/workbook.xml'), Buffer.alloc(40)]));
    await expect(readTable(broken)).rejects.toThrow(/cannot read broken\.xlsx as an \.xlsx workbook/);
    const odd = join(dir, 'x.ods');
    writeFileSync(odd, 'x');
    await expect(readTable(odd)).rejects.toThrow(/unsupported file type ".ods"/);
    await expect(readTable(join(dir, 'missing.xlsx'))).rejects.toThrow(/not found/);
  });

  it('column letters follow the A..Z, AA.. scheme', () => {
    expect([0, 25, 26, 51, 52, 701, 702, 16383].map(columnLetter)).toEqual(['A', 'Z', 'AA', 'AZ', 'BA', 'ZZ', 'AAA', 'XFD']);
  });
});
