/**
 * What both xlsx writers (in memory, streaming) share: output-path checks, where the result columns
 * go, the cell styles of our headers, and the notes sheet's layout.
 */
import { access } from 'node:fs/promises';
import { realpathSync } from 'node:fs';
import { basename, dirname, resolve } from 'node:path';
import type ExcelJS from 'exceljs';
import type { SourceTable } from '../scoring/types.js';
import type { NotesSection, Plan, PlanCell, Swatch } from '../report/types.js';
import { PALETTE, REVIEW_STATUSES } from '../report/style.js';
import { notesFormatOf, notesGrid } from '../report/notesSheet.js';
import { ruleFormula } from '../report/rules.js';
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

/** A CSV field as a sheet value: plain decimal numbers become numbers, everything else stays text. */
export function csvFieldValue(f: string): ExcelJS.CellValue {
  if (f === '') return null;
  if (/^-?(0|[1-9]\d{0,14})(\.\d{1,10})?$/.test(f)) return Number(f);
  return f;
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

/**
 * The notes sheet as cells (1-based rows and columns) and the number of columns used: the one
 * layout every host writes (src/report/notesSheet.ts), with our styles on titles and table headers.
 */
export function notesLayout(plan: Plan, extra: readonly NotesSection[] = []): { cells: NotesCell[]; widest: number } {
  const grid = notesGrid(plan.notes, plan.caution, extra);
  const titles = new Set(grid.titleRows);
  const headers = new Set(grid.headerRows);
  const cells: NotesCell[] = [];
  grid.rows.forEach((row, r) => {
    row.forEach((v, c) => {
      if (v === null) return;
      const style = r === 0 || titles.has(r) ? NOTES_TITLE_STYLE : headers.has(r) ? NOTES_TABLE_HEADER_STYLE : undefined;
      cells.push({ row: r + 1, col: c + 1, value: v, ...(style ? { style } : {}) });
    });
  });
  return { cells, widest: grid.width };
}

/** True when a sheet whose A1 holds `a1` is a notes sheet of ours (any host, any format version). */
export function isOurNotesSheet(a1: unknown): boolean {
  return notesFormatOf(a1) !== null;
}

/** Our status dropdown (the review statuses), the same in both xlsx writers. */
export function statusDropdown(): ExcelJS.DataValidation {
  const labels = REVIEW_STATUSES.map((s) => s.label).join(',');
  return {
    type: 'list',
    allowBlank: true,
    formulae: [`"${labels}"`],
    showErrorMessage: true,
    errorStyle: 'warning',
    errorTitle: 'Tailmark status',
    error: `Pick one of: ${REVIEW_STATUSES.map((s) => s.label).join(', ')}`,
  };
}

/** True when a data-validation range lies inside the status column (a previous run's dropdown, replaced by ours). */
export function inStatusColumn(range: string, statusColumn: string): boolean {
  const m = /^\$?([A-Z]+)\$?\d+(?::\$?([A-Z]+)\$?\d+)?$/.exec(range);
  return m !== null && m[1] === statusColumn && (m[2] === undefined || m[2] === statusColumn);
}

/** Our highlight rules as an ExcelJS conditional format over the data rows, or null when there is nothing to rule. */
export function ourRules(table: SourceTable, plan: Plan, placed: readonly Placed[]): ExcelJS.ConditionalFormattingOptions | null {
  const statusIdx = plan.columns.findIndex((c) => c.kind === 'status');
  if (statusIdx < 0 || table.rowCount === 0) return null;
  const flagColumns = plan.columns.map((c, i) => (c.kind === 'flag' ? placed[i].column : null)).filter((c): c is string => c !== null);
  const statusColumn = placed[statusIdx].column;
  return {
    ref: ruleRange(table, placed),
    rules: plan.rules.map((rule) => ({
      type: 'expression' as const,
      priority: rule.priority,
      formulae: [ruleFormula(rule, { firstDataRow: table.headerRow + 1, flagColumns, statusColumn }).replace(/^=/, '')],
      style: { fill: solid(rule.swatch), font: { color: argb(rule.swatch.font) } },
    })),
  };
}

/** Range text of the table's data rows across the table and our columns, e.g. "A2:L601". */
export function ruleRange(table: SourceTable, placed: readonly Placed[]): string {
  const firstDataRow = table.headerRow + 1;
  const lastDataRow = table.headerRow + table.rowCount;
  const lastCol = Math.max(...placed.map((p) => p.index));
  return `${columnLetter(table.firstColumn)}${firstDataRow}:${columnLetter(lastCol)}${lastDataRow}`;
}
