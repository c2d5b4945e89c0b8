/**
 * The spool that lets the large-file writer replay an .xlsx instead of parsing it again
 * (src/files/xlsx-spool.ts): what goes in comes back, row for row, from memory and from the spill
 * file, and the spill file leaves nothing behind. Expected values are the rows the test feeds in.
 */
import { mkdtempSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { WorkbookSpool, type CopyRow } from '../../src/files/xlsx-spool.js';
import type { SheetTail, StreamRow } from '../../src/files/xlsx-sheet.js';

const tail: SheetTail = { merges: ['A1:B1'], conditionalFormattings: [], dataValidations: [], notCarried: new Map([['hyperlink', 2]]) };

function rowsFor(n: number): StreamRow[] {
  const out: StreamRow[] = [];
  for (let r = 1; r <= n; r++) {
    out.push({
      r: r * 2, // rows missing from the file in between
      cells: [
        { col: 1, s: 0, value: `C-${r}`, raw: `C-${r}` },
        { col: 2, s: 3, value: r * 1.25, raw: r * 1.25 },
        { col: 4, s: 7, value: { formula: `B${r * 2}*2`, result: r * 2.5 }, raw: r * 2.5 },
        { col: 5, s: 2, value: null, raw: null },
        { col: 6, s: 0, value: new Date(Date.UTC(2025, 0, 1 + (r % 300))), raw: null },
        { col: 7, s: 0, value: { richText: [{ text: 'a', font: { bold: true } }, { text: 'ü€' }] }, raw: 'aü€' },
      ],
      ...(r % 5 === 0 ? { height: 21.5 } : {}),
      ...(r % 7 === 0 ? { hidden: true } : {}),
      ...(r % 11 === 0 ? { s: 9, outlineLevel: 1 } : {}),
    });
  }
  return out;
}

/** A StreamRow as the writer sees it (without the table's RawCells). */
function asCopy(row: StreamRow): CopyRow {
  const { cells, ...rest } = row;
  return { ...rest, cells: cells.map(({ col, s, value }) => ({ col, s, value })) };
}

async function roundTrip(memoryBytes: number, n: number): Promise<{ back: CopyRow[][]; spilled: number; left: string[] }> {
  const dir = mkdtempSync(join(tmpdir(), 'tailmark-spool-test-'));
  const spool = new WorkbookSpool({ dir, memoryBytes });
  const sheets = [rowsFor(n), rowsFor(3)];
  sheets.forEach((rows, i) => {
    spool.beginSheet(`S${i}`, i === 1 ? 'hidden' : undefined);
    spool.head({ columns: [{ min: 1, max: 2, width: 12 }] });
    for (const r of rows) spool.row(r);
    spool.endSheet(tail);
  });
  const back: CopyRow[][] = [];
  for (const sheet of spool.sheets) {
    const rows: CopyRow[] = [];
    let heads = 0;
    const t = await spool.replay(sheet, { onHead: () => void heads++, onRow: (r) => void rows.push(r) });
    expect(heads).toBe(1);
    expect(t).toBe(tail);
    back.push(rows);
  }
  expect(spool.sheets.map((s) => [s.name, s.state, s.rows, s.lastRow])).toEqual([
    ['S0', undefined, n, n * 2],
    ['S1', 'hidden', 3, 6],
  ]);
  const spilled = spool.bytes.spilled;
  spool.dispose();
  return { back, spilled, left: readdirSync(dir) };
}

describe('WorkbookSpool', () => {
  it('gives back every row as it went in, from memory', async () => {
    const { back, spilled, left } = await roundTrip(1 << 30, 10_000);
    expect(spilled).toBe(0);
    expect(back).toEqual([rowsFor(10_000).map(asCopy), rowsFor(3).map(asCopy)]);
    expect(left).toEqual([]);
  });

  it('gives back every row from the spill file, and leaves no file behind', async () => {
    const { back, spilled, left } = await roundTrip(0, 10_000);
    expect(spilled).toBeGreaterThan(0);
    expect(back).toEqual([rowsFor(10_000).map(asCopy), rowsFor(3).map(asCopy)]);
    expect(left).toEqual([]);
  });

  it('stops a replay when onRow returns false', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'tailmark-spool-test-'));
    const spool = new WorkbookSpool({ dir, memoryBytes: 0 });
    spool.beginSheet('S', undefined);
    for (const r of rowsFor(9000)) spool.row(r);
    spool.endSheet(tail);
    let seen = 0;
    await spool.replay(spool.sheets[0], { onRow: () => ++seen < 5000 });
    expect(seen).toBe(5000);
    spool.dispose();
  });
});
