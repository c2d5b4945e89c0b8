/**
 * Keeping the reviewer's marks before a removal: exportMarks() lists every claim with a status other
 * than the default or a note, with who saved it last and when (from the log), and can copy that list
 * to a new sheet that a later removal leaves alone. Expected rows are written out by hand from the
 * marks the test sets.
 */
import { describe, expect, it } from 'vitest';
import { MARKS_EXPORT_HEADER, toCsv } from '../../src/report/marksExport.js';
import { claimsSandbox, layerFor, SETTINGS } from './helpers.js';

describe('exportMarks', () => {
  it('lists the marks with who saved them and when, copies them to a sheet that Remove keeps', async () => {
    const sb = claimsSandbox(150);
    let clock = new Date('2025-03-31T09:00:00Z');
    const layer = layerFor(sb, { now: () => clock });
    await layer.run(await layer.detect(), { ...SETTINGS, reviewer: 'A.B.' });
    const ex = await layer.listExceptions();
    expect(ex.length).toBeGreaterThan(1);
    await layer.mark([ex[0].row], 'Cleared', 'receipt seen');
    clock = new Date('2025-04-01T10:30:00Z');
    await layer.mark([ex[1].row], null, '=SUM(1) is not a formula');

    const listed = await layer.exportMarks(false);
    const idOf = (row: number) => `CL-${String(row + 1).padStart(6, '0')}`;
    expect(listed.sheet).toBeNull();
    // Sheet row = data row + 2 (the header is row 1); rows in sheet order.
    const lines = [
      [idOf(ex[0].row), String(ex[0].row + 2), 'Cleared', 'receipt seen', 'A.B.', '2025-03-31T09:00:00.000Z'],
      [idOf(ex[1].row), String(ex[1].row + 2), 'To look at', '=SUM(1) is not a formula', 'A.B.', '2025-04-01T10:30:00.000Z'],
    ].sort((a, b) => Number(a[1]) - Number(b[1]));
    expect(listed.rows).toEqual([[...MARKS_EXPORT_HEADER], ...lines]);

    const copied = await layer.exportMarks(true);
    expect(copied.sheet).toBe('Tailmark marks 2025-04-01');
    expect(sb.valuesOf('Tailmark marks 2025-04-01', 'A1:F3')).toEqual(copied.rows);
    // A second copy the same day gets a name of its own.
    expect((await layer.exportMarks(true)).sheet).toBe('Tailmark marks 2025-04-01 (2)');

    await layer.remove(true, false);
    expect(sb.sheetNames()).toContain('Tailmark marks 2025-04-01');
    expect(sb.valuesOf('Tailmark marks 2025-04-01', 'D3:D3')[0][0]).toBe('=SUM(1) is not a formula');
  });

  it('CSV: RFC 4180 quoting, a byte-order mark, and no cell that a spreadsheet would read as a formula', () => {
    const csv = toCsv([
      ['Claim', 'Note'],
      ['CL-1', 'said "fine", ok'],
      ['CL-2', '=HYPERLINK("x")'],
      ['CL-3', 'two\nlines'],
    ]);
    expect(csv).toBe('\uFEFFClaim,Note\r\nCL-1,"said ""fine"", ok"\r\nCL-2,"\'=HYPERLINK(""x"")"\r\nCL-3,"two\nlines"\r\n');
  });
});
