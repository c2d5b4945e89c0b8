/**
 * Readable result columns: a run gives each of our columns a width that shows its header, also when
 * it writes into empty sheet columns, and removal (or a failed write) puts the earlier width back.
 *
 * What "shows the header" means here, independently of the code under test: Excel measures column
 * width in characters of the default font's digit (Calibri 11: 7 px, plus 5 px of padding; 0.75 pt
 * per px at 96 dpi — Microsoft's "Change the column width" help, from memory). A header of n
 * characters then needs at least (7 n + 5) px; bold text is counted at 8 px a character here
 * (common practice, no source).
 */
import { describe, expect, it } from 'vitest';
import { diffSnapshots } from '../../src/sandbox/index.js';
import { NOTE_HEADER, STATUS_HEADER, resultHeaders } from '../../src/report/index.js';
import { createWorkbookLayer } from '../../src/workbook/index.js';
import { claimsSandbox, failingAt, layerFor, SETTINGS } from './helpers.js';

const H = resultHeaders('Amount');
const OURS = [H.score, H.flag, H.reason, STATUS_HEADER, NOTE_HEADER];
/** Points a bold header of `text` needs (see the module comment). */
const needPoints = (text: string) => (8 * [...text].length + 5) * 0.75;

describe('result column widths', () => {
  it('a first run into empty columns gives each of our columns a width that shows its header', async () => {
    const sb = claimsSandbox(120);
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    // Data is A:E, our columns F:J (written into empty columns, none inserted).
    expect(sb.valuesOf('Claims', 'F1:J1')[0]).toEqual(OURS);
    OURS.forEach((header, i) => {
      const w = sb.columnWidth('Claims', 5 + i);
      expect(w, `${header}: no width set`).not.toBeNull();
      expect(w!, `${header}: ${w} pt < ${needPoints(header)} pt`).toBeGreaterThanOrEqual(needPoints(header));
    });
    // The status words fit too ("Asked claimant" is the longest).
    expect(sb.columnWidth('Claims', 8)!).toBeGreaterThanOrEqual(needPoints('Asked claimant'));
  });

  it('remove() puts back the width an empty column had before (a user-set one, and the standard one)', async () => {
    const sb = claimsSandbox(120);
    sb.setColumnWidth('Claims', 'G', 30);
    const before = sb.snapshot();
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    expect(sb.columnWidth('Claims', 6)!).toBeGreaterThanOrEqual(needPoints(H.flag));
    await layer.remove(true);
    expect(sb.columnWidth('Claims', 6)).toBe(30);
    // Remove clears our notes and log sheets instead of deleting them (guards.test.ts).
    expect(diffSnapshots(before, sb.snapshot()).filter((d) => !/^sheet Tailmark (notes|log) added$/.test(d))).toEqual([]);
  });

  it('a run that fails after the widths were set puts the earlier widths back', async () => {
    const probe = claimsSandbox(120);
    const ok = layerFor(probe);
    await ok.run(await ok.detect(), SETTINGS);
    const total = ok.lastStats!.syncs;
    const sb = claimsSandbox(120);
    sb.setColumnWidth('Claims', 'F', 30);
    const layer = layerFor(sb);
    const t = await layer.detect();
    const before = sb.snapshot();
    const failing = createWorkbookLayer(failingAt(sb, total), { now: () => new Date('2025-03-31T09:00:00Z') });
    await expect(failing.run(t, SETTINGS)).rejects.toThrow();
    expect(sb.columnWidth('Claims', 5)).toBe(30);
    expect(diffSnapshots(before, sb.snapshot())).toEqual([]);
  });
});
