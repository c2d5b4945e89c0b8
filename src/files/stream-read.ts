/**
 * Read a claims table row by row (Node): the same table `readTable` finds (the header row found as
 * src/table/header.ts says, or given; from its first to its last non-empty cell, down to the last row
 * with a value in those columns, a last row labelled total left out; the same RawCell conversions),
 * without holding the file: an .xlsx sheet is parsed as its
 * XML streams out of the zip, a CSV file is parsed in chunks. Only the columns the caller asks for
 * (`keep`) are stored, plus our own review columns from an earlier run, so a full-height sheet costs
 * the memory of its scored columns only. Cost O(cells) time.
 */
import { basename } from 'node:path';
import type { RawCell } from '../scoring/types.js';
import { NOTE_HEADER, NOTES_SHEET_NAME, STATUS_HEADER } from '../report/style.js';
import { notesFormatOf } from '../report/notesSheet.js';
import { readMarkRecords, type MarkRecord } from '../report/marks.js';
import { DELIMITER_WORDS } from '../table/csv.js';
import { TailmarkError, isTailmarkError } from '../pipeline/errors.js';
import { describeEncoding } from '../table/encoding.js';
import { findHeaderRow, HEADER_SEARCH_ROWS } from '../table/header.js';
import { isTotalFormula, isTotalLabel } from '../table/totals.js';
import { forEachCsvRecordDetected } from './csv-stream.js';
import {
  checkInputFile, cleanHeaders, describe, isEmpty, mergedSpans, sheetNameFromFile, type ReadOptions, type ReadTable,
} from './read.js';
import { XlsxStream, type StreamRow } from './xlsx-stream.js';
import { WorkbookSpool, type SpoolOptions } from './xlsx-spool.js';

export interface StreamReadOptions extends ReadOptions {
  /**
   * Called once, when the header row is known, with the cleaned header names; returns the indices
   * (into headers) of the columns whose cells to keep. Default: every column. It may throw (e.g. a
   * header that is not there); the read stops and the error is passed on.
   */
  readonly keep?: (headers: readonly string[]) => Iterable<number>;
  /**
   * .xlsx: keep every sheet's rows for the large-file writer (table.streamed.workbook), so the
   * file is parsed once; the caller disposes of it. Ignored for delimited text (read again to write).
   */
  readonly spool?: SpoolOptions & {
    /** Asked when the table's sheet has been read, with its data rows: false drops the spool (the writer will not need it). */
    readonly keepIf?: (rows: number) => boolean;
  };
}

/**
 * Growing column of cells, with repeated strings stored once (group keys repeat a lot). A column
 * whose first strings are mostly distinct (amounts, claim IDs) stops interning: looking each one up
 * cost more than it saved.
 */
class ColumnCollector {
  readonly cells: RawCell[] = [];
  private pool: Map<string, string> | null;
  private strings = 0;
  constructor(intern: boolean) {
    this.pool = intern ? new Map<string, string>() : null;
  }
  set(index: number, v: RawCell): void {
    const cells = this.cells;
    while (cells.length < index) cells.push(null);
    const pool = this.pool;
    if (pool !== null && typeof v === 'string') {
      const seen = pool.get(v);
      if (seen !== undefined) v = seen;
      else if (pool.size < 200_000) pool.set(v, v);
      if (++this.strings === INTERN_PROBE && pool.size > INTERN_PROBE / 2) this.pool = null;
    }
    cells[index] = v;
  }
  finish(length: number): RawCell[] {
    const cells = this.cells;
    while (cells.length < length) cells.push(null);
    cells.length = length;
    this.pool = null;
    return cells;
  }
}

/** Strings a column reads before deciding whether interning pays (a tuning choice, tried on the file benchmark). */
const INTERN_PROBE = 4096;

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

/**
 * Builds the table from rows given as (sheet row, cells by 0-based column). The first rows are held
 * until the header row is known (found among the first HEADER_SEARCH_ROWS rows, or given), then
 * replayed; after that each cell goes straight to its column. The last non-empty row is watched for
 * a totals label or SUBTOTAL formulas, and left out at the end when it has them.
 */
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
  /** Rows held until the header is known. */
  private pending: { rowNo: number; cells: Map<number, RawCell>; total: boolean; unsaved: readonly number[] }[] = [];
  private decided = false;
  /** The current row says total (label or SUBTOTAL formula); `lastTotal`: the last non-empty row did. */
  private rowTotal = false;
  private lastTotal = false;
  /** Per table column: formula cells without a saved result. */
  unsaved: number[] = [];
  readonly notes: string[] = [];

  constructor(
    private readonly keep: StreamReadOptions['keep'],
    private readonly intern: boolean,
    private readonly givenHeader: number | undefined,
  ) {}

  get hasHeader(): boolean {
    return this.decided && this.first >= 0;
  }

  /**
   * A whole row (cells by 0-based column). `total`: it holds a SUBTOTAL formula; `unsaved`: 0-based
   * columns of its formula cells without a saved result.
   */
  row(rowNo: number, cells: Map<number, RawCell>, total = false, unsaved: readonly number[] = []): void {
    if (this.decided) {
      this.rowTotal = total;
      for (const [c, v] of cells) this.cell(rowNo, c, v);
      for (const c of unsaved) if (c >= this.first && c <= this.last && rowNo > this.headerRow) this.unsaved[c - this.first]++;
      this.endRow(rowNo);
      return;
    }
    this.pending.push({ rowNo, cells, total, unsaved });
    if (this.givenHeader !== undefined ? rowNo >= this.givenHeader : this.pending.length >= HEADER_SEARCH_ROWS) this.decide();
  }

  /** A parsed .xlsx row: its RawCells, whether it holds SUBTOTAL formulas, and formulas without a saved result. */
  xlsxRow(row: StreamRow): void {
    const m = new Map<number, RawCell>();
    let total = false;
    const unsaved: number[] = [];
    for (const c of row.cells) {
      m.set(c.col - 1, c.raw);
      const v = c.value;
      if (v !== null && typeof v === 'object' && 'formula' in v && typeof v.formula === 'string') {
        if (isTotalFormula(v.formula)) total = true;
        if (c.raw === null && (v as { result?: unknown }).result === undefined) unsaved.push(c.col - 1);
      }
    }
    this.row(row.r, m, total, unsaved);
  }

  /** A delimited record as a row (fields by 0-based column; empty fields are blank). */
  record(rowNo: number, rec: readonly string[]): void {
    if (!this.decided) {
      const m = new Map<number, RawCell>();
      for (let c = 0; c < rec.length; c++) {
        const f = rec[c];
        if (f !== '') m.set(c, f.trim() === '' ? null : f);
      }
      this.row(rowNo, m);
      return;
    }
    for (let c = 0; c < rec.length; c++) {
      const f = rec[c];
      if (f !== '') this.cell(rowNo, c, f);
    }
    this.endRow(rowNo);
  }

  /** Decide the header from the held rows and replay the rows below it. */
  decide(): void {
    if (this.decided) return;
    this.decided = true;
    const held = this.pending;
    this.pending = [];
    let h: number;
    if (this.givenHeader !== undefined) {
      h = held.findIndex((p) => p.rowNo === this.givenHeader);
      if (h < 0 || [...held[h].cells.values()].every(isEmpty)) throw new TailmarkError('input-file', `--header-row ${this.givenHeader}: that row is empty`);
    } else {
      // Rows as dense arrays by sheet row (rows missing from the file are empty).
      const base = held.length ? held[0].rowNo : 1;
      const dense: RawCell[][] = [];
      for (const p of held) {
        const arr: RawCell[] = [];
        for (const [c, v] of p.cells) arr[c] = v;
        dense[p.rowNo - base] = arr;
      }
      for (let i = 0; i < dense.length; i++) dense[i] ??= [];
      const idx = findHeaderRow(dense);
      if (idx < 0) return;
      h = held.findIndex((p) => p.rowNo === base + idx);
      if (held.slice(0, h).some((p) => [...p.cells.values()].some((v) => !isEmpty(v)))) {
        this.notes.push(`Header row ${held[h].rowNo}: the rows above it look like titles and were skipped (give --header-row to choose another)`);
      }
    }
    this.header(held[h].rowNo, held[h].cells);
    for (const p of held.slice(h + 1)) this.row(p.rowNo, p.cells, p.total, p.unsaved);
  }

  private header(rowNo: number, cells: ReadonlyMap<number, RawCell>): void {
    let first = -1;
    let last = -1;
    for (const [c, v] of cells) {
      if (!isEmpty(v)) {
        if (first < 0 || c < first) first = c;
        if (c > last) last = c;
      }
    }
    this.headerRow = rowNo;
    this.first = first;
    this.last = last;
    const raw: string[] = [];
    for (let c = first; c <= last; c++) raw.push(headerText(cells.get(c) ?? null));
    this.headers = cleanHeaders(raw, first);
    const wanted = new Set<number>(this.keep ? this.keep(this.headers) : this.headers.map((_, i) => i));
    this.headers.forEach((hd, i) => {
      if (hd === STATUS_HEADER || hd === NOTE_HEADER) wanted.add(i);
    });
    this.kept = this.headers.map((_, i) => wanted.has(i));
    this.collectors = this.kept.map((k) => (k ? new ColumnCollector(this.intern) : null));
    this.unsaved = this.headers.map(() => 0);
    this.lastData = rowNo;
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
    } else {
      if (rowNo > this.lastData) {
        this.lastData = rowNo;
        this.lastTotal = false;
      }
      if (typeof v === 'string' && !this.rowTotal && isTotalLabel(v)) this.rowTotal = true;
    }
    const col = this.collectors[col0 - this.first];
    if (col) col.set(rowNo - this.headerRow - 1, v);
  }

  /** Called after each data row's cells. */
  endRow(rowNo: number): void {
    if (rowNo === this.lastData && this.rowTotal) this.lastTotal = true;
    this.rowTotal = false;
  }

  finish(): { columns: RawCell[][]; rowCount: number; busyColumns: number[] } {
    if (!this.decided) this.decide();
    let rowCount = this.lastData - this.headerRow;
    if (this.lastTotal && rowCount > 0) {
      this.notes.push(`Row ${this.lastData} was left out: it is a totals row (its label says total, or it holds SUBTOTAL formulas), not a claim`);
      rowCount--;
      // Blank rows between the data and the totals row are not data either.
      const kept = this.collectors.filter((c): c is ColumnCollector => c !== null);
      while (rowCount > 0 && kept.every((c) => isEmpty(c.cells[rowCount - 1] ?? null))) rowCount--;
      this.lastData = this.headerRow + rowCount;
    }
    const columns = this.collectors.map((c) => (c ? c.finish(rowCount) : []));
    const busyColumns = [...this.busy].filter(([, r]) => r <= this.lastData).map(([c]) => c).sort((a, b) => a - b);
    return { columns, rowCount, busyColumns };
  }
}

/** Sheet names and the sheet to read: the given one (exact, then ignoring case) or the first. */
function targetSheet(names: readonly string[], wanted: string | undefined, file: string): string {
  if (wanted === undefined) return names[0];
  const t = names.find((n) => n === wanted) ?? names.find((n) => n.toLowerCase() === wanted.toLowerCase());
  if (t === undefined) throw new TailmarkError('input-file', `sheet "${wanted}" not found in ${file}; sheets: ${names.map((n) => `"${n}"`).join(', ')}`);
  return t;
}

/** Sheet names of our notes chain present in the workbook: "Tailmark notes", then "(2)", "(3)"... while they exist. */
function notesChain(names: readonly string[]): Set<string> {
  const chain = new Set<string>();
  for (let k = 1; ; k++) {
    const n = k === 1 ? NOTES_SHEET_NAME : `${NOTES_SHEET_NAME} (${k})`;
    if (!names.includes(n)) return chain;
    chain.add(n);
  }
}

/** The first three columns of a notes sheet as a dense grid of values, for readMarkRecords. */
class NotesGrid {
  private readonly rows: RawCell[][] = [];
  add(row: StreamRow): void {
    const out: RawCell[] = [null, null, null];
    for (const c of row.cells) if (c.col <= 3) out[c.col - 1] = c.raw;
    this.rows[row.r - 1] = out;
  }
  marks(): MarkRecord[] {
    for (let r = 0; r < this.rows.length; r++) this.rows[r] ??= [];
    return readMarkRecords(this.rows);
  }
}

async function readXlsxStreaming(path: string, options: StreamReadOptions): Promise<ReadTable> {
  const spool = options.spool ? new WorkbookSpool(options.spool) : null;
  try {
    return await readXlsxSheets(path, options, spool);
  } catch (e) {
    spool?.dispose();
    throw e;
  }
}

/** Data rows the table has so far (before a totals row is left out). */
function rowsSoFar(b: TableBuilder): number {
  return b.hasHeader ? b.lastData - b.headerRow : 0;
}

/**
 * One pass over the workbook: the target sheet's rows build the table, our earlier notes sheet gives
 * the previous run's marks, and with a spool every sheet's rows are kept for the writer (without
 * one, the other sheets are skipped unparsed).
 */
/** What one pass over a workbook's sheets learns. */
interface XlsxPass {
  readonly name: string;
  readonly options: StreamReadOptions;
  readonly b: TableBuilder;
  spool: WorkbookSpool | null;
  target: string | null;
  names: string[];
  chain: Set<string>;
  found: boolean;
  merges: readonly string[];
  previous: NotesGrid | null;
}

/**
 * One sheet of the pass: the target's rows go to the table, our earlier notes sheet's to the
 * marks grid, every kept row to the spool. Returns false when the pass can stop.
 */
async function readOneSheet(x: XlsxStream, sheet: Parameters<XlsxStream['readSheet']>[0], p: XlsxPass): Promise<boolean> {
  const isTarget = sheet.name === p.target && !p.found;
  // Our notes sheet from an earlier run (the first of the chain whose A1 says so) holds the
  // previous run's list of review marks; the writer replaces it.
  const notesCandidate = !isTarget && p.previous === null && p.chain.has(sheet.name);
  const spool = p.spool;
  if (!isTarget && !notesCandidate && !spool) {
    await x.skipSheet(sheet);
    return true;
  }
  if (isTarget) p.found = true;
  spool?.beginSheet(sheet.name, sheet.state);
  let first = true;
  let grid = null as NotesGrid | null;
  const tail = await x.readSheet(sheet, {
    onHead(h) {
      spool?.head(h);
    },
    onRow(row) {
      if (first) {
        first = false;
        const a1 = row.r === 1 ? (row.cells.find((c) => c.col === 1)?.raw ?? null) : null;
        spool?.setA1(a1);
        if (notesCandidate && notesFormatOf(a1) !== null) {
          grid = new NotesGrid();
          spool?.markReplaced();
        }
      }
      if (grid) {
        grid.add(row);
        return;
      }
      spool?.row(row);
      if (isTarget) p.b.xlsxRow(row);
    },
  });
  spool?.endSheet(tail);
  if (isTarget) {
    p.merges = tail.merges;
    if (spool && p.options.spool?.keepIf && !p.options.spool.keepIf(rowsSoFar(p.b))) {
      spool.dispose();
      p.spool = null;
    }
  }
  if (grid) p.previous = grid;
  // Without a spool, read on only while our notes sheet may still come.
  return !(!p.spool && p.found && (p.previous !== null || p.chain.size === 0));
}

/** 0-based columns right of the table that are not free: holding a value, or in a merged range over the data rows. */
function busyWithMerges(b: TableBuilder, busyColumns: readonly number[], merges: readonly string[], rowCount: number): number[] {
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
  return [...busy].sort((p, q) => p - q);
}

async function readXlsxSheets(path: string, options: StreamReadOptions, spool: WorkbookSpool | null): Promise<ReadTable> {
  const x = new XlsxStream(path);
  const name = basename(path);
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
  const b = new TableBuilder(keep, false, options.headerRow);
  const p: XlsxPass = { name, options, b, spool, target: null, names: [], chain: new Set(), found: false, merges: [], previous: null };
  try {
    for await (const sheet of x.sheets()) {
      if (p.target === null) {
        p.names = x.sheetNames.length ? x.sheetNames : [sheet.name];
        p.target = targetSheet(p.names, options.sheet, name);
        p.chain = notesChain(p.names);
      }
      if (!(await readOneSheet(x, sheet, p))) break;
    }
  } catch (e) {
    if (isTailmarkError(e, 'input-file', 'output-file') || (callerError !== null && e === callerError)) throw e;
    if (e instanceof ReferenceError || e instanceof SyntaxError) throw e; // a bug of ours, not the file
    throw new TailmarkError('input-file', `cannot read ${name} as an .xlsx workbook (${e instanceof Error ? e.message : String(e)})`);
  } finally {
    x.close();
  }
  if (p.spool) {
    p.spool.style = (id) => x.style(id);
    p.spool.definedNames = x.definedNameCount;
  }
  if (!p.found) {
    if (p.names.length === 0) throw new TailmarkError('input-file', `${name} has no worksheets`);
    throw new TailmarkError('input-file', `sheet "${p.target}" not found in ${name}`);
  }
  const { columns, rowCount, busyColumns } = b.finish();
  if (!b.hasHeader) throw new TailmarkError('input-file', `sheet "${p.target}" in ${name} is empty`);
  return {
    source: describe(path, p.target, b.first, b.headerRow, b.headers.length, rowCount),
    sheetName: p.target!,
    headers: b.headers,
    columns,
    rowCount,
    headerRow: b.headerRow,
    firstColumn: b.first,
    streamed: {
      kind: 'xlsx', kept: b.kept, busyColumns: busyWithMerges(b, busyColumns, p.merges, rowCount), sheetNames: p.names,
      ...(p.spool ? { workbook: p.spool } : {}),
    },
    previousMarks: p.previous?.marks() ?? [],
    readNotes: b.notes,
    merges: mergedSpans(p.merges, b.first, b.headers.length, b.headerRow, rowCount),
    unsavedFormulas: b.unsaved,
  };
}

async function readCsvStreaming(path: string, options: StreamReadOptions): Promise<ReadTable> {
  const name = basename(path);
  let b = new TableBuilder(options.keep, true, options.headerRow);
  let info;
  try {
    info = await forEachCsvRecordDetected(
      path,
      (rec, i) => b.record(i + 1, rec),
      () => {
        b = new TableBuilder(options.keep, true, options.headerRow);
      },
      options.encoding !== undefined ? { encoding: options.encoding } : {},
    );
  } catch (e) {
    if (isTailmarkError(e) && e.line !== undefined) throw new TailmarkError('input-file', `${name}: ${e.message}`, e.line);
    if (isTailmarkError(e) || !(e instanceof Error) || !('code' in e)) throw e;
    throw new TailmarkError('input-file', `cannot read ${name} (${e.message})`);
  }
  const { columns, rowCount, busyColumns } = b.finish();
  if (!b.hasHeader) throw new TailmarkError('input-file', `${name} is empty (no header row found)`);
  return {
    source: describe(path, null, b.first, b.headerRow, b.headers.length, rowCount),
    sheetName: sheetNameFromFile(path),
    headers: b.headers,
    columns,
    rowCount,
    headerRow: b.headerRow,
    firstColumn: b.first,
    streamed: { kind: 'csv', kept: b.kept, busyColumns, sheetNames: [], text: { encoding: info.encoding.encoding, delimiter: info.delimiter } },
    readNotes: [`${name}: ${describeEncoding(info.encoding)}, ${DELIMITER_WORDS[info.delimiter]}-separated`, ...b.notes],
  };
}

/** Read the table of an .xlsx or delimited text file row by row. Throws TailmarkError ('input-file') with a one-line message. */
export async function readTableStreaming(path: string, options: StreamReadOptions = {}): Promise<ReadTable> {
  return (await checkInputFile(path, options.sheet)) === 'xlsx' ? readXlsxStreaming(path, options) : readCsvStreaming(path, options);
}
