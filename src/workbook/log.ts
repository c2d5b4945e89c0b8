/**
 * Appending to the log sheet (format: src/report/log.ts). Lines go below the last used row; the
 * header row is ours and follows the current format; nothing else in the sheet is rewritten.
 */
import { LOG_HEADER, LOG_SHEET_NAME, LOG_TITLE, isLogMarker, type PlanCell } from '../report/index.js';
import { TailmarkError } from './api.js';
import { structureError } from './resolve.js';
import { formatFor, toCellValue } from './notes.js';
import { jsonBytes, type Syncer } from './sync.js';

export function logNameClash(): TailmarkError {
  return new TailmarkError(
    'name-clash',
    `A sheet named "${LOG_SHEET_NAME}" already exists and was not made by Tailmark. Rename that sheet, then try again. Nothing was changed.`,
  );
}

/**
 * Queue lines at `next` (0-based sheet row) of the log sheet, with the title and header when the
 * sheet is new. Writes only; the caller syncs.
 */
export async function queueLogLines(sync: Syncer, sheet: Excel.Worksheet, created: boolean, next: number, lines: readonly (readonly PlanCell[])[]): Promise<void> {
  const width = LOG_HEADER.length;
  await sync.reserve(1024);
  if (created) {
    const title = sheet.getRangeByIndexes(0, 0, 1, 1);
    title.numberFormat = [['@']];
    title.values = [[LOG_TITLE]];
    title.format.font.bold = true;
    sheet.getRange('A:B').format.columnWidth = 160;
  }
  const header = sheet.getRangeByIndexes(1, 0, 1, width);
  header.numberFormat = [LOG_HEADER.map(() => '@')];
  header.values = [[...LOG_HEADER]];
  header.format.font.bold = true;
  if (lines.length === 0) return;
  const values = lines.map((l) => Array.from({ length: width }, (_, i) => toCellValue(l[i] ?? null)));
  const formats = lines.map((l) => Array.from({ length: width }, (_, i) => formatFor(l[i] ?? null)));
  await sync.reserve(jsonBytes(values) + jsonBytes(formats) + 256);
  const r = sheet.getRangeByIndexes(Math.max(2, next), 0, lines.length, width);
  r.numberFormat = formats;
  r.values = values;
}

/**
 * Append lines to the log sheet, creating it when missing. 1-2 syncs to find it and its last
 * row; the writes are queued for the caller's next sync or flush. Throws 'name-clash' (before any
 * write) when a sheet of that name is not ours.
 */
export async function appendLog(sync: Syncer, lines: readonly (readonly PlanCell[])[]): Promise<void> {
  if (lines.length === 0) return;
  const wb = sync.context.workbook;
  const found = wb.worksheets.getItemOrNullObject(LOG_SHEET_NAME);
  found.load('name');
  wb.protection.load('protected');
  await sync.sync();
  if (found.isNullObject) {
    if (wb.protection.protected) throw structureError([LOG_SHEET_NAME]);
    await queueLogLines(sync, wb.worksheets.add(LOG_SHEET_NAME), true, 2, lines);
    return;
  }
  const a1 = found.getRange('A1');
  a1.load('values');
  const used = found.getUsedRangeOrNullObject(true);
  used.load(['rowIndex', 'rowCount']);
  await sync.sync();
  if (!isLogMarker(a1.values[0][0])) throw logNameClash();
  const next = used.isNullObject ? 2 : Math.max(2, used.rowIndex + used.rowCount);
  await queueLogLines(sync, found, false, next, lines);
}
