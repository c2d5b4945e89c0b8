/**
 * followSelection(): what the follow-up view needs when the reviewer clicks in the sheet after a
 * run, at a cost that does not grow with the sheet: at most 2 syncs, and cells of only the
 * selected row and the few rows the pane asks to refresh.
 *
 * Sync 1: the selection, its sheet, our state and the saved settings. When the selection is not on
 * the results' sheet, that is all (the pane detects the table anew). Sync 2: the header row of our
 * block (or of the Excel table, with its range) and, for the selected row and each row to refresh,
 * the block's cells in that row (values; the selected row also as displayed text).
 *
 * The pane keeps everything else it needs from the run in memory (the follow-up list, its own
 * read of the scored columns); the rows refreshed here are how edits made in the sheet reach it
 * (the claim the reviewer left and the one they selected).
 */
import type { ClaimRecord, Exception, SelectionFollow } from './api.js';
import { MAX_COLUMNS } from './a1.js';
import { claimColumns, claimFrom, exceptionColumns, exceptionOf, headerColumns, type HeaderColumns } from './exceptions.js';
import { SETTINGS_KEY, STATE_KEY, parseSettings, parseState, type LayerState } from './state.js';
import { jsonBytes, type Syncer } from './sync.js';

/** Rows to refresh beyond the selected one (the pane asks for the claim it showed). */
export const MAX_REFRESH_ROWS = 4;

const OUTSIDE: SelectionFollow = { inResults: false, row: null, claim: null, rows: [] };

interface RowRead {
  readonly row: number;
  readonly range: Excel.Range;
  readonly selected: boolean;
}

export async function followSelection(sync: Syncer, refresh: readonly number[]): Promise<SelectionFollow> {
  const wb = sync.context.workbook;
  // Excel.run keeps a reference to every range it creates and releases them all in one more
  // request after the batch. None of these ranges is used after the sync that reads it, so none
  // is kept: the follow-up costs its 2 syncs and no release request (counted through the real client).
  const once = (r: Excel.Range): Excel.Range => {
    sync.context.trackedObjects.remove(r);
    return r;
  };
  const sel = once(wb.getSelectedRange());
  sel.load(['rowIndex', 'columnIndex', 'rowCount', 'columnCount']);
  const selSheet = sel.worksheet;
  selSheet.load('name');
  const st = wb.settings.getItemOrNullObject(STATE_KEY);
  st.load('value');
  const se = wb.settings.getItemOrNullObject(SETTINGS_KEY);
  se.load('value');
  try {
    await sync.sync();
  } catch {
    return OUTSIDE; // several areas selected, or no selection: detect says what to do
  }
  const state = parseState(st.isNullObject ? null : st.value);
  if (!state || selSheet.name !== state.sheet) return OUTSIDE;
  const settings = parseSettings(se.isNullObject ? null : se.value);
  const sheet = wb.worksheets.getItem(state.sheet);
  const width = state.blockColumn + state.columns.length - state.firstColumn;
  const plainBlock = { row: state.headerRow, column: state.firstColumn, rowCount: state.rowCount + 1, columnCount: width };
  if (!state.table && !overlaps(sel, plainBlock)) return OUTSIDE;

  // Sync 2: the header row, the block's extent, and the rows wanted (the block's cells of each sheet row).
  const table = state.table ? wb.tables.getItem(state.table) : null;
  const block = once(table ? table.getRange() : sheet.getRangeByIndexes(plainBlock.row, plainBlock.column, plainBlock.rowCount, plainBlock.columnCount));
  block.load(['rowIndex', 'columnIndex', 'rowCount', 'columnCount']);
  const header = once(table ? table.getHeaderRowRange() : sheet.getRangeByIndexes(state.headerRow, state.firstColumn, 1, width));
  header.load('values');
  const reads: RowRead[] = [];
  const readRow = (sheetRow: number, selected: boolean) => {
    const range = once(block.getIntersectionOrNullObject(once(sheet.getRangeByIndexes(sheetRow, 0, 1, MAX_COLUMNS))));
    range.load(selected ? ['values', 'text', 'columnIndex'] : ['values', 'columnIndex']);
    reads.push({ row: sheetRow - state.headerRow - 1, range, selected });
  };
  const oneRow = sel.rowCount === 1 && sel.rowIndex > state.headerRow;
  if (oneRow) readRow(sel.rowIndex, true);
  const wanted = [...new Set(refresh)].filter((r) => Number.isInteger(r) && r >= 0 && r !== sel.rowIndex - state.headerRow - 1).slice(0, MAX_REFRESH_ROWS);
  for (const r of wanted) readRow(state.headerRow + 1 + r, false);
  await sync.reserve(256 * (1 + reads.length));
  try {
    await sync.sync();
  } catch {
    return OUTSIDE; // the table is gone or renamed: detect again
  }
  // The block moved (rows inserted above a table, say): our row numbers would be wrong.
  if (block.rowIndex !== state.headerRow || block.columnIndex !== state.firstColumn) return OUTSIDE;
  if (!overlaps(sel, { row: block.rowIndex, column: block.columnIndex, rowCount: block.rowCount, columnCount: block.columnCount })) return OUTSIDE;
  const rows = block.rowCount - 1;
  const cells = header.values[0] as unknown[];
  const where = table ? tableColumns(state, block.columnIndex, cells) : headerColumns(state, cells);
  sync.noteResponse(jsonBytes(cells) + reads.reduce((n, x) => n + (x.range.isNullObject ? 0 : jsonBytes(x.range.values) * (x.selected ? 2 : 1)), 0));
  const keys = exceptionColumns(settings, where);
  const hasId = keys.some((k) => k.key === 'id');
  const shown = claimColumns(settings, where);
  let claim: ClaimRecord | null = null;
  let row: number | null = null;
  const out: { row: number; exception: Exception | null }[] = [];
  for (const x of reads) {
    if (x.range.isNullObject || x.row < 0 || x.row >= rows) continue;
    const at = x.range.columnIndex;
    const values = x.range.values[0] as unknown[];
    const byKey = new Map(keys.map((k) => [k.key, values[k.column - at]]));
    out.push({ row: x.row, exception: exceptionOf(x.row, (k) => byKey.get(k), hasId, settings) });
    if (x.selected) {
      const text = x.range.text[0] ?? [];
      row = x.row;
      claim = claimFrom(x.row, shown, (c) => String(text[c - at] ?? ''));
    }
  }
  return { inResults: true, row, claim, rows: out };
}

interface Rect {
  readonly row: number;
  readonly column: number;
  readonly rowCount: number;
  readonly columnCount: number;
}

function overlaps(sel: Excel.Range, b: Rect): boolean {
  return (
    sel.rowIndex < b.row + b.rowCount &&
    sel.rowIndex + sel.rowCount > b.row &&
    sel.columnIndex < b.column + b.columnCount &&
    sel.columnIndex + sel.columnCount > b.column
  );
}

/** Our columns and the user's in an Excel table, from its header row (column names). */
function tableColumns(state: LayerState, firstColumn: number, names: readonly unknown[]): HeaderColumns {
  const ourHeaders = new Set(state.columns.map((c) => c.header));
  const columns = new Map<string, number>();
  const userColumns = new Map<string, number>();
  names.forEach((n, i) => {
    const name = typeof n === 'string' ? n : String(n ?? '');
    (ourHeaders.has(name) ? columns : userColumns).set(name, firstColumn + i);
  });
  return { columns, userColumns };
}
