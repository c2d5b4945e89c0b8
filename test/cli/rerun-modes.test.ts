/**
 * Re-scoring a scored workbook gives the same review marks, notes and log in large-file mode (row by
 * row, `--stream`) as in memory (issue 7 item 3, issue 11): marks of claims that are gone are listed
 * from the previous run's notes, and the log sheet keeps every earlier line (runs, cutoff changes,
 * the add-in's status lines) and gains this run's lines below them.
 *
 * Expected values come from the test's own bookkeeping (which claim it marked how, which rows it
 * removed, which log lines it wrote), read back with SheetJS (independent of ExcelJS, which writes).
 */
import { mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import * as XLSX from 'xlsx';
import { describe, expect, it } from 'vitest';
import { demoClaims } from '../../src/demo/claims.js';
import { writeDemoWorkbook } from '../../src/files/demo.js';
import { GONE_TITLE, LOG_HEADER, LOG_SHEET_NAME, MARKS_TITLE, NOTE_HEADER, STATUS_HEADER } from '../../src/report/index.js';
import { readBook, run } from './helpers.js';

const dir = mkdtempSync(join(tmpdir(), 'tailmark-rerun-modes-'));
const args = ['--value', 'Amount', '--group', 'Cost centre', '--group', 'Category', '--id', 'Claim ID', '--method', 'robust'];
const MODES = { memory: [] as string[], rows: ['--stream'] };
type Mode = keyof typeof MODES;

/** Score `input` into <dir>/<mode>/<name> (same file name in both modes, so the log's Source matches). */
async function score(mode: Mode, input: string, name: string, ...extra: string[]): Promise<string> {
  mkdirSync(join(dir, mode), { recursive: true });
  const out = join(dir, mode, name);
  const r = await run('score', input, ...args, ...MODES[mode], ...extra, '--out', out, '--force');
  expect(r.code, r.err).toBe(0);
  expect(/Large-file mode/.test(r.out), `${mode}: ${r.out}`).toBe(mode === 'rows');
  return out;
}

async function load(path: string): Promise<ExcelJS.Workbook> {
  const wb = new ExcelJS.Workbook();
  await wb.xlsx.readFile(path);
  return wb;
}

/** 1-based column of a header on row 1. */
function col(ws: ExcelJS.Worksheet, header: string): number {
  let found = 0;
  ws.getRow(1).eachCell((c, n) => {
    if (c.value === header) found = n;
  });
  expect(found, header).toBeGreaterThan(0);
  return found;
}

function rowsOf(path: string, sheet: string): unknown[][] {
  const ws = readBook(path).Sheets[sheet];
  expect(ws, `${sheet} in ${path}`).toBeDefined();
  return XLSX.utils.sheet_to_json<unknown[]>(ws, { header: 1, raw: true, defval: null, blankrows: true });
}

/** The rows of a notes section (below its title, to the blank row that ends it). */
function section(path: string, title: string): unknown[][] {
  const rows = rowsOf(path, 'Tailmark notes');
  const at = rows.findIndex((r) => r[0] === title);
  expect(at, title).toBeGreaterThanOrEqual(0);
  const out: unknown[][] = [];
  for (let r = at + 1; r < rows.length && rows[r].some((v) => v !== null); r++) out.push(rows[r].slice(0, 3));
  return out;
}

/** The notes as text, without the run time and the large-file section. */
function notesText(path: string): string[] {
  const text = rowsOf(path, 'Tailmark notes').map((r) => r.filter((v) => v !== null).join(' | '));
  const cut = text.indexOf('Large-file mode');
  const kept = (cut >= 0 ? text.slice(0, cut) : text).filter((l) => !l.startsWith('Time of run'));
  while (kept.length && kept[kept.length - 1] === '') kept.pop();
  return kept;
}

/** The log sheet's rows without the time column (row 1 title, row 2 header, then lines). */
function logRows(path: string): unknown[][] {
  const when = LOG_HEADER.indexOf('When (UTC)');
  return rowsOf(path, LOG_SHEET_NAME).map((r) => r.filter((_, i) => i !== when));
}

describe('re-scoring a scored workbook: large-file mode as in memory', () => {
  it('lists the marks of claims that are gone from the previous run\'s notes', async () => {
    const input = join(dir, 'claims.xlsx');
    await writeDemoWorkbook(input, demoClaims());
    const first = await score('memory', input, 'first.xlsx');

    // The reviewer marks three flagged claims.
    const wb = await load(first);
    const ws = wb.getWorksheet('Claims')!;
    const [idc, st, nt] = [col(ws, 'Claim ID'), col(ws, STATUS_HEADER), col(ws, NOTE_HEADER)];
    const given = [
      ['Cleared', 'Receipt matches'],
      ['Sent up', 'Second trip this week'],
      ['Asked claimant', 'Which client?'],
    ];
    const marked: { id: string; status: string; note: string }[] = [];
    for (let r = 2; r <= ws.rowCount && marked.length < given.length; r++) {
      if (ws.getCell(r, st).value !== 'To look at') continue;
      const [status, note] = given[marked.length];
      ws.getCell(r, st).value = status;
      ws.getCell(r, nt).value = note;
      marked.push({ id: String(ws.getCell(r, idc).value), status, note });
    }
    expect(marked).toHaveLength(3);
    const reviewed = join(dir, 'reviewed.xlsx');
    await wb.xlsx.writeFile(reviewed);

    // Scored again: the notes list the three marks.
    const second = await score('memory', reviewed, 'second.xlsx');
    expect(section(second, MARKS_TITLE)).toEqual([['Claim', 'Status', 'Note'], ...marked.map((m) => [m.id, m.status, m.note])]);

    // The first two marked claims leave the data (their rows are removed).
    const wb2 = await load(second);
    const ws2 = wb2.getWorksheet('Claims')!;
    const gone = marked.slice(0, 2).map((m) => m.id);
    for (let r = ws2.rowCount; r >= 2; r--) if (gone.includes(String(ws2.getCell(r, idc).value))) ws2.spliceRows(r, 1);
    const trimmed = join(dir, 'trimmed.xlsx');
    await wb2.xlsx.writeFile(trimmed);

    const inMemory = await score('memory', trimmed, 'third.xlsx');
    const rowByRow = await score('rows', trimmed, 'third.xlsx');
    const expectedGone = [['Claim', 'Status', 'Note'], ...marked.slice(0, 2).map((m) => [m.id, m.status, m.note])];
    const expectedKept = [['Claim', 'Status', 'Note'], [marked[2].id, marked[2].status, marked[2].note]];
    for (const out of [inMemory, rowByRow]) {
      expect(section(out, GONE_TITLE), out).toEqual(expectedGone);
      expect(section(out, MARKS_TITLE), out).toEqual(expectedKept);
    }
    expect(notesText(rowByRow)).toEqual(notesText(inMemory));
  });

  it('keeps the same log: earlier lines untouched (runs, cutoff changes, status lines), this run\'s below', async () => {
    const input = join(dir, 'log-claims.xlsx');
    await writeDemoWorkbook(input, demoClaims());
    const logs: Record<Mode, unknown[][]> = { memory: [], rows: [] };
    for (const mode of ['memory', 'rows'] as const) {
      const one = await score(mode, input, 'log-1.xlsx', '--reviewer', 'K.M.');
      // A status line as the add-in writes it when a reviewer saves a status (src/workbook/ops.ts).
      const wb = await load(one);
      const log = wb.getWorksheet(LOG_SHEET_NAME)!;
      const audit = new Map<string, string>([
        ['When (UTC)', '2026-03-02T10:15:00.000Z'], ['Event', 'Status set'], ['Who', 'R.T.'],
        ['Claim', 'CLM-0042'], ['Status', 'To look at → Cleared'], ['Note', 'Receipt checked'],
      ]);
      const line = log.getRow(log.rowCount + 1);
      LOG_HEADER.forEach((h, i) => {
        if (audit.has(h)) line.getCell(i + 1).value = audit.get(h)!;
      });
      const edited = join(dir, mode, 'log-1-edited.xlsx');
      await wb.xlsx.writeFile(edited);
      const two = await score(mode, edited, 'log-2.xlsx', '--cutoff', '4');
      logs[mode] = logRows(two);
    }
    expect(logs.rows).toEqual(logs.memory);
    // Independent of the writers: the header, then run 1, the status line, run 2 and its cutoff change.
    const header = LOG_HEADER.filter((h) => h !== 'When (UTC)');
    expect(logs.rows[1]).toEqual(header);
    const lines = logs.rows.slice(2).map((r) => Object.fromEntries(header.map((h, i) => [h, r[i] ?? null])));
    expect(lines.map((l) => [l.Event, l.Who, l.Cutoff, l.Claim, l.Status, l.Note, l['Previous cutoff'], l['From a review budget']])).toEqual([
      ['Run', 'K.M.', 3.5, null, null, null, null, null],
      ['Status set', 'R.T.', null, 'CLM-0042', 'To look at → Cleared', 'Receipt checked', null, null],
      ['Run', '(name not given)', 4, null, null, null, null, null],
      ['Cutoff changed', '(name not given)', 4, null, null, null, 3.5, 'no'],
    ]);
  });

  it('a CSV scored row by row gets the log sheet too', async () => {
    const csv = join(dir, 'claims.csv');
    const demo = demoClaims();
    const field = (v: unknown) => {
      const t = v instanceof Date ? v.toISOString().slice(0, 10) : v === null ? '' : String(v);
      return /[",\n]/.test(t) ? `"${t.replace(/"/g, '""')}"` : t;
    };
    writeFileSync(csv, [demo.headers, ...demo.rows].map((r) => r.map(field).join(',')).join('\n'));
    const out = await score('rows', csv, 'csv.xlsx', '--reviewer', 'K.M.');
    const log = logRows(out);
    expect(log[1]).toEqual(LOG_HEADER.filter((h) => h !== 'When (UTC)'));
    expect(log.slice(2).map((r) => [r[LOG_HEADER.indexOf('Event') - 1], r[LOG_HEADER.indexOf('Who') - 1]])).toEqual([['Run', 'K.M.']]);
  });
});
