/**
 * Resolving a DetectedTable against the workbook as it is now (first sync of run / preview /
 * exceptions): the sheet, the Excel table if any, the header row, which columns are the user's
 * and which are ours, the used range, our stored state, the notes and log sheets.
 */
import { LOG_SHEET_NAME } from './notes.js';
import { NOTES_SHEET_NAME } from '../report/index.js';
import { TailmarkError, type DetectedTable } from './api.js';
import { findColumn } from '../pipeline/columns.js';
import { MAX_COLUMNS, columnLetters, rectAddress } from './a1.js';
import { cellText } from './cells.js';
import { detectMemo, spanOf } from './detect.js';
import { headerNames } from './guess.js';
import { STATE_KEY, SETTINGS_KEY, isOurHeader, parseSettings, parseState, type LayerState } from './state.js';
import { errorCode, type Syncer } from './sync.js';
import type { RunSettings } from './api.js';

/** How far right of the data we look for our columns. */
export const HEADER_SCAN = 64;

export interface Resolved {
  readonly sheet: Excel.Worksheet;
  readonly sheetName: string;
  readonly table: Excel.Table | null;
  readonly tableName: string | null;
  /** 0-based sheet row of the header row. */
  readonly headerRow: number;
  readonly rows: number;
  /** Data span: first and count of sheet columns holding the user's columns (ours may sit inside). */
  readonly spanStart: number;
  readonly spanCols: number;
  /** The user's columns: header name and sheet column. */
  readonly userColumns: readonly { readonly name: string; readonly column: number }[];
  /** Header texts from spanStart rightwards (span + scan). */
  readonly headerCells: readonly string[];
  /** Our columns found by header: header -> sheet column. */
  readonly ours: ReadonlyMap<string, number>;
  /** Table column names in order (tables only). */
  readonly tableColumns: readonly string[] | null;
  /** Sheet column of the table's first column (tables only). */
  readonly tableColumn: number;
  readonly state: LayerState | null;
  readonly savedSettings: RunSettings | null;
  readonly protected: boolean;
  /** The workbook is open read-only (ExcelApi 1.8). */
  readonly readOnly: boolean;
  /** The workbook's structure is protected: no sheet can be added (ExcelApi 1.7). */
  readonly structureProtected: boolean;
  /** Exclusive end column of the used range (values and formats); 0 when the sheet is empty. */
  readonly usedEnd: number;
  readonly notesSheet: Excel.Worksheet;
  readonly logSheet: Excel.Worksheet;
  /** Conditional formats intersecting the data rows (type loaded). */
  readonly cfs: Excel.ConditionalFormatCollection;
  /** Bytes per cell measured by detect, when known. */
  readonly bytesPerCell: number | null;
}

export function protectedError(sheet: string): TailmarkError {
  return new TailmarkError(
    'protected',
    `The sheet "${sheet}" is protected, so Tailmark cannot add its columns. Unprotect it (Review > Unprotect Sheet), then run again. Nothing was changed.`,
  );
}

export function readOnlyError(): TailmarkError {
  return new TailmarkError(
    'read-only',
    'This workbook is open read-only, so Tailmark cannot write its results. Save a copy you can edit (File > Save a Copy) or ask for edit access, open it, then run again. Nothing was changed.',
  );
}

/** Refusal when a sheet must be added but the workbook's structure is protected. */
export function structureError(sheets: readonly string[]): TailmarkError {
  return new TailmarkError(
    'protected',
    `The workbook's structure is protected, so Tailmark cannot add its sheet${sheets.length > 1 ? 's' : ''} ${sheets.map((s) => `"${s}"`).join(' and ')}. Turn the protection off (Review > Protect Workbook), then run again. Nothing was changed.`,
  );
}

export async function resolveTable(sync: Syncer, table: DetectedTable): Promise<Resolved> {
  const wb = sync.context.workbook;
  const span = spanOf(table);
  const sheet = wb.worksheets.getItem(table.sheetName);
  sheet.load('name');
  sheet.protection.load('protected');
  wb.load('readOnly');
  wb.protection.load('protected');
  const stateSetting = wb.settings.getItemOrNullObject(STATE_KEY);
  stateSetting.load('value');
  const settingsSetting = wb.settings.getItemOrNullObject(SETTINGS_KEY);
  settingsSetting.load('value');
  const used = sheet.getUsedRangeOrNullObject(false);
  used.load(['columnIndex', 'columnCount']);
  const notesSheet = wb.worksheets.getItemOrNullObject(NOTES_SHEET_NAME);
  notesSheet.load('name');
  const logSheet = wb.worksheets.getItemOrNullObject(LOG_SHEET_NAME);
  logSheet.load('name');
  let xlTable: Excel.Table | null = null;
  let tableRange: Excel.Range | null = null;
  let tableCols: Excel.TableColumnCollection | null = null;
  if (table.tableName) {
    xlTable = wb.tables.getItem(table.tableName);
    tableRange = xlTable.getRange();
    tableRange.load(['rowIndex', 'columnIndex', 'rowCount', 'columnCount']);
    tableCols = xlTable.columns;
    tableCols.load('items/name');
  }
  const scanCols = Math.min(span.columnCount + HEADER_SCAN, MAX_COLUMNS - span.column);
  const header = sheet.getRangeByIndexes(span.row, span.column, 1, scanCols);
  header.load('values');
  const cfRange = sheet.getRangeByIndexes(span.row, span.column, span.rowCount, scanCols);
  const cfs = cfRange.conditionalFormats;
  cfs.load('items/type');
  try {
    await sync.sync();
  } catch (e) {
    if (errorCode(e) === 'ItemNotFound') {
      throw new TailmarkError(
        'no-selection',
        table.tableName
          ? `The table "${table.tableName}" on sheet "${table.sheetName}" no longer exists. Select a cell in your claims table again.`
          : `The sheet "${table.sheetName}" no longer exists. Select a cell in your claims table again.`,
      );
    }
    throw e;
  }
  const headerCells = (header.values[0] as unknown[]).map((v) => cellText(typeof v === 'number' || typeof v === 'string' || typeof v === 'boolean' ? v : null));
  const state = parseState(stateSetting.isNullObject ? null : stateSetting.value);
  const savedSettings = parseSettings(settingsSetting.isNullObject ? null : settingsSetting.value);
  const usedEnd = used.isNullObject ? 0 : used.columnIndex + used.columnCount;
  const memo = detectMemo.get(table);

  let headerRow = span.row;
  let rows = span.rowCount - 1;
  let userColumns: { name: string; column: number }[];
  let tableColumns: string[] | null = null;
  let tableColumn = -1;
  const ours = new Map<string, number>();
  if (xlTable && tableRange && tableCols) {
    headerRow = tableRange.rowIndex;
    rows = tableRange.rowCount - 1;
    tableColumn = tableRange.columnIndex;
    tableColumns = tableCols.items.map((c) => c.name);
    userColumns = [];
    tableColumns.forEach((name, i) => {
      if (isOurHeader(name)) ours.set(name, tableColumn + i);
      else userColumns.push({ name, column: tableColumn + i });
    });
    if (headerRow !== span.row) {
      throw new TailmarkError('changed-during-run', `The table "${table.tableName}" has moved since it was selected. Select a cell in it again, then run.`);
    }
  } else {
    const names = headerNames(headerCells.slice(0, span.columnCount), span.column, true);
    userColumns = [];
    names.forEach((name, i) => {
      if (isOurHeader(headerCells[i])) ours.set(headerCells[i], span.column + i);
      else userColumns.push({ name, column: span.column + i });
    });
    // Our block sits right of the data span.
    for (let i = span.columnCount; i < headerCells.length; i++) {
      const h = headerCells[i];
      if (!isOurHeader(h)) break;
      if (!ours.has(h)) ours.set(h, span.column + i);
    }
  }
  if (userColumns.length === 0) throw new TailmarkError('no-numbers', `No data columns found at ${table.address}. Select your claims table again.`);
  const spanStart = Math.min(...userColumns.map((c) => c.column));
  const spanEnd = Math.max(...userColumns.map((c) => c.column)) + 1;
  return {
    sheet,
    sheetName: sheet.name,
    table: xlTable,
    tableName: table.tableName,
    headerRow,
    rows,
    spanStart,
    spanCols: spanEnd - spanStart,
    userColumns,
    headerCells,
    ours,
    tableColumns,
    tableColumn,
    state,
    savedSettings,
    protected: sheet.protection.protected,
    readOnly: wb.readOnly,
    structureProtected: wb.protection.protected,
    usedEnd,
    notesSheet,
    logSheet,
    cfs,
    bytesPerCell: memo ? memo.bytesPerCell : null,
  };
}

/** Sheet column of a user column by header name; TailmarkError naming the column when missing. */
/** Sheet column of a chosen column, resolved by the pipeline's one header match (src/pipeline/columns.ts). */
export function columnOf(res: Resolved, name: string, role: 'value' | 'group' | 'id'): number {
  const where = rectAddress(res.sheetName, { row: res.headerRow, column: res.spanStart, rowCount: res.rows + 1, columnCount: res.spanCols });
  return res.userColumns[findColumn(res.userColumns.map((u) => u.name), name, role, where)].column;
}

/** Header of each column of the data span as the pipeline takes it: null for our own result columns. */
export function spanHeaders(res: Resolved): (string | null)[] {
  return Array.from({ length: res.spanCols }, (_, i) => res.userColumns.find((u) => u.column === res.spanStart + i)?.name ?? null);
}

export function letter(column: number): string {
  return columnLetters(column);
}
