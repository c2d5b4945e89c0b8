/**
 * Issue 10 item 6: a selection change after a run costs at most 2 round trips and a payload that
 * does not grow with the sheet. On the office-js project the round trips and bytes are the real
 * client's requests and responses (every request it sent, its own reference clean-up included).
 * Expected cell values come straight from the sandbox's cells, not from the layer.
 */
import { describe, expect, it } from 'vitest';
import { statusLabel } from '../../src/report/index.js';
import { CLIENT, claimsSandbox, layerFor, officeHost, settled, SETTINGS } from './helpers.js';
import type { SandboxWorkbook } from '../../src/sandbox/index.js';
import { initialState, reducer } from '../../src/taskpane/state.js';
import { selectionActions } from '../../src/taskpane/selection.js';

/** Round trips and response bytes of what `f` does, as the host under test counts them. */
async function cost<T>(sb: SandboxWorkbook, f: () => Promise<T>): Promise<{ out: T; trips: number; bytes: number }> {
  const host = CLIENT === 'office-js' ? officeHost(sb) : null;
  await settled();
  sb.stats.reset();
  host?.wire.reset();
  const out = await f();
  return host
    ? { out, trips: host.wire.requests, bytes: host.wire.responseBytes.total }
    : { out, trips: sb.stats.syncs, bytes: sb.stats.responseBytes.total };
}

describe('following a selection in the sheet', () => {
  const figures: { rows: number; trips: number; bytes: number }[] = [];

  for (const n of [5_000, 50_000]) {
    it(`shows the selected claim in at most 2 round trips at ${n.toLocaleString('en-US')} rows`, async () => {
      const sb = claimsSandbox(n);
      const layer = layerFor(sb);
      await layer.run(await layer.detect(), SETTINGS);
      // The reviewer clicks a cell of sheet row 120 (data row 118), having looked at data row 13 before.
      sb.userSelect('Claims', 'C120');
      const { out, trips, bytes } = await cost(sb, () => layer.followSelection([13]));
      figures.push({ rows: n, trips, bytes });
      console.log(`selection follow-up at ${n} rows (${CLIENT}): ${trips} round trips, ${bytes} response bytes`);
      expect(trips).toBeLessThanOrEqual(2);
      expect(out.inResults).toBe(true);
      expect(out.row).toBe(118);
      expect(out.claim?.fields.slice(0, 4).map((f) => [f.header, f.text])).toEqual(
        ['Claim ID', 'Employee', 'Cost centre', 'Category'].map((h, c) => [h, String(sb.valueAt('Claims', 119, c))]),
      );
      expect(out.claim?.fields[4].header).toBe('Amount');
      expect(Number(out.claim?.fields[4].text)).toBeCloseTo(Number(sb.valueAt('Claims', 119, 4)), 10);
      expect(out.claim?.reasons).toEqual([{ valueColumn: 'Amount', text: String(sb.valueAt('Claims', 119, 7)) }]);
      // Data row 13 holds a planted claim (20 x the usual amount, see claimRows): it is flagged, unmarked.
      const planted = out.rows.find((r) => r.row === 13)?.exception;
      expect(planted).toMatchObject({ claimId: 'CL-000014', group: 'CC-202 / Travel', status: statusLabel('open'), note: '' });
      expect(planted?.value).toBeCloseTo(Number(sb.valueAt('Claims', 14, 4)), 10);
      // Row 118 is an ordinary claim: not in the follow-up list.
      expect(out.rows.find((r) => r.row === 118)).toEqual({ row: 118, exception: null });

      // The pane's own response to the event (what usePaneState runs), from its state after the run.
      let pane = reducer(initialState, { type: 'detected', table: await layer.detect(), saved: SETTINGS });
      pane = reducer(pane, { type: 'exceptions', list: await layer.listExceptions(), keepRow: 13 });
      sb.userSelect('Claims', 'D300');
      const viaPane = await cost(sb, () => selectionActions(layer, pane));
      console.log(`pane's selection response at ${n} rows (${CLIENT}): ${viaPane.trips} round trips, ${viaPane.bytes} response bytes`);
      expect(viaPane.trips).toBeLessThanOrEqual(2);
      expect(viaPane.bytes).toBeLessThan(8_000);
      if (viaPane.out === 'detect') throw new Error('the pane detected again instead of following the selection');
      for (const a of viaPane.out) pane = reducer(pane, a);
      expect(pane.currentRow).toBe(298);
      expect(pane.claim?.fields[0]).toEqual({ header: 'Claim ID', text: String(sb.valueAt('Claims', 299, 0)) });
    });
  }

  it('costs the same payload at 50,000 rows as at 5,000 (within the digits of the larger row count)', () => {
    expect(figures).toHaveLength(2);
    const [small, large] = figures;
    expect(small.bytes).toBeLessThan(8_000);
    expect(Math.abs(large.bytes - small.bytes)).toBeLessThanOrEqual(16);
  });

  it('carries edits made in the sheet to the rows it refreshes', async () => {
    const sb = claimsSandbox(300);
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    // The reviewer types a status and a note into row 13's cells (status column I, note column J), then moves down.
    sb.setCell('Claims', 14, 8, statusLabel('cleared'));
    sb.setCell('Claims', 40, 9, 'asked for the hotel bill');
    sb.userSelect('Claims', 'A16');
    const out = await layer.followSelection([13, 39]);
    expect(out.row).toBe(14);
    expect(out.rows.find((r) => r.row === 13)?.exception).toMatchObject({ status: statusLabel('cleared') });
    expect(out.rows.find((r) => r.row === 39)?.exception).toMatchObject({ row: 39, note: 'asked for the hotel bill', status: '' });
  });

  it('says when the selection is not in the results (another sheet, far away, several rows, the header)', async () => {
    const sb = claimsSandbox(100);
    sb.addSheet('Other');
    const layer = layerFor(sb);
    sb.userSelect('Claims', 'C10');
    expect((await layer.followSelection([])).inResults).toBe(false); // no run yet
    await layer.run(await layer.detect(), SETTINGS);
    sb.userSelect('Other', 'C10');
    expect((await layer.followSelection([])).inResults).toBe(false);
    sb.userSelect('Claims', 'Q10');
    expect((await layer.followSelection([])).inResults).toBe(false);
    sb.userSelect('Claims', 'A300');
    expect((await layer.followSelection([])).inResults).toBe(false);
    sb.userSelect('Claims', 'B1');
    expect(await layer.followSelection([])).toEqual({ inResults: true, row: null, claim: null, rows: [] });
    sb.userSelect('Claims', 'B5:C9');
    expect(await layer.followSelection([])).toMatchObject({ inResults: true, row: null, claim: null });
  });

  it('follows a row of an Excel table', async () => {
    const sb = claimsSandbox(60);
    sb.addTable('Claims', 'A1:E61', 'ClaimsTable');
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    sb.userSelect('Claims', 'B31');
    const { out, trips } = await cost(sb, () => layer.followSelection([13]));
    expect(trips).toBeLessThanOrEqual(2);
    expect(out.row).toBe(29);
    expect(out.claim?.fields[0]).toEqual({ header: 'Claim ID', text: String(sb.valueAt('Claims', 30, 0)) });
    expect(out.rows.find((r) => r.row === 13)?.exception).toMatchObject({ claimId: 'CL-000014' });
  });
});
