/**
 * What both xlsx writers (in memory, streaming) share: output-path checks, where the result columns
 * go, the cell styles of our headers, and the notes sheet's layout.
 */
import { access } from 'node:fs/promises';
import { realpathSync } from 'node:fs';
import { basename, dirname, resolve } from 'node:path';
import type ExcelJS from 'exceljs';
import type { SourceTable } from '../scoring/types.js';
import type { Plan, PlanCell, Swatch } from '../report/types.js';
import { PALETTE } from '../report/style.js';
import { columnLetter, fileKind } from './read.js';
import { TailmarkError } from '../pipeline/errors.js';

export interface Placed {
  readonly header: string;
  readonly column: string;
  /** 0-based sheet column. */
  readonly index: number;
}

export function argb(hex: string): { argb: string } {
  return { argb: `FF${hex.toUpperCase()}` };
}

export function solid(sw: Swatch): ExcelJS.Fill {
  return { type: 'pattern', pattern: 'solid', fgColor: argb(sw.fill), bgColor: argb(sw.fill) };
}

function sameFile(a: string, b: string): boolean {
  const ra = resolve(a);
  const rb = resolve(b);
  if (ra === rb) return true;
  try {
    return realpathSync(ra) === realpathSync(rb);
  } catch {
    return false;
  }
}

export async function exists(p: string): Promise<boolean> {
  try {
    await access(p);
    return true;
  } catch {
    return false;
  }
}

/** Refuse a bad --out before any work: wrong type, the input itself, an existing file without force, no folder. */
export async function checkOutPath(inputPath: string, outPath: string, force: boolean | undefined): Promise<void> {
  if (fileKind(outPath) !== 'xlsx') throw new TailmarkError('output-file', `--out must end in .xlsx; got ${outPath}`);
  if (sameFile(inputPath, outPath)) throw new TailmarkError('output-file', `refusing to write over the input file ${basename(inputPath)}; choose another --out`);
  if (!force && (await exists(outPath))) {
    throw new TailmarkError('output-file', `${outPath} already exists; choose another --out or add --force to replace it`);
  }
  if (!(await exists(dirname(resolve(outPath))))) throw new TailmarkError('output-file', `folder for --out does not exist: ${dirname(resolve(outPath))}`);
}

/**
 * Where each plan column goes. A re-run reuses our columns already in the table (matched by header);
 * new ones go in the first run of free columns right of the table (`isFree(col)` says whether a
 * 0-based column holds nothing from the header row to the last data row).
 */
export function placeColumns(table: SourceTable, plan: Plan, isFree: (col0: number) => boolean): Placed[] {
  const existing = new Map<string, number>();
  table.headers.forEach((h, i) => existing.set(h, table.firstColumn + i));
  const tableEnd = table.firstColumn + table.headers.length;
  const needNew = plan.columns.filter((c) => !existing.has(c.header)).length;
  let start = tableEnd;
  for (;;) {
    let ok = true;
    for (let k = 0; k < needNew; k++) {
      if (!isFree(start + k)) {
        start = start + k + 1;
        ok = false;
        break;
      }
    }
    if (ok) break;
  }
  const placed: Placed[] = [];
  let next = start;
  for (const col of plan.columns) {
    const index = existing.get(col.header) ?? next++;
    placed.push({ header: col.header, column: columnLetter(index), index });
  }
  if (placed.some((p) => p.index >= 16384)) throw new TailmarkError('output-file', 'the sheet has no room for the result columns (past column XFD)');
  return placed;
}

/** Header cell style of our result columns. */
export const RESULT_HEADER_STYLE: Partial<ExcelJS.Style> = {
  font: { bold: true, color: argb(PALETTE.header.font) },
  fill: solid(PALETTE.header),
};
export const NOTES_TITLE_STYLE: Partial<ExcelJS.Style> = {
  font: { bold: true, size: 12, color: argb(PALETTE.title.font) },
  fill: solid(PALETTE.title),
};
export const NOTES_TABLE_HEADER_STYLE: Partial<ExcelJS.Style> = {
  font: { bold: true },
  fill: solid(PALETTE.header),
};

export interface NotesCell {
  readonly row: number;
  readonly col: number;
  readonly value: PlanCell;
  readonly style?: Partial<ExcelJS.Style>;
}

/** The notes sheet as cells (1-based rows and columns) and the number of columns used. */
export function notesLayout(sections: Plan['notes']['sections']): { cells: NotesCell[]; widest: number } {
  const cells: NotesCell[] = [];
  let r = 1;
  let widest = 1;
  for (const section of sections) {
    cells.push({ row: r, col: 1, value: section.title, style: NOTES_TITLE_STYLE });
    r++;
    section.rows.forEach((row, i) => {
      row.forEach((v, c) => {
        cells.push({ row: r, col: c + 1, value: v, ...(section.table && i === 0 ? { style: NOTES_TABLE_HEADER_STYLE } : {}) });
      });
      widest = Math.max(widest, row.length);
      r++;
    });
    r++;
  }
  return { cells, widest };
}

/** Range text of the table's data rows across the table and our columns, e.g. "A2:L601". */
export function ruleRange(table: SourceTable, placed: readonly Placed[]): string {
  const firstDataRow = table.headerRow + 1;
  const lastDataRow = table.headerRow + table.rowCount;
  const lastCol = Math.max(...placed.map((p) => p.index));
  return `${columnLetter(table.firstColumn)}${firstDataRow}:${columnLetter(lastCol)}${lastDataRow}`;
}
