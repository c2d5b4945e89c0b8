import { beforeAll, describe, expect, it } from 'vitest';
import { copyFileSync, existsSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import * as XLSX from 'xlsx';
import { demoClaims, DEMO_GROUPS } from '../../src/demo/claims.js';
import { writeDemoWorkbook } from '../../src/files/demo.js';
import { CAUTION, REVIEW_STATUSES } from '../../src/report/index.js';
import { amountOf, cellsOf, decodeXml, medianOf, readBook, run, sha256, sheetPart, zipPart } from './helpers.js';

const dir = mkdtempSync(join(tmpdir(), 'tailmark-cli-'));
const input = join(dir, 'claims.xlsx');
const scored = join(dir, 'claims-scored.xlsx');
const baseArgs = ['--value', 'Amount', '--group', 'Cost centre', '--group', 'Category', '--id', 'Claim ID', '--method', 'robust'];

let inputHash = '';
let result = { code: -1, out: '', err: '' };

beforeAll(async () => {
  await writeDemoWorkbook(input, demoClaims());
  inputHash = sha256(input);
  result = await run('score', input, ...baseArgs, '--out', scored);
});

describe('tailmark score on the demo workbook', () => {
  it('exits 0, says where it wrote, shows the caution, leaves the input file byte-identical', () => {
    expect(result.err).toBe('');
    expect(result.code).toBe(0);
    expect(result.out).toContain(scored);
    expect(result.out).toContain(CAUTION);
    expect(sha256(input)).toBe(inputHash);
  });

  it('keeps every input cell: value, type, formula and number format (read back with SheetJS)', () => {
    const inSheet = readBook(input).Sheets.Claims;
    const a = cellsOf(inSheet);
    const b = cellsOf(readBook(scored).Sheets.Claims);
    const range = XLSX.utils.decode_range(inSheet['!ref']!);
    let compared = 0;
    for (let r = range.s.r; r <= range.e.r; r++) {
      for (let c = range.s.c; c <= range.e.c; c++) {
        const addr = XLSX.utils.encode_cell({ r, c });
        const x = a[addr];
        const y = b[addr];
        if (!x) continue;
        expect(y, addr).toBeDefined();
        expect({ t: y.t, v: y.v, f: y.f, z: y.z }, addr).toEqual({ t: x.t, v: x.v, f: x.f, z: x.z });
        compared++;
      }
    }
    expect(compared).toBeGreaterThan(600 * 6);
  });

  it('adds our result columns right of the data', () => {
    const rows = XLSX.utils.sheet_to_json<unknown[]>(readBook(scored).Sheets.Claims, { header: 1, raw: true });
    expect(rows[0].slice(7)).toEqual(['Amount · tail score', 'Amount · tail flag', 'Amount · why', 'Tailmark status', 'Tailmark note']);
  });

  it('scores equal robust z computed in the test from the group amounts (median/MAD by hand)', () => {
    const rows = XLSX.utils.sheet_to_json<unknown[]>(readBook(scored).Sheets.Claims, { header: 1, raw: true }).slice(1);
    const robustZ = (cc: string, cat: string, pick: (xs: number[]) => number) => {
      const members = rows.filter((r) => r[2] === cc && r[3] === cat);
      const xs = members.map((r) => amountOf(r[5])).filter((x): x is number => x !== null);
      const med = medianOf(xs);
      const mad = medianOf(xs.map((x) => Math.abs(x - med)));
      const target = pick(xs);
      const row = members.find((r) => amountOf(r[5]) === target)!;
      return { expected: Math.round(((target - med) / (1.4826 * mad)) * 100) / 100, got: row[7], row };
    };
    // The largest claim of the masking group.
    const big = robustZ(DEMO_GROUPS.masking.costCentre, DEMO_GROUPS.masking.category, (xs) => Math.max(...xs));
    expect(big.got).toBe(big.expected);
    expect(big.row[8]).toBe('▲ above peers');
    expect(big.row[10]).toBe(REVIEW_STATUSES[0].label);
    // An ordinary claim of the same group.
    const mid = robustZ(DEMO_GROUPS.masking.costCentre, DEMO_GROUPS.masking.category, (xs) => [...xs].sort((p, q) => p - q)[5]);
    expect(mid.got).toBe(mid.expected);
    expect(mid.row[8]).toBeUndefined();
    // A group holding an accounting-style credit "(38.20)": the credit counts as -38.20.
    const credit = rows.find((r) => r[5] === '(38.20)')!;
    const low = robustZ(credit[2] as string, credit[3] as string, () => -38.2);
    expect(low.got).toBe(low.expected);
    expect(low.row[8]).toBe('▼ below peers');
  });

  it('leaves excluded cells unscored and explains why', () => {
    const rows = XLSX.utils.sheet_to_json<unknown[]>(readBook(scored).Sheets.Claims, { header: 1, raw: true, defval: null }).slice(1);
    const receipt = rows.find((r) => r[5] === 'see receipt')!;
    expect(receipt[7]).toBeNull();
    expect(String(receipt[9])).toMatch(/text/i);
  });

  it('masking: the three large lodging claims are flagged by robust z but not by classic z', async () => {
    const classicOut = join(dir, 'classic.xlsx');
    const r = await run('score', input, ...baseArgs.slice(0, -2), '--method', 'classic', '--out', classicOut);
    expect(r.code).toBe(0);
    const flaggedIn = (path: string) =>
      XLSX.utils
        .sheet_to_json<unknown[]>(readBook(path).Sheets.Claims, { header: 1, raw: true })
        .slice(1)
        .filter((x) => x[2] === DEMO_GROUPS.masking.costCentre && x[3] === DEMO_GROUPS.masking.category && x[8]).length;
    expect(flaggedIn(scored)).toBe(3);
    expect(flaggedIn(classicOut)).toBe(0);
  });

  it('writes formula-like notes as text, not formulas', () => {
    const sheet = readBook(scored).Sheets.Claims;
    const cells = Object.entries(sheet).filter(([k]) => !k.startsWith('!'));
    const eq = cells.find(([, c]) => (c as XLSX.CellObject).v === '=as agreed with manager');
    expect(eq).toBeDefined();
    const cell = eq![1] as XLSX.CellObject;
    expect(cell.t).toBe('s');
    expect(cell.f).toBeUndefined();
    expect(cells.some(([, c]) => (c as XLSX.CellObject).f !== undefined)).toBe(false);
  });

  it('has our conditional-format rules (in the sheet XML) and the status dropdown', () => {
    const xml = decodeXml(zipPart(scored, sheetPart(scored, 'Claims')));
    expect(xml).toContain('<conditionalFormatting sqref="A2:L601">');
    expect(xml).toContain('<formula>AND(ISTEXT("tailmark:open"),$I2<>"",OR($K2="",$K2="To look at"))</formula>');
    for (const s of ['asked', 'cleared', 'escalated']) expect(xml).toContain(`ISTEXT("tailmark:${s}")`);
    expect(xml).toMatch(/<dataValidation type="list"[^>]*sqref="K2:K601"><formula1>"To look at,Asked claimant,Cleared,Sent up"<\/formula1>/);
  });

  it('has the notes sheet with the caution', () => {
    const book = readBook(scored);
    expect(book.SheetNames).toEqual(['Claims', 'Tailmark notes', 'Tailmark log']);
    const text = XLSX.utils.sheet_to_json<unknown[]>(book.Sheets['Tailmark notes'], { header: 1 }).flat().join('\n');
    expect(text).toContain(CAUTION);
    expect(text).toMatch(/How the cutoff was chosen/);
    expect(text).toContain('claims.xlsx, sheet Claims, A1:G601');
  });

  it('writes next to the input by default and refuses to overwrite without --force', async () => {
    const copy = join(dir, 'period.xlsx');
    copyFileSync(input, copy);
    const first = await run('score', copy, ...baseArgs);
    expect(first.code).toBe(0);
    const def = join(dir, 'period-tailmark.xlsx');
    expect(existsSync(def)).toBe(true);
    const before = sha256(def);
    const second = await run('score', copy, ...baseArgs);
    expect(second.code).toBe(2);
    expect(second.err.trim().split('\n')).toHaveLength(1);
    expect(second.err).toMatch(/already exists.*--force/);
    expect(sha256(def)).toBe(before);
    const forced = await run('score', copy, ...baseArgs, '--force');
    expect(forced.code).toBe(0);
  });

  it('never writes over the input, even with --force', async () => {
    const r = await run('score', input, ...baseArgs, '--out', input, '--force');
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/refusing to write over the input/);
    expect(sha256(input)).toBe(inputHash);
  });

  it('a re-run on a scored workbook keeps review marks and does not duplicate our rules', async () => {
    // The reviewer marks a claim in the scored copy.
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.readFile(scored);
    const ws = wb.getWorksheet('Claims')!;
    let marked = 0;
    for (let r = 2; r <= 601 && marked === 0; r++) {
      if (ws.getCell(`K${r}`).value === 'To look at') {
        ws.getCell(`K${r}`).value = 'Cleared';
        ws.getCell(`L${r}`).value = 'Receipt checked';
        marked = r;
      }
    }
    const reviewed = join(dir, 'reviewed.xlsx');
    await wb.xlsx.writeFile(reviewed);
    const again = join(dir, 'reviewed-again.xlsx');
    const r = await run('score', reviewed, ...baseArgs, '--out', again);
    expect(r.code).toBe(0);
    const sheet = cellsOf(readBook(again).Sheets.Claims);
    expect(sheet[`K${marked}`].v).toBe('Cleared');
    expect(sheet[`L${marked}`].v).toBe('Receipt checked');
    expect(sheet.M1).toBeUndefined(); // no second set of columns
    const xml = decodeXml(zipPart(again, sheetPart(again, 'Claims')));
    expect(xml.match(/ISTEXT\("tailmark:open"\)/g)).toHaveLength(1);
    expect(xml.match(/<dataValidation /g)).toHaveLength(1);
    expect([...readBook(again).SheetNames].sort()).toEqual(['Claims', 'Tailmark log', 'Tailmark notes']);
  });
});

describe('tailmark score keeps the user own formulas, formats and rules', () => {
  it('preserves them and puts results after the first empty column', async () => {
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('Q1 claims');
    ws.addRow(['Ref', 'Team', 'Amount', 'Doubled']);
    const amounts = [12, 14, 13, 15, 11, 13, 14, 12, 16, 90];
    amounts.forEach((a, i) => {
      ws.addRow([`R${i + 1}`, 'North', a, { formula: `C${i + 2}*2`, result: a * 2 }]);
    });
    ws.getColumn(3).numFmt = '#,##0.00 "units"';
    ws.getCell('A2').font = { italic: true, color: { argb: 'FF336699' } };
    ws.getCell('F3').value = 'side note'; // user content to the right: results must skip it
    ws.addConditionalFormatting({
      ref: 'C2:C11',
      rules: [{ type: 'expression', priority: 1, formulae: ['$C2>50'], style: { font: { bold: true } } }],
    });
    wb.addWorksheet('Tailmark notes').getCell('A1').value = 'my own sheet that happens to share the name';
    const p = join(dir, 'own.xlsx');
    await wb.xlsx.writeFile(p);
    const out = join(dir, 'own-out.xlsx');
    const r = await run('score', p, '--value', 'Amount', '--group', 'Team', '--out', out);
    expect(r.err).toBe('');
    expect(r.code).toBe(0);

    const a = cellsOf(readBook(p).Sheets['Q1 claims']);
    const b = cellsOf(readBook(out).Sheets['Q1 claims']);
    for (const addr of ['A1', 'A2', 'C2', 'C11', 'D2', 'D11', 'F3']) {
      expect({ t: b[addr].t, v: b[addr].v, f: b[addr].f, z: b[addr].z }, addr).toEqual({ t: a[addr].t, v: a[addr].v, f: a[addr].f, z: a[addr].z });
    }
    expect(b.D11.f).toBe('C11*2');
    const outBook = readBook(out);
    expect(outBook.SheetNames).toEqual(['Q1 claims', 'Tailmark notes', 'Tailmark notes (2)', 'Tailmark log']);
    expect(cellsOf(outBook.Sheets['Tailmark notes']).A1.v).toBe('my own sheet that happens to share the name');
    // Column E is empty but F has the user's note, so results start in G.
    expect(b.G1.v).toBe('Amount · tail score');
    expect(b.E1).toBeUndefined();
    const xml = decodeXml(zipPart(out, sheetPart(out, 'Q1 claims')));
    expect(xml).toContain('<formula>$C2&gt;50</formula>'.replace('&gt;', '>'));
    expect(xml).toContain('ISTEXT("tailmark:open")');
    // The italic font of A2 survives (ExcelJS read-back of styles).
    const back = new ExcelJS.Workbook();
    await back.xlsx.readFile(out);
    expect(back.getWorksheet('Q1 claims')!.getCell('A2').font?.italic).toBe(true);
  });
});

describe('tailmark score on CSV', () => {
  it('reads text numbers and credits, and writes a new workbook with the data and results', async () => {
    const p = join(dir, 'claims.csv');
    const lines = ['\uFEFFClaim ID,Team,Amount,Notes'];
    const amounts = ['"1,020.00"', '990', '1005', '1,010.00', '(15.00)', '1000', '998', '1002', '"5,400.00"', 'n/a'];
    amounts.forEach((a, i) => lines.push(`C${i + 1},East,${a},${i === 0 ? '"=HYPERLINK(""x"")"' : ''}`));
    writeFileSync(p, lines.join('\r\n') + '\r\n');
    const out = join(dir, 'claims-csv.xlsx');
    const r = await run('score', p, '--value', 'Amount', '--group', 'Team', '--out', out);
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    const book = readBook(out);
    expect(book.SheetNames).toEqual(['claims', 'Tailmark notes', 'Tailmark log']);
    const sheet = cellsOf(book.Sheets.claims);
    expect(sheet.C2.v).toBe('1,020.00');
    expect(sheet.C3.v).toBe(990);
    expect(sheet.D2.t).toBe('s');
    expect(sheet.D2.v).toBe('=HYPERLINK("x")');
    expect(sheet.D2.f).toBeUndefined();
    expect(sheet.E1.v).toBe('Amount · tail score');
    // 5,400.00 is far above its group; "(15.00)" far below.
    expect(sheet.F10.v).toBe('▲ above peers');
    expect(sheet.F6.v).toBe('▼ below peers');
    expect(sheet.E11?.v).toBeUndefined(); // "n/a" is not scored
  });
});

describe('tailmark score with --decimal-comma on a semicolon CSV', () => {
  it('reads "1.234,50" as 1234.5', async () => {
    const p = join(dir, 'komma.csv');
    const amounts = ['100,00', '101,50', '99,00', '100,50', '98,75', '102,00', '100,25', '99,50', '1.234,50'];
    writeFileSync(p, ['Team;Amount', ...amounts.map((a) => `W;${a}`)].join('\n'));
    const r = await run('score', p, '--value', 'Amount', '--group', 'Team', '--decimal-comma', '--json');
    expect(r.err).toBe('');
    const j = JSON.parse(r.out) as JsonOutput;
    expect(j.rows.map((x) => x.value)).toEqual([100, 101.5, 99, 100.5, 98.75, 102, 100.25, 99.5, 1234.5]);
    expect(j.rows[8].flagged).toBe(true);
  });
});

/** What `tailmark score --json` prints (the fields these tests read). */
interface JsonOutput {
  method: string;
  cutoff: number;
  rows: { row: number; group: string; value: number | null; score: number | null; flagged: boolean }[];
  groups: { key: string; n: number; center: number | null; lower: number | null; upper: number | null; flagged: number; medcouple: number | null }[];
}

describe('--json', () => {
  it('prints method, cutoff, rows and groups; writes no workbook unless --out is given', async () => {
    const copy = join(dir, 'json-in.xlsx');
    copyFileSync(input, copy);
    const r = await run('score', copy, ...baseArgs, '--json');
    expect(r.code).toBe(0);
    expect(existsSync(join(dir, 'json-in-tailmark.xlsx'))).toBe(false);
    const j = JSON.parse(r.out) as JsonOutput;
    expect(j.method).toBe('robust');
    expect(j.cutoff).toBe(3.5);
    expect(j.rows).toHaveLength(600);
    for (const k of ['row', 'group', 'value', 'score', 'flagged']) expect(j.rows[0]).toHaveProperty(k);
    expect(j.rows[0].row).toBe(1);
    const receipt = j.rows.find((x) => x.value === null && x.score === null);
    expect(receipt).toBeDefined();
    const g = j.groups.find((x) => x.key === `${DEMO_GROUPS.masking.costCentre} / ${DEMO_GROUPS.masking.category}`);
    expect(g).toMatchObject({ n: 23, flagged: 3 });
    expect(g?.center).toBe(144); // median of the 23 lodging amounts (hand-set, see src/demo/claims.ts)
    for (const k of ['key', 'n', 'center', 'scale', 'lower', 'upper', 'flagged']) expect(g).toHaveProperty(k);
    const flaggedRows = j.rows.filter((x) => x.flagged);
    for (const x of flaggedRows) expect(Math.abs(x.score ?? NaN), `row ${x.row}`).toBeGreaterThan(3.5);
  });
});

describe('--method adjusted', () => {
  it('flags what R robustbase adjboxStats puts outside its fences and reports each group\'s medcouple (test/reference/make-r-medcouple.R, set lognormal60)', async () => {
    const { readFileSync } = await import('node:fs');
    const fixture = JSON.parse(readFileSync(new URL('../reference/r-medcouple.json', import.meta.url), 'utf8')) as Record<string, { x: number[]; mc: number; fence: number[]; out: number[] }>;
    const s = fixture.lognormal60;
    const p = join(dir, 'adjusted.csv');
    writeFileSync(p, ['Team,Amount', ...s.x.map((a) => `W,${a}`)].join('\n'));
    const r = await run('score', p, '--value', 'Amount', '--group', 'Team', '--method', 'adjusted', '--json');
    expect(r.err).toBe('');
    const j = JSON.parse(r.out) as JsonOutput;
    expect(j.method).toBe('adjusted');
    expect(j.cutoff).toBe(1.5);
    expect(j.groups[0].medcouple).toBeCloseTo(s.mc, 12);
    expect(j.groups[0].lower).toBeCloseTo(s.fence[0], 9);
    expect(j.groups[0].upper).toBeCloseTo(s.fence[1], 9);
    const flagged = j.rows.filter((x) => x.flagged).map((x) => x.value ?? NaN).sort((a, b) => a - b);
    expect(flagged).toEqual(s.out);
  });
});
