// Tables, conditional formats, data validation, insert/delete shifting, snapshots.
// Behaviours follow the Excel JavaScript API reference (learn.microsoft.com/javascript/api/excel):
// ConditionalFormatCollection.add, TableCollection.add, TableColumnCollection.add, DataValidation,
// Range.insert/delete with Excel.InsertShiftDirection / DeleteShiftDirection.
import { describe, expect, it } from 'vitest';
import { sandboxFromRows, diffSnapshots, SandboxError } from '../../src/sandbox/index.js';

async function codeOf(p: Promise<unknown>): Promise<string> {
  try { await p; } catch (e) { return (e as SandboxError).code; }
  return 'no error';
}

const rows = [
  ['Id', 'Amount', 'Score'],
  ['C1', 10, 0.5],
  ['C2', 20, 3.4],
  ['C3', 30, ''],
  ['C4', 40, -4],
];

describe('conditional formats', () => {
  it('add(custom) with a relative rule; highlightAt evaluates it per cell; priority order wins', async () => {
    const sb = sandboxFromRows('S', rows);
    await sb.run(async (context) => {
      const ws = context.workbook.worksheets.getItem('S');
      const cf = ws.getRange('A2:C5').conditionalFormats.add('Custom' as Excel.ConditionalFormatType.custom);
      cf.custom.rule.formula = '=AND(ISNUMBER($C2),ABS($C2)>=3)';
      cf.custom.format.fill.color = '#204060';
      cf.custom.format.font.color = '#F0F0F0';
      await context.sync();
      // A second rule added later gets priority 0 and wins where both match.
      const cf2 = ws.getRange('B2:B5').conditionalFormats.add('Custom' as Excel.ConditionalFormatType.custom);
      cf2.custom.rule.formula = '=$B2>=40';
      cf2.custom.format.fill.color = '#112233';
      cf.load('priority');
      cf2.load('priority');
      await context.sync();
      expect([cf.priority, cf2.priority]).toEqual([1, 0]);
    });
    expect(sb.highlightAt('S', 1, 0)).toBeNull(); // C2 = 0.5
    expect(sb.highlightAt('S', 2, 0)).toEqual({ fill: '#204060', font: '#F0F0F0', bold: null }); // 3.4
    expect(sb.highlightAt('S', 3, 2)).toBeNull(); // blank: ISNUMBER false
    expect(sb.highlightAt('S', 4, 2)).toEqual({ fill: '#204060', font: '#F0F0F0', bold: null }); // -4
    expect(sb.highlightAt('S', 4, 1)).toEqual({ fill: '#112233', font: null, bold: null }); // B5 = 40, rule 0 first
    expect(sb.highlightAt('S', 0, 0)).toBeNull(); // header outside the range
  });

  it('collection lists rules intersecting the range; delete removes only that rule', async () => {
    const sb = sandboxFromRows('S', rows);
    sb.addConditionalFormat('S', 'A2:A5', '=LEN($A2)>0', { fill: '#010203' });
    sb.addConditionalFormat('S', 'C2:C5', '=$C2<0', { fill: '#040506' });
    await sb.run(async (context) => {
      const ws = context.workbook.worksheets.getItem('S');
      const cfs = ws.getRange('C:C').conditionalFormats;
      cfs.load('items/type');
      await context.sync();
      expect(cfs.items.length).toBe(1);
      cfs.items[0].custom.rule.load('formula');
      const all = ws.getRange().conditionalFormats.load('items');
      await context.sync();
      expect(cfs.items[0].custom.rule.formula).toBe('=$C2<0');
      expect(all.items.length).toBe(2);
      cfs.items[0].delete();
      await context.sync();
    });
    expect(sb.snapshot().sheets[0].conditionalFormats.map((c) => c.formula)).toEqual(['=LEN($A2)>0']);
  });

  it('types other than custom are not modelled and say so', async () => {
    const sb = sandboxFromRows('S', rows);
    await sb.run(async (context) => {
      context.workbook.worksheets.getItem('S').getRange('A1').conditionalFormats.add('CellValue' as Excel.ConditionalFormatType.cellValue);
      expect(await codeOf(context.sync())).toBe('NotImplemented');
    });
  });
});

describe('data validation', () => {
  it('list rule set, read, cleared; validationAt returns the list', async () => {
    const sb = sandboxFromRows('S', rows);
    await sb.run(async (context) => {
      const ws = context.workbook.worksheets.getItem('S');
      const dv = ws.getRange('D2:D5').dataValidation;
      dv.rule = { list: { inCellDropDown: true, source: 'open, cleared,queried' } };
      await context.sync();
      const part = ws.getRange('D3').dataValidation.load('type,rule');
      const mixed = ws.getRange('C2:D2').dataValidation.load('type');
      const none = ws.getRange('A1').dataValidation.load('type');
      await context.sync();
      expect(part.type).toBe('List');
      expect(part.rule).toEqual({ list: { inCellDropDown: true, source: 'open, cleared,queried' } });
      expect(mixed.type).toBe('Inconsistent');
      expect(none.type).toBe('None');
      ws.getRange('D2').dataValidation.clear();
      await context.sync();
    });
    expect(sb.validationAt('S', 1, 3)).toBeNull();
    expect(sb.validationAt('S', 2, 3)).toEqual(['open', 'cleared', 'queried']);
    expect(sb.snapshot().sheets[0].validations[0].ranges).toBe('D3:D5');
  });
});

describe('tables', () => {
  it('add with headers, ranges, columns.add(index, values, name), getItemOrNullObject, delete', async () => {
    const sb = sandboxFromRows('S', rows);
    await sb.run(async (context) => {
      const ws = context.workbook.worksheets.getItem('S');
      const t = ws.tables.add('A1:C5', true);
      t.load('name');
      const body = t.getDataBodyRange().load('address');
      const head = t.getHeaderRowRange().load('values');
      await context.sync();
      expect(t.name).toBe('Table1');
      expect(body.address).toBe('S!A2:C5');
      expect(head.values).toEqual([['Id', 'Amount', 'Score']]);
      t.columns.add(null as unknown as undefined, [['Flag'], ['y'], ['n'], ['y'], ['n']]);
      t.columns.add(1, undefined, 'Inserted');
      const missing = t.columns.getItemOrNullObject('Nope');
      await context.sync();
      expect(missing.isNullObject).toBe(true);
      const whole = t.getRange().load('address');
      t.columns.load('items/name');
      await context.sync();
      expect(whole.address).toBe('S!A1:E5');
      expect(t.columns.items.map((c) => c.name)).toEqual(['Id', 'Inserted', 'Amount', 'Score', 'Flag']);
      t.columns.getItem('Inserted').delete();
      await context.sync();
      t.columns.add(undefined, [['x'], ['1']]); // 2 rows for a 5-row table
      expect(await codeOf(context.sync())).toBe('InvalidArgument');
    });
    expect(sb.valuesOf('S', 'A1:D2')).toEqual([['Id', 'Amount', 'Score', 'Flag'], ['C1', 10, 0.5, 'y']]);
    expect(sb.snapshot().sheets[0].tables).toEqual([{ name: 'Table1', address: 'A1:D5', showHeaders: true }]);
  });

  it('hasHeaders=false generates headers and shifts the data down a row (as documented)', async () => {
    const sb = sandboxFromRows('S', [[1, 2], [3, 4]]);
    await sb.run(async (context) => {
      context.workbook.worksheets.getItem('S').tables.add('A1:B2', false);
      await context.sync();
    });
    expect(sb.valuesOf('S', 'A1:B3')).toEqual([['Column1', 'Column2'], [1, 2], [3, 4]]);
    expect(sb.snapshot().sheets[0].tables[0].address).toBe('A1:B3');
  });

  it('workbook.tables and range.getTables find tables; overlapping add fails', async () => {
    const sb = sandboxFromRows('S', rows);
    sb.addTable('S', 'A1:C5', 'Claims');
    await sb.run(async (context) => {
      const byName = context.workbook.tables.getItemOrNullObject('claims').load('name');
      const inRange = context.workbook.worksheets.getItem('S').getRange('B3').getTables(false).load('items/name');
      await context.sync();
      expect(byName.name).toBe('Claims');
      expect(inRange.items.map((t) => t.name)).toEqual(['Claims']);
      context.workbook.worksheets.getItem('S').tables.add('C3:D6', true);
      expect(await codeOf(context.sync())).toBe('InvalidOperation');
    });
  });
});

describe('insert and delete with shift', () => {
  it('inserting entire columns moves cells, formats, widths, rules, validations, tables and references', async () => {
    const sb = sandboxFromRows('S', rows);
    sb.addTable('S', 'A1:C5', 'Claims');
    sb.addConditionalFormat('S', 'C2:C5', '=ABS($C2)>=3', { fill: '#0A0B0C' });
    sb.addListValidation('S', 'D2:D5', 'a,b');
    sb.setColumnWidth('S', 'C', 70);
    sb.setCell('S', 0, 5, { formula: '=C2*2' });
    await sb.run(async (context) => {
      context.workbook.worksheets.getItem('S').getRange('B:B').insert('Right');
      await context.sync();
    });
    const snap = sb.snapshot().sheets[0];
    expect(sb.valuesOf('S', 'A1:D2')).toEqual([['Id', '', 'Amount', 'Score'], ['C1', '', 10, 0.5]]);
    expect(snap.tables[0].address).toBe('A1:D5');
    expect(snap.conditionalFormats[0]).toMatchObject({ ranges: 'D2:D5', formula: '=ABS($D2)>=3' });
    expect(snap.validations[0].ranges).toBe('E2:E5');
    expect(snap.columnWidths).toEqual({ D: 70 });
    expect(snap.cells.G1).toEqual({ formula: '=D2*2' });
    expect(sb.highlightAt('S', 2, 3)).toEqual({ fill: '#0A0B0C', font: null, bold: null });
  });

  it('deleting columns shifts left and turns references to deleted cells into #REF!', async () => {
    const sb = sandboxFromRows('S', rows);
    sb.addConditionalFormat('S', 'C2:C5', '=$C2>0', { fill: '#0A0B0C' });
    sb.addConditionalFormat('S', 'B2:B5', '=$B2>0', { fill: '#0D0E0F' });
    await sb.run(async (context) => {
      context.workbook.worksheets.getItem('S').getRange('B:B').delete('Left');
      await context.sync();
    });
    const snap = sb.snapshot().sheets[0];
    expect(sb.valuesOf('S', 'A1:C1')).toEqual([['Id', 'Score', '']]);
    expect(snap.conditionalFormats.map((c) => [c.ranges, c.formula])).toEqual([['B2:B5', '=$B2>0']]);
  });

  it('partial insert shifts only the band; rows inserted Down move what is below', async () => {
    const sb = sandboxFromRows('S', rows);
    sb.addListValidation('S', 'A2:C3', 'x');
    await sb.run(async (context) => {
      const ws = context.workbook.worksheets.getItem('S');
      ws.getRange('B3:B4').insert('Down');
      await context.sync();
    });
    expect(sb.valuesOf('S', 'A1:C7')).toEqual([
      ['Id', 'Amount', 'Score'], ['C1', 10, 0.5], ['C2', '', 3.4], ['C3', '', ''], ['C4', 20, -4], ['', 30, ''], ['', 40, ''],
    ]);
    // The validation block is split: column B's part grows by the inserted cells (inserted inside
    // it, as Excel extends validation into inserted cells), the rest stays.
    expect(sb.validationAt('S', 4, 1)).toEqual(['x']); // old B3 moved to B5
    expect(sb.validationAt('S', 5, 1)).toBeNull(); // B6 (old B4) was never validated
    expect(sb.validationAt('S', 2, 0)).toEqual(['x']);
    expect(sb.validationAt('S', 3, 0)).toBeNull(); // A4 not in the band, not validated
    expect(sb.snapshot().sheets[0].validations[0].ranges).toBe('A2:A3,C2:C3,B2:B5');
  });

  it('inserting would push data off the sheet: NonBlankCellOffSheet, nothing changed', async () => {
    const sb = sandboxFromRows('S', rows);
    sb.setCell('S', 0, 16383, 'edge');
    const before = sb.snapshot();
    await sb.run(async (context) => {
      context.workbook.worksheets.getItem('S').getRange('A:A').insert('Right');
      expect(await codeOf(context.sync())).toBe('NonBlankCellOffSheet');
    });
    expect(diffSnapshots(before, sb.snapshot())).toEqual([]);
  });

  it('a shift that would move part of a table fails with InvalidOperation', async () => {
    const sb = sandboxFromRows('S', rows);
    sb.addTable('S', 'A1:C5', 'Claims');
    await sb.run(async (context) => {
      context.workbook.worksheets.getItem('S').getRange('B2').insert('Down');
      expect(await codeOf(context.sync())).toBe('InvalidOperation');
    });
  });
});

describe('snapshots', () => {
  it('diffSnapshots lists exactly what changed', async () => {
    const sb = sandboxFromRows('S', rows);
    const before = sb.snapshot();
    await sb.run(async (context) => {
      const ws = context.workbook.worksheets.getItem('S');
      ws.getRange('B2').values = [[11]];
      ws.getRange('A1').format.font.bold = true;
      context.workbook.settings.add('k', 1);
      await context.sync();
    });
    expect(diffSnapshots(before, sb.snapshot())).toEqual([
      'S!A1 bold: none -> true',
      'S!B2 value: 10 -> 11',
      'setting k: none -> 1',
    ]);
    expect(diffSnapshots(before, before)).toEqual([]);
  });

  it('snapshots are plain JSON (deep copies)', () => {
    const sb = sandboxFromRows('S', rows);
    const a = sb.snapshot();
    expect(JSON.parse(JSON.stringify(a))).toEqual(a);
    a.sheets[0].cells.A1.value = 'mutated';
    expect(sb.snapshot().sheets[0].cells.A1.value).toBe('Id');
  });
});

describe('more members', () => {
  it('unprotect lifts AccessDenied; protect with a password needs it', async () => {
    const sb = sandboxFromRows('S', rows);
    await sb.run(async (context) => {
      const ws = context.workbook.worksheets.getItem('S');
      ws.protection.protect(undefined, 'pw');
      ws.getRange('A1').values = [['x']];
      expect(await codeOf(context.sync())).toBe('AccessDenied');
      // As in Excel, the protect() before the failing write stayed applied.
      ws.protection.load('protected');
      await context.sync();
      expect(ws.protection.protected).toBe(true);
      ws.protection.unprotect('wrong');
      expect(await codeOf(context.sync())).toBe('InvalidArgument');
      ws.protection.unprotect('pw');
      ws.getRange('A1').values = [['x']];
      await context.sync();
    });
    expect(sb.valueAt('S', 0, 0)).toBe('x');
  });

  it('table rows.add appends inside the table; Table.delete removes table and contents', async () => {
    const sb = sandboxFromRows('S', rows);
    sb.addTable('S', 'A1:C5', 'Claims');
    await sb.run(async (context) => {
      const t = context.workbook.tables.getItem('Claims');
      t.rows.add(undefined, [['C5', 50, 1]]);
      const r = t.getRange().load('address');
      await context.sync();
      expect(r.address).toBe('S!A1:C6');
      t.delete();
      await context.sync();
    });
    expect(sb.snapshot().sheets[0].tables).toEqual([]);
    expect(sb.valueAt('S', 5, 0)).toBe('');
  });

  it('highlightAt refuses to guess on a rule it cannot evaluate', () => {
    const sb = sandboxFromRows('S', rows);
    sb.addConditionalFormat('S', 'B2:B5', '=B2>AVERAGE($B$2:$B$5)', { fill: '#101010' });
    expect(() => sb.highlightAt('S', 1, 1)).toThrow(/AVERAGE|range/);
  });

  it('stats count syncs, statements and bytes, and reset', async () => {
    const sb = sandboxFromRows('S', rows);
    sb.stats.reset();
    await sb.run(async (context) => {
      const r = context.workbook.worksheets.getItem('S').getRange('A1:C5').load('values');
      await context.sync();
      const read = r.values;
      r.values = read; // write back exactly what was read
      await context.sync();
    });
    expect(sb.stats.runs).toBe(1);
    expect(sb.stats.syncs).toBe(2);
    expect(sb.stats.requests).toBe(2);
    // The response carries the 5x3 values as JSON.
    expect(sb.stats.responseBytes.max).toBeGreaterThan(JSON.stringify(rows).length);
    expect(sb.stats.requestBytes.total).toBeGreaterThan(JSON.stringify(rows).length);
    sb.stats.reset();
    expect([sb.stats.syncs, sb.stats.requestBytes.max, sb.stats.responseBytes.total]).toEqual([0, 0, 0]);
  });
});
