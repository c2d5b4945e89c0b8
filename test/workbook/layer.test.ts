import { describe, expect, it } from 'vitest';
import { diffSnapshots, sandboxFromRows, CellError, type SandboxSnapshot } from '../../src/sandbox/index.js';
import { NOTES_SHEET_NAME, PALETTE, REVIEW_STATUSES, STATUS_HEADER, NOTE_HEADER, resultHeaders } from '../../src/report/index.js';
import { TailmarkError } from '../../src/workbook/api.js';
import { claimRows, claimsSandbox, layerFor, SETTINGS } from './helpers.js';

const H = resultHeaders('Amount');
const code = async (p: Promise<unknown>): Promise<string> => {
  try {
    await p;
  } catch (e) {
    if (e instanceof TailmarkError) return e.code;
    throw e;
  }
  return 'no error';
};
const hex = (s: string) => `#${s}`.toUpperCase();

describe('detect', () => {
  it('finds the block around one cell, the header row and column guesses', async () => {
    const sb = claimsSandbox(300);
    const t = await layerFor(sb).detect();
    expect(t.address).toBe('Claims!A1:E301');
    expect(t.rowCount).toBe(300);
    expect(t.tableName).toBeNull();
    expect(t.hasResults).toBe(false);
    expect(t.columns.map((c) => [c.header, c.guess])).toEqual([
      ['Claim ID', 'id'],
      ['Employee', 'key'],
      ['Cost centre', 'key'],
      ['Category', 'key'],
      ['Amount', 'amount'],
    ]);
  });

  it('uses the Excel table when the selection is inside one', async () => {
    const sb = claimsSandbox(50);
    sb.addTable('Claims', 'A1:E51', 'ClaimsTable');
    sb.setSelection('Claims', 'C10');
    const t = await layerFor(sb).detect();
    expect(t.tableName).toBe('ClaimsTable');
    expect(t.address).toBe('Claims!A1:E51');
  });

  it('recognises date columns from their number format', async () => {
    const sb = sandboxFromRows('S', [['Claim date', 'Amount'], [45292, 10], [45293, 12], [45294, 11]]);
    for (let r = 1; r <= 3; r++) sb.setCell('S', r, 0, { value: 45291 + r, numberFormat: 'yyyy-mm-dd' });
    sb.setSelection('S', 'A1');
    const t = await layerFor(sb).detect();
    expect(t.columns.map((c) => c.guess)).toEqual(['date', 'amount']);
  });

  it('refuses a multi-area selection, an empty cell and a block without numbers', async () => {
    const sb = claimsSandbox(20);
    sb.setSelection('Claims', ['A1', 'C5']);
    const e1 = layerFor(sb).detect();
    await expect(e1).rejects.toThrow(/Several areas/);
    expect(await code(layerFor(sb).detect())).toBe('multi-area');
    sb.setSelection('Claims', 'K40');
    expect(await code(layerFor(sb).detect())).toBe('no-selection');
    await expect(layerFor(sb).detect()).rejects.toThrow(/K40 is empty/);
    const text = sandboxFromRows('T', [['Name', 'Team'], ['a', 'x'], ['b', 'y']]);
    text.setSelection('T', 'A2');
    expect(await code(layerFor(text).detect())).toBe('no-numbers');
  });

  it('refuses a block whose first row is data (no header row)', async () => {
    const sb = sandboxFromRows('S', [[1, 2], [3, 4]]);
    sb.setSelection('S', 'A1');
    await expect(layerFor(sb).detect()).rejects.toThrow(/no header row/);
  });
});

describe('typed reads', () => {
  it('reads error cells as CellError and dates as Date (excluded from amounts as "date")', async () => {
    const sb = sandboxFromRows('S', [['Cost centre', 'Amount'], ['A', 10], ['A', 11], ['A', 12], ['A', 0], ['A', 13]]);
    sb.setCell('S', 4, 1, { value: new CellError('#N/A') });
    sb.setCell('S', 5, 1, { value: 45300, numberFormat: 'dd/mm/yyyy' });
    sb.setSelection('S', 'A1');
    const layer = layerFor(sb);
    const t = await layer.detect();
    const p = await layer.readForPreview(t, { ...SETTINGS, idColumn: null, groupColumns: ['Cost centre'] });
    const cells = p.valueColumns[0].cells;
    expect(cells.slice(0, 3)).toEqual([10, 11, 12]);
    expect(cells[3]).toEqual({ kind: 'error', code: '#N/A' });
    expect(cells[4]).toBeInstanceOf(Date);
    expect((cells[4] as Date).toISOString().slice(0, 10)).toBe('2024-01-09'); // serial 45300 = 2024-01-09: Excel's 1900 system counts days from 1899-12-30 for serials >= 61 (Microsoft DATEVALUE docs: 2008-01-01 is 39448)
    const s = await layer.run(t, { ...SETTINGS, idColumn: null, groupColumns: ['Cost centre'], minGroupSize: 1 });
    const ex = Object.fromEntries(s.excluded.map((e) => [e.reason, e.count]));
    expect(Object.values(ex)).toHaveLength(2);
    expect(s.rowsScored).toBe(3);
  });
});

describe('run on a plain range', () => {
  it('writes result columns right of the data, dropdown, highlight and notes, in at most 8 syncs for 5,000 x 10', async () => {
    // 10 columns: the 5 claim columns plus 5 descriptive ones.
    const rows = claimRows(5000).map((r, i) => [...r, ...(i === 0 ? ['Project', 'Vendor', 'Ref', 'Memo', 'Region'] : [`P${i % 9}`, `V${i % 31}`, i * 3, `memo ${i}`, `R${i % 5}`])]);
    const sb = sandboxFromRows('Claims', rows);
    sb.setSelection('Claims', 'A1');
    sb.stats.reset();
    const layer = layerFor(sb);
    const t = await layer.detect();
    const summary = await layer.run(t, SETTINGS);
    expect(sb.stats.syncs).toBeLessThanOrEqual(8);
    expect(sb.stats.requestBytes.max).toBeLessThan(5 * 1024 * 1024);
    expect(sb.stats.responseBytes.max).toBeLessThan(5 * 1024 * 1024);
    expect(summary.rowsScored).toBe(5000);
    // planted large claims: every 97th row from row 13
    expect(summary.flagged).toBeGreaterThanOrEqual(Math.floor(5000 / 97));
    const header = sb.valuesOf('Claims', 'K1:O1')[0];
    expect(header).toEqual([H.score, H.flag, H.reason, STATUS_HEADER, NOTE_HEADER]);
    // row 15 (data row 13) is planted: flagged, status default, highlighted with the open swatch
    const row = 1 + 13;
    expect(sb.valueAt('Claims', row, 12)).not.toBe('');
    expect(sb.valueAt('Claims', row, 13)).toBe(REVIEW_STATUSES[0].label);
    expect(sb.highlightAt('Claims', row, 4)?.fill?.toUpperCase()).toBe(hex(PALETTE.open.fill));
    expect(sb.highlightAt('Claims', 2, 4)).toBeNull();
    expect(sb.validationAt('Claims', row, 13)).toEqual(REVIEW_STATUSES.map((s) => s.label));
    expect(sb.sheetNames()).toContain(NOTES_SHEET_NAME);
    expect(await layer.loadSettings()).toEqual(SETTINGS);
  });

  it('recolours a row when its status cell is changed directly', async () => {
    const sb = claimsSandbox(200);
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    const row = 14; // data row 13 is planted
    expect(sb.highlightAt('Claims', row, 0)?.fill?.toUpperCase()).toBe(hex(PALETTE.open.fill));
    for (const st of REVIEW_STATUSES) {
      sb.setCell('Claims', row, 8, st.label);
      expect(sb.highlightAt('Claims', row, 0)?.fill?.toUpperCase()).toBe(hex(PALETTE[st.id].fill));
    }
  });

  it('writes text as text: group names and notes starting with = + - @ stay text', async () => {
    const rows: (string | number)[][] = [['Claim ID', 'Cost centre', 'Amount']];
    for (let i = 0; i < 30; i++) rows.push([`=ID${i}`, i % 2 ? '=SUM(A1)' : '+44 team', 100 + (i % 5) + (i === 7 ? 900 : 0)]);
    const sb = sandboxFromRows('S', rows);
    sb.setSelection('S', 'A1');
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), { ...SETTINGS, groupColumns: ['Cost centre'], minGroupSize: 3 });
    await layer.mark([7], 'Cleared', '=HYPERLINK("x")');
    const snap = sb.snapshot();
    const all = snap.sheets.flatMap((s) => Object.entries(s.cells).map(([k, c]) => [s.name, k, c] as const));
    // The only formulas anywhere are none: we wrote no formula into any cell.
    expect(all.filter(([, , c]) => c.formula !== undefined)).toEqual([]);
    expect(sb.valueAt('S', 8, 7)).toBe('=HYPERLINK("x")');
    const notes = snap.sheets.find((s) => s.name === NOTES_SHEET_NAME)!;
    expect(Object.values(notes.cells).some((c) => typeof c.value === 'string' && c.value.includes('=SUM(A1)'))).toBe(true);
  });

  it('inserts columns when the columns to the right hold user data, and remove() restores the sheet exactly', async () => {
    const sb = claimsSandbox(100);
    sb.setCell('Claims', 0, 7, 'My notes');
    sb.setCell('Claims', 5, 7, 'keep me');
    sb.setColumnWidth('Claims', 'H', 90);
    sb.addConditionalFormat('Claims', 'E2:E101', '=$E2>1000', { fill: '#123456' });
    sb.addListValidation('Claims', 'H2:H101', 'a,b');
    const before = sb.snapshot();
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    // user's column H moved right by 5 and is intact
    expect(sb.valueAt('Claims', 5, 12)).toBe('keep me');
    expect(sb.valueAt('Claims', 0, 5)).toBe(H.score);
    await layer.remove(true);
    expect(afterRemove(before, sb.snapshot())).toEqual([]);
  });

  it('remove() after writing into empty columns restores the sheet exactly (values, formats, rules, validations)', async () => {
    const sb = claimsSandbox(120);
    sb.setCell('Claims', 3, 4, { value: 12.5, numberFormat: '0.00', fill: '#FFEEDD', bold: true });
    sb.addConditionalFormat('Claims', 'A2:E121', '=$E2>500', { fill: '#101010' });
    const before = sb.snapshot();
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    await layer.run(await layer.detect(), { ...SETTINGS, cutoff: 2.5 });
    await layer.remove(true);
    expect(afterRemove(before, sb.snapshot())).toEqual([]);
  });
});

describe('run into an Excel table', () => {
  it('adds table columns and remove() takes them away', async () => {
    const sb = claimsSandbox(80);
    sb.addTable('Claims', 'A1:E81', 'ClaimsTable');
    sb.setSelection('Claims', 'B2');
    const before = sb.snapshot();
    const layer = layerFor(sb);
    const t = await layer.detect();
    await layer.run(t, SETTINGS);
    const tbl = sb.snapshot().sheets[0].tables[0];
    expect(tbl.address).toBe('A1:J81');
    expect(sb.valuesOf('Claims', 'F1:J1')[0]).toEqual([H.score, H.flag, H.reason, STATUS_HEADER, NOTE_HEADER]);
    const again = await layer.detect();
    expect(again.hasResults).toBe(true);
    expect(again.columns.map((c) => c.header)).toEqual(['Claim ID', 'Employee', 'Cost centre', 'Category', 'Amount']);
    await layer.remove(true);
    expect(afterRemove(before, sb.snapshot())).toEqual([]);
  });
});

describe('re-runs keep review marks', () => {
  it('by claim ID after a re-sort, with new rows and a new cutoff', async () => {
    const sb = claimsSandbox(200);
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    const ex = await layer.listExceptions();
    expect(ex.length).toBeGreaterThan(1);
    const [a, b] = ex;
    await layer.mark([a.row], 'Asked claimant', 'emailed 3 Apr');
    await layer.mark([b.row], 'Cleared', null);
    // re-sort the whole block (data and our columns together), reversing row order
    const block = sb.valuesOf('Claims', 'A2:J201');
    sb.setValues('Claims', 'A2', [...block].reverse());
    // new rows appended
    sb.setValues('Claims', 'A202', [['CL-NEW-1', 'Person 1', 'CC-101', 'Travel', 95], ['CL-NEW-2', 'Person 2', 'CC-202', 'Meals', 4000]]);
    sb.setSelection('Claims', 'A1');
    const t = await layer.detect();
    expect(t.rowCount).toBe(202);
    await layer.run(t, { ...SETTINGS, cutoff: 3 });
    const after = await layer.listExceptions();
    const byId = new Map(after.map((e) => [e.claimId, e]));
    expect(byId.get(a.claimId)?.status).toBe('Asked claimant');
    expect(byId.get(a.claimId)?.note).toBe('emailed 3 Apr');
    expect(byId.get(b.claimId)?.status).toBe('Cleared');
    expect(byId.get('CL-NEW-2')?.status).toBe(REVIEW_STATUSES[0].label);
    expect(layer.lastRun?.marksKept).toBe(2);
  });

  it('by row without an ID column; a claim no longer flagged keeps its mark', async () => {
    const sb = claimsSandbox(200);
    const layer = layerFor(sb);
    const settings = { ...SETTINGS, idColumn: null };
    await layer.run(await layer.detect(), settings);
    const ex = await layer.listExceptions();
    await layer.mark([ex[0].row], 'Sent up', 'to finance');
    // a much higher cutoff: nothing flagged any more
    await layer.run(await layer.detect(), { ...settings, cutoff: 1000 });
    const after = await layer.listExceptions();
    expect(after).toHaveLength(1);
    expect(after[0]).toMatchObject({ row: ex[0].row, status: 'Sent up', note: 'to finance' });
    expect(sb.highlightAt('Claims', ex[0].row + 1, 0)?.fill?.toUpperCase()).toBe(hex(PALETTE.escalated.fill));
  });
});

describe('refusals leave the workbook unchanged', () => {
  it('protected sheet', async () => {
    const sb = claimsSandbox(50);
    const layer = layerFor(sb);
    const t = await layer.detect();
    sb.setProtected('Claims', true);
    const before = sb.snapshot();
    expect(await code(layer.run(t, SETTINGS))).toBe('protected');
    expect(diffSnapshots(before, sb.snapshot())).toEqual([]);
  });

  it('notes sheet name taken by a user sheet', async () => {
    const sb = claimsSandbox(50);
    sb.addSheet(NOTES_SHEET_NAME);
    sb.setCell(NOTES_SHEET_NAME, 0, 0, 'my own notes');
    const before = sb.snapshot();
    const layer = layerFor(sb);
    expect(await code(layer.run(await layer.detect(), SETTINGS))).toBe('name-clash');
    expect(diffSnapshots(before, sb.snapshot())).toEqual([]);
  });

  it('no room before column XFD', async () => {
    const sb = claimsSandbox(30);
    sb.setCell('Claims', 10, 16383, 'far right');
    const before = sb.snapshot();
    const layer = layerFor(sb);
    const err = layer.run(await layer.detect(), SETTINGS);
    expect(await code(err)).toBe('column-limit');
    expect(diffSnapshots(before, sb.snapshot())).toEqual([]);
  });

  it('data changed while scoring', async () => {
    const sb = claimsSandbox(60);
    const layer = layerFor(sb);
    const t = await layer.detect();
    const before = sb.snapshot();
    let typed = false;
    const p = layer.run(t, SETTINGS, (progress) => {
      if (progress.phase === 'scoring' && !typed) {
        typed = true;
        sb.setCell('Claims', 5, 4, 99999);
      }
    });
    expect(await code(p)).toBe('changed-during-run');
    const after = sb.snapshot();
    after.sheets[0].cells.E6 = before.sheets[0].cells.E6;
    expect(diffSnapshots(before, after)).toEqual([]);
  });

  it('cancelled before writing', async () => {
    const sb = claimsSandbox(60);
    const layer = layerFor(sb);
    const t = await layer.detect();
    const before = sb.snapshot();
    const ac = new AbortController();
    const p = layer.run(t, SETTINGS, (progress) => {
      if (progress.phase === 'scoring') ac.abort();
    }, ac.signal);
    expect(await code(p)).toBe('cancelled');
    expect(diffSnapshots(before, sb.snapshot())).toEqual([]);
  });
});

describe('re-run with a user column added right of our block', () => {
  it('updates our columns in place and leaves the user column alone', async () => {
    const sb = claimsSandbox(100);
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    sb.setCell('Claims', 0, 10, 'Follow-up');
    sb.setCell('Claims', 14, 10, 'call Tue');
    const t = await layer.detect();
    expect(t.address).toBe('Claims!A1:E101');
    expect(t.hasResults).toBe(true);
    await layer.run(t, { ...SETTINGS, cutoff: 3 });
    expect(sb.valuesOf('Claims', 'F1:K1')[0]).toEqual([H.score, H.flag, H.reason, STATUS_HEADER, NOTE_HEADER, 'Follow-up']);
    expect(sb.valueAt('Claims', 14, 10)).toBe('call Tue');
  });
});

/**
 * What remove(true) left different from before the run: nothing but our two sheets, which it
 * clears (keeping their A1 marker) instead of deleting (deleting a sheet wipes Excel's undo history).
 */
function afterRemove(before: SandboxSnapshot, after: SandboxSnapshot): string[] {
  const ours = after.sheets.filter((s) => s.name === NOTES_SHEET_NAME || s.name === 'Tailmark log');
  const leftovers = ours.flatMap((s) => Object.keys(s.cells).filter((k) => k !== 'A1').map((k) => `${s.name}!${k} left`));
  return [...leftovers, ...diffSnapshots(before, after).filter((d) => !/^sheet Tailmark (notes|log) added$/.test(d))];
}
