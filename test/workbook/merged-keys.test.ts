/**
 * Issue 12 item 1 in the add-in: merged cells in a peer-group (key) column take the merged value
 * for every row they cover, and the notes say so. Expected results come from the same claims laid
 * out without merged cells (every row carries its own label), run through the same layer: the
 * groups must come out the same. Both hosts (the office-js project sends the real
 * getMergedAreasOrNullObject request through Microsoft's client).
 */
import { describe, expect, it } from 'vitest';
import { sandboxFromRows, type SandboxWorkbook } from '../../src/sandbox/index.js';
import { NOTES_SHEET_NAME, resultHeaders } from '../../src/report/index.js';
import { layerFor, rng, SETTINGS } from './helpers.js';
import ExcelJS from 'exceljs';
import { sandboxFromExcelJs, sandboxToExcelJs } from '../../src/sandbox/exceljs-bridge.js';

const KEY_SETTINGS = { ...SETTINGS, groupColumns: ['Cost centre'] };

/** 80 invented claims: rows 2-41 cost centre CC-10 (amounts near 100), rows 42-81 CC-20 (near 300), one planted large claim in each. */
function claims(): (string | number)[][] {
  const r = rng(12);
  const rows: (string | number)[][] = [['Claim ID', 'Employee', 'Cost centre', 'Category', 'Amount']];
  for (let i = 0; i < 80; i++) {
    const cc = i < 40 ? 'CC-10' : 'CC-20';
    const base = (i < 40 ? 100 : 300) + Math.round((r() - 0.5) * 4000) / 100;
    rows.push([`CL-${i + 1}`, `Person ${i % 9}`, cc, 'Travel', i === 7 || i === 55 ? base * 4 : base]);
  }
  return rows;
}

function merged(): SandboxWorkbook {
  const sb = sandboxFromRows('Claims', claims());
  sb.mergeCells('Claims', 'C2:C41');
  sb.mergeCells('Claims', 'C42:C81');
  sb.setSelection('Claims', 'B3');
  return sb;
}

function notesText(sb: SandboxWorkbook): string {
  return sb.valuesOf(NOTES_SHEET_NAME, 'A1:A3000').map((r) => String(r[0] ?? '')).join('\n');
}

/** Our result columns (score, flag) of the 80 claims. */
function results(sb: SandboxWorkbook): unknown[][] {
  const h = resultHeaders('Amount');
  const header = sb.valuesOf('Claims', 'F1:J1')[0];
  const at = [header.indexOf(h.score), header.indexOf(h.flag)].map((i) => String.fromCharCode(70 + i));
  return at.map((col) => sb.valuesOf('Claims', `${col}2:${col}81`).map((r) => r[0]));
}

describe('merged cells in a peer-group column (add-in)', () => {
  it('take the merged value for every row they cover: the groups come out as with unmerged data', async () => {
    const plain = sandboxFromRows('Claims', claims());
    plain.setSelection('Claims', 'B3');
    const expected = await layerFor(plain, { isSetSupported: () => true }).run(await layerFor(plain).detect(), KEY_SETTINGS);
    expect(expected.groups.map((g) => [g.label, g.n])).toEqual([['CC-10', 40], ['CC-20', 40]]);

    const sb = merged();
    // The merged layout as Excel holds it: only the first cell of each area has the label.
    expect(sb.valueAt('Claims', 2, 2)).toBe('');
    const layer = layerFor(sb, { isSetSupported: () => true });
    const summary = await layer.run(await layer.detect(), KEY_SETTINGS);
    expect(summary.groups.map((g) => [g.label, g.n, g.flagged])).toEqual(expected.groups.map((g) => [g.label, g.n, g.flagged]));
    expect(results(sb)).toEqual(results(plain));
    expect(notesText(sb)).toMatch(/Cost centre: 78 cells in 2 merged areas \(C2:C41, C42:C81\) took the merged value/);
    // The user's cells stay as they were: the merged areas' other cells are still blank.
    expect(sb.valueAt('Claims', 2, 2)).toBe('');
  });

  it('the pane\'s preview reads the key column the same way', async () => {
    const sb = merged();
    const layer = layerFor(sb, { isSetSupported: () => true });
    const data = await layer.readForPreview(await layer.detect(), KEY_SETTINGS);
    const keys = data.groupColumns[0].cells;
    expect(keys.slice(0, 40).every((k) => k === 'CC-10')).toBe(true);
    expect(keys.slice(40).every((k) => k === 'CC-20')).toBe(true);
  });

  it('says in the notes that merged cells could not be checked where Excel cannot report them (before ExcelApi 1.13)', async () => {
    const sb = merged();
    const layer = layerFor(sb, { isSetSupported: (name, version) => name === 'ExcelApi' && Number(version.split('.')[1]) <= 12 });
    await layer.run(await layer.detect(), KEY_SETTINGS);
    expect(notesText(sb)).toMatch(/Cost centre: merged cells could not be checked/);
  });

  it('finds more merged areas than Excel lists for one range (512): each query asks about 512 rows', async () => {
    const rows: (string | number)[][] = [['Claim ID', 'Cost centre', 'Amount']];
    for (let i = 0; i < 1100; i++) rows.push([`CL-${i + 1}`, `CC-${Math.floor(i / 2)}`, 100 + (i % 13)]);
    const sb = sandboxFromRows('Claims', rows);
    for (let i = 0; i < 550; i++) sb.mergeCells('Claims', `B${2 + 2 * i}:B${3 + 2 * i}`);
    sb.setSelection('Claims', 'A3');
    const layer = layerFor(sb, { isSetSupported: () => true });
    const summary = await layer.run(await layer.detect(), { ...KEY_SETTINGS, minGroupSize: 2 });
    expect(summary.groups).toHaveLength(550);
    expect(summary.groups.every((g) => g.n === 2)).toBe(true);
    expect(notesText(sb)).toMatch(/Cost centre: 550 cells in 550 merged areas \(B2:B3, B4:B5, B6:B7, B8:B9, B10:B11, \.\.\.\) took the merged value/);
  });

  it('an .xlsx file\'s merged cells come into the sandbox (tailmark sandbox) and go out with the result', async () => {
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('Claims');
    claims().forEach((r, i) => ws.addRow(i === 0 || (i - 1) % 40 === 0 ? r : r.map((v, c) => (c === 2 ? null : v))));
    ws.mergeCells('C2:C41');
    ws.mergeCells('C42:C81');
    const sb = sandboxFromExcelJs(wb);
    sb.setSelection('Claims', 'B3');
    const layer = layerFor(sb, { isSetSupported: () => true });
    const summary = await layer.run(await layer.detect(), KEY_SETTINGS);
    expect(summary.groups.map((g) => [g.label, g.n])).toEqual([['CC-10', 40], ['CC-20', 40]]);
    const out = sandboxToExcelJs(sb).getWorksheet('Claims')!;
    expect((out.model as { merges?: string[] }).merges?.sort()).toEqual(['C2:C41', 'C42:C81']);
  });
});
