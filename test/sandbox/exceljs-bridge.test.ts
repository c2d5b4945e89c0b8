// Round trip sandbox -> exceljs -> .xlsx bytes -> exceljs -> sandbox. The xlsx step uses exceljs's
// own writer/reader (the ECMA-376 container), and the result is also read with SheetJS (an
// independent reader) to check the values and formula really are in the file.
import { describe, expect, it } from 'vitest';
import ExcelJS from 'exceljs';
import * as XLSX from 'xlsx';
import { sandboxFromExcelJs, sandboxToExcelJs } from '../../src/sandbox/exceljs-bridge.js';
import { sandboxFromRows, diffSnapshots, CellError } from '../../src/sandbox/index.js';

function sample() {
  const sb = sandboxFromRows('Claims', [
    ['Id', 'Centre', 'Amount', 'Date'],
    ['C-001', 'North', 120.5, new Date(Date.UTC(2024, 2, 15))],
    ['C-002', 'South', '1,234.50', new Date(Date.UTC(2024, 2, 16))],
    ['C-003', 'North', new CellError('#N/A'), null],
    ['=not a formula', 'West', true, null],
  ]);
  sb.setCell('Claims', 0, 4, { value: 'Check', bold: true, fill: '#1F3A5F', font: '#FAFAFA' });
  sb.setCell('Claims', 1, 4, { formula: '=C2*2', value: 241 });
  sb.setCell('Claims', 2, 2, { value: '1,234.50', numberFormat: '@' });
  sb.setCell('Claims', 1, 2, { value: 120.5, numberFormat: '#,##0.00', wrap: true });
  sb.setColumnWidth('Claims', 'B', 90);
  sb.addTable('Claims', 'A1:D5', 'ClaimsTable');
  sb.addConditionalFormat('Claims', 'C2:C5', '=AND(ISNUMBER($C2),$C2>100)', { fill: '#2E4D2E', font: '#EFEFEF' });
  sb.addConditionalFormat('Claims', 'A2:A5', '=LEN($A2)>5', { fill: '#3B3B6D' });
  sb.addListValidation('Claims', 'F2:F5', 'open,cleared');
  sb.addSheet('Notes');
  sb.setValues('Notes', 'A1', [['Why'], ['Robust z over peer group']]);
  return sb;
}

describe('exceljs bridge', () => {
  it('round-trips through an .xlsx buffer without losing anything it carries', async () => {
    const sb = sample();
    const buf = await sandboxToExcelJs(sb).xlsx.writeBuffer();
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(buf);
    const back = sandboxFromExcelJs(wb);
    expect(back.importNotes).toEqual([]);
    const a = sb.snapshot();
    const b = back.snapshot();
    // Settings and selection are not part of the bridge; compare sheets.
    expect(diffSnapshots({ ...a, settings: {} }, { ...b, settings: {} })).toEqual([]);
    expect(b.sheets.map((s) => s.name)).toEqual(['Claims', 'Notes']);
    expect(back.highlightAt('Claims', 1, 2)).toEqual({ fill: '#2E4D2E', font: '#EFEFEF', bold: null });
    expect(back.validationAt('Claims', 3, 5)).toEqual(['open', 'cleared']);

    // Independent reader: SheetJS sees the same cells.
    const x = XLSX.read(new Uint8Array(buf), { type: 'array', cellFormula: true });
    const s = x.Sheets.Claims as Record<string, XLSX.CellObject>;
    expect(s.A2.v).toBe('C-001');
    expect(s.C2.v).toBe(120.5);
    expect(s.C3.v).toBe('1,234.50');
    expect(s.C4.t).toBe('e');
    expect(s.E2.f).toBe('C2*2');
    expect(s.A5.v).toBe('=not a formula');
    // 2024-03-15 is serial 45366 (1900 date system).
    expect(s.D2.v).toBe(45366);
  });

  it('imports an exceljs workbook built directly, and reports what it cannot carry', () => {
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('Data');
    ws.getCell('A1').value = 'Amount';
    ws.getCell('A2').value = 5;
    ws.getCell('A3').value = { formula: 'A2+1', result: 6 };
    ws.getCell('A4').value = { richText: [{ text: 'ri' }, { text: 'ch' }] };
    ws.getColumn(1).width = 20;
    ws.addConditionalFormatting({ ref: 'A2:A4', rules: [{ type: 'cellIs', operator: 'greaterThan', formulae: [1], priority: 1, style: {} }] });
    const sb = sandboxFromExcelJs(wb);
    expect(sb.valuesOf('Data', 'A1:A4')).toEqual([['Amount'], [5], [6], ['rich']]);
    expect(sb.cellAt('Data', 2, 0)).toEqual({ value: 6, formula: '=A2+1' });
    // 20 characters -> (20*7+5) px * 0.75 = 108.75 pt (Excel default font metrics).
    expect(sb.snapshot().sheets[0].columnWidths).toEqual({ A: 108.75 });
    expect(sb.importNotes).toEqual(['Data!A2:A4: conditional format of type "cellIs" is not carried.']);
  });
});
