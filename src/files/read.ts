/**
 * Read a claims table from an .xlsx or .csv file (Node only).
 *
 * The header row is the first non-empty row; the table spans from its first to its last non-empty
 * header cell and down to the last row with any value in those columns. Cells come out as `RawCell`:
 * formula cells give their cached result, error results become `CellError`, rich text becomes plain
 * text, date-formatted numbers become `Date` (ExcelJS does that), hyperlinks give their text. CSV cells
 * stay strings (parseCell turns them into numbers later); empty fields are blank (`null`).
 */
import { open, readFile, stat } from 'node:fs/promises';
import { basename, extname } from 'node:path';
import ExcelJS from 'exceljs';
import type { RawCell, SourceTable } from '../scoring/types.js';
import { readDelimited } from '../table/delimited.js';
import type { TextEncodingName } from '../table/encoding.js';
import { findHeaderRow, HEADER_SEARCH_ROWS } from '../table/header.js';
import { sniffKind, unreadableMessage } from '../table/kind.js';
import { uniqueHeaders } from '../table/names.js';
import { columnLetters } from '../report/columns.js';
import { TailmarkError } from '../pipeline/errors.js';
import type { MarkRecord } from '../report/marks.js';
import type { WorkbookSpool } from './xlsx-spool.js';
import { isTotalFormula, rowSaysTotal } from '../table/totals.js';


export interface ReadOptions {
  /** Worksheet name (xlsx only); default the first worksheet. */
  readonly sheet?: string;
  /** Text encoding of a delimited file (default: detected). */
  readonly encoding?: TextEncodingName;
  /** 1-based row of the header (default: found, skipping title rows and blanks). */
  readonly headerRow?: number;
}

/** A merged area inside the table: table column `col`, data rows `from` .. `to` (0-based, inclusive). */
export interface MergedSpan {
  readonly col: number;
  readonly from: number;
  readonly to: number;
  /** As written in the file, e.g. "C2:C41". */
  readonly ref: string;
}

export type ReadTable = SourceTable & {
  /** The ExcelJS workbook the table was read from (xlsx), so a writer can add to it without re-reading. */
  readonly workbook?: unknown;
  /** The CSV records as read (csv), so a writer can lay them out on a sheet. */
  readonly csvRecords?: readonly (readonly string[])[];
  /** Set when the table was read row by row (readTableStreaming); see StreamedInfo. */
  readonly streamed?: StreamedInfo;
  /** What the reader decided or left out (encoding, header row, a totals row), in words for the notes. */
  readonly readNotes?: readonly string[];
  /** Merged areas that span several data rows of one table column (their other cells read as blank). */
  readonly merges?: readonly MergedSpan[];
  /** Per table column: formula cells whose result was never saved (read as blank); xlsx only. */
  readonly unsavedFormulas?: readonly number[];
  /** The previous run's list of review marks, from our notes sheet (xlsx read row by row; [] when none). */
  readonly previousMarks?: readonly MarkRecord[];
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
  /** Every sheet's rows as read (xlsx read with a spool), so the writer does not parse the file again. */
  readonly workbook?: WorkbookSpool;
  /** How a delimited file was decoded and split (csv), so the writer reads it the same way. */
  readonly text?: { readonly encoding: TextEncodingName; readonly delimiter: import('../table/csv.js').CsvDelimiter };
}

/** 0-based column index -> letters (src/report/columns.ts). */
export const columnLetter = columnLetters;

/** Delimited-text extensions read as CSV (the delimiter is sniffed). */
const TEXT_EXTENSIONS = ['.csv', '.tsv', '.txt', '.tab'];

/** By extension: 'xlsx', 'csv' for delimited text, or null. */
export function fileKind(path: string): 'xlsx' | 'csv' | null {
  const ext = extname(path).toLowerCase();
  if (ext === '.xlsx' || ext === '.xlsm') return 'xlsx';
  if (TEXT_EXTENSIONS.includes(ext)) return 'csv';
  return null;
}

/** Make header names usable as keys: empty ones get the column letter, repeats get " (2)", " (3)"... */
export const cleanHeaders = uniqueHeaders;

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

/** Cells of formulas whose result was never saved, per table column (what a script-written file holds). */
export function unsavedFormulaMessage(name: string, header: string, count: number): string {
  return (
    `column "${header}" in ${name} holds ${count} formula${count === 1 ? '' : 's'} whose result${count === 1 ? ' was' : 's were'} never calculated ` +
    '(the file was written by a program that does not calculate formulas): open it in a spreadsheet program, save it, and run again'
  );
}

async function readXlsx(path: string, options: ReadOptions): Promise<ReadTable> {
  const name = basename(path);
  const wb = new ExcelJS.Workbook();
  try {
    await wb.xlsx.readFile(path);
  } catch (e) {
    throw new TailmarkError('input-file', `cannot read ${name} as an .xlsx workbook (${e instanceof Error ? e.message : String(e)})`);
  }
  const names = wb.worksheets.map((w) => w.name);
  if (names.length === 0) throw new TailmarkError('input-file', `${name} has no worksheets`);
  let ws: ExcelJS.Worksheet | undefined;
  if (options.sheet !== undefined) {
    ws = wb.worksheets.find((w) => w.name === options.sheet) ?? wb.worksheets.find((w) => w.name.toLowerCase() === options.sheet!.toLowerCase());
    if (!ws) throw new TailmarkError('input-file', `sheet "${options.sheet}" not found in ${name}; sheets: ${names.map((n) => `"${n}"`).join(', ')}`);
  } else {
    ws = wb.worksheets[0];
  }

  const lastRow = ws.rowCount;
  // A merged cell other than the area's first reads as blank here, as in the row-by-row reader;
  // the host decides what merged areas mean (see MergedSpan).
  const value = (cell: ExcelJS.Cell): RawCell => (cell.isMerged && cell.master !== cell ? null : fromExcelValue(cell.value));
  const rowCells = (r: number): RawCell[] => {
    const row = ws.getRow(r);
    const out: RawCell[] = [];
    for (let c = 1; c <= row.cellCount; c++) out.push(value(row.getCell(c)));
    return out;
  };
  let headerRow: number;
  const notes: string[] = [];
  if (options.headerRow !== undefined) {
    if (options.headerRow > lastRow || rowCells(options.headerRow).every(isEmpty)) {
      throw new TailmarkError('input-file', `--header-row ${options.headerRow}: row ${options.headerRow} of sheet "${ws.name}" in ${name} is empty`);
    }
    headerRow = options.headerRow;
  } else {
    const top = Array.from({ length: Math.min(lastRow, HEADER_SEARCH_ROWS) }, (_, i) => rowCells(i + 1));
    const h = findHeaderRow(top);
    if (h < 0) throw new TailmarkError('input-file', `sheet "${ws.name}" in ${name} is empty`);
    headerRow = h + 1;
    if (top.slice(0, h).some((r) => r.some((v) => !isEmpty(v)))) {
      notes.push(`Header row ${headerRow}: the rows above it look like titles and were skipped (give --header-row to choose another)`);
    }
  }

  const headerCells = rowCells(headerRow);
  let first = -1;
  let last = -1;
  headerCells.forEach((v, c) => {
    if (!isEmpty(v)) {
      if (first < 0) first = c;
      last = c;
    }
  });
  const width = last - first + 1;
  const rawHeaders = headerCells.slice(first, last + 1).map(headerText);
  const headers = cleanHeaders(rawHeaders, first);

  const columns: RawCell[][] = headers.map(() => []);
  const unsaved = new Array<number>(width).fill(0);
  let lastData = headerRow;
  let lastIsTotal = false;
  for (let r = headerRow + 1; r <= lastRow; r++) {
    const row = ws.getRow(r);
    let any = false;
    let total = false;
    for (let c = 0; c < width; c++) {
      const cell = row.getCell(first + c + 1);
      const v = value(cell);
      columns[c].push(v);
      if (!isEmpty(v)) any = true;
      const f = cell.formula;
      if (typeof f === 'string' && f !== '') {
        if (isTotalFormula(f)) total = true;
        const res = (cell.value as { result?: unknown } | null)?.result;
        if (res === undefined && !(cell.isMerged && cell.master !== cell)) unsaved[c]++;
      }
    }
    if (any) {
      lastData = r;
      lastIsTotal = total || rowSaysTotal(columns.map((col) => col[col.length - 1]));
    }
  }
  let rowCount = lastData - headerRow;
  if (lastIsTotal && rowCount > 0) {
    notes.push(`Row ${lastData} was left out: it is a totals row (its label says total, or it holds SUBTOTAL formulas), not a claim`);
    rowCount--;
    while (rowCount > 0 && columns.every((col) => isEmpty(col[rowCount - 1]))) rowCount--;
  }
  for (const col of columns) col.length = rowCount;
  const merges = mergedSpans(
    Object.keys((ws as unknown as { _merges: Record<string, unknown> })._merges ?? {}).map((k) => {
      const m = (ws as unknown as { _merges: Record<string, { range: string } | undefined> })._merges[k];
      return m?.range ?? k;
    }),
    first,
    width,
    headerRow,
    rowCount,
  );
  return {
    source: describe(path, ws.name, first, headerRow, width, rowCount),
    sheetName: ws.name,
    headers,
    columns,
    rowCount,
    headerRow,
    firstColumn: first,
    workbook: wb,
    readNotes: notes,
    merges,
    unsavedFormulas: unsaved,
  };
}

function headerText(v: RawCell): string {
  if (v instanceof Date) return v.toISOString().slice(0, 10);
  if (isEmpty(v)) return '';
  if (typeof v === 'object' && v !== null) return v.code;
  return String(v);
}

/** "A" -> 0, "AA" -> 26. */
function letterIndex(letters: string): number {
  let n = 0;
  for (let i = 0; i < letters.length; i++) n = n * 26 + (letters.charCodeAt(i) - 64);
  return n - 1;
}

/** Merged areas (A1 refs) that cover more than one data row of a table column, as table coordinates. */
export function mergedSpans(refs: readonly string[], firstColumn: number, width: number, headerRow: number, rowCount: number): MergedSpan[] {
  const out: MergedSpan[] = [];
  for (const ref of refs) {
    const m = /^\$?([A-Z]+)\$?(\d+)(?::\$?([A-Z]+)\$?(\d+))?$/.exec(ref);
    if (!m) continue;
    const c1 = letterIndex(m[1]);
    const c2 = letterIndex(m[3] ?? m[1]);
    const from = Number(m[2]) - headerRow - 1;
    const to = Math.min(Number(m[4] ?? m[2]) - headerRow - 1, rowCount - 1);
    if (from < 0 || to <= from) continue;
    for (let c = Math.max(c1, firstColumn); c <= Math.min(c2, firstColumn + width - 1); c++) {
      if (c === c1) out.push({ col: c - firstColumn, from, to, ref });
    }
  }
  return out;
}

async function readCsvTable(path: string, options: ReadOptions): Promise<ReadTable> {
  let bytes: Uint8Array;
  try {
    bytes = await readFile(path);
  } catch (e) {
    throw new TailmarkError('input-file', `cannot read ${basename(path)} (${e instanceof Error ? e.message : String(e)})`);
  }
  {
    const t = readDelimited(bytes, basename(path), {
      ...(options.encoding !== undefined ? { encoding: options.encoding } : {}),
      ...(options.headerRow !== undefined ? { headerRow: options.headerRow } : {}),
    });
    return {
      source: describe(path, null, t.firstColumn, t.headerRow, t.headers.length, t.rowCount),
      sheetName: sheetNameFromFile(path),
      headers: [...t.headers],
      columns: t.columns,
      rowCount: t.rowCount,
      headerRow: t.headerRow,
      firstColumn: t.firstColumn,
      csvRecords: t.records,
      readNotes: t.notes,
    };
  }
}

/** A valid worksheet name from a file name: no []:*?/\ characters, at most 31 characters. */
export function sheetNameFromFile(path: string): string {
  const base = basename(path, extname(path)).replace(/[[\]:*?/\\]/g, ' ').replace(/^'+|'+$/g, '').trim();
  return (base || 'Data').slice(0, 31);
}

/** The first and last 64 KiB of a file (a zip's directory of names is at its end). */
async function headAndTail(path: string, size: number): Promise<{ head: Uint8Array; tail: Uint8Array }> {
  const fh = await open(path, 'r');
  try {
    const n = Math.min(size, 1 << 16);
    const head = new Uint8Array(n);
    await fh.read(head, 0, n, 0);
    const m = Math.min(size, 1 << 16);
    const tail = new Uint8Array(m);
    await fh.read(tail, 0, m, size - m);
    return { head, tail };
  } finally {
    await fh.close();
  }
}

/**
 * Checks that `path` is a readable, non-empty workbook or delimited text file, from its content as
 * well as its extension (and that --sheet is only given for a workbook), and says which. Files we
 * cannot read (.xls, .xlsb, .ods, encrypted, HTML, a file whose extension says something else) get
 * one line that says what the file is and how to convert it. Shared by both readers.
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
  const name = basename(path);
  const ext = extname(path).toLowerCase();
  const byName = fileKind(path);
  const { head, tail } = await headAndTail(path, info.size);
  const kind = sniffKind(head, tail);
  const refusal = unreadableMessage(name, kind, ext);
  if (refusal) throw new TailmarkError('input-file', refusal);
  if (kind === 'xlsx' && byName !== 'xlsx') {
    throw new TailmarkError('input-file', `${name} is an Excel workbook, not ${byName === 'csv' ? 'delimited text' : `a ${ext || 'file of unknown type'}`}: rename it to end in .xlsx and run again`);
  }
  if (kind === 'text' && byName === 'xlsx') {
    throw new TailmarkError('input-file', `${name} is a text file, not an .xlsx workbook: if it holds comma- or tab-separated values, rename it to end in .csv and run again`);
  }
  if (byName === null) {
    throw new TailmarkError('input-file', `unsupported file type "${ext || '(none)'}": use an .xlsx workbook or a .csv, .tsv or .txt file`);
  }
  if (byName === 'csv' && sheet !== undefined) throw new TailmarkError('input-file', `--sheet applies to .xlsx files only; ${name} is a text file`);
  return byName;
}

/** Read the table of an .xlsx or .csv file. Throws TailmarkError ('input-file') with a one-line message. */
export async function readTable(path: string, options: ReadOptions = {}): Promise<ReadTable> {
  return (await checkInputFile(path, options.sheet)) === 'xlsx' ? readXlsx(path, options) : readCsvTable(path, options);
}
