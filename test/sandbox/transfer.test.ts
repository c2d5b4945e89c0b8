/**
 * A sandbox sent in parts (as the preview page's .xlsx worker does) comes back whole: the rebuilt
 * workbook's snapshot equals the original's (cells with values, formulas, errors, formats, fills;
 * widths; a table; our highlight rules, dropdown and saved settings from a real run).
 */
import { describe, expect, it } from 'vitest';
import { CellError, diffSnapshots } from '../../src/sandbox/index.js';
import { addCells, finish, fromShell, toParts } from '../../src/sandbox/transfer.js';
import { claimsSandbox, layerFor, SETTINGS } from '../workbook/helpers.js';

describe('sandbox transfer in parts', () => {
  it('rebuilds a scored workbook exactly, part by part', async () => {
    const sb = claimsSandbox(240);
    sb.setCell('Claims', 3, 1, { value: 'bold fill', fill: '#FFEEDD', font: '#112233', bold: true, wrap: true });
    sb.setCell('Claims', 5, 4, { value: new CellError('#N/A') });
    sb.setColumnWidth('Claims', 'B', 90);
    sb.addSheet('Other');
    sb.setCell('Other', 0, 0, { value: 3, formula: '=1+2', numberFormat: '0.00' });
    sb.addTable('Other', 'C1:D3', 'Small');
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    sb.setSelection('Claims', 'B4');

    const { shell, parts } = toParts(sb, 500);
    expect(parts.length).toBeGreaterThan(2);
    // Through structured clone, as a worker's message goes.
    const copy = structuredClone({ shell, parts });
    const back = fromShell(copy.shell);
    for (const p of copy.parts) addCells(back, p);
    finish(back, copy.shell);
    expect(diffSnapshots(sb.snapshot(), back.snapshot())).toEqual([]);
    expect(back.snapshot()).toEqual(sb.snapshot());
  });
});
