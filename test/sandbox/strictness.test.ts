// Strictness rules of the sandbox, checked against the behaviour the Office.js reference documents
// (learn.microsoft.com/javascript/api/excel: load/sync, *OrNullObject, error codes) and the
// @types/office-js doc comments.
import { describe, expect, it } from 'vitest';
import { SandboxWorkbook, sandboxFromRows, SandboxError } from '../../src/sandbox/index.js';

function book(): SandboxWorkbook {
  return sandboxFromRows('Claims', [
    ['Id', 'Centre', 'Amount'],
    ['C1', 'North', 120],
    ['C2', 'North', 80.5],
    ['C3', 'South', '1,234.50'],
  ]);
}

async function codeOf(p: Promise<unknown>): Promise<string> {
  try {
    await p;
  } catch (e) {
    expect(e).toBeInstanceOf(SandboxError);
    return (e as SandboxError).code;
  }
  return 'no error';
}

describe('load + sync strictness', () => {
  it('reading a property before load+sync throws PropertyNotLoaded naming the property', async () => {
    const sb = book();
    await sb.run(async (context) => {
      const r = context.workbook.worksheets.getItem('Claims').getRange('A1:C4');
      expect(() => r.values).toThrow(/values/);
      r.load('values');
      // Loaded but not yet synced: still unavailable.
      try {
        void r.values;
        expect.unreachable();
      } catch (e) {
        expect((e as SandboxError).code).toBe('PropertyNotLoaded');
      }
      await context.sync();
      expect(r.values).toEqual([
        ['Id', 'Centre', 'Amount'],
        ['C1', 'North', 120],
        ['C2', 'North', 80.5],
        ['C3', 'South', '1,234.50'],
      ]);
      expect(() => r.address).toThrow(/address/);
    });
  });

  it('writes apply only at sync, in order', async () => {
    const sb = book();
    await sb.run(async (context) => {
      const r = context.workbook.worksheets.getItem('Claims').getRange('D1');
      r.values = [['first']];
      r.values = [['second']];
      expect(sb.valueAt('Claims', 0, 3)).toBe('');
      await context.sync();
      expect(sb.valueAt('Claims', 0, 3)).toBe('second');
    });
  });

  it('loads capture the state at their place in the queue', async () => {
    const sb = book();
    await sb.run(async (context) => {
      const ws = context.workbook.worksheets.getItem('Claims');
      const before = ws.getRange('C2').load('values');
      ws.getRange('C2').values = [[999]];
      const after = ws.getRange('C2').load('values');
      await context.sync();
      expect(before.values).toEqual([[120]]);
      expect(after.values).toEqual([[999]]);
    });
  });

  it('Excel.run syncs work left queued at the end of the batch', async () => {
    const sb = book();
    await sb.run((context) => {
      context.workbook.worksheets.getItem('Claims').getRange('E1').values = [['x']];
      return Promise.resolve();
    });
    expect(sb.valueAt('Claims', 0, 4)).toBe('x');
  });

  it('objects cannot queue work after their run finished', async () => {
    const sb = book();
    let leaked: Excel.Range | null = null;
    await sb.run((context) => {
      leaked = context.workbook.worksheets.getItem('Claims').getRange('A1');
      return Promise.resolve();
    });
    expect(() => { leaked!.values = [[1]]; }).toThrow(/finished/);
  });

  it('OrNullObject: isNullObject readable only after sync', async () => {
    const sb = book();
    await sb.run(async (context) => {
      const missing = context.workbook.worksheets.getItemOrNullObject('Nope');
      const present = context.workbook.worksheets.getItemOrNullObject('Claims');
      expect(() => missing.isNullObject).toThrow(/isNullObject/);
      await context.sync();
      expect(missing.isNullObject).toBe(true);
      expect(present.isNullObject).toBe(false);
    });
  });

  it('getItem of a missing sheet fails the sync with ItemNotFound only when used', async () => {
    const sb = book();
    await sb.run(async (context) => {
      context.workbook.worksheets.getItem('Nope'); // never used: no failure
      await context.sync();
      const r = context.workbook.worksheets.getItem('Nope').getRange('A1').load('values');
      expect(await codeOf(context.sync())).toBe('ItemNotFound');
      void r;
    });
  });

  it('collections expose items after load', async () => {
    const sb = book();
    sb.addSheet('Other');
    await sb.run(async (context) => {
      const sheets = context.workbook.worksheets;
      expect(() => sheets.items).toThrow(/items/);
      sheets.load('items/name');
      await context.sync();
      expect(sheets.items.map((s) => s.name)).toEqual(['Claims', 'Other']);
      expect(() => sheets.items[0].position).toThrow(/position/);
    });
  });

  it('getCount returns a ClientResult whose value needs a sync', async () => {
    const sb = book();
    await sb.run(async (context) => {
      const n = context.workbook.worksheets.getCount();
      expect(() => n.value).toThrow();
      await context.sync();
      expect(n.value).toBe(1);
    });
  });
});

describe('errors and atomicity', () => {
  it('atomic mode (partialOnError: false): a shape mismatch fails with InvalidArgument and the sync applies nothing', async () => {
    // The kinder-than-Excel mode, kept to show that the mismatch check itself changes nothing.
    const sb = sandboxFromRows('Claims', [['Claim', 'Amount'], ['C1', 10], ['C2', 20]], { partialOnError: false });
    const before = sb.snapshot();
    await sb.run(async (context) => {
      const ws = context.workbook.worksheets.getItem('Claims');
      ws.getRange('A1').values = [['changed']];
      ws.getRange('A2:B2').values = [[1, 2, 3]];
      const code = await codeOf(context.sync());
      expect(code).toBe('InvalidArgument');
    });
    expect(sb.snapshot()).toEqual(before);
  });

  it('by default (as Excel) a failing statement keeps the statements before it in the same sync', async () => {
    const sb = sandboxFromRows('S', [['a']]);
    await sb.run(async (context) => {
      const ws = context.workbook.worksheets.getItem('S');
      ws.getRange('A1').values = [['changed']];
      ws.getRange('A2:B2').values = [[1]];
      ws.getRange('A3').values = [['never']];
      expect(await codeOf(context.sync())).toBe('InvalidArgument');
    });
    expect(sb.valueAt('S', 0, 0)).toBe('changed');
    expect(sb.valueAt('S', 2, 0)).toBe('');
  });

  it('errors carry debugInfo naming the statement', async () => {
    const sb = book();
    await sb.run(async (context) => {
      context.workbook.worksheets.getItem('Claims').getRange('A1:B1').values = [[1]];
      try {
        await context.sync();
        expect.unreachable();
      } catch (e) {
        const err = e as SandboxError;
        expect(err.name).toBe('RichApi.Error');
        expect(err.debugInfo.code).toBe('InvalidArgument');
        expect(err.debugInfo.statement).toMatch(/getRange\("A1:B1"\)\.values/);
      }
    });
  });

  it('request payload over the limit fails with RequestPayloadSizeLimitExceeded and applies nothing', async () => {
    const sb = sandboxFromRows('S', [['a']], { payloadLimitBytes: 1000 });
    await sb.run(async (context) => {
      const rows = Array.from({ length: 200 }, (_, i) => [`row ${i}`]);
      context.workbook.worksheets.getItem('S').getRange('A1:A200').values = rows;
      expect(await codeOf(context.sync())).toBe('RequestPayloadSizeLimitExceeded');
    });
    expect(sb.valueAt('S', 0, 0)).toBe('a');
  });

  it('response payload over the limit fails with ResponsePayloadSizeLimitExceeded', async () => {
    const rows = Array.from({ length: 500 }, (_, i) => [`a fairly long text value number ${i}`]);
    const sb = sandboxFromRows('S', rows, { payloadLimitBytes: 4096 });
    await sb.run(async (context) => {
      const r = context.workbook.worksheets.getItem('S').getRange('A1:A500').load('values');
      expect(await codeOf(context.sync())).toBe('ResponsePayloadSizeLimitExceeded');
      expect(() => r.values).toThrow(/values/);
    });
  });

  it('the default limit is 5 MB', () => {
    expect(new SandboxWorkbook().options.payloadLimitBytes).toBe(5 * 1024 * 1024);
  });

  it('a protected sheet rejects writes with AccessDenied', async () => {
    const sb = book();
    sb.setProtected('Claims', true);
    await sb.run(async (context) => {
      const ws = context.workbook.worksheets.getItem('Claims');
      ws.protection.load('protected');
      await context.sync();
      expect(ws.protection.protected).toBe(true);
      ws.getRange('D1').values = [['x']];
      expect(await codeOf(context.sync())).toBe('AccessDenied');
      ws.getRange('D1').format.fill.color = '#123456';
      expect(await codeOf(context.sync())).toBe('AccessDenied');
      ws.getRange('D:D').conditionalFormats.add(Excel_Custom);
      expect(await codeOf(context.sync())).toBe('AccessDenied');
    });
    expect(sb.valueAt('Claims', 0, 3)).toBe('');
  });

  it('column limit: a range beyond XFD fails with InvalidArgument', async () => {
    const sb = book();
    await sb.run(async (context) => {
      const ws = context.workbook.worksheets.getItem('Claims');
      ws.getRangeByIndexes(0, 16383, 1, 1).values = [['last column is fine']];
      await context.sync();
      ws.getRangeByIndexes(0, 16383, 1, 2).values = [['a', 'b']];
      expect(await codeOf(context.sync())).toBe('InvalidArgument');
      ws.getRange('XFD1').getOffsetRange(0, 1).values = [['x']];
      expect(await codeOf(context.sync())).toBe('InvalidArgument');
    });
    expect(sb.valueAt('Claims', 0, 16383)).toBe('last column is fine');
  });

  it('getSelectedRange fails with InvalidSelection on a multi-area selection; getSelectedRanges lists areas', async () => {
    const sb = book();
    sb.setSelection('Claims', ['A1:A4', 'C1:C4']);
    await sb.run(async (context) => {
      const one = context.workbook.getSelectedRange().load('address');
      expect(await codeOf(context.sync())).toBe('InvalidSelection');
      void one;
      const many = context.workbook.getSelectedRanges();
      many.load('areaCount,address');
      many.areas.load('address');
      await context.sync();
      expect(many.areaCount).toBe(2);
      expect(many.address).toBe('Claims!A1:A4,Claims!C1:C4');
      expect(many.areas.items.map((a) => a.address)).toEqual(['Claims!A1:A4', 'Claims!C1:C4']);
    });
  });
});

const Excel_Custom = 'Custom' as Excel.ConditionalFormatType.custom;

describe("Excel's limits and the states a user can put Excel in", () => {
  it('a cell holds at most 32,767 characters (Excel specifications and limits)', async () => {
    const sb = sandboxFromRows('S', [['a']]);
    await sb.run(async (context) => {
      const r = context.workbook.worksheets.getItem('S').getRange('A1');
      r.values = [['x'.repeat(32767)]];
      await context.sync();
      r.values = [['x'.repeat(32768)]];
      expect(await codeOf(context.sync())).toBe('InvalidArgument');
    });
    expect(String(sb.valueAt('S', 0, 0)).length).toBe(32767);
  });

  it('a typed-in list source holds at most 255 characters; a range reference is not limited', async () => {
    const sb = sandboxFromRows('S', [['a']]);
    const list = (n: number) => Array.from({ length: n }, (_, i) => String(i % 10)).join(',').slice(0, n);
    await sb.run(async (context) => {
      const dv = context.workbook.worksheets.getItem('S').getRange('A2').dataValidation;
      dv.rule = { list: { source: list(255), inCellDropDown: true } };
      await context.sync();
      dv.rule = { list: { source: list(256), inCellDropDown: true } };
      expect(await codeOf(context.sync())).toBe('InvalidArgument');
      dv.rule = { list: { source: '=$Z$1:$Z$500', inCellDropDown: true } };
      await context.sync();
    });
  });

  it('cell-edit mode refuses a request unless the run asked to wait (delayForCellEdit), which then waits', async () => {
    const sb = sandboxFromRows('S', [['a']]);
    sb.setCellEditMode(true);
    await expect(sb.run(async (context) => {
      context.workbook.worksheets.getItem('S').getRange('A1').values = [['b']];
      await context.sync();
    })).rejects.toMatchObject({ code: 'InvalidOperationInCellEditMode' });
    let done = false;
    const held = sb.run({ delayForCellEdit: true }, async (context) => {
      context.workbook.worksheets.getItem('S').getRange('A1').values = [['c']];
      await context.sync();
      done = true;
    });
    await new Promise((r) => setTimeout(r, 20));
    expect(done).toBe(false);
    sb.setCellEditMode(false);
    await held;
    expect(sb.valueAt('S', 0, 0)).toBe('c');
  });

  it('a read-only workbook refuses writes but answers reads', async () => {
    const sb = sandboxFromRows('S', [['a']]);
    sb.mode.readOnly = true;
    await sb.run(async (context) => {
      const r = context.workbook.worksheets.getItem('S').getRange('A1').load('values');
      await context.sync();
      expect(r.values).toEqual([['a']]);
      r.values = [['b']];
      expect(await codeOf(context.sync())).toBe('AccessDenied');
    });
    expect(sb.valueAt('S', 0, 0)).toBe('a');
  });
});

describe('workbook-structure protection', () => {
  it('refuses adding and deleting sheets, and workbook.protection.protected says so', async () => {
    const sb = sandboxFromRows('S', [['a']]);
    sb.mode.structureProtected = true;
    await sb.run(async (context) => {
      const p = context.workbook.protection.load('protected');
      await context.sync();
      expect(p.protected).toBe(true);
      context.workbook.worksheets.add('Notes');
      expect(await codeOf(context.sync())).toBe('AccessDenied');
      context.workbook.worksheets.getItem('S').getRange('B1').values = [['cells are still writable']];
      await context.sync();
    });
    expect(sb.sheetNames()).toEqual(['S']);
  });
});
