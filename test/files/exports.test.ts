/**
 * End to end: claim files shaped like real exports (invented data, written here), read by the batch
 * command and by the preview page's reader to the same values as the plain CSV (issues 8 and 12).
 * The reference for every case is the plain UTF-8 comma-separated file with a decimal point; the
 * other files hold the same claims written another way, so their results must be equal to it.
 */
import { describe, expect, it, beforeAll } from 'vitest';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import JSZip from 'jszip';
import * as XLSX from 'xlsx';
import { readDelimited, tableRows } from '../../src/table/delimited.js';
import { scoreTable } from '../../src/scoring/index.js';
import { run } from '../cli/helpers.js';

const dir = mkdtempSync(join(tmpdir(), 'tailmark-exports-'));

/** Invented claims: two cost centres whose names differ only in accented or currency letters. */
const CENTRES = ['Café £', 'Café €'];
interface Claim { id: string; who: string; centre: string; amount: number }
const claims: Claim[] = Array.from({ length: 40 }, (_, i) => ({
  id: `CLM-${String(i + 1).padStart(4, '0')}`,
  who: ['Ana Lindqvist', 'Bo Ferreira', 'Chi Okafor', 'Dée Marchetti'][i % 4],
  centre: CENTRES[Math.floor(i / 20)],
  // Hand-picked spread; claim 7 is large (over a thousand, so thousands separators show).
  amount: i === 6 ? 1480 : Math.round((60 + ((i * 37) % 90) + (i % 3) * 0.25) * 100) / 100,
}));

const point = (x: number) => x.toFixed(2);
const commaEu = (x: number) => new Intl.NumberFormat('de-DE', { minimumFractionDigits: 2, maximumFractionDigits: 2 }).format(x);

function lines(sep: string, fmt: (x: number) => string, quote = (s: string) => s): string[] {
  return [['Claim ID', 'Employee', 'Cost centre', 'Amount'].join(sep), ...claims.map((c) => [c.id, c.who, quote(c.centre), quote(fmt(c.amount))].join(sep))];
}

function utf16(text: string, be: boolean): Buffer {
  const le = Buffer.from(`\ufeff${text}`, 'utf16le');
  if (!be) return le;
  const out = Buffer.alloc(le.length);
  for (let i = 0; i < le.length; i += 2) {
    out[i] = le[i + 1];
    out[i + 1] = le[i];
  }
  return out;
}

/** Windows-1252 bytes of a text (the characters used here: ASCII, é, £, €). */
function cp1252(text: string): Buffer {
  const map: Record<string, number> = { '€': 0x80, '£': 0xa3, 'é': 0xe9 };
  return Buffer.from(Array.from(text, (ch) => map[ch] ?? ch.charCodeAt(0)));
}

interface Out { rows: { row: number; group: string | null; value: number | null; score: number | null }[] }

async function scoreJson(file: string, ...extra: string[]): Promise<Out & { err: string; out: string }> {
  const r = await run('score', file, '--value', 'Amount', '--group', 'Cost centre', '--json', ...extra);
  expect(r.code, r.err).toBe(0);
  const j = JSON.parse(r.out) as Out;
  return { rows: j.rows.map(({ row, group, value, score }) => ({ row, group, value, score })), err: r.err, out: r.out };
}

/** What the preview page's reader gives, scored the same way (values and groups per row). */
function previewValues(file: string): { values: number[]; groups: number[]; labels: string[] } {
  const t = readDelimited(readFileSync(file), file);
  const rows = tableRows(t);
  const h = rows[0];
  const col = (name: string) => rows.slice(1).map((r) => r[h.indexOf(name)]);
  const res = scoreTable(
    { valueColumns: [{ name: 'Amount', cells: col('Amount') }], groupColumns: [{ name: 'Cost centre', cells: col('Cost centre') }] },
    { method: 'robust', direction: 'both', logScale: false, minGroupSize: 8, smallGroups: 'pool' },
  ).columns[0];
  return { values: Array.from(res.values), groups: Array.from(res.groupOf), labels: res.groups.map((g) => g.label) };
}

const plain = join(dir, 'plain.csv');
let reference: Out;
let previewReference: ReturnType<typeof previewValues>;

beforeAll(async () => {
  writeFileSync(plain, `${lines(',', point).join('\r\n')}\r\n`);
  reference = await scoreJson(plain);
  previewReference = previewValues(plain);
});

describe('the plain CSV reference', () => {
  it('has the invented claims, two groups, and amounts as written', () => {
    expect(reference.rows.map((r) => r.value)).toEqual(claims.map((c) => c.amount));
    expect(new Set(reference.rows.map((r) => r.group))).toEqual(new Set(CENTRES));
    expect(previewReference.values).toEqual(claims.map((c) => c.amount));
  });
});

const textCases: [string, () => Buffer, string[]][] = [
  ['European: semicolons, decimal comma, "1.480,00", a title, an export date and a blank line above, UTF-8 BOM', () =>
    Buffer.from(`\ufeffClaims report Q1\r\nExported;2025-04-01\r\n\r\n${lines(';', commaEu).join('\r\n')}\r\n`), []],
  ['UTF-16 LE with BOM, tab-separated .txt ("Unicode text")', () => utf16(`${lines('\t', point).join('\r\n')}\r\n`, false), []],
  ['UTF-16 BE with BOM, .tsv', () => utf16(`${lines('\t', point).join('\n')}\n`, true), []],
  ['Windows-1252 (not valid UTF-8): £ and € groups stay apart', () => cp1252(`${lines(',', point).join('\r\n')}\r\n`), []],
  ['pipe-separated with quoted fields holding pipes', () => Buffer.from(`${lines('|', point, (s) => `"${s}"`).join('\n').replace('"Café £"', '"Café £"')}\n`), []],
  ['a totals row at the end', () => Buffer.from(`${lines(',', point).join('\n')}\nTotal,,,${point(claims.reduce((s, c) => s + c.amount, 0))}\n`), []],
  ['accents written decomposed (e + combining accent): one group after NFC', () =>
    Buffer.from(`${lines(',', point).map((l, i) => (i % 2 ? l.replace('Café', 'Cafe\u0301') : l)).join('\n')}\n`), []],
];
const extension = ['csv', 'txt', 'tsv', 'csv', 'txt', 'csv', 'csv'];

describe('text exports read to the same values as the plain CSV (batch command and preview reader)', () => {
  textCases.forEach(([what, make, extra], i) => {
    it(what, async () => {
      const file = join(dir, `case${i}.${extension[i]}`);
      writeFileSync(file, make());
      const got = await scoreJson(file, ...extra);
      expect(got.rows.map((r) => [r.value, r.group, r.score])).toEqual(reference.rows.map((r) => [r.value, r.group, r.score]));
      const p = previewValues(file);
      expect(p.values).toEqual(previewReference.values);
      expect(p.labels).toEqual(previewReference.labels);
      expect(p.groups).toEqual(previewReference.groups);
    });
  });

  it('says what it decided: decimal comma, encoding, header row, totals row', async () => {
    const eu = join(dir, 'case0.csv');
    const r = await run('score', eu, '--value', 'Amount', '--group', 'Cost centre', '--out', join(dir, 'eu-out.xlsx'));
    expect(r.code, r.err).toBe(0);
    expect(r.out).toMatch(/Amount: read with decimal comma \(inferred from 40 cells such as "\d+,\d\d"/);
    expect(r.out).toMatch(/Header row 4: the rows above it look like titles/);
    const notes = XLSX.utils.sheet_to_json<string[]>(XLSX.read(readFileSync(join(dir, 'eu-out.xlsx'))).Sheets['Tailmark notes'], { header: 1 }).flat().join('\n');
    expect(notes).toMatch(/Amount: read with decimal comma/);
    expect(notes).toMatch(/semicolon-separated/);
    const w = await run('score', join(dir, 'case3.csv'), '--value', 'Amount', '--json');
    expect(w.code).toBe(0);
    const t = await run('score', join(dir, 'case5.csv'), '--value', 'Amount', '--out', join(dir, 'tot-out.xlsx'));
    expect(t.out).toMatch(/Row 42 was left out: it is a totals row/);
    const enc = await run('score', join(dir, 'case3.csv'), '--value', 'Amount', '--out', join(dir, 'enc-out.xlsx'));
    expect(enc.out).toMatch(/text encoding Windows-1252 \(not valid UTF-8\)/);
  });

  it('--encoding, --header-row and --decimal-point override what is detected', async () => {
    const eu = join(dir, 'case0.csv');
    // With a decimal point "1.480,00" is not a number and "61,25" neither: every amount is text.
    const forced = await run('score', eu, '--value', 'Amount', '--json', '--decimal-point');
    expect(forced.code).toBe(2);
    expect(forced.err).toMatch(/value column "Amount" has no numbers .*\(40 text that is not a number\)/);
    const header4 = await scoreJson(eu, '--header-row', '4');
    expect(header4.rows.map((r) => r.value)).toEqual(reference.rows.map((r) => r.value));
    const wrongHeader = await run('score', eu, '--value', 'Amount', '--json', '--header-row', '1');
    expect(wrongHeader.err).toMatch(/value column "Amount" not found/);
    const latin = await scoreJson(join(dir, 'case3.csv'), '--encoding', 'utf-8');
    // Read as UTF-8 on purpose, the £ and € bytes become U+FFFD and the two centres merge.
    expect(new Set(latin.rows.map((r) => r.group)).size).toBe(1);
  });
});

async function claimsWorkbook(path: string, shape: (ws: ExcelJS.Worksheet, wb: ExcelJS.Workbook) => void): Promise<void> {
  const wb = new ExcelJS.Workbook();
  const ws = wb.addWorksheet('Claims');
  shape(ws, wb);
  await wb.xlsx.writeFile(path);
}

function plainSheet(ws: ExcelJS.Worksheet, top = 1): void {
  ws.getRow(top).values = ['Claim ID', 'Employee', 'Cost centre', 'Amount'];
  claims.forEach((c, i) => (ws.getRow(top + 1 + i).values = [c.id, c.who, c.centre, c.amount]));
}

/**
 * Rewrite an ExcelJS workbook as openpyxl lays it out: worksheets stored before workbook.xml, and
 * relationship targets written as absolute paths ("/xl/worksheets/sheet1.xml").
 */
async function asOpenpyxl(src: string, dst: string): Promise<void> {
  const zip = await JSZip.loadAsync(readFileSync(src));
  const names = Object.keys(zip.files).filter((p) => !zip.files[p].dir);
  const rank = (p: string) => (p.includes('worksheets/') ? 0 : p.includes('workbook.xml') ? 2 : 1);
  const out = new JSZip();
  for (const p of [...names].sort((a, b) => rank(a) - rank(b))) {
    let content = await zip.files[p].async('nodebuffer');
    if (p === 'xl/_rels/workbook.xml.rels') content = Buffer.from(content.toString('utf8').replace(/Target="(?!\/)/g, 'Target="/xl/'));
    out.file(p, content);
  }
  writeFileSync(dst, await out.generateAsync({ type: 'nodebuffer', compression: 'DEFLATE' }));
}

describe('workbook exports read to the same values as the plain CSV', () => {
  it('title rows above the header and an Excel totals row (SUBTOTAL) at the end', async () => {
    const f = join(dir, 'titles.xlsx');
    await claimsWorkbook(f, (ws) => {
      ws.getCell('A1').value = 'Expense claims, first quarter';
      ws.getCell('A2').value = 'Exported 2025-04-01';
      plainSheet(ws, 4);
      const last = 4 + claims.length;
      ws.getRow(last + 1).values = ['Total', null, null, { formula: `SUBTOTAL(109,D5:D${last})`, result: 1 }];
    });
    for (const stream of [[], ['--stream']]) {
      const got = await scoreJson(f, ...stream);
      expect(got.rows.map((r) => [r.value, r.group, r.score])).toEqual(reference.rows.map((r) => [r.value, r.group, r.score]));
    }
  });

  it('openpyxl layout: --sheet Claims is found', async () => {
    const src = join(dir, 'for-openpyxl.xlsx');
    await claimsWorkbook(src, (ws, wb) => {
      plainSheet(ws);
      wb.addWorksheet('Other').getCell('A1').value = 'x';
    });
    const f = join(dir, 'openpyxl.xlsx');
    await asOpenpyxl(src, f);
    const got = await scoreJson(f, '--sheet', 'Claims');
    expect(got.rows.map((r) => [r.value, r.group, r.score])).toEqual(reference.rows.map((r) => [r.value, r.group, r.score]));
    const other = await run('score', f, '--sheet', 'Nope', '--value', 'Amount', '--json');
    expect(other.err).toMatch(/sheet "Nope" not found in openpyxl\.xlsx; sheets: "Claims", "Other"/);
  });

  it('merged cells in the cost-centre column take the merged value for every row (said in the notes)', async () => {
    const f = join(dir, 'merged.xlsx');
    await claimsWorkbook(f, (ws) => {
      plainSheet(ws);
      for (let r = 3; r <= 21; r++) ws.getCell(`C${r}`).value = null;
      for (let r = 23; r <= 41; r++) ws.getCell(`C${r}`).value = null;
      ws.mergeCells('C2:C21');
      ws.mergeCells('C22:C41');
    });
    for (const stream of [[], ['--stream']]) {
      const got = await scoreJson(f, ...stream);
      expect(got.rows.map((r) => [r.value, r.group, r.score])).toEqual(reference.rows.map((r) => [r.value, r.group, r.score]));
    }
    const r = await run('score', f, '--value', 'Amount', '--group', 'Cost centre', '--out', join(dir, 'merged-out.xlsx'));
    expect(r.out).toMatch(/Cost centre: 38 cells in 2 merged areas \(C2:C21, C22:C41\) took the merged value/);
  });

  it('formulas without saved results: a clear message, not blank cells', async () => {
    const f = join(dir, 'formulas.xlsx');
    await claimsWorkbook(f, (ws) => {
      plainSheet(ws);
      claims.forEach((_, i) => (ws.getCell(`D${i + 2}`).value = { formula: `${i + 10}*2` } as ExcelJS.CellFormulaValue));
    });
    for (const how of [['--json'], ['--json', '--stream'], ['--out', join(dir, 'formulas-out.xlsx')]]) {
      const r = await run('score', f, '--value', 'Amount', ...how);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(/column "Amount" in formulas\.xlsx holds 40 formulas whose results were never calculated .*open it in a spreadsheet program, save it, and run again/);
    }
  });
});

describe('files that cannot be read get a message that says what they are', () => {
  const ole = Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1]);
  const cases: [string, Buffer, RegExp][] = [
    ['old.xls', Buffer.concat([ole, Buffer.alloc(512), Buffer.from('Workbook', 'utf16le')]), /Excel 97-2003 workbook \(\.xls\).*save it as an Excel Workbook \(\.xlsx\)/],
    ['locked.xlsx', Buffer.concat([ole, Buffer.alloc(512), Buffer.from('EncryptedPackage', 'utf16le')]), /protected with a password/],
    ['sheet.ods', Buffer.concat([Buffer.from('PK\x03\x04'), Buffer.alloc(26), Buffer.from('mimetypeapplication/vnd.oasis.opendocument.spreadsheet')]), /OpenDocument spreadsheet \(\.ods\)/],
    ['binary.xlsb', Buffer.concat([Buffer.from('PK\x03\x04'), Buffer.alloc(26), Buffer.from('xl/workbook.bin')]), /Excel binary workbook \(\.xlsb\)/],
    ['page.xls', Buffer.from('<html><body><table><tr><td>1</td></tr></table></body></html>'), /web page \(HTML\)/],
    ['renamed.csv', Buffer.concat([Buffer.from('PK\x03\x04'), Buffer.alloc(26), Buffer.from('xl/workbook.xml')]), /is an Excel workbook, not delimited text: rename it to end in \.xlsx/],
  ];
  for (const [name, bytes, pattern] of cases) {
    it(name, async () => {
      const f = join(dir, name);
      writeFileSync(f, bytes);
      const r = await run('score', f, '--value', 'Amount', '--json');
      expect(r.code).toBe(2);
      expect(r.err).toMatch(pattern);
    });
  }

  it('a column of reference codes is not a column of numbers', async () => {
    const r = await run('score', plain, '--value', 'Claim ID', '--json');
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/value column "Claim ID" has no numbers .*40 text/);
  });
});
