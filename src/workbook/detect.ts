/**
 * detect(): find the table around the selection, its header row and the role of each column.
 *
 * Syncs: 1 (selection, surrounding region, tables at the selection, used range) + 1 (sample of the
 * block, and the table's range when the selection is inside an Excel table) [+ 1 when the table is
 * not the surrounding region].
 */
import type { RawCell } from '../scoring/types.js';
import { TailmarkError, type DetectedColumn, type DetectedTable } from './api.js';
import { MAX_COLUMNS, parseAddress, rectAddress, type GridRect } from './a1.js';
import { cellText, toRawCell } from './cells.js';
import { guessColumn, headerNames, looksLikeHeader } from './guess.js';
import { readRows } from './read.js';
import { isOurHeader } from './state.js';
import { errorCode, type Syncer } from './sync.js';

/** What detect learnt that run() can reuse (kept beside the DetectedTable object). */
export interface DetectMemo {
  /** Response bytes per cell measured on the sample (values + types + formats). */
  readonly bytesPerCell: number;
}

export const detectMemo = new WeakMap<DetectedTable, DetectMemo>();

/** Rows sampled for the guesses (plus the header row). */
export const SAMPLE_ROWS = 2_000;

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

export async function detectTable(sync: Syncer): Promise<DetectedTable> {
  const wb = sync.context.workbook;
  const sel = wb.getSelectedRange();
  sel.load(['address', 'rowIndex', 'columnIndex', 'rowCount', 'columnCount']);
  const sheet = sel.worksheet;
  sheet.load('name');
  // The region is needed for a single selected cell only (and for a table, whose range we load next).
  const region = sel.getSurroundingRegion();
  region.load(['rowIndex', 'columnIndex', 'rowCount', 'columnCount']);
  const tables = sel.getTables(false);
  tables.load('items/name');
  const used = sheet.getUsedRangeOrNullObject(true);
  used.load(['rowIndex', 'columnIndex', 'rowCount', 'columnCount']);
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
  const single = sel.rowCount === 1 && sel.columnCount === 1;
  let block: Rect;
  let table: Excel.Table | null = null;
  let tableName: string | null = null;
  let tableRange: Excel.Range | null = null;
  if (tables.items.length > 0) {
    table = tables.items[0];
    tableName = table.name;
    tableRange = table.getRange();
    tableRange.load(['rowIndex', 'columnIndex', 'rowCount', 'columnCount']);
    block = rectOf(region);
  } else if (single) {
    block = rectOf(region);
  } else {
    const u = used.isNullObject ? null : rectOf(used);
    const b = u ? intersect(rectOf(sel), u) : null;
    if (!b) throw emptySelection(sel.address);
    block = b;
  }

  let sample = await readSample(sync, sheet, block, tableRange);
  if (tableRange) {
    const tr = rectOf(tableRange);
    if (tr.row !== block.row || tr.column !== block.column || tr.rowCount !== block.rowCount || tr.columnCount !== block.columnCount) {
      block = tr;
      sample = await readSample(sync, sheet, block, null);
    }
  }
  return buildDetected(sheetName, block, tableName, sample, sel.address);
}

interface Sample {
  /** Row-major raw cells: header row first. */
  rows: RawCell[][];
  bytesPerCell: number;
}

async function readSample(sync: Syncer, sheet: Excel.Worksheet, block: Rect, alsoLoaded: Excel.Range | null): Promise<Sample> {
  const n = Math.min(block.rowCount, SAMPLE_ROWS + 1);
  const rows: RawCell[][] = new Array(n);
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
        const out: RawCell[] = new Array(vr.length);
        for (let c = 0; c < vr.length; c++) out[c] = toRawCell(vr[c], tr[c], fr[c]);
        rows[offset + r] = out;
      }
      bytes += JSON.stringify(d.values).length + JSON.stringify(d.valueTypes).length + JSON.stringify(d.numberFormat).length;
      cells += d.values.length * (d.values[0]?.length ?? 0);
    },
  );
  void alsoLoaded; // queued before this call, so it is synced with the first chunk
  return { rows, bytesPerCell: cells > 0 ? bytes / cells : 0 };
}

function emptySelection(address: string): TailmarkError {
  return new TailmarkError(
    'no-selection',
    `The selected cell ${address} is empty and has no data around it. Click a cell inside your claims table (a header or any claim), then try again.`,
  );
}

function buildDetected(sheetName: string, block: Rect, tableName: string | null, sample: Sample, selAddress: string): DetectedTable {
  const [first, ...rest] = sample.rows;
  const nonBlank = sample.rows.some((r) => r.some((c) => c !== null && c !== undefined && !(typeof c === 'string' && c.trim() === '')));
  if (!nonBlank) throw emptySelection(selAddress);
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
