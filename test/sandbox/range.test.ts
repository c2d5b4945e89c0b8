// Range semantics of the sandbox. Expected behaviours follow the Excel JavaScript API reference
// (learn.microsoft.com/javascript/api/excel/excel.range) and @types/office-js doc comments:
// "If the returned value starts with a plus ("+"), minus ("-"), or equal sign ("="), Excel
// interprets this value as a formula"; getUsedRange on a blank sheet returns A1; getSelectedRange
// throws on multiple areas; TableCollection.add(hasHeaders=false) generates headers and shifts data down.
import { describe, expect, it } from 'vitest';
import { SandboxWorkbook, sandboxFromRows, SandboxError, CellError } from '../../src/sandbox/index.js';

async function codeOf(p: Promise<unknown>): Promise<string> {
  try { await p; } catch (e) { return (e as SandboxError).code; }
  return 'no error';
}

describe('values, types, formulas', () => {
  it('reports valueTypes and error values', async () => {
    const sb = sandboxFromRows('S', [[1.5, 'x', true, null, new CellError('#N/A')]]);
    await sb.run(async (context) => {
      const r = context.workbook.worksheets.getItem('S').getRange('A1:E1').load(['values', 'valueTypes', 'formulas', 'numberFormat', 'address', 'rowIndex', 'columnIndex', 'rowCount', 'columnCount']);
      await context.sync();
      expect(r.values).toEqual([[1.5, 'x', true, '', '#N/A']]);
      expect(r.valueTypes).toEqual([['Double', 'String', 'Boolean', 'Empty', 'Error']]);
      expect(r.formulas).toEqual([[1.5, 'x', true, '', '#N/A']]);
      expect(r.numberFormat).toEqual([['General', 'General', 'General', 'General', 'General']]);
      expect(r.address).toBe('S!A1:E1');
      expect([r.rowIndex, r.columnIndex, r.rowCount, r.columnCount]).toEqual([0, 0, 1, 5]);
    });
  });

  it('strings starting with = become formulas; with "@" format or an apostrophe they stay text', async () => {
    const sb = sandboxFromRows('S', [['seed']]);
    await sb.run(async (context) => {
      const ws = context.workbook.worksheets.getItem('S');
      ws.getRange('B1').values = [['=1+2']];
      ws.getRange('B2').numberFormat = [['@']];
      ws.getRange('B2').values = [['=1+2']];
      ws.getRange('B3').values = [["'=1+2"]];
      ws.getRange('B4').values = [['-abc']];
      ws.getRange('B5').values = [['@home']];
      await context.sync();
      const r = ws.getRange('B1:B5').load(['values', 'formulas']);
      await context.sync();
      expect(r.formulas).toEqual([['=1+2'], ['=1+2'], ['=1+2'], ['=-abc'], ['@home']]);
      // B1 is evaluated by the sandbox's evaluator; B2 and B3 are text.
      expect(r.values[0][0]).toBe(3);
      expect(r.values[1][0]).toBe('=1+2');
      expect(r.values[2][0]).toBe('=1+2');
    });
    expect(sb.cellAt('S', 0, 1)).toEqual({ formula: '=1+2' });
    expect(sb.cellAt('S', 1, 1)).toEqual({ value: '=1+2', numberFormat: '@' });
    expect(sb.cellAt('S', 2, 1)).toEqual({ value: '=1+2', quotePrefix: true });
  });

  it('typed-input conversion: numeric text becomes numbers unless the cell is text-formatted', async () => {
    const sb = sandboxFromRows('S', [['seed']]);
    await sb.run(async (context) => {
      const ws = context.workbook.worksheets.getItem('S');
      ws.getRange('A2:A8').values = [['1,234.50'], ['(120)'], ['12%'], ['TRUE'], ['#N/A'], ['2024-01-31'], ['001']];
      ws.getRange('B2').numberFormat = [['@']];
      ws.getRange('B2').values = [['001']];
      await context.sync();
    });
    expect(sb.valuesOf('S', 'A2:A8')).toEqual([[1234.5], [-120], [0.12], [true], ['#N/A'], [45322], [1]]);
    expect(sb.cellAt('S', 3, 0)?.numberFormat).toBe('0%');
    expect(sb.cellAt('S', 6, 0)?.numberFormat).toBe('yyyy-mm-dd');
    expect(sb.valueAt('S', 1, 1)).toBe('001');
  });

  it('null entries leave cells unchanged; a scalar is broadcast; NaN and objects are rejected', async () => {
    const sb = sandboxFromRows('S', [['a', 'b']]);
    await sb.run(async (context) => {
      const ws = context.workbook.worksheets.getItem('S');
      ws.getRange('A1:B1').values = [[null, 'B']];
      ws.getRange('C1:D2').values = 7 as unknown as unknown[][];
      await context.sync();
      ws.getRange('A1').values = [[Number.NaN]];
      expect(await codeOf(context.sync())).toBe('InvalidArgument');
      ws.getRange('A1').values = [[new Date()]];
      expect(await codeOf(context.sync())).toBe('InvalidArgument');
    });
    expect(sb.valuesOf('S', 'A1:D2')).toEqual([['a', 'B', 7, 7], ['', '', 7, 7]]);
  });

  it('dates are serial numbers with a date format; text reflects the format', async () => {
    const sb = sandboxFromRows('S', [[new Date(Date.UTC(2024, 0, 31)), 0.256]]);
    await sb.run(async (context) => {
      const ws = context.workbook.worksheets.getItem('S');
      ws.getRange('B1').numberFormat = [['0.0%']];
      const r = ws.getRange('A1:B1').load(['values', 'numberFormat', 'text']);
      await context.sync();
      // Excel serial for 2024-01-31 is 45322 (1900 date system; Microsoft support, "DATEVALUE function").
      expect(r.values).toEqual([[45322, 0.256]]);
      expect(r.numberFormat).toEqual([['yyyy-mm-dd', '0.0%']]);
      expect(r.text).toEqual([['2024-01-31', '25.6%']]);
    });
  });
});

describe('addresses and navigation', () => {
  it('supports A1, sheet-qualified, whole-column and whole-row addresses', async () => {
    const sb = sandboxFromRows('My Sheet', [[1]]);
    await sb.run(async (context) => {
      const ws = context.workbook.worksheets.getItem('My Sheet');
      const a = ws.getRange('A:A').load(['address', 'rowCount', 'isEntireColumn']);
      const b = ws.getRange("'My Sheet'!B2:C5").load('address');
      const c = ws.getRange('3:4').load(['address', 'columnCount']);
      const d = ws.getRange('B2:C5').getEntireColumn().load('address');
      const e = ws.getRange('B2:C5').getCell(1, 1).load('address');
      const f = ws.getRange('B2').getResizedRange(2, 1).load('address');
      const g = ws.getRange('B2').getOffsetRange(1, 2).load('address');
      await context.sync();
      expect([a.address, a.rowCount, a.isEntireColumn]).toEqual(["'My Sheet'!A:A", 1048576, true]);
      expect(b.address).toBe("'My Sheet'!B2:C5");
      expect([c.address, c.columnCount]).toEqual(["'My Sheet'!3:4", 16384]);
      expect(d.address).toBe("'My Sheet'!B:C");
      expect(e.address).toBe("'My Sheet'!C3");
      expect(f.address).toBe("'My Sheet'!B2:C4");
      expect(g.address).toBe("'My Sheet'!D3");
      ws.getRange('A0').load('address');
      expect(await codeOf(context.sync())).toBe('InvalidArgument');
    });
  });

  it('getSurroundingRegion finds the contiguous block; getUsedRange(OrNullObject) on blank sheets', async () => {
    const sb = new SandboxWorkbook().addSheet('Data').addSheet('Blank');
    sb.setValues('Data', 'B2', [['h1', 'h2'], [1, 2], [3, null], [null, 4]]);
    sb.setValues('Data', 'F10', [['far']]);
    await sb.run(async (context) => {
      const ws = context.workbook.worksheets.getItem('Data');
      const region = ws.getRange('C3').getSurroundingRegion().load('address');
      const used = ws.getUsedRange().load('address');
      const blank = context.workbook.worksheets.getItem('Blank');
      const blankUsed = blank.getUsedRange().load('address');
      const blankNull = blank.getUsedRangeOrNullObject();
      const inter = ws.getRange('A1:C3').getIntersectionOrNullObject('C3:D4').load('address');
      const none = ws.getRange('A1').getIntersectionOrNullObject('D4');
      await context.sync();
      expect(region.address).toBe('Data!B2:C5');
      expect(used.address).toBe('Data!B2:F10');
      expect(blankUsed.address).toBe('Blank!A1');
      expect(blankNull.isNullObject).toBe(true);
      expect(inter.address).toBe('Data!C3');
      expect(none.isNullObject).toBe(true);
    });
  });

  it('select() updates the selection and fires selection-changed listeners after the run', async () => {
    const sb = sandboxFromRows('S', [[1]]);
    let fired = 0;
    let handler: { remove(): void } | null = null;
    await sb.run(async (context) => {
      handler = context.workbook.onSelectionChanged.add(() => { fired++; return Promise.resolve(); });
      await context.sync();
    });
    expect(sb.selectionListenerCount).toBe(1);
    await sb.run(async (context) => {
      context.workbook.worksheets.getItem('S').getRange('B2:B4').select();
      await context.sync();
      expect(fired).toBe(0);
    });
    await sb.flushEvents();
    expect(fired).toBe(1);
    expect(sb.selection()).toEqual(['S!B2:B4']);
    sb.userSelect('S', 'C1');
    await sb.flushEvents();
    expect(fired).toBe(2);
    // The first context has finished: remove() cannot queue on it outside a run...
    expect(() => handler!.remove()).toThrow(/finished/);
    expect(sb.selectionListenerCount).toBe(1);
    // ...but Excel.run(object, batch) reuses it, as Microsoft's events article shows.
    const h = handler as unknown as OfficeExtension.EventHandlerResult<Excel.SelectionChangedEventArgs>;
    await sb.run(h.context, async (context) => {
      h.remove();
      await context.sync();
    });
    expect(sb.selectionListenerCount).toBe(0);
  });
});

describe('formats', () => {
  it('fill, font, bold, column width read back uniformly or null when mixed', async () => {
    const sb = sandboxFromRows('S', [[1, 2]]);
    await sb.run(async (context) => {
      const ws = context.workbook.worksheets.getItem('S');
      ws.getRange('A1').format.fill.color = '#aabbcc';
      ws.getRange('A1:B1').format.font.bold = true;
      ws.getRange('A:A').format.columnWidth = 80;
      const a = ws.getRange('A1').format;
      a.load('columnWidth');
      a.fill.load('color');
      const ab = ws.getRange('A1:B1').format;
      ab.load('columnWidth');
      ab.fill.load('color');
      ab.font.load('bold,color');
      const c = ws.getRange('C1').format.fill.load('color');
      await context.sync();
      expect(a.fill.color).toBe('#AABBCC');
      expect(a.columnWidth).toBe(80);
      expect(ab.fill.color).toBeNull();
      expect(ab.columnWidth).toBeNull();
      expect(ab.font.bold).toBe(true);
      expect(ab.font.color).toBe('#000000');
      expect(c.color).toBe('#FFFFFF');
      ws.getRange('A1').format.fill.color = 'not a colour';
      expect(await codeOf(context.sync())).toBe('InvalidArgument');
    });
    const snap = sb.snapshot().sheets[0];
    expect(snap.columnWidths).toEqual({ A: 80 });
    expect(snap.cells.A1).toEqual({ value: 1, fill: '#AABBCC', bold: true });
  });

  it('nested load paths reach child objects', async () => {
    const sb = sandboxFromRows('S', [[1]]);
    await sb.run(async (context) => {
      const r = context.workbook.worksheets.getItem('S').getRange('A1');
      r.load('values,format/fill/color,format/columnWidth');
      await context.sync();
      expect(r.format.fill.color).toBe('#FFFFFF');
      expect(r.format.columnWidth).toBe(48);
    });
  });
});

describe('settings', () => {
  it('add, getItemOrNullObject, value, delete', async () => {
    const sb = sandboxFromRows('S', [[1]]);
    await sb.run(async (context) => {
      const s = context.workbook.settings;
      s.add('tailmark.test', { cutoff: 3.5, cols: ['Amount'] });
      await context.sync();
      const got = s.getItemOrNullObject('tailmark.test').load('value');
      const missing = s.getItemOrNullObject('nope').load('value');
      await context.sync();
      expect(got.value).toEqual({ cutoff: 3.5, cols: ['Amount'] });
      expect(missing.isNullObject).toBe(true);
      s.getItem('nope').delete();
      expect(await codeOf(context.sync())).toBe('ItemNotFound');
      s.getItemOrNullObject('nope').delete(); // a no-op on a null object, as in Excel
      await context.sync();
      s.getItem('tailmark.test').delete();
      await context.sync();
    });
    expect(sb.snapshot().settings).toEqual({});
  });
});

describe('worksheets', () => {
  it('add, getItemOrNullObject().delete() no-op, rename clash, position, activate', async () => {
    const sb = sandboxFromRows('S', [[1]]);
    await sb.run(async (context) => {
      const wss = context.workbook.worksheets;
      wss.getItemOrNullObject('Notes').delete();
      const notes = wss.add('Notes');
      notes.load('name,position');
      await context.sync();
      expect([notes.name, notes.position]).toEqual(['Notes', 1]);
      wss.add('notes');
      expect(await codeOf(context.sync())).toBe('ItemAlreadyExists');
      notes.position = 0;
      notes.activate();
      const active = wss.getActiveWorksheet().load('name');
      await context.sync();
      expect(active.name).toBe('Notes');
    });
    expect(sb.sheetNames()).toEqual(['Notes', 'S']);
  });
});
