import { afterEach, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import * as XLSX from 'xlsx';
import { demoClaims } from '../../src/demo/claims.js';
import { writeDemoWorkbook } from '../../src/files/demo.js';
import { cellsOf, decodeXml, readBook, run, sha256, sheetPart, zipPart } from './helpers.js';

const dir = mkdtempSync(join(tmpdir(), 'tailmark-stream-cli-'));
const input = join(dir, 'claims.xlsx');
const inMemory = join(dir, 'in-memory.xlsx');
const streamed = join(dir, 'streamed.xlsx');
const baseArgs = ['--value', 'Amount', '--group', 'Cost centre', '--group', 'Category', '--id', 'Claim ID'];
let streamedOut = '';

beforeAll(async () => {
  await writeDemoWorkbook(input, demoClaims());
  const hash = sha256(input);
  const a = await run('score', input, ...baseArgs, '--out', inMemory);
  expect(a.code, a.err).toBe(0);
  expect(a.out).not.toMatch(/Large-file mode/);
  // Large-file mode forced with a low threshold (the environment variable) ...
  process.env.TAILMARK_STREAM_ROWS = '10';
  const b = await run('score', input, ...baseArgs, '--out', streamed);
  delete process.env.TAILMARK_STREAM_ROWS;
  expect(b.code, b.err).toBe(0);
  streamedOut = b.out;
  expect(sha256(input)).toBe(hash);
});

afterEach(() => {
  delete process.env.TAILMARK_STREAM_ROWS;
});

/** Every cell of a sheet as {t, v, f, z}, by address. */
function cells(path: string, sheet: string): Record<string, unknown> {
  const ws = readBook(path).Sheets[sheet];
  const out: Record<string, unknown> = {};
  for (const [addr, c] of Object.entries(ws)) {
    if (addr.startsWith('!')) continue;
    const cell = c as XLSX.CellObject;
    out[addr] = { t: cell.t, v: cell.v, f: cell.f, z: cell.z };
  }
  return out;
}

/** The notes sheet's text without the run time and our large-file section. */
function notesText(path: string): string[] {
  const rows = XLSX.utils.sheet_to_json<unknown[]>(readBook(path).Sheets['Tailmark notes'], { header: 1, raw: true });
  const text = rows.map((r) => r.join(' | '));
  const cut = text.indexOf('Large-file mode');
  const kept = (cut >= 0 ? text.slice(0, cut) : text).filter((l) => !l.startsWith('Time of run'));
  while (kept.length && kept[kept.length - 1] === '') kept.pop();
  return kept;
}

function sheetXml(path: string, sheet: string): string {
  return decodeXml(zipPart(path, sheetPart(path, sheet)));
}

describe('large-file mode (row by row) on the demo data gives what the in-memory path gives', () => {
  it('says so in its output', () => {
    expect(streamedOut).toMatch(/Large-file mode \(written row by row\)\./);
  });

  it('the same cells: input values, formulas, formats, and our scores, flags, reasons and statuses', () => {
    const a = cells(inMemory, 'Claims');
    const b = cells(streamed, 'Claims');
    expect(Object.keys(a).length).toBeGreaterThan(600 * 8);
    expect(b).toEqual(a);
  });

  it('the same conditional-format rules and status dropdown', () => {
    const rules = (xml: string) => xml.match(/<conditionalFormatting[\s\S]*?<\/conditionalFormatting>/g)!.map((s) => s.replace(/ dxfId="\d+"/g, ''));
    const dropdown = (xml: string) => xml.match(/<dataValidation [\s\S]*?<\/dataValidation>/g);
    const a = sheetXml(inMemory, 'Claims');
    const b = sheetXml(streamed, 'Claims');
    expect(rules(b)).toEqual(rules(a));
    expect(rules(b)).toHaveLength(1);
    expect(dropdown(b)).toEqual(dropdown(a));
    expect(dropdown(b)).toHaveLength(1);
  });

  it('the same highlight colours (the rules\' fill and font, read back with ExcelJS)', async () => {
    const styles = async (p: string) => {
      const wb = new ExcelJS.Workbook();
      await wb.xlsx.readFile(p);
      const model = wb.getWorksheet('Claims') as unknown as { conditionalFormattings: { rules: { style?: unknown }[] }[] };
      return model.conditionalFormattings.flatMap((cf) => cf.rules.map((r) => r.style));
    };
    expect(await styles(streamed)).toEqual(await styles(inMemory));
  });

  it('the same notes sheet, plus a section saying what large-file mode carried over', () => {
    expect(readBook(streamed).SheetNames).toEqual(['Claims', 'Tailmark notes', 'Tailmark log']);
    expect(readBook(streamed).SheetNames).toEqual(readBook(inMemory).SheetNames);
    expect(notesText(streamed)).toEqual(notesText(inMemory));
    const all = XLSX.utils.sheet_to_json<unknown[]>(readBook(streamed).Sheets['Tailmark notes'], { header: 1 }).flat().join('\n');
    expect(all).toMatch(/Large-file mode/);
    expect(all).toMatch(/Carried over from the input: values, formulas, number formats/);
  });

  it('keeps the frozen header row and column widths', () => {
    const a = sheetXml(inMemory, 'Claims');
    const b = sheetXml(streamed, 'Claims');
    expect(b).toMatch(/<pane [^>]*ySplit="1"[^>]*state="frozen"/);
    const widths = (xml: string) => [...xml.matchAll(/<col min="(\d+)" max="(\d+)" width="([\d.]+)"/g)].map((m) => `${m[1]}-${m[2]}:${m[3]}`);
    expect(widths(b)).toEqual(widths(a));
  });
});

describe('large-file mode keeps the user own formulas, formats, rules and sheets', () => {
  it('and lists what it could not carry over, in the output and the notes sheet', async () => {
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('Q1 claims', { views: [{ state: 'frozen', ySplit: 1 }] });
    ws.addRow(['Ref', 'Team', 'Amount', 'Doubled']);
    const amounts = [12, 14, 13, 15, 11, 13, 14, 12, 16, 90];
    amounts.forEach((a, i) => ws.addRow([`R${i + 1}`, 'North', a, null]));
    // D2 is a shared-formula master, D3:D11 its dependents (stored as <f t="shared" si="0"/>).
    ws.getCell('D2').value = { formula: 'C2*2', result: 24 };
    for (let r = 3; r <= 11; r++) ws.getCell(`D${r}`).value = { sharedFormula: 'D2', result: amounts[r - 2] * 2 };
    ws.getColumn(3).numFmt = '#,##0.00 "units"';
    ws.getCell('A2').font = { italic: true, color: { argb: 'FF336699' } };
    ws.getCell('B2').value = { text: 'North', hyperlink: 'https://example.invalid/north' };
    ws.getCell('F3').value = 'side note';
    ws.mergeCells('F5:G5');
    ws.getCell('F5').value = 'merged';
    ws.addConditionalFormatting({
      ref: 'C2:C11',
      rules: [{ type: 'expression', priority: 1, formulae: ['$C2>50'], style: { font: { bold: true } } }],
    });
    ws.getCell('B3').dataValidation = { type: 'list', allowBlank: true, formulae: ['"North,South"'] };
    wb.addWorksheet('Tailmark notes').getCell('A1').value = 'my own sheet that happens to share the name';
    const p = join(dir, 'own.xlsx');
    await wb.xlsx.writeFile(p);
    const out = join(dir, 'own-streamed.xlsx');
    const r = await run('score', p, '--value', 'Amount', '--group', 'Team', '--out', out, '--stream');
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/Not carried over from the input: sheet "Q1 claims": 1 hyperlink target\(s\) \(the link text is kept\)/);

    const a = cellsOf(readBook(p).Sheets['Q1 claims']);
    const outSheet = readBook(out).Sheets['Q1 claims'];
    const b = cellsOf(outSheet);
    for (const addr of ['A1', 'A2', 'B2', 'C2', 'C11', 'D2', 'D3', 'D11', 'F3', 'F5']) {
      expect({ t: b[addr].t, v: b[addr].v, f: b[addr].f, z: b[addr].z }, addr).toEqual({ t: a[addr].t, v: a[addr].v, f: a[addr].f, z: a[addr].z });
    }
    expect(b.D11.f).toBe('C11*2'); // the shared formula, written out for its own cell
    const book = readBook(out);
    expect(book.SheetNames).toEqual(['Q1 claims', 'Tailmark notes', 'Tailmark notes (2)', 'Tailmark log']);
    expect(cellsOf(book.Sheets['Tailmark notes']).A1.v).toBe('my own sheet that happens to share the name');
    const notes = XLSX.utils.sheet_to_json<unknown[]>(book.Sheets['Tailmark notes (2)'], { header: 1 }).flat().join('\n');
    expect(notes).toMatch(/Not carried over \(found in the input\): sheet "Q1 claims": 1 hyperlink target\(s\)/);
    // Results skip column F (the user's note) and start in G... F5:G5 is merged, so G is not free either.
    expect(b.H1.v).toBe('Amount · tail score');
    expect(outSheet['!merges']?.map((m) => XLSX.utils.encode_range(m))).toEqual(['F5:G5']);
    const xml = sheetXml(out, 'Q1 claims');
    expect(xml).toContain('<formula>$C2>50</formula>');
    expect(xml).toContain('ISTEXT("tailmark:open")');
    expect(xml).toMatch(/<dataValidation type="list" allowBlank="1" sqref="B3"><formula1>"North,South"<\/formula1>/);
    expect(xml).toMatch(/<pane [^>]*ySplit="1"[^>]*state="frozen"/);
    const back = new ExcelJS.Workbook();
    await back.xlsx.readFile(out);
    expect(back.getWorksheet('Q1 claims')!.getCell('A2').font?.italic).toBe(true);
    expect(back.getWorksheet('Q1 claims')!.getCell('A2').font?.color?.argb).toBe('FF336699');
  });

  it('a re-run in large-file mode keeps review marks and does not duplicate our rules or sheets', async () => {
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.readFile(streamed);
    const ws = wb.getWorksheet('Claims')!;
    let marked = 0;
    for (let r = 2; r <= 601 && marked === 0; r++) {
      if (ws.getCell(`K${r}`).value === 'To look at') {
        ws.getCell(`K${r}`).value = 'Asked claimant';
        ws.getCell(`L${r}`).value = 'Email sent';
        marked = r;
      }
    }
    expect(marked).toBeGreaterThan(0);
    const reviewed = join(dir, 'reviewed.xlsx');
    await wb.xlsx.writeFile(reviewed);
    const again = join(dir, 'reviewed-again.xlsx');
    const r = await run('score', reviewed, ...baseArgs, '--out', again, '--stream');
    expect(r.code, r.err).toBe(0);
    const sheet = cellsOf(readBook(again).Sheets.Claims);
    expect(sheet[`K${marked}`].v).toBe('Asked claimant');
    expect(sheet[`L${marked}`].v).toBe('Email sent');
    expect(sheet.M1).toBeUndefined();
    const xml = sheetXml(again, 'Claims');
    expect(xml.match(/ISTEXT\("tailmark:open"\)/g)).toHaveLength(1);
    expect(xml.match(/<dataValidation /g)).toHaveLength(1);
    // Our log stays where it was (one more line); the notes sheet is replaced, at the end.
    expect(readBook(again).SheetNames).toEqual(['Claims', 'Tailmark log', 'Tailmark notes']);
  });

  it('a bad TAILMARK_STREAM_ROWS is a usage error', async () => {
    process.env.TAILMARK_STREAM_ROWS = 'lots';
    const r = await run('score', input, ...baseArgs, '--json');
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/TAILMARK_STREAM_ROWS must be a whole number of rows; got "lots"/);
  });
});
