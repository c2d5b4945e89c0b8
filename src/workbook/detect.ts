/**
 * detect(): find the table around the selection, its header row and the role of each column.
 *
 * Which block the selection means:
 *  - inside an Excel table (any selection that meets one): the table;
 *  - one cell, or part of one row (what selectRow selects): the surrounding region of its
 *    top-left cell; when that cell is in our result columns (which sit next to the data, and
 *    may be blank around it), the surrounding region of the data's header row instead;
 *  - entire rows, entire columns or the whole sheet (a click on a row or column header): the
 *    selection is cut to the used range, and the surrounding region of the first non-blank cell
 *    of that cut (read row by row from its top) is taken, as for one cell;
 *  - any other block: the block itself when it has a header row and claims under it, else the
 *    surrounding region of its top-left cell (a few rows dragged over inside the data).
 *
 * Syncs: 1 (selection, surrounding region, tables at the selection, used range) + 1 (sample of the
 * block, and the table's range when the selection is inside an Excel table) [+ 1 when the table is
 * not the surrounding region] [+ 1 for a cell in our result columns]. Entire rows / columns: + 1 (the top of the cut and its region)
 * [+ 1 when its first non-blank cell is not its top-left one]. Another block without a header
 * row: + 1 (sample of the region).
 */
import type { RawCell } from '../scoring/types.js';
import { TailmarkError, type DetectedColumn, type DetectedTable } from './api.js';
import { MAX_COLUMNS, MAX_ROWS, parseAddress, rectAddress, type GridRect } from './a1.js';
import { cellText, toRawCell } from './cells.js';
import { guessColumn, headerNames, looksLikeHeader } from './guess.js';
import { readRows } from './read.js';
import { STATE_KEY, isOurHeader, parseState, type LayerState } from './state.js';
import { errorCode, jsonBytes, type Syncer } from './sync.js';

/** What detect learnt that run() can reuse (kept beside the DetectedTable object). */
export interface DetectMemo {
  /** Response bytes per cell measured on the sample (values + types + formats). */
  readonly bytesPerCell: number;
}

export const detectMemo = new WeakMap<DetectedTable, DetectMemo>();

/** Rows sampled for the guesses (plus the header row). */
export const SAMPLE_ROWS = 2_000;

/** Cells read from the top of an entire-row / entire-column selection to find where the data starts. */
export const PROBE_CELLS = 10_000;

interface Rect {
  row: number;
  column: number;
  rowCount: number;
  columnCount: number;
}

function intersect(a: Rect, b: Rect): Rect | null {
  const r0 = Math.max(a.row, b.row);
  const c0 = Math.max(a.column, b.column);
  const r1 = Math.min(a.row + a.rowCount, b.row + b.rowCount);
  const c1 = Math.min(a.column + a.columnCount, b.column + b.columnCount);
  return r1 > r0 && c1 > c0 ? { row: r0, column: c0, rowCount: r1 - r0, columnCount: c1 - c0 } : null;
}

const rectOf = (r: Excel.Range): Rect => ({ row: r.rowIndex, column: r.columnIndex, rowCount: r.rowCount, columnCount: r.columnCount });

const sameRect = (a: Rect, b: Rect): boolean => a.row === b.row && a.column === b.column && a.rowCount === b.rowCount && a.columnCount === b.columnCount;

const isBlank = (v: unknown): boolean => v === null || v === undefined || v === '';

export async function detectTable(sync: Syncer): Promise<DetectedTable> {
  const seen: { rect: Rect | null } = { rect: null };
  const found = await detectBlock(sync, (r) => {
    seen.rect = r;
  });
  const sel = seen.rect;
  if (sel === null) return found;
  // The claim row the reviewer selected (one row, inside the data, not the header).
  const span = spanOf(found);
  const inRows = sel.rowCount === 1 && sel.row > span.row && sel.row < span.row + span.rowCount;
  const withRow: DetectedTable = { ...found, selectedRow: inRows ? sel.row - span.row - 1 : null };
  const memo = detectMemo.get(found);
  if (memo) detectMemo.set(withRow, memo);
  return withRow;
}

async function detectBlock(sync: Syncer, onSelection: (r: Rect) => void): Promise<DetectedTable> {
  const wb = sync.context.workbook;
  const sel = wb.getSelectedRange();
  sel.load(['address', 'rowIndex', 'columnIndex', 'rowCount', 'columnCount']);
  const sheet = sel.worksheet;
  sheet.load('name');
  // The region of the selection's top-left cell serves one cell, part of a row, and a block without a header.
  const region = sel.getSurroundingRegion();
  region.load(['rowIndex', 'columnIndex', 'rowCount', 'columnCount']);
  const tables = sel.getTables(false);
  tables.load('items/name');
  const used = sheet.getUsedRangeOrNullObject(true);
  used.load(['rowIndex', 'columnIndex', 'rowCount', 'columnCount']);
  // Where our result columns sit (a cell in them may have no values around it: blank notes).
  const stateSetting = wb.settings.getItemOrNullObject(STATE_KEY);
  stateSetting.load('value');
  try {
    await sync.sync();
  } catch (e) {
    const code = errorCode(e);
    if (code === 'InvalidSelection' || code === 'InvalidOperation') {
      throw new TailmarkError(
        'multi-area',
        'Several areas are selected. Click one cell inside your claims table (or select one block of cells), then try again.',
      );
    }
    throw e;
  }
  const sheetName = sheet.name;
  const selRect = rectOf(sel);
  onSelection(selRect);
  const single = selRect.rowCount === 1 && selRect.columnCount === 1;
  const entire = selRect.rowCount === MAX_ROWS || selRect.columnCount === MAX_COLUMNS;
  if (tables.items.length > 0) {
    const table = tables.items[0];
    const tableRange = table.getRange();
    tableRange.load(['rowIndex', 'columnIndex', 'rowCount', 'columnCount']);
    let block = rectOf(region);
    let sample = await readSample(sync, sheet, block, tableRange);
    const tr = rectOf(tableRange);
    if (!sameRect(tr, block)) {
      block = tr;
      sample = await readSample(sync, sheet, block, null);
    }
    return buildDetected(sheetName, block, table.name, sample, sel.address);
  }
  if (entire) {
    const u = used.isNullObject ? null : rectOf(used);
    const cut = u ? intersect(selRect, u) : null;
    if (!cut) throw emptySelection(sel.address, false);
    const block = await regionOfFirstValue(sync, sheet, cut, sel.address);
    return buildDetected(sheetName, block, null, await readSample(sync, sheet, block, null), sel.address);
  }
  const state = parseState(stateSetting.isNullObject ? null : stateSetting.value);
  const inOurs = state !== null && inOurBlock(state, sheetName, selRect.row, selRect.column);
  /** The region of the selection's top-left cell; for a cell in our columns, the region of the data's header row. */
  const around = async (): Promise<Rect> => {
    if (!inOurs || !state) return rectOf(region);
    const r = sheet.getRangeByIndexes(state.headerRow, state.firstColumn, 1, 1).getSurroundingRegion();
    r.load(['rowIndex', 'columnIndex', 'rowCount', 'columnCount']);
    await sync.sync();
    return rectOf(r);
  };
  if (single || selRect.rowCount === 1) {
    const block = await around();
    return buildDetected(sheetName, block, null, await readSample(sync, sheet, block, null), sel.address);
  }
  // A block of several rows: the block itself if it is a table with a header, else the region.
  const u = used.isNullObject ? null : rectOf(used);
  const block = u ? intersect(selRect, u) : null;
  if (!block) throw emptySelection(sel.address, false);
  try {
    return buildDetected(sheetName, block, null, await readSample(sync, sheet, block, null), sel.address);
  } catch (e) {
    if (!(e instanceof TailmarkError)) throw e;
    const other = await around();
    if (sameRect(other, block)) throw e;
    try {
      return buildDetected(sheetName, other, null, await readSample(sync, sheet, other, null), sel.address);
    } catch {
      throw e; // the selected block's own problem is the one to report
    }
  }
}

/** True when (row, column) lies in our result columns of a plain range (header row included), per the stored state. */
function inOurBlock(state: LayerState, sheetName: string, row: number, column: number): boolean {
  return (
    state.table === null &&
    state.sheet === sheetName &&
    row >= state.headerRow &&
    row <= state.headerRow + state.rowCount &&
    column >= state.blockColumn &&
    column < state.blockColumn + state.columns.length
  );
}

/**
 * The surrounding region of the first non-blank cell of `cut` (rows read from its top, at most
 * PROBE_CELLS cells). The region of the top-left cell is queued with the read, so a cut that
 * starts with a value costs one sync.
 */
async function regionOfFirstValue(sync: Syncer, sheet: Excel.Worksheet, cut: Rect, selAddress: string): Promise<Rect> {
  const rows = Math.min(cut.rowCount, Math.max(1, Math.floor(PROBE_CELLS / cut.columnCount)));
  const top = sheet.getRangeByIndexes(cut.row, cut.column, rows, cut.columnCount);
  top.load('values');
  const first = sheet.getRangeByIndexes(cut.row, cut.column, 1, 1).getSurroundingRegion();
  first.load(['rowIndex', 'columnIndex', 'rowCount', 'columnCount']);
  await sync.sync();
  const values = top.values as unknown[][];
  sync.noteResponse(jsonBytes(values));
  for (let r = 0; r < values.length; r++) {
    for (let c = 0; c < values[r].length; c++) {
      if (isBlank(values[r][c])) continue;
      if (r === 0 && c === 0) return rectOf(first);
      const around = sheet.getRangeByIndexes(cut.row + r, cut.column + c, 1, 1).getSurroundingRegion();
      around.load(['rowIndex', 'columnIndex', 'rowCount', 'columnCount']);
      await sync.sync();
      return rectOf(around);
    }
  }
  throw emptySelection(selAddress, false);
}

interface Sample {
  /** Row-major raw cells: header row first. */
  rows: RawCell[][];
  bytesPerCell: number;
}

async function readSample(sync: Syncer, sheet: Excel.Worksheet, block: Rect, alsoLoaded: Excel.Range | null): Promise<Sample> {
  const n = Math.min(block.rowCount, SAMPLE_ROWS + 1);
  const rows: RawCell[][] = new Array<RawCell[]>(n);
  let bytes = 0;
  let cells = 0;
  await readRows(
    sync,
    sheet,
    block.row,
    n,
    [{ column: block.column, columnCount: block.columnCount, props: 'typed' }],
    (_s, offset, d) => {
      for (let r = 0; r < d.values.length; r++) {
        const vr = d.values[r];
        const tr = d.valueTypes![r];
        const fr = d.numberFormat![r];
        const out: RawCell[] = new Array<RawCell>(vr.length);
        for (let c = 0; c < vr.length; c++) out[c] = toRawCell(vr[c], tr[c], fr[c]);
        rows[offset + r] = out;
      }
      bytes += jsonBytes(d.values) + jsonBytes(d.valueTypes) + jsonBytes(d.numberFormat);
      cells += d.values.length * (d.values[0]?.length ?? 0);
    },
  );
  void alsoLoaded; // queued before this call, so it is synced with the first chunk
  return { rows, bytesPerCell: cells > 0 ? bytes / cells : 0 };
}

function emptySelection(address: string, single: boolean): TailmarkError {
  return new TailmarkError(
    'no-selection',
    single
      ? `The selected cell ${address} is empty and has no data around it. Click a cell inside your claims table (a header or any claim), then try again.`
      : `The selection ${address} holds no data near its top. Click a cell inside your claims table (a header or any claim), then try again.`,
  );
}

function buildDetected(sheetName: string, block: Rect, tableName: string | null, sample: Sample, selAddress: string): DetectedTable {
  const [first, ...rest] = sample.rows;
  const nonBlank = sample.rows.some((r) => r.some((c) => c !== null && c !== undefined && !(typeof c === 'string' && c.trim() === '')));
  if (!nonBlank) throw emptySelection(selAddress, !selAddress.includes(':'));
  const where = rectAddress(sheetName, block);
  if (tableName === null && !looksLikeHeader(first, rest)) {
    throw new TailmarkError(
      'no-selection',
      `The block ${where} has no header row: its first row holds numbers. Insert a row of column names (e.g. Claim ID, Cost centre, Amount) above the first claim, then select a cell in the table again.`,
    );
  }
  if (block.rowCount < 2) {
    throw new TailmarkError(
      'no-selection',
      `The block ${where} has a header row but no claims under it. Select a cell inside a table with at least one row of data.`,
    );
  }
  const names = headerNames(first, block.column, true);
  // Our own result columns (from a previous run) are not data.
  const ours = first.map((c) => isOurHeader(cellText(c)));
  // On a plain range our block ends the data: columns the user added right of it are not data.
  const firstOurs = tableName === null ? ours.indexOf(true) : -1;
  const userIdx = ours.map((o, i) => (o || (firstOurs >= 0 && i > firstOurs) ? -1 : i)).filter((i) => i >= 0);
  if (userIdx.length === 0) throw new TailmarkError('no-numbers', `The block ${where} holds only Tailmark's result columns. Select a cell in your claims data.`);
  const spanStart = userIdx[0];
  const spanEnd = userIdx[userIdx.length - 1] + 1;
  const columns: DetectedColumn[] = [];
  for (const i of userIdx) {
    const cells = rest.map((r) => r[i]);
    columns.push(guessColumn(i - spanStart, names[i], cells));
  }
  if (!columns.some((c) => c.numericShare >= 0.5 && c.guess !== 'date')) {
    throw new TailmarkError(
      'no-numbers',
      `No column of ${where} holds amounts (numbers). Check that the amount column is filled with numbers, not text, or select the claims table.`,
    );
  }
  const span: GridRect = { row: block.row, column: block.column + spanStart, rowCount: block.rowCount, columnCount: spanEnd - spanStart };
  if (span.column + span.columnCount > MAX_COLUMNS) throw new TailmarkError('column-limit', 'The table reaches the last column of the sheet.');
  const detected: DetectedTable = {
    sheetName,
    address: rectAddress(sheetName, span),
    tableName,
    rowCount: block.rowCount - 1,
    columns,
    hasResults: ours.some(Boolean),
  };
  detectMemo.set(detected, { bytesPerCell: sample.bytesPerCell });
  return detected;
}

/** The data span of a DetectedTable (header row included), from its address. */
export function spanOf(table: DetectedTable): GridRect {
  const p = parseAddress(table.address);
  if (!p) throw new TailmarkError('bad-settings', `Cannot read the table address "${table.address}". Select the table again.`);
  return p.rect;
}
