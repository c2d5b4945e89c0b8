/**
 * The log sheet as both xlsx writers keep it (the format is src/report/log.ts): which sheet is ours,
 * its title and header row, and this run's lines below the last one. Nothing above them is
 * rewritten, only the header row is brought up to today's columns.
 */
import type ExcelJS from 'exceljs';
import { LOG_HEADER, LOG_SHEET_NAME, isLogMarker, lastRunCutoff, runLogLines } from '../report/log.js';
import { LOG_TITLE } from '../report/notesSheet.js';
import type { Plan, PlanCell } from '../report/types.js';

/** Row of the log's column headers; its lines start on the row below. */
export const LOG_HEADER_ROW = 2;
export const LOG_TITLE_STYLE: Partial<ExcelJS.Style> = { font: { bold: true } };
export const LOG_HEADER_FONT: Partial<ExcelJS.Font> = { bold: true };
/** Widths of a new log sheet's first columns (when, source). */
export const LOG_WIDTHS: readonly number[] = [26, 30];

/**
 * The log sheet's name: "Tailmark log", or "(2)", "(3)"... past sheets of those names that are the
 * user's; `exists` says whether that sheet is there already (then it is ours and is appended to).
 */
export function logSheetChoice(exists: (name: string) => boolean, a1Of: (name: string) => unknown): { name: string; exists: boolean } {
  for (let k = 1; ; k++) {
    const name = k === 1 ? LOG_SHEET_NAME : `${LOG_SHEET_NAME} (${k})`;
    if (!exists(name)) return { name, exists: false };
    if (isLogMarker(a1Of(name))) return { name, exists: true };
  }
}

/** A cell of the log sheet as a plan cell: numbers, text and booleans are all the log holds. */
export function logCell(v: unknown): PlanCell {
  return typeof v === 'number' || typeof v === 'string' || typeof v === 'boolean' ? v : null;
}

/** The lines this run adds, after the log's earlier lines (rows of LOG_HEADER cells). */
export function newLogLines(plan: Plan, reviewer: string | null, earlier: readonly (readonly PlanCell[])[]): PlanCell[][] {
  return runLogLines(plan.log, reviewer, lastRunCutoff(earlier, plan.log.method));
}

/** The first row for this run's lines, below the log's last row. */
export function firstNewLogRow(lastRow: number): number {
  return Math.max(LOG_HEADER_ROW + 1, lastRow + 1);
}

export { LOG_HEADER, LOG_TITLE };
