/**
 * Checked before anything is written: a read-only workbook, a protected sheet, a protected
 * workbook structure when a sheet must be added, and a table that whole-column insertion would
 * widen. Remove clears our own sheets instead of deleting them (deleting a sheet wipes the user's
 * undo history in Excel).
 */
import { describe, expect, it } from 'vitest';
import { diffSnapshots } from '../../src/sandbox/index.js';
import { LOG_SHEET_NAME, NOTES_SHEET_NAME } from '../../src/report/index.js';
import { TailmarkError } from '../../src/workbook/api.js';
import { claimsSandbox, layerFor, SETTINGS } from './helpers.js';

async function code(p: Promise<unknown>): Promise<{ code: string; message: string }> {
  const e = await p.then(() => null, (x: unknown) => x);
  if (!(e instanceof TailmarkError)) throw new Error(`expected a TailmarkError, got ${String(e)}`);
  return { code: e.code, message: e.message };
}

describe('read-only workbook', () => {
  it('a first run and a re-run refuse before writing, with what to do; nothing changes and nothing needs undoing', async () => {
    for (const scored of [false, true]) {
      const sb = claimsSandbox(120);
      const layer = layerFor(sb);
      if (scored) await layer.run(await layer.detect(), SETTINGS);
      const t = await layer.detect();
      sb.mode.readOnly = true;
      const before = sb.snapshot();
      const r = await code(layer.run(t, { ...SETTINGS, cutoff: 3 }));
      expect(r.code, `scored: ${scored}`).toBe('read-only');
      expect(r.message).toMatch(/read-only.*Save a copy/);
      expect(diffSnapshots(before, sb.snapshot())).toEqual([]);
    }
  });

  it('marking, removing and saving the reviewer name refuse too', async () => {
    const sb = claimsSandbox(120);
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    const ex = await layer.listExceptions();
    sb.mode.readOnly = true;
    const before = sb.snapshot();
    expect((await code(layer.mark([ex[0].row], 'Cleared', 'ok'))).code).toBe('read-only');
    expect((await code(layer.remove(true))).code).toBe('read-only');
    expect((await code(layer.saveReviewPrefs({ reviewer: 'R. Reviewer', detailColumns: null }))).code).toBe('read-only');
    expect(diffSnapshots(before, sb.snapshot())).toEqual([]);
    // Reading still works.
    expect((await layer.listExceptions()).length).toBe(ex.length);
  });
});

describe('workbook-structure protection', () => {
  it('refuses a first run that must add the notes and log sheets, naming them, before writing', async () => {
    const sb = claimsSandbox(120);
    sb.mode.structureProtected = true;
    const before = sb.snapshot();
    const layer = layerFor(sb);
    const r = await code(layer.run(await layer.detect(), SETTINGS));
    expect(r.code).toBe('protected');
    expect(r.message).toContain(`"${NOTES_SHEET_NAME}" and "${LOG_SHEET_NAME}"`);
    expect(r.message).toMatch(/Review > Protect Workbook/);
    expect(diffSnapshots(before, sb.snapshot())).toEqual([]);
  });

  it('a re-run that adds no sheet goes ahead', async () => {
    const sb = claimsSandbox(120);
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    sb.mode.structureProtected = true;
    await layer.run(await layer.detect(), { ...SETTINGS, cutoff: 3 });
    expect(sb.sheetNames()).toEqual(['Claims', NOTES_SHEET_NAME, LOG_SHEET_NAME]);
  });
});

describe('remove clears our sheets instead of deleting them', () => {
  it('keeps the notes and log sheets with only their marker, and the next run reuses them', async () => {
    const sb = claimsSandbox(120);
    const before = sb.snapshot();
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    const markers = [NOTES_SHEET_NAME, LOG_SHEET_NAME].map((n) => sb.valueAt(n, 0, 0));
    await layer.remove(true);
    expect(sb.sheetNames()).toEqual(['Claims', NOTES_SHEET_NAME, LOG_SHEET_NAME]);
    for (const [i, n] of [NOTES_SHEET_NAME, LOG_SHEET_NAME].entries()) {
      expect(sb.usedRange(n)).toEqual({ rows: 1, cols: 1 });
      expect(sb.valueAt(n, 0, 0)).toBe(markers[i]);
    }
    // Everything else is as before the run.
    expect(diffSnapshots(before, sb.snapshot()).filter((d) => !/^sheet Tailmark (notes|log) added$/.test(d))).toEqual([]);
    await layer.run(await layer.detect(), SETTINGS);
    expect(sb.sheetNames()).toEqual(['Claims', NOTES_SHEET_NAME, LOG_SHEET_NAME]);
    expect(sb.usedRange(NOTES_SHEET_NAME).rows).toBeGreaterThan(5);
  });
});

describe('inserting whole columns never widens another table', () => {
  /** Claims in A1:E101 with the user's own column in H (so our 5 columns must be inserted at F). */
  function withUserColumn() {
    const sb = claimsSandbox(100);
    sb.setCell('Claims', 0, 7, 'My memo');
    sb.setCell('Claims', 3, 7, 'keep');
    return sb;
  }

  it('refuses, naming the table, when the insertion point runs through a table elsewhere on the sheet', async () => {
    const sb = withUserColumn();
    sb.setValues('Claims', 'D200', [['Q', 'R', 'S', 'T'], [1, 2, 3, 4]]);
    sb.addTable('Claims', 'D200:G201', 'Budget');
    const before = sb.snapshot();
    const layer = layerFor(sb);
    const r = await code(layer.run(await layer.detect(), SETTINGS));
    expect(r.code).toBe('column-limit');
    expect(r.message).toMatch(/widen the table "Budget"/);
    expect(diffSnapshots(before, sb.snapshot())).toEqual([]);
    expect(sb.snapshot().sheets[0].tables).toEqual([{ name: 'Budget', address: 'D200:G201', showHeaders: true }]);
  });

  it('a table wholly right of the insertion point moves with its columns and keeps its size', async () => {
    const sb = withUserColumn();
    sb.setValues('Claims', 'H200', [['Q', 'R'], [1, 2]]);
    sb.addTable('Claims', 'H200:I201', 'Budget');
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    expect(sb.snapshot().sheets[0].tables).toEqual([{ name: 'Budget', address: 'M200:N201', showHeaders: true }]);
  });
});
