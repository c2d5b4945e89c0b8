/**
 * A workbook read once (large-file mode, Node). While the row-by-row reader parses an .xlsx for the
 * table, it hands every sheet's rows to this spool: the part the writer needs (each cell's value to
 * write back and style id, the row's format) is packed into batches of V8-serialised flat arrays
 * (`node:v8`), kept in memory up to a budget and beyond it appended to a temporary file beside the
 * output. The large-file writer then replays the sheets from here instead of unzipping and parsing
 * the input a second time. Memory: the budget plus one batch; disk: about the size of the sheets'
 * cells (the file is removed by `dispose`). Cost O(cells) to pack and to replay.
 */
import { closeSync, mkdtempSync, openSync, readSync, rmdirSync, rmSync, unlinkSync, writeSync } from 'node:fs';
import { join } from 'node:path';
import { deserialize, serialize } from 'node:v8';
import type ExcelJS from 'exceljs';
import type { RawCell } from '../scoring/types.js';
import { TailmarkError } from '../pipeline/errors.js';
import type { SheetHead, SheetTail, StreamRow } from './xlsx-sheet.js';

/** A cell as the writer copies it. */
export interface CopyCell {
  /** 1-based column. */
  readonly col: number;
  /** Style id in the source workbook (0 = default). */
  readonly s: number;
  readonly value: ExcelJS.CellValue;
}

/** A row as the writer copies it (a StreamRow without the table's RawCells). */
export interface CopyRow {
  readonly r: number;
  readonly cells: readonly CopyCell[];
  readonly s?: number;
  readonly height?: number;
  readonly hidden?: boolean;
  readonly outlineLevel?: number;
}

/** Handlers for replaying a sheet (those of XlsxStream.readSheet, with rows as copied). */
export interface ReplayHandlers {
  onHead?(head: SheetHead): void;
  onRow?(row: CopyRow): void | boolean;
  afterChunk?(): Promise<void> | void;
}

/** One sheet as spooled, in storage order. */
export interface SpooledSheet {
  readonly name: string;
  readonly state?: string;
  /** A1 of the sheet as read (null when row 1 or its A1 is empty): says whether a notes or log sheet is ours. */
  readonly a1: RawCell;
  /** An earlier run's notes sheet of ours, to be replaced: its rows are not kept. */
  readonly replaced: boolean;
  /** Number of rows kept. */
  readonly rows: number;
  /** Sheet row of the last row kept (0 when none). */
  readonly lastRow: number;
  /** What follows the sheet's cells (merges, rules, validations...; see SheetTail). */
  readonly tail: SheetTail;
}

interface Batch {
  /** In memory, or at `offset` in the spill file. */
  readonly buf: Buffer | null;
  readonly offset: number;
  readonly length: number;
}

interface SheetRecord extends SpooledSheet {
  readonly head: SheetHead | null;
  readonly first: number;
  readonly end: number;
}

/** Rows per batch (a flat array of about 30 entries a row). */
const BATCH_ROWS = 4096;
/** Bytes of batches kept in memory before the rest goes to the spill file. */
const DEFAULT_MEMORY_BYTES = 48 << 20;

export interface SpoolOptions {
  /** Folder for the spill file (e.g. the output's folder). */
  readonly dir: string;
  /** Bytes held in memory before spilling (default 48 MiB). */
  readonly memoryBytes?: number;
}

/**
 * Row layout in a batch's flat array: r, row style (0 none), height (-1 none), hidden (0/1),
 * outline level, cell count n, then n times (col, style, value).
 */
function packRow(out: unknown[], row: StreamRow): void {
  out.push(row.r, row.s ?? 0, row.height ?? -1, row.hidden ? 1 : 0, row.outlineLevel ?? 0, row.cells.length);
  for (const c of row.cells) out.push(c.col, c.s, c.value);
}

export class WorkbookSpool {
  private readonly sheetList: SheetRecord[] = [];
  private readonly batches: Batch[] = [];
  private pending: unknown[] = [];
  private pendingRows = 0;
  private memory = 0;
  private fd: number | null = null;
  private folder: string | null = null;
  private fileBytes = 0;
  private open: { name: string; state?: string; replaced: boolean; a1: RawCell; head: SheetHead | null; first: number; rows: number; lastRow: number } | null = null;

  /** Style model of a source style id (the reader's style table, kept after the file is closed). */
  style: (id: number | undefined) => Partial<ExcelJS.Style> | undefined = () => undefined;
  /** Number of defined names (named ranges) in the source workbook. */
  definedNames = 0;

  constructor(private readonly options: SpoolOptions) {}

  /** The sheets spooled, in storage order. */
  get sheets(): readonly SpooledSheet[] {
    return this.sheetList;
  }

  /** Bytes packed (in memory and spilled), for the benchmark's curiosity and the tests. */
  get bytes(): { memory: number; spilled: number } {
    return { memory: this.memory, spilled: this.fileBytes };
  }

  /** Start a sheet (sheets are spooled one after the other). */
  beginSheet(name: string, state: string | undefined): void {
    if (this.open) throw new Error('WorkbookSpool: a sheet is still open');
    this.open = { name, ...(state !== undefined ? { state } : {}), replaced: false, a1: null, head: null, first: this.batches.length, rows: 0, lastRow: 0 };
  }

  head(head: SheetHead): void {
    this.open!.head = head;
  }

  /** Note the sheet's A1 (called with the first row when it is row 1). */
  setA1(v: RawCell): void {
    this.open!.a1 = v;
  }

  /** Mark the open sheet as our earlier notes sheet: it is replaced, its rows are not kept. */
  markReplaced(): void {
    this.open!.replaced = true;
  }

  row(row: StreamRow): void {
    const o = this.open!;
    packRow(this.pending, row);
    o.rows++;
    o.lastRow = row.r;
    if (++this.pendingRows >= BATCH_ROWS) this.flush();
  }

  endSheet(tail: SheetTail): void {
    this.flush();
    const o = this.open!;
    this.open = null;
    this.sheetList.push({ ...o, tail, end: this.batches.length });
  }

  private flush(): void {
    if (this.pendingRows === 0) return;
    const buf = serialize(this.pending);
    this.pending = [];
    this.pendingRows = 0;
    if (this.memory + buf.length <= (this.options.memoryBytes ?? DEFAULT_MEMORY_BYTES)) {
      this.memory += buf.length;
      this.batches.push({ buf, offset: 0, length: buf.length });
      return;
    }
    const fd = this.fd ?? this.openFile();
    let done = 0;
    try {
      while (done < buf.length) done += writeSync(fd, buf, done, buf.length - done, this.fileBytes + done);
    } catch (e) {
      throw this.fileError(e);
    }
    this.batches.push({ buf: null, offset: this.fileBytes, length: buf.length });
    this.fileBytes += buf.length;
  }

  private fileError(e: unknown): TailmarkError {
    return new TailmarkError('output-file', `cannot write a temporary file in ${this.options.dir} (${e instanceof Error ? e.message : String(e)})`);
  }

  /** The spill file, in a private folder of its own. */
  private openFile(): number {
    let fd: number;
    try {
      this.folder = mkdtempSync(join(this.options.dir, '.tailmark-spool-'));
      const file = join(this.folder, 'rows');
      fd = openSync(file, 'w+', 0o600);
      this.fd = fd;
      try {
        // Unlinked at once where the system allows it (the open file stays readable): nothing is left
        // behind even if the process is killed.
        unlinkSync(file);
        rmdirSync(this.folder);
        this.folder = null;
      } catch {
        /* removed by dispose() */
      }
    } catch (e) {
      throw this.fileError(e);
    }
    return fd;
  }

  private load(b: Batch): unknown[] {
    if (b.buf) return deserialize(b.buf) as unknown[];
    const buf = Buffer.allocUnsafe(b.length);
    let done = 0;
    while (done < b.length) {
      const n = readSync(this.fd!, buf, done, b.length - done, b.offset + done);
      if (n === 0) throw new Error('spool file ended early');
      done += n;
    }
    return deserialize(buf) as unknown[];
  }

  /**
   * Replay one spooled sheet to the handlers, as XlsxStream.readSheet would parse it: the head, each
   * row in order (onRow may return false to stop), afterChunk after each batch; returns the tail.
   */
  async replay(sheet: SpooledSheet, handlers: ReplayHandlers): Promise<SheetTail> {
    const rec = sheet as SheetRecord;
    if (rec.head) handlers.onHead?.(rec.head);
    for (let b = rec.first; b < rec.end; b++) {
      const flat = this.load(this.batches[b]);
      let i = 0;
      while (i < flat.length) {
        const n = flat[i + 5] as number;
        const cells: CopyCell[] = new Array<CopyCell>(n);
        let k = i + 6;
        for (let c = 0; c < n; c++, k += 3) cells[c] = { col: flat[k] as number, s: flat[k + 1] as number, value: flat[k + 2] as ExcelJS.CellValue };
        const s = flat[i + 1] as number;
        const height = flat[i + 2] as number;
        const outlineLevel = flat[i + 4] as number;
        const row: CopyRow = {
          r: flat[i] as number,
          cells,
          ...(s ? { s } : {}),
          ...(height >= 0 ? { height } : {}),
          ...(flat[i + 3] ? { hidden: true } : {}),
          ...(outlineLevel ? { outlineLevel } : {}),
        };
        i = k;
        if (handlers.onRow?.(row) === false) return rec.tail;
      }
      if (handlers.afterChunk) await handlers.afterChunk();
    }
    return rec.tail;
  }

  /** Remove the spill file and drop the batches. Safe to call twice. */
  dispose(): void {
    this.batches.length = 0;
    this.memory = 0;
    if (this.fd !== null) {
      closeSync(this.fd);
      this.fd = null;
    }
    if (this.folder !== null) {
      rmSync(this.folder, { recursive: true, force: true });
      this.folder = null;
    }
  }
}
