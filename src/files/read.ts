/**
 * Read a claims table from an .xlsx or .csv file (Node only).
 *
 * The header row is the first non-empty row; the table spans from its first to its last non-empty
 * header cell and down to the last row with any value in those columns. Cells come out as `RawCell`:
 * formula cells give their cached result, error results become `CellError`, rich text becomes plain
 * text, date-formatted numbers become `Date` (ExcelJS does that), hyperlinks give their text. CSV cells
 * stay strings (parseCell turns them into numbers later); empty fields are blank (`null`).
 */
import { readFile, stat } from 'node:fs/promises';
import { basename, extname } from 'node:path';
import ExcelJS from 'exceljs';
import type { RawCell, SourceTable } from '../scoring/types.js';
import { parseCsv } from './csv.js';
import { TailmarkError, isTailmarkError } from '../pipeline/errors.js';

export interface ReadOptions {
  /** Worksheet name (xlsx only); default the first worksheet. */
  readonly sheet?: string;
}

export type ReadTable = SourceTable & {
  /** The ExcelJS workbook the table was read from (xlsx), so a writer can add to it without re-reading. */
  readonly workbook?: unknown;
  /** The CSV records as read (csv), so a writer can lay them out on a sheet. */
  readonly csvRecords?: readonly (readonly string[])[];
  /** Set when the table was read row by row (readTableStreaming); see StreamedInfo. */
  readonly streamed?: StreamedInfo;
};

/** What a streaming read learnt that the streaming writer needs (it cannot look at the sheet again). */
export interface StreamedInfo {
  readonly kind: 'xlsx' | 'csv';
  /** Per table column: true when its cells were kept; columns not kept have empty cell arrays. */
  readonly kept: readonly boolean[];
  /** 0-based sheet columns right of the table holding a value between the header row and the last data row. */
  readonly busyColumns: readonly number[];
  /** The workbook's sheet names in workbook order (xlsx; empty for csv). */
  readonly sheetNames: readonly string[];
}

/** 0-based column index -> letters (src/report/columns.ts). */
import { columnLetters } from '../report/columns.js';
export const columnLetter = columnLetters;

export function fileKind(path: string): 'xlsx' | 'csv' | null {
  const ext = extname(path).toLowerCase();
  if (ext === '.xlsx') return 'xlsx';
  if (ext === '.csv') return 'csv';
  return null;
}

/** Make header names usable as keys: empty ones get the column letter, repeats get " (2)", " (3)"... */
export function cleanHeaders(raw: readonly string[], firstColumn: number): string[] {
  const seen = new Map<string, number>();
  return raw.map((h, i) => {
    let name = h.trim() === '' ? `Column ${columnLetter(firstColumn + i)}` : h.trim();
    const count = (seen.get(name.toLowerCase()) ?? 0) + 1;
    seen.set(name.toLowerCase(), count);
    if (count > 1) name = `${name} (${count})`;
    return name;
  });
}

export function isEmpty(v: RawCell): boolean {
  return v === null || v === undefined || (typeof v === 'string' && v.trim() === '');
}

/** Convert an ExcelJS cell value to a RawCell. */
export function fromExcelValue(value: unknown): RawCell {
  if (value === null || value === undefined) return null;
  if (typeof value === 'number' || typeof value === 'boolean') return value;
  if (typeof value === 'string') return value === '' ? null : value;
  if (value instanceof Date) return value;
  if (typeof value === 'object') {
    const o = value as Record<string, unknown>;
    if ('error' in o && typeof o.error === 'string') return { kind: 'error', code: o.error };
    if ('formula' in o || 'sharedFormula' in o) return 'result' in o ? fromExcelValue(o.result) : null;
    if (Array.isArray(o.richText)) {
      return (o.richText as { text?: unknown }[]).map((r) => (typeof r.text === 'string' ? r.text : '')).join('');
    }
    if ('hyperlink' in o) return fromExcelValue(o.text);
    if ('text' in o) return fromExcelValue(o.text);
  }
  return String(value);
}

export function describe(path: string, sheet: string | null, firstCol: number, headerRow: number, width: number, rows: number): string {
  const range = `${columnLetter(firstCol)}${headerRow}:${columnLetter(firstCol + Math.max(width, 1) - 1)}${headerRow + rows}`;
  return sheet ? `${basename(path)}, sheet ${sheet}, ${range}` : `${basename(path)}, ${range}`;
}

async function readXlsx(path: string, options: ReadOptions): Promise<ReadTable> {
  const wb = new ExcelJS.Workbook();
  try {
    await wb.xlsx.readFile(path);
  } catch (e) {
    throw new TailmarkError('input-file', `cannot read ${basename(path)} as an .xlsx workbook (${e instanceof Error ? e.message : String(e)})`);
  }
  const names = wb.worksheets.map((w) => w.name);
  if (names.length === 0) throw new TailmarkError('input-file', `${basename(path)} has no worksheets`);
  let ws: ExcelJS.Worksheet | undefined;
  if (options.sheet !== undefined) {
    ws = wb.worksheets.find((w) => w.name === options.sheet) ?? wb.worksheets.find((w) => w.name.toLowerCase() === options.sheet!.toLowerCase());
    if (!ws) throw new TailmarkError('input-file', `sheet "${options.sheet}" not found in ${basename(path)}; sheets: ${names.map((n) => `"${n}"`).join(', ')}`);
  } else {
    ws = wb.worksheets[0];
  }

  const lastRow = ws.rowCount;
  let headerRow = 0;
  for (let r = 1; r <= lastRow && headerRow === 0; r++) {
    const row = ws.getRow(r);
    for (let c = 1; c <= row.cellCount; c++) {
      if (!isEmpty(fromExcelValue(row.getCell(c).value))) {
        headerRow = r;
        break;
      }
    }
  }
  if (headerRow === 0) throw new TailmarkError('input-file', `sheet "${ws.name}" in ${basename(path)} is empty`);

  const hrow = ws.getRow(headerRow);
  let first = -1;
  let last = -1;
  const headerCells: RawCell[] = [];
  for (let c = 1; c <= hrow.cellCount; c++) {
    const v = fromExcelValue(hrow.getCell(c).value);
    headerCells.push(v);
    if (!isEmpty(v)) {
      if (first < 0) first = c - 1;
      last = c - 1;
    }
  }
  const width = last - first + 1;
  const rawHeaders = headerCells.slice(first, last + 1).map((v) => (v instanceof Date ? v.toISOString().slice(0, 10) : isEmpty(v) ? '' : typeof v === 'object' && v !== null ? v.code : String(v)));
  const headers = cleanHeaders(rawHeaders, first);

  const columns: RawCell[][] = headers.map(() => []);
  let lastData = headerRow;
  for (let r = headerRow + 1; r <= lastRow; r++) {
    const row = ws.getRow(r);
    let any = false;
    for (let c = 0; c < width; c++) {
      const v = fromExcelValue(row.getCell(first + c + 1).value);
      columns[c].push(v);
      if (!isEmpty(v)) any = true;
    }
    if (any) lastData = r;
  }
  const rowCount = lastData - headerRow;
  for (const col of columns) col.length = rowCount;
  return {
    source: describe(path, ws.name, first, headerRow, width, rowCount),
    sheetName: ws.name,
    headers,
    columns,
    rowCount,
    headerRow,
    firstColumn: first,
    workbook: wb,
  };
}

async function readCsvTable(path: string): Promise<ReadTable> {
  let text: string;
  try {
    text = (await readFile(path)).toString('utf8');
  } catch (e) {
    throw new TailmarkError('input-file', `cannot read ${basename(path)} (${e instanceof Error ? e.message : String(e)})`);
  }
  let records: string[][];
  try {
    records = parseCsv(text);
  } catch (e) {
    if (isTailmarkError(e) && e.line !== undefined) throw new TailmarkError('input-file', `${basename(path)}: ${e.message}`, e.line);
    throw e;
  }
  const nonEmpty = (rec: readonly string[]) => rec.some((f) => f.trim() !== '');
  const h = records.findIndex(nonEmpty);
  if (h < 0) throw new TailmarkError('input-file', `${basename(path)} is empty (no header row found)`);
  const hrec = records[h];
  const first = hrec.findIndex((f) => f.trim() !== '');
  let last = hrec.length - 1;
  while (last > first && hrec[last].trim() === '') last--;
  const width = last - first + 1;
  const headers = cleanHeaders(hrec.slice(first, last + 1), first);
  let end = records.length - 1;
  while (end > h && !nonEmpty(records[end].slice(first, last + 1))) end--;
  const rowCount = end - h;
  const columns: RawCell[][] = headers.map(() => new Array<RawCell>(rowCount));
  for (let r = 0; r < rowCount; r++) {
    const rec = records[h + 1 + r];
    for (let c = 0; c < width; c++) {
      const f = rec[first + c];
      columns[c][r] = f === undefined || f === '' ? null : f;
    }
  }
  return {
    source: describe(path, null, first, h + 1, width, rowCount),
    sheetName: sheetNameFromFile(path),
    headers,
    columns,
    rowCount,
    headerRow: h + 1,
    firstColumn: first,
    csvRecords: records,
  };
}

/** A valid worksheet name from a file name: no []:*?/\ characters, at most 31 characters. */
export function sheetNameFromFile(path: string): string {
  const base = basename(path, extname(path)).replace(/[[\]:*?/\\]/g, ' ').replace(/^'+|'+$/g, '').trim();
  return (base || 'Data').slice(0, 31);
}

/**
 * Checks that `path` is a readable, non-empty .xlsx or .csv file (and that --sheet is only given for
 * .xlsx) and says which. Shared by the in-memory and the row-by-row readers, so both refuse bad input
 * with the same one-line InputFileError.
 */
export async function checkInputFile(path: string, sheet: string | undefined): Promise<'xlsx' | 'csv'> {
  let info;
  try {
    info = await stat(path);
  } catch {
    throw new TailmarkError('input-file', `input file not found: ${path}`);
  }
  if (!info.isFile()) throw new TailmarkError('input-file', `input is not a file: ${path}`);
  if (info.size === 0) throw new TailmarkError('input-file', `input file is empty: ${path}`);
  const kind = fileKind(path);
  if (kind === 'xlsx') return kind;
  if (kind === 'csv') {
    if (sheet !== undefined) throw new TailmarkError('input-file', `--sheet applies to .xlsx files only; ${basename(path)} is a CSV file`);
    return kind;
  }
  throw new TailmarkError('input-file', `unsupported file type "${extname(path) || '(none)'}": use an .xlsx or .csv file`);
}

/** Read the table of an .xlsx or .csv file. Throws InputFileError with a one-line message. */
export async function readTable(path: string, options: ReadOptions = {}): Promise<ReadTable> {
  return (await checkInputFile(path, options.sheet)) === 'xlsx' ? readXlsx(path, options) : readCsvTable(path);
}
