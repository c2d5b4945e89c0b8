/**
 * One workbook format (issue 7): a workbook scored by the batch command is re-scored by the add-in's
 * workbook layer (on the sandbox, loaded through the ExcelJS bridge), then by the batch command
 * again, with next period's rows added in between. Every review mark stays with its claim, nothing
 * is added twice (one notes sheet, one set of result columns), and the notes list the marks of
 * claims that are gone.
 *
 * Expected values come from the test's own bookkeeping of which claim was marked how (by claim ID),
 * not from Tailmark's code.
 */
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import { describe, expect, it } from 'vitest';
import { demoClaims } from '../../src/demo/claims.js';
import { writeDemoWorkbook } from '../../src/files/demo.js';
import { sandboxFromExcelJs, sandboxToExcelJs } from '../../src/sandbox/exceljs-bridge.js';
import { createWorkbookLayer } from '../../src/workbook/index.js';
import { GONE_TITLE, MARKS_TITLE, NOTE_HEADER, NOTES_SHEET_NAME, STATUS_HEADER, notesFormatOf, resultHeaders, statusLabel } from '../../src/report/index.js';
import { run } from '../cli/helpers.js';

const dir = mkdtempSync(join(tmpdir(), 'tailmark-roundtrip-'));
const SHEET = 'Claims';

async function load(path: string): Promise<ExcelJS.Workbook> {
  const wb = new ExcelJS.Workbook();
  await wb.xlsx.readFile(path);
  return wb;
}

function headersOf(ws: ExcelJS.Worksheet): string[] {
  const out: string[] = [];
  ws.getRow(1).eachCell({ includeEmpty: false }, (c) => out.push(String(c.value)));
  return out;
}

function cellText(v: ExcelJS.CellValue): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'object' && 'richText' in v) return v.richText.map((t) => t.text).join('');
  return String(v);
}

/** Claim ID -> { status, note } as the sheet holds them. */
function marksById(ws: ExcelJS.Worksheet): Map<string, { status: string; note: string }> {
  const h = headersOf(ws);
  const id = h.indexOf('Claim ID') + 1;
  const st = h.indexOf(STATUS_HEADER) + 1;
  const nt = h.indexOf(NOTE_HEADER) + 1;
  const out = new Map<string, { status: string; note: string }>();
  for (let r = 2; r <= ws.rowCount; r++) {
    const row = ws.getRow(r);
    const key = cellText(row.getCell(id).value);
    if (key === '') continue;
    out.set(key, { status: cellText(row.getCell(st).value), note: cellText(row.getCell(nt).value) });
  }
  return out;
}

function notesSheets(wb: ExcelJS.Workbook): string[] {
  return wb.worksheets.map((w) => w.name).filter((n) => n.startsWith(NOTES_SHEET_NAME));
}

function notesText(wb: ExcelJS.Workbook): string[] {
  const ws = wb.getWorksheet(NOTES_SHEET_NAME)!;
  const out: string[] = [];
  ws.eachRow((row) => out.push(cellText(row.getCell(1).value)));
  return out;
}

describe('batch -> add-in -> batch keeps review marks and adds nothing twice', () => {
  it('round trip with next period\'s rows', async () => {
    const input = join(dir, 'claims.xlsx');
    const scored1 = join(dir, 'scored-1.xlsx');
    await writeDemoWorkbook(input, demoClaims());
    const args = ['--value', 'Amount', '--group', 'Cost centre', '--group', 'Category', '--id', 'Claim ID', '--sheet', SHEET];
    const first = await run('score', input, ...args, '--out', scored1);
    expect(first.code, first.err).toBe(0);

    // The add-in opens the batch command's workbook (sandbox via the ExcelJS bridge) and the reviewer marks claims.
    const sb = sandboxFromExcelJs(await load(scored1));
    sb.setSelection(SHEET, 'A1');
    const layer = createWorkbookLayer(sb.run);
    const table = await layer.detect();
    expect(table.hasResults).toBe(true);
    const settings = (await layer.loadSettings()) ?? {
      valueColumns: ['Amount'], groupColumns: ['Cost centre', 'Category'], idColumn: 'Claim ID', method: 'robust' as const,
      cutoff: 3.5, direction: 'both' as const, logScale: false, minGroupSize: 8, smallGroups: 'pool' as const, widen: 'drop-first' as const, decimal: 'auto' as const, reviewer: null, detailColumns: null,
    };
    // Re-scoring the batch command's workbook in the add-in is accepted (it used to be refused as a name clash).
    await layer.run(table, settings);
    const exceptions = await layer.listExceptions();
    expect(exceptions.length).toBeGreaterThanOrEqual(4);
    const picked = exceptions.slice(0, 4);
    const wanted = new Map<string, { status: string; note: string }>();
    const labels = [statusLabel('cleared'), statusLabel('asked'), statusLabel('cleared'), statusLabel('escalated')];
    for (const [i, e] of picked.entries()) {
      await layer.mark([e.row], labels[i], `checked ${i + 1}`);
      wanted.set(e.claimId!, { status: labels[i], note: `checked ${i + 1}` });
    }
    await layer.run(await layer.detect(), settings);
    const afterAddin = sandboxToExcelJs(sb);
    expect(notesSheets(afterAddin)).toEqual([NOTES_SHEET_NAME]);
    for (const [id, m] of wanted) expect(marksById(afterAddin.getWorksheet(SHEET)!).get(id)).toEqual(m);

    // Next period: two new claims appended, and the claim of the first mark is removed.
    const ws = afterAddin.getWorksheet(SHEET)!;
    const gone = picked[0].claimId!;
    let goneRow = 0;
    ws.eachRow((row, r) => {
      if (cellText(row.getCell(1).value) === gone) goneRow = r;
    });
    expect(goneRow).toBeGreaterThan(1);
    ws.spliceRows(goneRow, 1);
    const last = ws.rowCount;
    const template = ws.getRow(last);
    for (const [k, id] of ['NEW-1', 'NEW-2'].entries()) {
      const row = ws.getRow(last + 1 + k);
      row.getCell(1).value = id;
      for (let c = 2; c <= 7; c++) row.getCell(c).value = template.getCell(c).value;
    }
    const addinPath = join(dir, 'from-addin.xlsx');
    await afterAddin.xlsx.writeFile(addinPath);

    // The batch command re-scores the add-in's workbook.
    const scored2 = join(dir, 'scored-2.xlsx');
    const second = await run('score', addinPath, ...args, '--out', scored2);
    expect(second.code, second.err).toBe(0);
    expect(second.out).toMatch(/Kept 3 review marks with their claims; 1 mark of claims no longer in the data/);
    const out = await load(scored2);
    expect(notesSheets(out)).toEqual([NOTES_SHEET_NAME]);
    const headers = headersOf(out.getWorksheet(SHEET)!);
    const ours = [...Object.values(resultHeaders('Amount')), STATUS_HEADER, NOTE_HEADER];
    for (const h of ours) expect(headers.filter((x) => x === h), h).toHaveLength(1);
    const marks = marksById(out.getWorksheet(SHEET)!);
    for (const [id, m] of wanted) {
      if (id === gone) expect(marks.has(id)).toBe(false);
      else expect(marks.get(id), id).toEqual(m);
    }
    // The notes: one versioned marker in A1 (no internal token shown), the marks, and the gone one.
    const text = notesText(out);
    expect(notesFormatOf(text[0])).toBe(1);
    expect(text[0]).not.toMatch(/tm:/);
    const goneAt = text.indexOf(GONE_TITLE);
    expect(text.indexOf(MARKS_TITLE)).toBeGreaterThan(0);
    expect(goneAt).toBeGreaterThan(0);
    expect(text[goneAt + 2]).toBe(gone);

    // And the add-in once more on the batch command's second workbook: still one of everything.
    const sb2 = sandboxFromExcelJs(out);
    sb2.setSelection(SHEET, 'A1');
    const layer2 = createWorkbookLayer(sb2.run);
    await layer2.run(await layer2.detect(), settings);
    const final = sandboxToExcelJs(sb2);
    expect(notesSheets(final)).toEqual([NOTES_SHEET_NAME]);
    const finalHeaders = headersOf(final.getWorksheet(SHEET)!);
    for (const h of ours) expect(finalHeaders.filter((x) => x === h), h).toHaveLength(1);
    const finalMarks = marksById(final.getWorksheet(SHEET)!);
    for (const [id, m] of wanted) if (id !== gone) expect(finalMarks.get(id), id).toEqual(m);
  }, 120_000);
});
