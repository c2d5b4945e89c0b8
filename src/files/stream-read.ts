/**
 * Read a claims table row by row (Node): the same table `readTable` finds (first non-empty row is the
 * header, from its first to its last non-empty cell, down to the last row with a value in those
 * columns, the same RawCell conversions), without holding the file: an .xlsx sheet is parsed as its
 * XML streams out of the zip, a CSV file is parsed in chunks. Only the columns the caller asks for
 * (`keep`) are stored, plus our own review columns from an earlier run, so a full-height sheet costs
 * the memory of its scored columns only. Cost O(cells) time.
 */
import { basename } from 'node:path';
import type { RawCell } from '../scoring/types.js';
import { NOTE_HEADER, STATUS_HEADER } from '../report/style.js';
import { forEachCsvRecord } from './csv-stream.js';
import { checkInputFile, cleanHeaders, describe, isEmpty, sheetNameFromFile, type ReadOptions, type ReadTable } from './read.js';
import { XlsxStream } from './xlsx-stream.js';
import { TailmarkError, isTailmarkError } from '../pipeline/errors.js';

export interface StreamReadOptions extends ReadOptions {
  /**
   * Called once, when the header row is known, with the cleaned header names; returns the indices
   * (into headers) of the columns whose cells to keep. Default: every column. It may throw (e.g. a
   * header that is not there); the read stops and the error is passed on.
   */
  readonly keep?: (headers: readonly string[]) => Iterable<number>;
}

/** Growing column of cells, with repeated strings stored once (group keys repeat a lot). */
class ColumnCollector {
  readonly cells: RawCell[] = [];
  private readonly pool = new Map<string, string>();
  constructor(private readonly intern: boolean) {}
  set(index: number, v: RawCell): void {
    const cells = this.cells;
    while (cells.length < index) cells.push(null);
    if (this.intern && typeof v === 'string') {
      const seen = this.pool.get(v);
      if (seen !== undefined) v = seen;
      else if (this.pool.size < 200_000) this.pool.set(v, v);
    }
    cells[index] = v;
  }
  finish(length: number): RawCell[] {
    const cells = this.cells;
    while (cells.length < length) cells.push(null);
    cells.length = length;
    this.pool.clear();
    return cells;
  }
}

/** "A" -> 0, "AA" -> 26. */
function letterIndex(letters: string): number {
  let n = 0;
  for (let i = 0; i < letters.length; i++) n = n * 26 + (letters.charCodeAt(i) - 64);
  return n - 1;
}

function headerText(v: RawCell): string {
  if (v instanceof Date) return v.toISOString().slice(0, 10);
  if (isEmpty(v)) return '';
  if (typeof v === 'object' && v !== null) return v.code;
  return String(v);
}

/** Builds the table from rows given as (sheet row, cells by 0-based column). */
class TableBuilder {
  headerRow = 0;
  first = -1;
  last = -1;
  headers: string[] = [];
  kept: boolean[] = [];
  private collectors: (ColumnCollector | null)[] = [];
  lastData = 0;
  /** 0-based column -> first sheet row (>= header row) where it holds a value, right of the table. */
  private busy = new Map<number, number>();

  constructor(private readonly keep: StreamReadOptions['keep'], private readonly intern: boolean) {}

  /** Offer a header candidate; returns true once the header row is set. */
  header(rowNo: number, cells: ReadonlyMap<number, RawCell>): boolean {
    let first = -1;
    let last = -1;
    for (const [c, v] of cells) {
      if (!isEmpty(v)) {
        if (first < 0 || c < first) first = c;
        if (c > last) last = c;
      }
    }
    if (first < 0) return false;
    this.headerRow = rowNo;
    this.first = first;
    this.last = last;
    const raw: string[] = [];
    for (let c = first; c <= last; c++) raw.push(headerText(cells.get(c) ?? null));
    this.headers = cleanHeaders(raw, first);
    const wanted = new Set<number>(this.keep ? this.keep(this.headers) : this.headers.map((_, i) => i));
    this.headers.forEach((h, i) => {
      if (h === STATUS_HEADER || h === NOTE_HEADER) wanted.add(i);
    });
    this.kept = this.headers.map((_, i) => wanted.has(i));
    this.collectors = this.kept.map((k) => (k ? new ColumnCollector(this.intern) : null));
    this.lastData = rowNo;
    return true;
  }

  /** A data row (below the header): cell value by 0-based sheet column. */
  cell(rowNo: number, col0: number, v: RawCell): void {
    if (col0 < this.first) return;
    if (col0 > this.last) {
      if (!isEmpty(v) && !this.busy.has(col0)) this.busy.set(col0, rowNo);
      return;
    }
    if (isEmpty(v)) {
      if (v === null || v === undefined) return;
    } else if (rowNo > this.lastData) this.lastData = rowNo;
    const col = this.collectors[col0 - this.first];
    if (col) col.set(rowNo - this.headerRow - 1, v);
  }

  finish(): { columns: RawCell[][]; rowCount: number; busyColumns: number[] } {
    const rowCount = this.lastData - this.headerRow;
    const columns = this.collectors.map((c) => (c ? c.finish(rowCount) : []));
    const busyColumns = [...this.busy].filter(([, r]) => r <= this.lastData).map(([c]) => c).sort((a, b) => a - b);
    return { columns, rowCount, busyColumns };
  }
}

async function readXlsxStreaming(path: string, options: StreamReadOptions): Promise<ReadTable> {
  const x = new XlsxStream(path);
  const name = basename(path);
  let target: string | null = null;
  let names: string[] = [];
  let found = false;
  let merges: readonly string[] = [];
  // An error from the caller's `keep` is passed on as it is; any other failure means the file is not
  // a workbook we can read.
  let callerError: unknown = null;
  const keep = options.keep
    ? (headers: readonly string[]) => {
        try {
          return options.keep!(headers);
        } catch (e) {
          callerError = e;
          throw e;
        }
      }
    : undefined;
  const b = new TableBuilder(keep, false);
  try {
    for await (const sheet of x.sheets()) {
      if (target === null) {
        names = x.sheetNames.length ? x.sheetNames : [sheet.name];
        if (options.sheet !== undefined) {
          target = names.find((n) => n === options.sheet) ?? names.find((n) => n.toLowerCase() === options.sheet!.toLowerCase()) ?? null;
          if (target === null) throw new TailmarkError('input-file', `sheet "${options.sheet}" not found in ${name}; sheets: ${names.map((n) => `"${n}"`).join(', ')}`);
        } else target = names[0];
      }
      if (sheet.name !== target) {
        await x.skipSheet(sheet);
        continue;
      }
      found = true;
      let haveHeader = false;
      const tail = await x.readSheet(sheet, {
        onRow(row) {
          if (!haveHeader) {
            const m = new Map<number, RawCell>();
            for (const c of row.cells) m.set(c.col - 1, c.raw);
            haveHeader = b.header(row.r, m);
            return;
          }
          for (const c of row.cells) b.cell(row.r, c.col - 1, c.raw);
        },
      });
      merges = tail.merges;
      break;
    }
  } catch (e) {
    if (isTailmarkError(e, 'input-file') || (callerError !== null && e === callerError)) throw e;
    if (e instanceof ReferenceError || e instanceof SyntaxError) throw e; // a bug of ours, not the file
    throw new TailmarkError('input-file', `cannot read ${name} as an .xlsx workbook (${e instanceof Error ? e.message : String(e)})`);
  } finally {
    x.close();
  }
  if (!found) {
    if (names.length === 0) throw new TailmarkError('input-file', `${name} has no worksheets`);
    throw new TailmarkError('input-file', `sheet "${target}" not found in ${name}`);
  }
  if (b.first < 0) throw new TailmarkError('input-file', `sheet "${target}" in ${name} is empty`);
  const { columns, rowCount, busyColumns } = b.finish();
  // A merged range right of the table is not free either (its cells other than the first hold no value).
  const busy = new Set(busyColumns);
  for (const m of merges) {
    const r = /^\$?([A-Z]+)\$?(\d+)(?::\$?([A-Z]+)\$?(\d+))?$/.exec(m);
    if (!r) continue;
    const c1 = letterIndex(r[1]);
    const c2 = letterIndex(r[3] ?? r[1]);
    const r1 = Number(r[2]);
    const r2 = Number(r[4] ?? r[2]);
    if (r2 < b.headerRow || r1 > b.headerRow + rowCount) continue;
    for (let c = Math.max(c1, b.last + 1); c <= c2; c++) busy.add(c);
  }
  return {
    source: describe(path, target, b.first, b.headerRow, b.headers.length, rowCount),
    sheetName: target!,
    headers: b.headers,
    columns,
    rowCount,
    headerRow: b.headerRow,
    firstColumn: b.first,
    streamed: { kind: 'xlsx', kept: b.kept, busyColumns: [...busy].sort((p, q) => p - q), sheetNames: names },
  };
}

async function readCsvStreaming(path: string, options: StreamReadOptions): Promise<ReadTable> {
  const name = basename(path);
  const b = new TableBuilder(options.keep, true);
  let haveHeader = false;
  try {
    await forEachCsvRecord(path, (rec, i) => {
      const rowNo = i + 1;
      if (!haveHeader) {
        const m = new Map<number, RawCell>();
        rec.forEach((f, c) => m.set(c, f.trim() === '' ? null : f));
        if (!b.header(rowNo, m)) return;
        haveHeader = true;
        return;
      }
      for (let c = 0; c < rec.length; c++) {
        const f = rec[c];
        if (f !== '') b.cell(rowNo, c, f);
      }
    });
  } catch (e) {
    if (isTailmarkError(e) && e.line !== undefined) throw new TailmarkError('input-file', `${name}: ${e.message}`, e.line);
    if (isTailmarkError(e, 'input-file') || !(e instanceof Error) || !('code' in e)) throw e;
    throw new TailmarkError('input-file', `cannot read ${name} (${e.message})`);
  }
  if (!haveHeader) throw new TailmarkError('input-file', `${name} is empty (no header row found)`);
  const { columns, rowCount, busyColumns } = b.finish();
  return {
    source: describe(path, null, b.first, b.headerRow, b.headers.length, rowCount),
    sheetName: sheetNameFromFile(path),
    headers: b.headers,
    columns,
    rowCount,
    headerRow: b.headerRow,
    firstColumn: b.first,
    streamed: { kind: 'csv', kept: b.kept, busyColumns, sheetNames: [] },
  };
}

/** Read the table of an .xlsx or .csv file row by row. Throws InputFileError with a one-line message. */
export async function readTableStreaming(path: string, options: StreamReadOptions = {}): Promise<ReadTable> {
  return (await checkInputFile(path, options.sheet)) === 'xlsx' ? readXlsxStreaming(path, options) : readCsvStreaming(path, options);
}
