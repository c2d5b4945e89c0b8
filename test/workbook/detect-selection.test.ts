/**
 * detect() resolves what the reviewer (or the layer's own selectRow) selected to the data block:
 * whole rows, whole columns, the whole sheet, part of a row, a few rows dragged over, and a cell in
 * one of our result columns all give the same DetectedTable as a click on a data cell.
 */
import { describe, expect, it } from 'vitest';
import { sandboxFromRows } from '../../src/sandbox/index.js';
import { claimRows, claimsSandbox, layerFor, SETTINGS } from './helpers.js';

/** The detected block without the selected claim row (which follows the selection by design). */
const block = <T extends { selectedRow?: number | null }>(d: T): Omit<T, 'selectedRow'> => {
  const { selectedRow: _row, ...rest } = d;
  return rest;
};

describe('detect from row, column and sheet selections', () => {
  const fromCell = async (n: number) => {
    const sb = claimsSandbox(n);
    return { sb, expected: await layerFor(sb).detect() };
  };

  it('one entire sheet row inside the data (a click on the row header)', async () => {
    const { sb, expected } = await fromCell(300);
    expect(expected.address).toBe('Claims!A1:E301');
    sb.setSelection('Claims', '15:15');
    expect(block(await layerFor(sb).detect())).toEqual(block(expected));
  });

  it('several entire rows, entire columns and the whole sheet', async () => {
    const { sb, expected } = await fromCell(120);
    for (const sel of ['10:20', '2:2', 'E:E', 'B:D', '1:1048576', 'A:XFD']) {
      sb.setSelection('Claims', sel);
      expect(block(await layerFor(sb).detect()), sel).toEqual(block(expected));
    }
  });

  it('entire rows when the data does not start in column A and a title sits above it', async () => {
    const rows = claimRows(40);
    const sb = sandboxFromRows('Claims', [['March claims (invented)'], [], ...rows.map((r) => [null, null, ...r])]);
    sb.setSelection('Claims', 'D10');
    const expected = await layerFor(sb).detect();
    expect(expected.address).toBe('Claims!C3:G43');
    sb.setSelection('Claims', '12:14');
    expect(block(await layerFor(sb).detect())).toEqual(block(expected));
    // A whole column through the data: its top (row 1) is blank in column E; the header below is found.
    sb.setSelection('Claims', 'E:E');
    expect(block(await layerFor(sb).detect())).toEqual(block(expected));
  });

  it('entire rows below the data say the selection is empty', async () => {
    const sb = claimsSandbox(20);
    sb.setSelection('Claims', '40:41');
    await expect(layerFor(sb).detect()).rejects.toThrow(/selection Claims!40:41 holds no data/);
  });

  it('entire rows inside an Excel table give the table', async () => {
    const sb = claimsSandbox(50);
    sb.addTable('Claims', 'A1:E51', 'ClaimsTable');
    sb.setSelection('Claims', '20:22');
    const t = await layerFor(sb).detect();
    expect(t.tableName).toBe('ClaimsTable');
    expect(t.address).toBe('Claims!A1:E51');
  });

  it('a few rows dragged over inside the data give the block around them; a block with a header stays itself', async () => {
    const { sb, expected } = await fromCell(100);
    sb.setSelection('Claims', 'B10:D12');
    expect(block(await layerFor(sb).detect())).toEqual(block(expected));
    sb.setSelection('Claims', 'A1:E51');
    const t = await layerFor(sb).detect();
    expect(t.address).toBe('Claims!A1:E51');
    expect(t.rowCount).toBe(50);
  });

  it('entire-row detect stays within a few syncs', async () => {
    const sb = claimsSandbox(200);
    sb.setSelection('Claims', '30:30');
    const layer = layerFor(sb);
    await layer.detect();
    expect(layer.lastStats!.syncs).toBeLessThanOrEqual(3);
  });
});

describe('detect after our own actions', () => {
  it('after selectRow (Next / Previous in the pane), detect and a re-run still work and keep marks', async () => {
    const sb = claimsSandbox(200);
    const layer = layerFor(sb);
    const first = await layer.detect();
    await layer.run(first, SETTINGS);
    const fresh = await layer.detect();
    await layer.mark([13], 'Cleared', 'receipt seen');
    await layer.selectRow(13);
    expect(sb.selection()).toEqual(['Claims!A15:J15']);
    const again = await layer.detect();
    expect(block(again)).toEqual(block(fresh));
    expect(again.hasResults).toBe(true);
    await layer.run(again, { ...SETTINGS, cutoff: 3 });
    const ex = await layer.listExceptions();
    expect(ex.find((e) => e.row === 13)).toMatchObject({ status: 'Cleared', note: 'receipt seen' });
    // And the whole sheet row of that claim (a click on its row header).
    sb.setSelection('Claims', '15:15');
    expect(block(await layer.detect())).toEqual(block(fresh));
  });

  it('a cell in one of our result columns resolves to the same data block', async () => {
    const sb = claimsSandbox(150);
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    const fromData = await layer.detect();
    expect(fromData.address).toBe('Claims!A1:E151');
    for (const col of layer.lastRun!.resultColumns) {
      sb.setSelection('Claims', `${col}40`);
      expect(block(await layer.detect()), col).toEqual(block(fromData));
      sb.setSelection('Claims', `${col}1`);
      expect(block(await layer.detect()), `${col}1`).toEqual(block(fromData));
    }
  });

  it('a cell in our result columns inside an Excel table resolves to the table', async () => {
    const sb = claimsSandbox(60);
    sb.addTable('Claims', 'A1:E61', 'ClaimsTable');
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    const fromData = await layer.detect();
    sb.setSelection('Claims', 'H30');
    expect(block(await layer.detect())).toEqual(block(fromData));
  });
});
