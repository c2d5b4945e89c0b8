/**
 * exportMarks(): the reviewer's statuses and notes with who saved them last and when (from the log
 * sheet), read before a removal that would delete them; optionally copied to a new sheet of their
 * own ("Tailmark marks <date>"), which is the reviewer's from then on (runs and Remove leave it alone).
 * One Excel.run: locate (2 syncs), the marks in row chunks plus the log with the first chunk, and
 * the new sheet's rows in chunks under the request budget.
 */
import { LOG_HEADER, LOG_SHEET_NAME, NOTE_HEADER, STATUS_HEADER, isLogMarker, statusLabel, widthToShow } from '../report/index.js';
import { MARKS_EXPORT_HEADER, MARKS_SHEET_PREFIX, lastSavedBy, marksExportGrid, type MarkToKeep } from '../report/marksExport.js';
import type { PlanCell } from '../report/types.js';
import { TailmarkError } from './api.js';
import { locate } from './ops.js';
import { readRows } from './read.js';
import type { Syncer } from './sync.js';

/** Points per character of column width (as the result columns use: write-results.ts). */
const POINTS_PER_CHAR = 5.7;
const SHEET_NAME_MAX = 31;

const text = (v: unknown): string => (v === null || v === undefined ? '' : String(v).trim());

export async function exportMarkRows(sync: Syncer, toSheet: boolean, now: Date): Promise<{ grid: string[][]; sheet: string | null }> {
  const loc = await locate(sync);
  if (!loc) throw new TailmarkError('no-results', 'This workbook has no Tailmark results yet.');
  const sc = loc.columns.get(STATUS_HEADER);
  const nc = loc.columns.get(NOTE_HEADER);
  if (sc === undefined || nc === undefined) {
    throw new TailmarkError('no-results', "Tailmark's status and note columns were not found where they were written. Run the review again.");
  }
  const idCol = loc.settings?.idColumn ? loc.userColumns.get(loc.settings.idColumn) : undefined;
  const cols = [sc, nc, ...(idCol === undefined ? [] : [idCol])];
  const got = cols.map(() => new Array<unknown>(loc.rows));
  const wb = sync.context.workbook;
  const log = wb.worksheets.getItemOrNullObject(LOG_SHEET_NAME);
  const logUsed = log.getUsedRangeOrNullObject(true);
  // Names for the new sheet: "Tailmark marks <date>", then "(2)" .. "(9)"; the first free one is taken.
  const base = `${MARKS_SHEET_PREFIX} ${now.toISOString().slice(0, 10)}`.slice(0, SHEET_NAME_MAX);
  const names = [base, ...Array.from({ length: 8 }, (_, i) => `${base.slice(0, SHEET_NAME_MAX - 4)} (${i + 2})`)];
  const existing = toSheet ? names.map((n) => wb.worksheets.getItemOrNullObject(n)) : [];
  await readRows(
    sync,
    loc.sheet,
    loc.firstDataRow,
    loc.rows,
    cols.map((column) => ({ column, columnCount: 1, props: 'values' as const })),
    (si, offset, d) => {
      for (let r = 0; r < d.values.length; r++) got[si][offset + r] = d.values[r][0];
    },
    {
      withFirstSync: () => {
        logUsed.load('values');
        for (const e of existing) e.load('name');
      },
    },
  );
  const open = statusLabel('open');
  const marks: MarkToKeep[] = [];
  for (let r = 0; r < loc.rows; r++) {
    const status = text(got[0][r]);
    const note = text(got[1][r]);
    if ((status === '' || status === open) && note === '') continue;
    const sheetRow = loc.firstDataRow + r + 1;
    const id = idCol === undefined ? '' : text(got[2][r]);
    marks.push({ claim: id !== '' ? id : `sheet row ${sheetRow}`, sheetRow, status, note });
  }
  const logRows = !logUsed.isNullObject && isLogMarker((logUsed.values[0] as unknown[] | undefined)?.[0]) ? (logUsed.values as PlanCell[][]).slice(2) : [];
  const grid = marksExportGrid(marks, lastSavedBy(logRows.map((l) => l.slice(0, LOG_HEADER.length))));
  if (!toSheet) return { grid, sheet: null };

  const free = existing.findIndex((e) => e.isNullObject);
  if (free < 0) throw new TailmarkError('name-clash', `Sheets "${names[0]}" to "${names[names.length - 1]}" all exist. Rename or delete some of them, then try again.`);
  const name = names[free];
  await sync.reserve(1024);
  const sheet = wb.worksheets.add(name);
  const width = MARKS_EXPORT_HEADER.length;
  MARKS_EXPORT_HEADER.forEach((h, c) => {
    const longest = grid.slice(0, 200).reduce((a, row) => (row[c].length > a.length ? row[c] : a), h);
    sheet.getRangeByIndexes(0, c, 1, 1).format.columnWidth = Math.round(widthToShow(longest, 10) * POINTS_PER_CHAR);
  });
  sheet.getRangeByIndexes(0, 0, 1, width).format.font.bold = true;
  const target = sync.budget.target;
  for (let r = 0; r < grid.length; ) {
    const values: string[][] = [];
    let bytes = 0;
    while (r + values.length < grid.length) {
      const b = JSON.stringify(grid[r + values.length]).length * 2 + 16;
      if (values.length > 0 && bytes + b > target * 0.9) break;
      values.push(grid[r + values.length]);
      bytes += b;
    }
    await sync.reserve(bytes);
    const range = sheet.getRangeByIndexes(r, 0, values.length, width);
    // Text as text: a note starting with "=" stays a note.
    range.numberFormat = values.map((row) => row.map(() => '@'));
    range.values = values;
    r += values.length;
  }
  await sync.flush();
  return { grid, sheet: name };
}
