import { describe, expect, it } from 'vitest';
import { diffSnapshots, sandboxFromRows } from '../../src/sandbox/index.js';
import { countUserCellsChanged } from '../../src/cli/sandbox-command.js';
import { TailmarkError } from '../../src/workbook/api.js';
import { LOG_HEADER } from '../../src/report/index.js';
import { claimsSandbox, layerFor, SETTINGS } from './helpers.js';

describe('pane actions', () => {
  it('selectRow selects the sheet row of a data row and fires selection handlers until unsubscribed', async () => {
    const sb = claimsSandbox(100);
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    let calls = 0;
    const off = await layer.onSelectionChanged(() => {
      calls++;
    });
    expect(sb.selectionListenerCount).toBe(1);
    await layer.selectRow(13);
    await sb.flushEvents();
    expect(sb.selection()).toEqual(['Claims!A15:J15']);
    expect(calls).toBe(1);
    sb.userSelect('Claims', 'C4');
    await sb.flushEvents();
    expect(calls).toBe(2);
    off();
    await new Promise((r) => setTimeout(r, 10));
    expect(sb.selectionListenerCount).toBe(0);
    sb.userSelect('Claims', 'C5');
    await sb.flushEvents();
    expect(calls).toBe(2);
  });

  it('mark validates statuses and rows; listExceptions lists flagged and marked rows', async () => {
    const sb = claimsSandbox(100);
    const layer = layerFor(sb);
    await expect(layer.listExceptions()).resolves.toEqual([]);
    await expect(layer.mark([1], 'Cleared', null)).rejects.toBeInstanceOf(TailmarkError);
    const summary = await layer.run(await layer.detect(), SETTINGS);
    const ex = await layer.listExceptions();
    expect(ex).toHaveLength(summary.flagged);
    const planted = ex.find((e) => e.row === 13)!;
    expect(planted).toMatchObject({ claimId: 'CL-000014', group: 'CC-202 / Travel', status: 'To look at', note: '' });
    expect(planted.value).toBeCloseTo(Number(sb.valueAt('Claims', 14, 4)), 10);
    expect(planted.score).toBeGreaterThan(3.5);
    await expect(layer.mark([5], 'Approved', null)).rejects.toThrow(/not a review status/);
    await expect(layer.mark([100], 'Cleared', null)).rejects.toThrow(/outside the data/);
    await layer.mark([2], null, 'asked for receipt');
    const again = await layer.listExceptions();
    expect(again.find((e) => e.row === 2)).toMatchObject({ status: '', note: 'asked for receipt' });
  });

  it('a run and a re-run change no user cell, format, rule or validation', async () => {
    const sb = claimsSandbox(150);
    sb.setCell('Claims', 2, 4, { value: 99.5, numberFormat: '#,##0.00', fill: '#EEEEEE' });
    sb.addConditionalFormat('Claims', 'A2:E151', '=$E2>1500', { fill: '#202020' });
    sb.addListValidation('Claims', 'B2:B151', 'x,y');
    const before = sb.snapshot();
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    const cols = layer.lastRun!.resultColumns.map((c) => c.charCodeAt(0) - 65);
    const afterRun = sb.snapshot();
    expect(countUserCellsChanged(before, afterRun, 'Claims', cols)).toBe(0);
    await layer.mark([13], 'Cleared', 'fine');
    await layer.run(await layer.detect(), { ...SETTINGS, cutoff: 4 });
    const afterRerun = sb.snapshot();
    expect(countUserCellsChanged(before, afterRerun, 'Claims', cols)).toBe(0);
    for (const snap of [afterRun, afterRerun]) {
      const s = snap.sheets.find((x) => x.name === 'Claims')!;
      const b = before.sheets.find((x) => x.name === 'Claims')!;
      expect(s.conditionalFormats.map((c) => [c.formula, c.ranges, c.fill])).toEqual(expect.arrayContaining(b.conditionalFormats.map((c) => [c.formula, c.ranges, c.fill])));
      expect(s.validations).toEqual(expect.arrayContaining(b.validations));
    }
    // The diff mentions only our columns (F..J: cells and widths), our sheets, our settings and our rules. Our rules
    // are added on top (Excel gives a new rule priority 0), so the user's rule moves down in number
    // but keeps its place relative to the user's other rules: compare the user's rules without it.
    const noPriority = (x: typeof before) => ({ ...x, sheets: x.sheets.map((s) => ({ ...s, conditionalFormats: s.conditionalFormats.map((c) => ({ ...c, priority: 0 })) })) });
    const foreign = diffSnapshots(noPriority(before), noPriority(afterRerun)).filter(
      (d) => !/^Claims![F-J]\d+ /.test(d) && !/^Claims column [F-J] width: /.test(d) && !/^sheet Tailmark (notes|log) added$/.test(d) && !/^setting tailmark\./.test(d) && !/^Claims (conditionalFormats|validations) added/.test(d),
    );
    expect(foreign).toEqual([]);
  });

  it('loadSettings is null before the first run and survives a workbook without our state', async () => {
    const sb = sandboxFromRows('S', [['Amount'], [1], [2]]);
    const layer = layerFor(sb);
    expect(await layer.loadSettings()).toBeNull();
    sb.setSetting('tailmark.settings', '{"not":"settings"}');
    expect(await layer.loadSettings()).toBeNull();
  });

  it('readClaim returns the claim row as displayed and its "why" cell; detect reports the selected claim row', async () => {
    const sb = claimsSandbox(100);
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    const c = await layer.readClaim(13);
    // Data row 13 is sheet row 15 (header in row 1): values straight from the sandbox.
    expect(c.fields.map((f) => f.header)).toEqual(['Claim ID', 'Employee', 'Cost centre', 'Category', 'Amount']);
    expect(c.fields[0].text).toBe(String(sb.valueAt('Claims', 14, 0)));
    expect(c.fields[1].text).toBe(String(sb.valueAt('Claims', 14, 1)));
    expect(c.reasons).toHaveLength(1);
    expect(c.reasons[0].text).toBe(String(sb.valueAt('Claims', 14, 7)));
    await expect(layer.readClaim(100)).rejects.toThrow(/outside the data/);
    sb.userSelect('Claims', 'B15:C15');
    expect((await layer.detect()).selectedRow).toBe(13);
    sb.userSelect('Claims', 'B1');
    expect((await layer.detect()).selectedRow).toBeNull();
  });

  it('keeps the reviewer\'s name and chosen columns with the saved run settings, and a run keeps them', async () => {
    const sb = claimsSandbox(20);
    const layer = layerFor(sb);
    expect(await layer.loadReviewPrefs()).toEqual({ reviewer: null, detailColumns: null });
    await expect(layer.saveReviewPrefs({ reviewer: 'JD', detailColumns: null })).rejects.toThrow(/no Tailmark results/);
    await layer.run(await layer.detect(), SETTINGS);
    await layer.saveReviewPrefs({ reviewer: '  JD ', detailColumns: ['Employee'] });
    expect(await layerFor(sb).loadReviewPrefs()).toEqual({ reviewer: 'JD', detailColumns: ['Employee'] });
    expect(await layer.loadSettings()).toMatchObject({ ...SETTINGS, reviewer: 'JD', detailColumns: ['Employee'] });
    sb.setSetting('tailmark.settings', 'not json');
    expect(await layer.loadReviewPrefs()).toEqual({ reviewer: null, detailColumns: null });
  });

  it('remove can keep the status and note columns as plain cells, and a later run carries the marks on', async () => {
    const sb = claimsSandbox(100);
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    await layer.mark([13], 'Cleared', 'receipt seen');
    await layer.remove(false, true);
    const headers = [0, 1, 2, 3, 4, 5, 6].map((c) => String(sb.valueAt('Claims', 0, c)));
    expect(headers).toEqual(['Claim ID', 'Employee', 'Cost centre', 'Category', 'Amount', 'Tailmark status', 'Tailmark note']);
    expect(sb.valueAt('Claims', 14, 5)).toBe('Cleared');
    expect(sb.valueAt('Claims', 14, 6)).toBe('receipt seen');
    // No dropdown and none of our rules are left.
    expect(sb.validationAt('Claims', 14, 5)).toBeNull();
    const claims = sb.snapshot().sheets.find((x) => x.name === 'Claims')!;
    expect(claims.conditionalFormats.filter((c) => /tailmark:/.test(c.formula))).toEqual([]);
    sb.setSelection('Claims', 'B3');
    await layer.run(await layer.detect(), SETTINGS);
    const ex = await layer.listExceptions();
    expect(ex.find((e) => e.row === 13)).toMatchObject({ status: 'Cleared', note: 'receipt seen' });
  });

  it('logs each run, each cutoff change with its reason and budget, and each saved status with who and when; never rewrites a line', async () => {
    const sb = claimsSandbox(100);
    const layer = layerFor(sb); // clock: 2025-03-31T09:00:00Z (helpers.ts)
    await layer.run(await layer.detect(), { ...SETTINGS, cutoff: 4 }, undefined, undefined, { cutoffReason: 'one afternoon', budget: 5 });
    const logText = () => {
      const rows: string[][] = [];
      for (let r = 0; r < 20; r++) {
        const row = Array.from({ length: LOG_HEADER.length }, (_, c) => String(sb.valueAt('Tailmark log', r, c) ?? ''));
        if (row.every((x) => x === '')) break;
        rows.push(row);
      }
      return rows;
    };
    const col = (name: string) => LOG_HEADER.indexOf(name);
    let log = logText();
    expect(log[1]).toEqual([...LOG_HEADER]);
    expect(log[2][col('Event')]).toBe('Run');
    expect(log[2][col('Who')]).toBe('(name not given)');
    expect(log[3][col('Event')]).toBe('Cutoff changed');
    expect(log[3][col('Previous cutoff')]).toBe('3.5');
    expect(log[3][col('Cutoff')]).toBe('4');
    expect(log[3][col('Reason given')]).toBe('one afternoon');
    expect(log[3][col('From a review budget')]).toBe('yes: at most 5 claims');
    await layer.saveReviewPrefs({ reviewer: 'JD', detailColumns: null });
    await layer.mark([13], 'Cleared', 'receipt seen');
    await layer.mark([13], null, 'receipt seen');
    log = logText();
    expect(log).toHaveLength(5);
    expect(log[4][col('Event')]).toBe('Status set');
    expect(log[4][col('Who')]).toBe('JD');
    expect(log[4][col('When (UTC)')]).toBe('2025-03-31T09:00:00.000Z');
    expect(log[4][col('Claim')]).toBe('CL-000014');
    expect(log[4][col('Status')]).toBe('To look at → Cleared');
    expect(log[4][col('Note')]).toBe('receipt seen');
    const before = log;
    // Same cutoff again: a run line only, below the others.
    await layer.run(await layer.detect(), { ...SETTINGS, cutoff: 4, reviewer: 'JD' });
    log = logText();
    expect(log.slice(0, before.length)).toEqual(before);
    expect(log.slice(before.length).map((r) => [r[col('Event')], r[col('Who')]])).toEqual([['Run', 'JD']]);
  });
});

describe('highlight rules', () => {
  it('are added in priority order: escalated, asked, cleared, open (a new rule in Excel goes on top)', async () => {
    const sb = claimsSandbox(200);
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    const ours = sb.snapshot().sheets.find((s) => s.name === 'Claims')!.conditionalFormats.filter((c) => c.formula.includes('tailmark:'));
    // The order the review states are meant to win in (src/report/rules.ts documents it; written out here).
    expect(ours.map((c) => /tailmark:([a-z]+)/.exec(c.formula)![1])).toEqual(['escalated', 'asked', 'cleared', 'open']);
    expect(ours.map((c) => c.priority)).toEqual([0, 1, 2, 3]);
  });
});
