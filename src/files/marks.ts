/**
 * The previous run's list of review marks (src/report/marks.ts says what the list is for): read by
 * the row-by-row reader while it passes our notes sheet (`table.previousMarks`), or from the notes
 * sheet of an .xlsx read in memory. Either way from the sheet a writer replaces: the first of
 * "Tailmark notes", "Tailmark notes (2)"... whose A1 says it is ours. A notes sheet of the user's gives nothing.
 */
import type ExcelJS from 'exceljs';
import { NOTES_SHEET_NAME } from '../report/style.js';
import { notesFormatOf } from '../report/notesSheet.js';
import { readMarkRecords, type MarkRecord } from '../report/marks.js';
import type { ReadTable } from './read.js';

function plain(v: ExcelJS.CellValue): unknown {
  if (v && typeof v === 'object' && 'richText' in v) return v.richText.map((t) => t.text).join('');
  if (v && typeof v === 'object' && 'result' in v) return v.result;
  return v;
}

/** Our notes sheet in an ExcelJS workbook (the one a writer replaces), or undefined. */
function ourNotesSheet(wb: ExcelJS.Workbook): ExcelJS.Worksheet | undefined {
  for (let k = 1; ; k++) {
    const ws = wb.getWorksheet(k === 1 ? NOTES_SHEET_NAME : `${NOTES_SHEET_NAME} (${k})`);
    if (!ws) return undefined;
    if (notesFormatOf(plain(ws.getCell('A1').value)) !== null) return ws;
  }
}

export function previousMarks(table: ReadTable): readonly MarkRecord[] {
  const wb = table.workbook as ExcelJS.Workbook | undefined;
  if (!wb) return table.previousMarks ?? [];
  const notes = ourNotesSheet(wb);
  if (!notes) return [];
  const grid: unknown[][] = [];
  notes.eachRow({ includeEmpty: true }, (row, r) => {
    grid[r - 1] = [1, 2, 3].map((c) => plain(row.getCell(c).value));
  });
  for (let r = 0; r < grid.length; r++) grid[r] ??= [];
  return readMarkRecords(grid);
}
