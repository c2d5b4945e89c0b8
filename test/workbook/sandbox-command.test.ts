import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { mkdtempSync, rmSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import ExcelJS from 'exceljs';
import { runSandboxCommand } from '../../src/cli/sandbox-command.js';
import { claimRows } from './helpers.js';

let dir: string;
let input: string;

beforeAll(async () => {
  dir = mkdtempSync(path.join(tmpdir(), 'tm-sandbox-'));
  input = path.join(dir, 'claims.xlsx');
  const wb = new ExcelJS.Workbook();
  const ws = wb.addWorksheet('Claims');
  for (const r of claimRows(400)) ws.addRow(r);
  ws.getCell('H1').value = 'Reviewer memo';
  ws.getCell('H3').value = 'keep';
  await wb.xlsx.writeFile(input);
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function capture(argv: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const o = vi.spyOn(process.stdout, 'write').mockImplementation((s) => ((out += String(s)), true));
  const e = vi.spyOn(process.stderr, 'write').mockImplementation((s) => ((err += String(s)), true));
  try {
    const code = await runSandboxCommand(argv);
    return { code, out, err };
  } finally {
    o.mockRestore();
    e.mockRestore();
  }
}

describe('tailmark sandbox', () => {
  it('runs detect -> run on the file, reports JSON and writes the result', async () => {
    const out = path.join(dir, 'scored.xlsx');
    const r = await capture([input, '--group', 'Cost centre', '--group', 'Category', '--id', 'Claim ID', '--rerun', '--out', out, '--json']);
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out) as {
      syncs: number;
      maxRequestBytes: number;
      userCellsChanged: number;
      resultColumns: { column: string }[];
      highlightedRows: number;
      flagged: number;
      notesSheet: string;
      reviewMarksKept: boolean;
      reviewMarks: { marked: number };
    };
    expect(j.syncs).toBeLessThanOrEqual(8);
    expect(j.maxRequestBytes).toBeLessThan(5 * 1024 * 1024);
    expect(j.userCellsChanged).toBe(0);
    expect(j.resultColumns.map((c) => c.column)).toEqual(['F', 'G', 'H', 'I', 'J']);
    expect(j.highlightedRows).toBe(j.flagged);
    expect(j.flagged).toBeGreaterThan(0);
    expect(j.notesSheet).toBe('Tailmark notes');
    expect(j.reviewMarksKept).toBe(true);
    expect(j.reviewMarks.marked).toBe(3);
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.readFile(out);
    const ws = wb.getWorksheet('Claims')!;
    expect(ws.getCell('M3').value).toBe('keep'); // the user's column H moved right past our 5 columns
    expect(wb.getWorksheet('Tailmark notes')).toBeDefined();
  });

  it('--office-client runs the same through the real Office.js client and reports real request sizes', async () => {
    type Report = { client: string; flagged: number; syncs: number; clientCleanupRequests: number; userCellsChanged: number; maxRequestBytes: number };
    const plain = JSON.parse((await capture([input, '--group', 'Cost centre', '--json'])).out) as Report;
    const r = await capture([input, '--group', 'Cost centre', '--office-client', '--json']);
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out) as Report;
    expect(plain.client).toBe('sandbox');
    expect(j.client).toBe('office-js');
    expect(j.flagged).toBe(plain.flagged);
    // The client adds one request per Excel.run that kept references (it releases them at the end).
    expect(j.syncs).toBe(plain.syncs + j.clientCleanupRequests);
    expect(j.clientCleanupRequests).toBeLessThanOrEqual(2); // detect and run
    expect(j.userCellsChanged).toBe(0);
    // Real request JSON (object paths, action ids) is larger than the sandbox's own estimate.
    expect(j.maxRequestBytes).toBeGreaterThan(plain.maxRequestBytes);
    expect(j.maxRequestBytes).toBeLessThan(5 * 1024 * 1024);
  });

  it('--fail-sync <k> injects a failure into the k-th sync of the run and reports whether the workbook is as before', async () => {
    type Report = { faultInjected: boolean; runFailed: string | null; workbookUnchangedByFailedRun: boolean; changedByFailedRun?: string[] };
    const r = await capture([input, '--group', 'Cost centre', '--fail-sync', '3', '--json']);
    expect(r.err).toBe('');
    const j = JSON.parse(r.out) as Report;
    expect(j.faultInjected).toBe(true);
    expect(j.runFailed).toMatch(/Injected failure/);
    expect(j.workbookUnchangedByFailedRun).toBe(true);
    expect(j.changedByFailedRun).toBeUndefined();
    const late = JSON.parse((await capture([input, '--fail-sync', '99', '--json'])).out) as Report;
    expect(late.faultInjected).toBe(false);
    expect(late.runFailed).toBeNull();
    expect(late.workbookUnchangedByFailedRun).toBe(false);
    expect((await capture([input, '--fail-sync', '0'])).code).toBe(2);
  });

  it('--rerun --fail-sync <k>: a re-run failing at its last syncs leaves the workbook as it was (all-or-nothing re-runs)', async () => {
    type Report = { faultInjected: boolean; syncsOfLastRun: number | null; workbookUnchangedByFailedRun: boolean; changedByFailedRun?: string[] };
    const args = [input, '--group', 'Cost centre', '--id', 'Claim ID', '--rerun', '--json'];
    const whole = JSON.parse((await capture([...args, '--fail-sync', '999'])).out) as Report;
    expect(whole.faultInjected).toBe(false);
    const syncs = whole.syncsOfLastRun!;
    expect(syncs).toBeGreaterThan(3);
    // The last syncs write the values, rules, notes, log and settings; the first ones only read.
    for (const k of [syncs, syncs - 1, Math.ceil(syncs / 2)]) {
      const j = JSON.parse((await capture([...args, '--fail-sync', String(k)])).out) as Report;
      expect(j.faultInjected, `sync ${k}`).toBe(true);
      expect(j.changedByFailedRun ?? [], `sync ${k}`).toEqual([]);
      expect(j.workbookUnchangedByFailedRun, `sync ${k}`).toBe(true);
    }
  });

  it('exits 2 with one line on bad input', async () => {
    const missing = await capture([path.join(dir, 'nope.xlsx')]);
    expect(missing.code).toBe(2);
    expect(missing.err).toMatch(/^tailmark: input file not found: .*nope\.xlsx\n$/);
    const badOpt = await capture([input, '--colour', 'red']);
    expect(badOpt.code).toBe(2);
    expect(badOpt.err).toBe('tailmark: unknown option --colour for "sandbox" (see tailmark --help)\n');
    const badCol = await capture([input, '--value', 'Amnt']);
    expect(badCol.code).toBe(2);
    expect(badCol.err).toMatch(/value column "Amnt" not found/);
    const exists = await capture([input, '--out', input]);
    expect(exists.code).toBe(2);
    expect(existsSync(input)).toBe(true);
  });
});
