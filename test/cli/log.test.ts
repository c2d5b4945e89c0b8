/**
 * The batch command keeps the same log sheet as the add-in (src/report/log.ts): one line per run
 * with who ran it (--reviewer), a cutoff-change line when the cutoff differs from the last run's,
 * and earlier lines never rewritten. Read back with SheetJS (independent of ExcelJS, which writes).
 */
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import * as XLSX from 'xlsx';
import { describe, expect, it } from 'vitest';
import { demoClaims } from '../../src/demo/claims.js';
import { writeDemoWorkbook } from '../../src/files/demo.js';
import { LOG_HEADER, LOG_SHEET_NAME } from '../../src/report/index.js';
import { readBook, run } from './helpers.js';

function logOf(path: string): Record<string, unknown>[] {
  const rows = XLSX.utils.sheet_to_json<unknown[]>(readBook(path).Sheets[LOG_SHEET_NAME], { header: 1, raw: true, defval: null });
  expect(rows[1]).toEqual([...LOG_HEADER]);
  return rows.slice(2).map((r) => Object.fromEntries(LOG_HEADER.map((h, i) => [h, r[i] ?? null])));
}

describe('tailmark score: the log sheet', () => {
  it('adds a run line with the reviewer, a cutoff-change line when the cutoff changes, and keeps earlier lines', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'tailmark-log-'));
    const input = join(dir, 'claims.xlsx');
    const first = join(dir, 'first.xlsx');
    const second = join(dir, 'second.xlsx');
    await writeDemoWorkbook(input, demoClaims());
    const args = ['--value', 'Amount', '--group', 'Cost centre', '--group', 'Category', '--method', 'robust'];
    expect((await run('score', input, ...args, '--reviewer', 'K.M.', '--out', first)).code).toBe(0);
    const one = logOf(first);
    expect(one).toHaveLength(1);
    expect(one[0]).toMatchObject({ Event: 'Run', Who: 'K.M.', Cutoff: 3.5 });
    // Scoring the scored file again at another cutoff, without a name.
    expect((await run('score', first, ...args, '--cutoff', '4', '--out', second)).code).toBe(0);
    const two = logOf(second);
    expect(two.slice(0, 1)).toEqual(one);
    expect(two.slice(1).map((l) => [l.Event, l.Who, l.Cutoff, l['Previous cutoff'], l['From a review budget']])).toEqual([
      ['Run', '(name not given)', 4, null, null],
      ['Cutoff changed', '(name not given)', 4, 3.5, 'no'],
    ]);
  });
});
