/**
 * Every Excel.run of the layer waits for cell editing to end (delayForCellEdit) and, where
 * ExcelApi 1.20 is supported, asks for one undo step (mergeUndoGroup) — "Excel.RunOptions" in
 * Microsoft's Excel JavaScript API reference. Through the real client, delayForCellEdit is request
 * flag 64 on the wire.
 */
import { describe, expect, it } from 'vitest';
import { createWorkbookLayer } from '../../src/workbook/index.js';
import { CLIENT, claimsSandbox, hostRun, officeHost, SETTINGS } from './helpers.js';

describe('Excel.run options', () => {
  it('a run in cell-edit mode waits until editing ends instead of failing', async () => {
    const sb = claimsSandbox(60);
    const layer = createWorkbookLayer(hostRun(sb), { runInContext: hostRun(sb) });
    const t = await layer.detect();
    sb.setCellEditMode(true);
    let finished = false;
    const running = layer.run(t, SETTINGS).then((s) => { finished = true; return s; });
    await new Promise((r) => setTimeout(r, 30));
    expect(finished).toBe(false);
    sb.setCellEditMode(false);
    const summary = await running;
    expect(summary.rowsScored).toBe(60);
    if (CLIENT === 'office-js') expect(officeHost(sb).wire.lastFlags & 64).toBe(64);
  });

  it('asks for one undo step only where ExcelApi 1.20 is supported', async () => {
    if (CLIENT === 'office-js') return; // the npm client (1.1.110) does not put mergeUndoGroup on the wire
    for (const have of [true, false]) {
      const sb = claimsSandbox(30);
      const layer = createWorkbookLayer(sb.run, { isSetSupported: (n, v) => have && n === 'ExcelApi' && Number(v) <= 1.2 });
      await layer.detect();
      expect(sb.lastRunOptions).toEqual(have ? { delayForCellEdit: true, mergeUndoGroup: true } : { delayForCellEdit: true });
    }
  });
});
