import { describe, expect, it } from 'vitest';
import { sandboxFromRows } from '../../src/sandbox/index.js';
import { createWorkbookLayer } from '../../src/workbook/index.js';
import { claimRows, SETTINGS, hostRun } from './helpers.js';

const LIMIT = 150_000;

function wide(n: number, groups: number, plantEvery: number): unknown[][] {
  const rows: unknown[][] = [['Claim ID', 'Cost centre', 'Amount', 'A', 'B', 'C', 'D', 'E', 'F', 'G']];
  for (let i = 0; i < n; i++) {
    const amount = 100 + (i % 13) + (i % plantEvery === 3 ? 5000 : 0);
    rows.push([`CL-${i}`, `CC-${String(i % groups).padStart(3, '0')}`, amount, i, `a${i % 7}`, i * 2, 'x', 'y', 'z', i % 3]);
  }
  return rows;
}

describe('chunked reads and writes', () => {
  it('keeps every request and response under the limit and reads every cell', async () => {
    const sb = sandboxFromRows('Claims', wide(20_000, 40, 500), { payloadLimitBytes: LIMIT });
    sb.setSelection('Claims', 'A1');
    const layer = createWorkbookLayer(hostRun(sb), { payloadLimit: LIMIT });
    const t = await layer.detect();
    expect(t.rowCount).toBe(20_000);
    const preview = await layer.readForPreview(t, { ...SETTINGS, idColumn: null, groupColumns: ['Cost centre'] });
    expect(preview.valueColumns[0].cells).toHaveLength(20_000);
    expect(preview.valueColumns[0].cells[19_999]).toBe(100 + (19_999 % 13));
    expect(preview.groupColumns[0].cells[12_345]).toBe('CC-025');
    sb.stats.reset();
    await layer.run(t, { ...SETTINGS, idColumn: 'Claim ID', groupColumns: ['Cost centre'] });
    expect(sb.stats.syncs).toBeGreaterThan(10);
    expect(sb.stats.requestBytes.max).toBeLessThanOrEqual(LIMIT);
    expect(sb.stats.responseBytes.max).toBeLessThanOrEqual(LIMIT);
    expect(sb.valueAt('Claims', 20_000, 13)).toBe(''); // last data row, status column (N): not flagged
    expect(sb.valueAt('Claims', 4, 13)).toBe('To look at'); // data row 3 is planted
  });

  it('needs the same number of syncs whatever the number of groups and flagged rows', async () => {
    const syncs: number[] = [];
    for (const [groups, plant] of [
      [2, 5000],
      [400, 7],
    ]) {
      const sb = sandboxFromRows('Claims', wide(6_000, groups, plant), { payloadLimitBytes: LIMIT });
      sb.setSelection('Claims', 'A1');
      const layer = createWorkbookLayer(hostRun(sb), { payloadLimit: LIMIT });
      const s = await layer.run(await layer.detect(), { ...SETTINGS, idColumn: null, groupColumns: ['Cost centre'], minGroupSize: 3 });
      expect(s.flagged).toBeGreaterThan(0);
      syncs.push(sb.stats.syncs);
    }
    // 200 times the groups and ~700 times the flagged rows: the same syncs, give or take the two
    // that the longer explanation texts of flagged rows cost under this small payload limit.
    expect(Math.abs(syncs[0] - syncs[1])).toBeLessThanOrEqual(2);
    expect(syncs[1]).toBeLessThan(100); // far below 400 groups or ~860 flagged rows
  });

  it('5,000 claims: the data is read in one sync when detect measured the row size', async () => {
    const sb = sandboxFromRows('Claims', claimRows(5000));
    sb.setSelection('Claims', 'C2');
    const layer = createWorkbookLayer(hostRun(sb));
    const t = await layer.detect();
    expect(layer.lastStats?.syncs).toBe(2);
    await layer.run(t, SETTINGS);
    expect(layer.lastStats?.syncs).toBe(4); // resolve, read, check, write
  });
});
