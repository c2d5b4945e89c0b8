/**
 * What a run's writes may change, read before the first write so that a write failing part-way
 * can be undone exactly (undo.ts): the cells of our existing result columns (formulas and number
 * formats) and their header cells with formats and widths, the status dropdown, our highlight
 * rules (formula, colours, range, priority), the notes sheet, the log rows a run writes, and the
 * saved settings.
 *
 * Cost: the result columns' cells are read in the run's check pass (extra spans of the same row
 * chunks); rules, dropdown, headers and settings are loaded with its first sync; only an existing
 * notes or log sheet needs one more sync (more for a notes sheet over the payload budget).
 */
import { LOG_HEADER, isTailmarkFormula } from '../report/index.js';
import type { Placement } from './place.js';
import type { Resolved } from './resolve.js';
import { SETTINGS_KEY, STATE_KEY } from './state.js';
import { jsonBytes, type Syncer } from './sync.js';

/** The formats a run writes on cells it also restores (font bold and colour, fill colour, wrap). */
const FORMAT_PROPS: Excel.CellPropertiesLoadOptions = { format: { font: { bold: true, color: true }, fill: { color: true }, wrapText: true } };

/** A block of cells as read back: formulas (the value for constants), number formats, and formats when read. */
export interface SavedCells {
  readonly row: number;
  readonly column: number;
  readonly formulas: readonly (readonly unknown[])[];
  readonly numberFormat: readonly (readonly string[])[];
  readonly props: readonly (readonly Excel.CellProperties[])[] | null;
}

export interface SavedRule {
  /** A1 address of the rule's one area on the data sheet. */
  readonly address: string;
  readonly formula: string;
  readonly fill: string | null;
  readonly font: string | null;
  readonly priority: number;
  readonly stopIfTrue: boolean;
}

export interface SavedValidation {
  readonly row: number;
  readonly column: number;
  readonly rowCount: number;
  readonly list: { readonly source: string; readonly inCellDropDown: boolean } | null;
  readonly ignoreBlanks: boolean;
}

export interface Backup {
  /** Our existing result columns' data cells, in row chunks. */
  readonly cells: SavedCells[];
  /** Plain ranges: our existing header cells. */
  readonly headers: SavedCells | null;
  /** Widths of the old columns a re-run takes away and whose width it changes (plain ranges). */
  readonly widths: { readonly column: number; readonly width: number }[];
  readonly validation: SavedValidation | null;
  readonly rules: SavedRule[];
  /** Null when the run creates the notes sheet. */
  readonly notes: SavedCells[] | null;
  /** The log's header row and the rows this run appends; null when the run creates the log. */
  readonly log: SavedCells[] | null;
  readonly settings: { readonly key: string; readonly value: unknown }[];
}

/** Cells of a SavedCells block: row and column count. */
export function sizeOf(c: SavedCells): { rows: number; cols: number } {
  return { rows: c.formulas.length, cols: c.formulas[0]?.length ?? 0 };
}

/** Rough request bytes to write a saved block back. */
export function bytesOf(c: SavedCells): number {
  return jsonBytes(c.formulas) + jsonBytes(c.numberFormat) + (c.props ? jsonBytes(c.props) : 0) + 256;
}

/**
 * Queue the loads of the small parts (rules, dropdown, headers, widths, settings) with the check
 * pass's first sync (the rules' formulas are loaded there); read them after it.
 */
export function queueSmallBackup(
  sync: Syncer,
  res: Resolved,
  placement: Placement,
  customRules: readonly Excel.ConditionalFormat[],
): () => Pick<Backup, 'headers' | 'widths' | 'validation' | 'rules' | 'settings'> {
  const wb = sync.context.workbook;
  const firstDataRow = res.headerRow + 1;
  const rules = customRules.map((cf) => {
    cf.load(['priority', 'stopIfTrue']);
    cf.custom.format.fill.load('color');
    cf.custom.format.font.load('color');
    const range = cf.getRangeOrNullObject();
    range.load('address');
    return { cf, range };
  });
  const settings = [SETTINGS_KEY, STATE_KEY].map((key) => {
    const s = wb.settings.getItemOrNullObject(key);
    s.load('value');
    return { key, s };
  });
  // The dropdown as it is: over the rows of the last run, or as far as the data now reaches.
  const lastRows = res.state && res.state.sheet === res.sheetName ? res.state.rowCount : res.rows;
  const candidates: { dv: Excel.DataValidation; rows: number }[] = [];
  if (placement.oldStatus !== null) {
    for (const rows of new Set([Math.max(lastRows, res.rows), lastRows])) {
      if (rows < 1) continue;
      const dv = res.sheet.getRangeByIndexes(firstDataRow, placement.oldStatus, rows, 1).dataValidation;
      dv.load(['type', 'rule', 'ignoreBlanks']);
      candidates.push({ dv, rows });
    }
  }
  const statusColumn = placement.oldStatus;
  let headers: { range: Excel.Range; props: OfficeExtension.ClientResult<Excel.CellProperties[][]>; column: number } | null = null;
  if (!res.table && placement.oldColumns.length > 0) {
    const c0 = placement.oldColumns[0];
    const range = res.sheet.getRangeByIndexes(res.headerRow, c0, 1, placement.oldColumns.length);
    range.load(['formulas', 'numberFormat']);
    headers = { range, props: range.getCellProperties(FORMAT_PROPS), column: c0 };
  }
  const widths = res.table
    ? []
    : placement.dropColumns.filter((d) => d.info.inserted || d.info.width !== null).map((d) => {
        const f = res.sheet.getRangeByIndexes(0, d.column, 1, 1).format;
        f.load('columnWidth');
        return { column: d.column, f };
      });
  return () => ({
    rules: rules.flatMap(({ cf, range }): SavedRule[] =>
      range.isNullObject || !isTailmarkFormula(cf.custom.rule.formula)
        ? []
        : [{
            address: range.address.replace(/^.*!/, ''),
            formula: cf.custom.rule.formula,
            fill: cf.custom.format.fill.color ?? null,
            font: cf.custom.format.font.color ?? null,
            priority: cf.priority,
            stopIfTrue: cf.stopIfTrue,
          }],
    ),
    settings: settings.map(({ key, s }) => ({ key, value: s.isNullObject ? null : (s.value as unknown) })),
    validation: statusColumn === null ? null : pickValidation(candidates, firstDataRow, statusColumn),
    headers: headers
      ? { row: res.headerRow, column: headers.column, formulas: headers.range.formulas as unknown[][], numberFormat: headers.range.numberFormat, props: headers.props.value }
      : null,
    widths: widths.map((w) => ({ column: w.column, width: w.f.columnWidth })),
  });
}

function pickValidation(candidates: readonly { dv: Excel.DataValidation; rows: number }[], row: number, column: number): SavedValidation {
  for (const { dv, rows } of candidates) {
    const list = dv.type === 'List' ? dv.rule.list : undefined;
    if (list) return { row, column, rowCount: rows, list: { source: String(list.source), inCellDropDown: list.inCellDropDown !== false }, ignoreBlanks: dv.ignoreBlanks };
  }
  return { row, column, rowCount: candidates[0]?.rows ?? 1, list: null, ignoreBlanks: true };
}

/** Queue reading a block back (formulas, number formats, and formats when `props`). */
function queueCells(sheet: Excel.Worksheet, row: number, column: number, rows: number, cols: number, props: boolean, into: SavedCells[]): () => void {
  const r = sheet.getRangeByIndexes(row, column, rows, cols);
  r.load(['formulas', 'numberFormat']);
  const p = props ? r.getCellProperties(FORMAT_PROPS) : null;
  return () => {
    into.push({ row, column, formulas: r.formulas as unknown[][], numberFormat: r.numberFormat, props: p ? p.value : null });
  };
}

/** Bytes per cell planned for reading a block with its formats (formula, number format, formats JSON). */
const BYTES_PER_FORMATTED_CELL = 200;

/**
 * The notes sheet (from A1 to the end of its used range, in row chunks under the budget) and
 * the log's header row and the rows this run appends. Syncs: none when the run creates both.
 */
export async function readSheetBackups(
  sync: Syncer,
  res: Resolved,
  notesUsed: Excel.Range | null,
  log: { readonly next: number; readonly lines: number } | null,
): Promise<Pick<Backup, 'notes' | 'log'>> {
  const notes: SavedCells[] | null = notesUsed ? [] : null;
  const logCells: SavedCells[] | null = log ? [] : null;
  let pending: (() => void)[] = [];
  if (log && logCells) {
    pending.push(queueCells(res.logSheet, 1, 0, 1, LOG_HEADER.length, true, logCells));
    if (log.lines > 0) pending.push(queueCells(res.logSheet, Math.max(2, log.next), 0, log.lines, LOG_HEADER.length, false, logCells));
  }
  if (notes && notesUsed && !notesUsed.isNullObject) {
    const rows = notesUsed.rowIndex + notesUsed.rowCount;
    const cols = notesUsed.columnIndex + notesUsed.columnCount;
    const chunk = Math.max(1, Math.floor(sync.budget.target / (cols * BYTES_PER_FORMATTED_CELL)));
    for (let r = 0; r < rows; r += chunk) {
      pending.push(queueCells(res.notesSheet, r, 0, Math.min(chunk, rows - r), cols, true, notes));
      await sync.sync();
      for (const f of pending) f();
      pending = [];
    }
  }
  if (pending.length) {
    await sync.sync();
    for (const f of pending) f();
  }
  return { notes, log: logCells };
}
