/**
 * The pane's what-if engine (same-thread port here: Node has no Web Worker): answers match the
 * pane's scoring called directly, and a question replaced by a later one of its kind while another
 * is being worked out resolves to null (only the latest is answered).
 */
import { describe, expect, it } from 'vitest';
import { previewOf, summarisePreview } from '../../src/taskpane/engine.js';
import { createPaneEngine } from '../../src/taskpane/paneEngine.js';
import type { PreviewData } from '../../src/workbook/api.js';
import { claimRows, SETTINGS } from '../workbook/helpers.js';

function data(): PreviewData {
  const rows = claimRows(400).slice(1);
  return {
    valueColumns: [{ name: 'Amount', cells: rows.map((r) => r[4]) }],
    groupColumns: [
      { name: 'Cost centre', cells: rows.map((r) => r[2]) },
      { name: 'Category', cells: rows.map((r) => r[3]) },
    ],
  };
}

describe('pane engine', () => {
  it('answers the live counts as the direct scoring does, and only the latest of a burst', async () => {
    const d = data();
    const engine = createPaneEngine();
    engine.setData(d);
    const first = engine.ask({ kind: 'summary', settings: { ...SETTINGS, cutoff: 3 } });
    const replaced = engine.ask({ kind: 'summary', settings: { ...SETTINGS, cutoff: 2.5 } });
    const last = engine.ask({ kind: 'summary', settings: { ...SETTINGS, cutoff: 2 } });
    const [a, b, c] = await Promise.all([first, replaced, last]);
    expect(b).toBeNull();
    const direct = (cutoff: number) => summarisePreview(previewOf(d, { ...SETTINGS, cutoff }).result!, { ...SETTINGS, cutoff });
    expect(a?.summary).toEqual(direct(3));
    expect(c?.summary).toEqual(direct(2));
    // A lower cutoff flags at least as many claims (the planted ones: every 97th row is 20 times the usual).
    expect(c!.summary!.flaggedRows).toBeGreaterThanOrEqual(a!.summary!.flaggedRows);
    expect(a!.summary!.flaggedRows).toBeGreaterThanOrEqual(4);
    const budget = await engine.ask({ kind: 'budget', settings: SETTINGS, claims: 2 });
    expect(budget?.answer.kind).toBe('cutoff');
    engine.dispose();
  });
});
