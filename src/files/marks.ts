/**
 * The previous run's list of review marks, read from the notes sheet of an .xlsx read in memory
 * (src/report/marks.ts says what the list is for). A notes sheet that is not ours gives nothing.
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

export function previousMarks(table: ReadTable): MarkRecord[] {
  const wb = table.workbook as ExcelJS.Workbook | undefined;
  const notes = wb?.getWorksheet(NOTES_SHEET_NAME);
  if (!notes || notesFormatOf(plain(notes.getCell('A1').value)) === null) return [];
  const grid: unknown[][] = [];
  notes.eachRow({ includeEmpty: true }, (row, r) => {
    grid[r - 1] = [1, 2, 3].map((c) => plain(row.getCell(c).value));
  });
  for (let r = 0; r < grid.length; r++) grid[r] ??= [];
  return readMarkRecords(grid);
}
