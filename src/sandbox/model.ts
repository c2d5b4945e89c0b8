/**
 * The sandbox's in-memory workbook state: sheets of cells stored per column (one array per
 * attribute per column, never an object per cell, so 1,048,575 rows x 10 columns fit and a
 * full-height read in chunks is linear), tables, conditional formats, data validations, settings,
 * selection and protection. Mutations go through `Tx` so a failed sync can be rolled back.
 *
 * This module is pure TypeScript with no Node or DOM imports (it runs in the browser too).
 */
import {
  MAX_COLS, MAX_ROWS, type Rect, rect, intersect, subtract, containsCell, formatRect, columnLetters,
} from './address.js';
import { CellError, ERROR_LITERALS, type Scalar, evaluateFormula, FormulaUnsupportedError, rewriteReferences } from './formula.js';
import { SandboxError } from './errors.js';

export { CellError };

/** What a cell stores as its value: a scalar, an error, or undefined (empty / formula not yet computed). */
export type StoredValue = number | string | boolean | CellError | undefined;

export interface ColumnData {
  /** Values (cached results for formula cells, when known). */
  v?: StoredValue[];
  /** Formulas ("=..."), undefined for constants. */
  f?: (string | undefined)[];
  /** Number formats; undefined = "General". */
  nf?: (string | undefined)[];
  /** Fill colour "#RRGGBB"; undefined = no fill. */
  fill?: (string | undefined)[];
  /** Font colour "#RRGGBB"; undefined = automatic (black). */
  font?: (string | undefined)[];
  bold?: (boolean | undefined)[];
  wrap?: (boolean | undefined)[];
  /** Quote prefix: text entered with a leading apostrophe. */
  qp?: (boolean | undefined)[];
}

export type Attr = keyof ColumnData;
export const ATTRS: readonly Attr[] = ['v', 'f', 'nf', 'fill', 'font', 'bold', 'wrap', 'qp'];
const CONTENT_ATTRS: readonly Attr[] = ['v', 'f', 'qp'];
const FORMAT_ATTRS: readonly Attr[] = ['nf', 'fill', 'font', 'bold', 'wrap'];

/** Excel's default column width in points (8.43 characters, 64 px). */
export const DEFAULT_COLUMN_WIDTH = 48;

export interface TableModel {
  readonly id: string;
  name: string;
  rect: Rect;
  showHeaders: boolean;
}

export interface ConditionalFormatModel {
  readonly id: string;
  readonly type: 'Custom';
  rects: Rect[];
  /** Cell the formula's relative references are written against (top-left of the range it was added to). */
  anchor: { row: number; col: number };
  formula: string;
  fill: string | null;
  font: string | null;
  bold: boolean | null;
  stopIfTrue: boolean;
}

export interface ListRule {
  readonly list: { readonly source: string; readonly inCellDropDown: boolean };
}

export interface ValidationModel {
  readonly id: string;
  rects: Rect[];
  rule: ListRule;
  ignoreBlanks: boolean;
}

export class SheetModel {
  cols: (ColumnData | undefined)[] = [];
  widths = new Map<number, number>();
  tables: TableModel[] = [];
  /** In priority order: index 0 is priority 0 (evaluated first). */
  cfs: ConditionalFormatModel[] = [];
  validations: ValidationModel[] = [];
  protected = false;
  visibility: 'Visible' | 'Hidden' | 'VeryHidden' = 'Visible';
  constructor(readonly id: string, public name: string) {}
}

export interface SelectionModel {
  sheetId: string;
  areas: Rect[];
}

interface SheetSaved {
  name: string;
  cols: (ColumnData | undefined)[];
  widths: Map<number, number>;
  tables: TableModel[];
  cfs: ConditionalFormatModel[];
  validations: ValidationModel[];
  protected: boolean;
  visibility: SheetModel['visibility'];
}

const cloneRects = (rs: Rect[]): Rect[] => rs.map((r) => ({ ...r }));

/**
 * A transaction over the workbook state. Cell writes are undone from a log (cost proportional to
 * what was written); structural changes copy the affected column arrays first (copy on write).
 */
export class Tx {
  private readonly logArr: unknown[][] = [];
  private readonly logStart: number[] = [];
  private readonly logOld: unknown[][] = [];
  private readonly logLen: number[] = [];
  readonly fresh = new Set<unknown[]>();
  private readonly sheetSaved = new Map<SheetModel, SheetSaved>();
  private readonly wbSaved: { sheets: SheetModel[]; settings: Map<string, string>; selection: SelectionModel; activeSheetId: string; nextId: number };

  constructor(private readonly wb: WorkbookModel) {
    this.wbSaved = {
      sheets: [...wb.sheets],
      settings: new Map(wb.settings),
      selection: { sheetId: wb.selection.sheetId, areas: cloneRects(wb.selection.areas) },
      activeSheetId: wb.activeSheetId,
      nextId: wb.nextId,
    };
  }

  touch(s: SheetModel): void {
    if (this.sheetSaved.has(s)) return;
    this.sheetSaved.set(s, {
      name: s.name,
      cols: s.cols.map((c) => (c ? { ...c } : undefined)),
      widths: new Map(s.widths),
      tables: s.tables.map((t) => ({ ...t, rect: { ...t.rect } })),
      cfs: s.cfs.map((c) => ({ ...c, rects: cloneRects(c.rects), anchor: { ...c.anchor } })),
      validations: s.validations.map((v) => ({ ...v, rects: cloneRects(v.rects) })),
      protected: s.protected,
      visibility: s.visibility,
    });
  }

  /** Remember entries [start, start+n) of `arr` (and its length) before they are overwritten. */
  log(arr: unknown[], start: number, n = 1): void {
    if (this.fresh.has(arr)) return;
    this.logArr.push(arr);
    this.logStart.push(start);
    this.logOld.push(start < arr.length ? arr.slice(start, Math.min(start + n, arr.length)) : []);
    this.logLen.push(arr.length);
  }

  rollback(): void {
    for (let k = this.logArr.length - 1; k >= 0; k--) {
      const arr = this.logArr[k];
      const old = this.logOld[k];
      const start = this.logStart[k];
      for (let i = 0; i < old.length; i++) arr[start + i] = old[i];
      if (arr.length !== this.logLen[k]) arr.length = this.logLen[k];
    }
    for (const [s, saved] of this.sheetSaved) {
      s.name = saved.name;
      s.cols = saved.cols;
      s.widths = saved.widths;
      s.tables = saved.tables;
      s.cfs = saved.cfs;
      s.validations = saved.validations;
      s.protected = saved.protected;
      s.visibility = saved.visibility;
    }
    this.wb.sheets = this.wbSaved.sheets;
    this.wb.settings = this.wbSaved.settings;
    this.wb.selection = this.wbSaved.selection;
    this.wb.activeSheetId = this.wbSaved.activeSheetId;
    this.wb.nextId = this.wbSaved.nextId;
  }
}

/** Named HTML colours Excel accepts (subset), mapped to #RRGGBB. */
const NAMED_COLOURS: Record<string, string> = {
  black: '#000000', white: '#FFFFFF', red: '#FF0000', green: '#008000', blue: '#0000FF', yellow: '#FFFF00',
  orange: '#FFA500', purple: '#800080', gray: '#808080', grey: '#808080', silver: '#C0C0C0', navy: '#000080',
  teal: '#008080', maroon: '#800000', olive: '#808000', lime: '#00FF00', aqua: '#00FFFF', fuchsia: '#FF00FF',
};

export function normaliseColour(c: unknown, where: string): string {
  if (typeof c !== 'string') throw new SandboxError('InvalidArgument', `${where}: colour must be a string such as "#1A2B3C".`, where);
  const s = c.trim();
  if (/^#[0-9a-fA-F]{6}$/.test(s)) return s.toUpperCase();
  if (/^#[0-9a-fA-F]{3}$/.test(s)) return ('#' + s.slice(1).split('').map((x) => x + x).join('')).toUpperCase();
  const named = NAMED_COLOURS[s.toLowerCase()];
  if (named) return named;
  throw new SandboxError('InvalidArgument', `${where}: "${s}" is not a colour (use #RRGGBB or an HTML colour name).`, where);
}

/** Excel serial date (1900 system) for a UTC calendar date. */
export function dateToSerial(y: number, m: number, d: number): number {
  return Math.round((Date.UTC(y, m - 1, d) - Date.UTC(1899, 11, 30)) / 86_400_000);
}

export function serialToIso(serial: number): string {
  const ms = Date.UTC(1899, 11, 30) + Math.round(serial * 86_400_000);
  return new Date(ms).toISOString().slice(0, 10);
}

export function isDateFormat(nf: string | undefined): boolean {
  if (!nf || nf === 'General' || nf === '@') return false;
  const stripped = nf.replace(/"[^"]*"/g, '').replace(/\[[^\]]*\]/g, '');
  return /[dmy]/i.test(stripped) && !/^[#0.,%]+$/.test(stripped);
}

/** What writing one input value to a cell does, following Excel's interpretation of typed input. */
interface CellWrite {
  v: StoredValue;
  f: string | undefined;
  qp: boolean | undefined;
  /** Number format Excel applies as a side effect (dates, percentages), only when the cell is General. */
  nf?: string;
  skip?: boolean;
}

const NUM_RE = /^[+-]?(\d+|\d{1,3}(,\d{3})+)?(\.\d+)?([eE][+-]?\d+)?$/;

/**
 * Interpret `input` as Excel does when it is written to Range.values / Range.formulas (en-US):
 * - null/undefined: cell left unchanged (Excel ignores null entries in an input array).
 * - number: stored (NaN/Infinity rejected with InvalidArgument); boolean: stored.
 * - "" clears the value.
 * - with number format "@" (Text) any string stays text, even "=x" or "123".
 * - "'text": quote prefix; stores "text" as text (Range.values returns "text").
 * - "=..." becomes a formula; "+x" / "-x" that are not numbers become formulas "=+x" / "=-x".
 * - "123", "1,234.5", "(120)", "12%", "TRUE", "#N/A", "2024-01-31" become number / boolean / error /
 *   date serial, as typed input does in Excel.
 * Anything else (objects, Date instances) is rejected with InvalidArgument: Office.js would serialise
 * it as JSON; the sandbox refuses so the bug is visible.
 */
/** Longest text a cell holds (Excel specifications and limits: 32,767 characters). */
export const MAX_CELL_TEXT = 32767;

export function interpretInput(input: unknown, currentNf: string | undefined, where: string): CellWrite {
  if (input === null || input === undefined) return { v: undefined, f: undefined, qp: undefined, skip: true };
  if (typeof input === 'number') {
    if (!Number.isFinite(input)) throw new SandboxError('InvalidArgument', `${where}: ${input} is not a finite number.`, where);
    return { v: input, f: undefined, qp: undefined };
  }
  if (typeof input === 'boolean') return { v: input, f: undefined, qp: undefined };
  if (typeof input !== 'string') {
    throw new SandboxError('InvalidArgument', `${where}: a cell value must be a string, number or boolean (got ${input instanceof Date ? 'a Date' : typeof input}).`, where);
  }
  if (input === '') return { v: undefined, f: undefined, qp: undefined };
  if (input.length > MAX_CELL_TEXT) {
    throw new SandboxError('InvalidArgument', `${where}: the text is ${input.length} characters long; a cell holds at most ${MAX_CELL_TEXT} (Excel's specifications and limits).`, where);
  }
  if (currentNf === '@') return { v: input, f: undefined, qp: undefined };
  if (input.startsWith("'")) return { v: input.slice(1) === '' ? undefined : input.slice(1), f: undefined, qp: true };
  if (input.startsWith('=') && input.length > 1) return { v: undefined, f: input, qp: undefined };
  const s = input.trim();
  const general = currentNf === undefined || currentNf === 'General';
  if (s !== '' && NUM_RE.test(s) && /\d/.test(s)) return { v: Number(s.replace(/,/g, '')), f: undefined, qp: undefined };
  const paren = /^\((\d+|\d{1,3}(,\d{3})+)?(\.\d+)?\)$/.exec(s);
  if (paren && /\d/.test(s)) return { v: -Number(s.slice(1, -1).replace(/,/g, '')), f: undefined, qp: undefined };
  const pct = /^([+-]?(\d+|\d{1,3}(,\d{3})+)?(\.\d+)?)%$/.exec(s);
  if (pct && /\d/.test(pct[1])) {
    const dec = (pct[1].split('.')[1] ?? '').length;
    return { v: Number(pct[1].replace(/,/g, '')) / 100, f: undefined, qp: undefined, ...(general ? { nf: dec ? `0.${'0'.repeat(dec)}%` : '0%' } : {}) };
  }
  const iso = /^(\d{4})-(\d{2})-(\d{2})$/.exec(s);
  if (iso) {
    const y = Number(iso[1]); const m = Number(iso[2]); const d = Number(iso[3]);
    const dt = new Date(Date.UTC(y, m - 1, d));
    if (y >= 1900 && dt.getUTCMonth() === m - 1 && dt.getUTCDate() === d) {
      return { v: dateToSerial(y, m, d), f: undefined, qp: undefined, ...(general ? { nf: 'yyyy-mm-dd' } : {}) };
    }
  }
  const up = s.toUpperCase();
  if (up === 'TRUE' || up === 'FALSE') return { v: up === 'TRUE', f: undefined, qp: undefined };
  if (ERROR_LITERALS.includes(up)) return { v: new CellError(up), f: undefined, qp: undefined };
  if ((input.startsWith('+') || input.startsWith('-')) && input.length > 1) return { v: undefined, f: '=' + input, qp: undefined };
  return { v: input, f: undefined, qp: undefined };
}

/** The value a reader sees (Range.values). */
export type ReadValue = number | string | boolean;

export class WorkbookModel {
  sheets: SheetModel[] = [];
  settings = new Map<string, string>();
  selection: SelectionModel = { sheetId: '', areas: [rect(0, 0, 1, 1)] };
  activeSheetId = '';
  nextId = 1;
  tx: Tx | null = null;

  newId(prefix: string): string {
    return `${prefix}${this.nextId++}`;
  }

  // ---------- transactions ----------
  begin(): Tx {
    if (this.tx) throw new SandboxError('GeneralException', 'Sandbox: nested transaction.');
    this.tx = new Tx(this);
    return this.tx;
  }
  commit(): void {
    this.tx = null;
  }
  rollback(): void {
    this.tx?.rollback();
    this.tx = null;
  }
  touch(s: SheetModel): void {
    this.tx?.touch(s);
  }

  // ---------- sheets ----------
  addSheet(name: string): SheetModel {
    this.checkSheetName(name);
    const s = new SheetModel(this.newId('sheet'), name);
    this.sheets.push(s);
    if (!this.activeSheetId) {
      this.activeSheetId = s.id;
      this.selection = { sheetId: s.id, areas: [rect(0, 0, 1, 1)] };
    }
    return s;
  }

  checkSheetName(name: string, except?: SheetModel): void {
    if (typeof name !== 'string' || name.length === 0 || name.length > 31 || /[\\/?*[\]:]/.test(name) || name.startsWith("'") || name.endsWith("'")) {
      throw new SandboxError('InvalidArgument', `"${String(name)}" is not a valid sheet name (1-31 characters, none of \\ / ? * [ ] :).`, 'WorksheetCollection.add');
    }
    if (this.sheets.some((s) => s !== except && s.name.toLowerCase() === name.toLowerCase())) {
      throw new SandboxError('ItemAlreadyExists', `A sheet named "${name}" already exists.`, 'WorksheetCollection.add');
    }
  }

  sheetByName(name: string): SheetModel | undefined {
    const n = name.toLowerCase();
    return this.sheets.find((s) => s.name.toLowerCase() === n);
  }

  sheetById(id: string): SheetModel | undefined {
    return this.sheets.find((s) => s.id === id);
  }

  activeSheet(): SheetModel {
    const s = this.sheetById(this.activeSheetId) ?? this.sheets[0];
    if (!s) throw new SandboxError('ItemNotFound', 'The workbook has no worksheets.');
    return s;
  }

  deleteSheet(s: SheetModel): void {
    const visible = this.sheets.filter((x) => x.visibility === 'Visible');
    if (visible.length === 1 && visible[0] === s) {
      throw new SandboxError('InvalidOperation', 'A workbook must contain at least one visible worksheet.', 'Worksheet.delete');
    }
    this.sheets = this.sheets.filter((x) => x !== s);
    if (this.activeSheetId === s.id) {
      const next = this.sheets.find((x) => x.visibility === 'Visible')!;
      this.activeSheetId = next.id;
      this.selection = { sheetId: next.id, areas: [rect(0, 0, 1, 1)] };
    }
  }

  // ---------- cells ----------
  /** Writable attribute array for column c (logs the old value of index i for rollback). */
  private writable(s: SheetModel, c: number, attr: Attr): unknown[] {
    this.touch(s);
    let col = s.cols[c];
    if (!col) {
      while (s.cols.length < c) s.cols.push(undefined);
      col = {};
      s.cols[c] = col;
    }
    let arr = col[attr] as unknown[] | undefined;
    if (!arr) {
      arr = [];
      (col as Record<string, unknown[]>)[attr] = arr;
      this.tx?.fresh.add(arr);
    }
    return arr;
  }

  setAttr(s: SheetModel, r: number, c: number, attr: Attr, value: unknown): void {
    const col = s.cols[c];
    const existing = col?.[attr] as unknown[] | undefined;
    if (value === undefined && (!existing || r >= existing.length)) return;
    const arr = this.writable(s, c, attr);
    if (this.tx) this.tx.log(arr, r);
    if (r >= arr.length) {
      // Grow densely so V8 keeps the array packed (no holes): O(gap) once.
      for (let k = arr.length; k < r; k++) arr.push(undefined);
    }
    arr[r] = value;
  }

  /** Direct bulk write of plain values into one column (setup only, outside transactions). Clears formulas there. */
  bulkValues(s: SheetModel, c: number, r0: number, values: readonly StoredValue[]): void {
    if (this.tx) throw new SandboxError('GeneralException', 'Sandbox: bulkValues inside a sync.');
    while (s.cols.length < c) s.cols.push(undefined);
    const col = (s.cols[c] ??= {});
    const v = (col.v ??= []);
    for (let k = v.length; k < r0; k++) v.push(undefined);
    for (let i = 0; i < values.length; i++) {
      if (r0 + i < v.length) v[r0 + i] = values[i];
      else v.push(values[i]);
    }
    if (col.f) for (let i = 0; i < values.length && r0 + i < col.f.length; i++) col.f[r0 + i] = undefined;
    if (col.qp) for (let i = 0; i < values.length && r0 + i < col.qp.length; i++) col.qp[r0 + i] = undefined;
  }

  /**
   * Write a contiguous run of one attribute in one column: entries [r0, r0 + values.length).
   * One undo-log entry per run, so writing a chunk of rows costs O(rows), not O(rows) allocations.
   */
  writeRun(s: SheetModel, c: number, attr: Attr, r0: number, values: readonly unknown[]): void {
    const existing = s.cols[c]?.[attr] as unknown[] | undefined;
    if (!existing || existing.length <= r0) {
      let any = false;
      for (let i = 0; i < values.length; i++) if (values[i] !== undefined) { any = true; break; }
      if (!any) return;
    }
    const arr = this.writable(s, c, attr);
    if (this.tx) this.tx.log(arr, r0, values.length);
    for (let k = arr.length; k < r0; k++) arr.push(undefined);
    for (let i = 0; i < values.length; i++) {
      const r = r0 + i;
      if (r < arr.length) arr[r] = values[i];
      else arr.push(values[i]);
    }
  }

  getAttr<A extends Attr>(s: SheetModel, r: number, c: number, attr: A): NonNullable<ColumnData[A]>[number] | undefined {
    const arr = s.cols[c]?.[attr] as unknown[] | undefined;
    return arr ? (arr[r] as NonNullable<ColumnData[A]>[number] | undefined) : undefined;
  }

  /** Replace an attribute array by a private copy (structural changes); returns the copy. */
  private freshen(s: SheetModel, c: number, attr: Attr): unknown[] | undefined {
    this.touch(s);
    const col = s.cols[c];
    const arr = col?.[attr] as unknown[] | undefined;
    if (!col || !arr) return undefined;
    if (this.tx && !this.tx.fresh.has(arr)) {
      const copy = arr.slice();
      this.tx.fresh.add(copy);
      (col as Record<string, unknown[]>)[attr] = copy;
      return copy;
    }
    return arr;
  }

  isEmptyCell(s: SheetModel, r: number, c: number, valuesOnly: boolean): boolean {
    const col = s.cols[c];
    if (!col) return true;
    const attrs = valuesOnly ? CONTENT_ATTRS : ATTRS;
    for (const a of attrs) {
      const arr = col[a] as unknown[] | undefined;
      if (arr && arr[r] !== undefined) return false;
    }
    return true;
  }

  /** Value as Range.values reports it. Formula cells: cached value, else the sandbox evaluator, else the formula text. */
  readValue(s: SheetModel, r: number, c: number, depth = 0): ReadValue | CellError | null {
    const col = s.cols[c];
    if (!col) return null;
    const v = col.v?.[r];
    const f = col.f?.[r];
    if (f !== undefined && v === undefined) {
      if (depth > 50) return new CellError('#REF!');
      try {
        const res = evaluateFormula(f, (rr, cc) => {
          const x = this.readValue(s, rr, cc, depth + 1);
          return x;
        }, r, c, r, c);
        return res;
      } catch (e) {
        if (e instanceof FormulaUnsupportedError) return f;
        throw e;
      }
    }
    return v === undefined ? null : v;
  }

  /** Apply an already-interpreted write to a cell. */
  applyWrite(s: SheetModel, r: number, c: number, w: CellWrite): void {
    if (w.skip) return;
    this.setAttr(s, r, c, 'v', w.v);
    this.setAttr(s, r, c, 'f', w.f);
    this.setAttr(s, r, c, 'qp', w.qp);
    if (w.nf !== undefined) this.setAttr(s, r, c, 'nf', w.nf);
  }

  /** Clear contents and/or formats of a rectangle (Range.clear). */
  clear(s: SheetModel, rr: Rect, applyTo: 'All' | 'Formats' | 'Contents'): void {
    this.touch(s);
    const attrs = applyTo === 'All' ? ATTRS : applyTo === 'Formats' ? FORMAT_ATTRS : CONTENT_ATTRS;
    const cEnd = Math.min(rr.c0 + rr.cols, s.cols.length);
    for (let c = rr.c0; c < cEnd; c++) {
      const col = s.cols[c];
      if (!col) continue;
      for (const a of attrs) {
        const arr = col[a] as unknown[] | undefined;
        if (!arr) continue;
        const end = Math.min(rr.r0 + rr.rows, arr.length);
        for (let r = rr.r0; r < end; r++) if (arr[r] !== undefined) this.setAttr(s, r, c, a, undefined);
      }
    }
    if (applyTo !== 'Contents') {
      // Clearing formats also removes conditional formats from those cells (as Excel's Clear Formats does).
      s.cfs = s.cfs
        .map((cf) => ({ ...cf, rects: cf.rects.flatMap((x) => subtract(x, rr)) }))
        .filter((cf) => cf.rects.length > 0);
    }
    if (applyTo === 'All') {
      s.validations = s.validations
        .map((v) => ({ ...v, rects: v.rects.flatMap((x) => subtract(x, rr)) }))
        .filter((v) => v.rects.length > 0);
    }
  }

  /** Last used row/column (valuesOnly: values/formulas only; else any stored attribute). */
  usedRect(s: SheetModel, valuesOnly: boolean): Rect | null {
    let rMin = Infinity; let rMax = -1; let cMin = Infinity; let cMax = -1;
    const attrs = valuesOnly ? CONTENT_ATTRS : ATTRS;
    for (let c = 0; c < s.cols.length; c++) {
      const col = s.cols[c];
      if (!col) continue;
      for (const a of attrs) {
        const arr = col[a] as unknown[] | undefined;
        if (!arr) continue;
        let lo = 0;
        while (lo < arr.length && arr[lo] === undefined) lo++;
        if (lo === arr.length) continue;
        let hi = arr.length - 1;
        while (arr[hi] === undefined) hi--;
        if (lo < rMin) rMin = lo;
        if (hi > rMax) rMax = hi;
        if (c < cMin) cMin = c;
        if (c > cMax) cMax = c;
      }
    }
    if (rMax < 0) return null;
    return rect(rMin, cMin, rMax - rMin + 1, cMax - cMin + 1);
  }

  /**
   * Contiguous non-empty block around a rect (Ctrl+* / Range.getSurroundingRegion): grow the block
   * while the row or column just outside it (diagonals included) holds a value. Each direction is
   * grown as far as it goes before the next, so a tall block costs O(rows x columns), not O(rows^2).
   */
  surroundingRegion(s: SheetModel, start: Rect): Rect {
    let r0 = start.r0; let c0 = start.c0; let r1 = start.r0 + start.rows - 1; let c1 = start.c0 + start.cols - 1;
    const colHas = (c: number, from: number, to: number): boolean => {
      if (c < 0 || c >= MAX_COLS) return false;
      const col = s.cols[c];
      if (!col) return false;
      for (const a of CONTENT_ATTRS) {
        const arr = col[a] as unknown[] | undefined;
        if (!arr) continue;
        const end = Math.min(to, arr.length - 1);
        for (let r = Math.max(0, from); r <= end; r++) if (arr[r] !== undefined) return true;
      }
      return false;
    };
    const rowHas = (r: number, from: number, to: number): boolean => {
      if (r < 0 || r >= MAX_ROWS) return false;
      for (let c = Math.max(0, from); c <= Math.min(to, MAX_COLS - 1); c++) if (!this.isEmptyCell(s, r, c, true)) return true;
      return false;
    };
    for (let changed = true; changed;) {
      changed = false;
      while (r1 < MAX_ROWS - 1 && rowHas(r1 + 1, c0 - 1, c1 + 1)) { r1++; changed = true; }
      while (r0 > 0 && rowHas(r0 - 1, c0 - 1, c1 + 1)) { r0--; changed = true; }
      while (c1 < MAX_COLS - 1 && colHas(c1 + 1, r0 - 1, r1 + 1)) { c1++; changed = true; }
      while (c0 > 0 && colHas(c0 - 1, r0 - 1, r1 + 1)) { c0--; changed = true; }
    }
    return rect(r0, c0, r1 - r0 + 1, c1 - c0 + 1);
  }

  // ---------- insert / delete ----------
  /**
   * Insert cells over `rr`, shifting existing cells Down or Right. Tables, conditional formats,
   * validations and same-sheet references in formulas move with the cells, as in Excel.
   * Fails (nothing changed) with NonBlankCellOffSheet (Excel's code) if non-empty cells would be
   * pushed past row 1,048,576 or column XFD, and with InvalidOperation if the shift would move part of a table.
   */
  insert(s: SheetModel, rr: Rect, shift: 'Down' | 'Right'): void {
    this.structural(s, rr, shift === 'Down' ? 'insertDown' : 'insertRight');
  }

  /** Delete cells in `rr`, shifting cells Up or Left (see `insert`). */
  delete(s: SheetModel, rr: Rect, shift: 'Up' | 'Left'): void {
    this.structural(s, rr, shift === 'Up' ? 'deleteUp' : 'deleteLeft');
  }

  private structural(s: SheetModel, rr: Rect, op: ShiftOp): void {
    const mover = makeMover(rr, op);
    // 1. Validate tables first (no change yet).
    const newTables: TableModel[] = [];
    for (const t of s.tables) {
      const moved = mover.rect(t.rect);
      if (moved === 'conflict') throw new SandboxError('InvalidOperation', `This operation would move part of the table "${t.name}"; insert or delete whole table rows or columns instead.`, 'Range.insert');
      if (moved === null) continue;
      if (t.showHeaders && moved.r0 !== mover.point(t.rect.r0, t.rect.c0)?.row && (op === 'deleteUp')) {
        // Header row deleted while rows remain.
        throw new SandboxError('InvalidOperation', `This operation would delete the header row of table "${t.name}".`, 'Range.delete');
      }
      newTables.push({ ...t, rect: moved });
    }
    // 2. Overflow check.
    const usedCols = s.cols.length;
    if (op === 'insertDown') {
      const limit = MAX_ROWS - rr.rows;
      for (let c = rr.c0; c < Math.min(rr.c0 + rr.cols, usedCols); c++) {
        for (const a of ATTRS) {
          const arr = s.cols[c]?.[a] as unknown[] | undefined;
          if (!arr) continue;
          for (let r = Math.max(limit, rr.r0); r < arr.length; r++) if (arr[r] !== undefined) {
            throw new SandboxError('NonBlankCellOffSheet', `Inserting ${rr.rows} row(s) would push non-empty cells in ${columnLetters(c)} off the sheet.`, 'Range.insert');
          }
        }
      }
    } else if (op === 'insertRight') {
      for (let c = Math.max(MAX_COLS - rr.cols, rr.c0); c < usedCols; c++) {
        for (let r = rr.r0; r < rr.r0 + rr.rows; r++) if (!this.isEmptyCell(s, r, c, false)) {
          throw new SandboxError('NonBlankCellOffSheet', `Inserting ${rr.cols} column(s) would push non-empty cells past column XFD.`, 'Range.insert');
        }
        if (!s.cols[c]) continue;
      }
    }
    this.touch(s);
    // 3. Move cells.
    const fullCols = rr.r0 === 0 && rr.rows === MAX_ROWS;
    if (op === 'insertDown' || op === 'deleteUp') {
      for (let c = rr.c0; c < Math.min(rr.c0 + rr.cols, s.cols.length); c++) {
        for (const a of ATTRS) {
          const arr = this.freshen(s, c, a);
          if (!arr || arr.length <= rr.r0) continue;
          if (op === 'insertDown') {
            insertHoles(arr, rr.r0, rr.rows, MAX_ROWS);
          } else {
            arr.splice(rr.r0, rr.rows);
          }
        }
      }
    } else if (fullCols) {
      if (op === 'insertRight') {
        if (s.cols.length > rr.c0) {
          insertHoles(s.cols, rr.c0, rr.cols, MAX_COLS);
        }
      } else if (s.cols.length > rr.c0) {
        s.cols.splice(rr.c0, rr.cols);
      }
      const w = new Map<number, number>();
      for (const [c, width] of s.widths) {
        const p = mover.point(0, c);
        if (p) w.set(p.col, width);
      }
      s.widths = w;
    } else {
      // Partial rows: move cell by cell within rows r0..r1.
      const last = s.cols.length - 1;
      const rEnd = rr.r0 + rr.rows;
      const moveCell = (from: number, to: number) => {
        for (const a of ATTRS) {
          for (let r = rr.r0; r < rEnd; r++) {
            const arr = s.cols[from]?.[a] as unknown[] | undefined;
            const v = arr ? arr[r] : undefined;
            if (to >= 0 && to < MAX_COLS) this.setAttr(s, r, to, a, v);
          }
        }
      };
      if (op === 'insertRight') {
        for (let c = last; c >= rr.c0; c--) moveCell(c, c + rr.cols);
        for (let c = rr.c0; c < rr.c0 + rr.cols; c++) for (const a of ATTRS) for (let r = rr.r0; r < rEnd; r++) this.setAttr(s, r, c, a, undefined);
      } else {
        for (let c = rr.c0 + rr.cols; c <= last; c++) moveCell(c, c - rr.cols);
        for (let c = Math.max(rr.c0, last - rr.cols + 1); c <= last; c++) for (const a of ATTRS) for (let r = rr.r0; r < rEnd; r++) this.setAttr(s, r, c, a, undefined);
      }
    }
    // 4. Move objects and rewrite same-sheet references.
    s.tables = newTables;
    s.cfs = s.cfs
      .map((cf) => {
        const rects = cf.rects.flatMap((x) => mover.rectSplit(x));
        const anchor = mover.point(cf.anchor.row, cf.anchor.col) ?? (rects[0] ? { row: rects[0].r0, col: rects[0].c0 } : cf.anchor);
        return { ...cf, rects, anchor, formula: rewriteReferences(cf.formula, mover.point) };
      })
      .filter((cf) => cf.rects.length > 0);
    s.validations = s.validations
      .map((v) => ({
        ...v,
        rects: v.rects.flatMap((x) => mover.rectSplit(x)),
        rule: { list: { ...v.rule.list, source: v.rule.list.source.startsWith('=') ? rewriteReferences(v.rule.list.source, mover.point) : v.rule.list.source } },
      }))
      .filter((v) => v.rects.length > 0);
    for (let c = 0; c < s.cols.length; c++) {
      const f = s.cols[c]?.f;
      if (!f) continue;
      for (let r = 0; r < f.length; r++) {
        const x = f[r];
        if (x === undefined) continue;
        const y = rewriteReferences(x, mover.point);
        if (y !== x) { this.setAttr(s, r, c, 'f', y); this.setAttr(s, r, c, 'v', undefined); }
      }
    }
    if (this.selection.sheetId === s.id) {
      const areas = this.selection.areas.flatMap((a) => mover.rectSplit(a));
      this.selection = { sheetId: s.id, areas: areas.length ? areas : [rect(rr.r0, rr.c0, 1, 1)] };
    }
  }

  // ---------- conditional formats / validations ----------
  /** The first matching custom rule (priority order) for a cell, evaluated with the sandbox evaluator. */
  highlightAt(s: SheetModel, row: number, col: number): { fill: string | null; font: string | null; bold: boolean | null } | null {
    for (const cf of s.cfs) {
      if (!cf.rects.some((x) => containsCell(x, row, col))) continue;
      const res = evaluateFormula(cf.formula, (r, c) => this.readValue(s, r, c), row, col, cf.anchor.row, cf.anchor.col);
      if (res === true || (typeof res === 'number' && res !== 0)) return { fill: cf.fill, font: cf.font, bold: cf.bold };
    }
    return null;
  }

  setValidation(s: SheetModel, rr: Rect, rule: ListRule, ignoreBlanks: boolean): void {
    this.clearValidation(s, rr);
    s.validations.push({ id: this.newId('dv'), rects: [{ ...rr }], rule, ignoreBlanks });
  }

  clearValidation(s: SheetModel, rr: Rect): void {
    this.touch(s);
    s.validations = s.validations
      .map((v) => ({ ...v, rects: v.rects.flatMap((x) => subtract(x, rr)) }))
      .filter((v) => v.rects.length > 0);
  }

  validationsIn(s: SheetModel, rr: Rect): ValidationModel[] {
    return s.validations.filter((v) => v.rects.some((x) => intersect(x, rr)));
  }
}

/** Insert `n` undefined entries at `at` without spreading (safe for millions), truncating to `max`. */
function insertHoles(arr: unknown[], at: number, n: number, max: number): void {
  const oldLen = arr.length;
  const newLen = Math.min(oldLen + n, max);
  for (let k = oldLen; k < newLen; k++) arr.push(undefined);
  // Move the tail down from the end (copyWithin handles overlap).
  arr.copyWithin(at + n, at, newLen - n);
  arr.fill(undefined, at, Math.min(at + n, newLen));
}

type ShiftOp = 'insertDown' | 'insertRight' | 'deleteUp' | 'deleteLeft';

interface Mover {
  point: (row: number, col: number) => { row: number; col: number } | null;
  /** Moved rect, null when deleted entirely, 'conflict' when only part of it would move. */
  rect: (x: Rect) => Rect | null | 'conflict';
  /** Moved rect(s), splitting a rect that only partly lies in the shifted band. */
  rectSplit: (x: Rect) => Rect[];
}

/** Geometry of an insert/delete shift. Rows/columns are swapped for the horizontal cases. */
function makeMover(rr: Rect, op: ShiftOp): Mover {
  const vertical = op === 'insertDown' || op === 'deleteUp';
  const insert = op === 'insertDown' || op === 'insertRight';
  // Along = the shift axis; across = the band the shift applies to.
  const a0 = vertical ? rr.r0 : rr.c0;
  const aN = vertical ? rr.rows : rr.cols;
  const b0 = vertical ? rr.c0 : rr.r0;
  const bN = vertical ? rr.cols : rr.rows;
  const maxA = vertical ? MAX_ROWS : MAX_COLS;
  const inBand = (b: number) => b >= b0 && b < b0 + bN;
  const moveA = (a: number): number | null => {
    if (a < a0) return a;
    if (insert) return a + aN < maxA ? a + aN : null;
    if (a < a0 + aN) return null;
    return a - aN;
  };
  const point = (row: number, col: number) => {
    const a = vertical ? row : col;
    const b = vertical ? col : row;
    if (!inBand(b)) return { row, col };
    const na = moveA(a);
    if (na === null) return null;
    return vertical ? { row: na, col } : { row, col: na };
  };
  const toAB = (x: Rect) => (vertical ? { a: x.r0, an: x.rows, b: x.c0, bn: x.cols } : { a: x.c0, an: x.cols, b: x.r0, bn: x.rows });
  const fromAB = (a: number, an: number, b: number, bn: number): Rect => (vertical ? rect(a, b, an, bn) : rect(b, a, bn, an));
  const moveSpan = (a: number, an: number): [number, number] | null => {
    const end = a + an; // exclusive
    if (insert) {
      if (a >= a0) {
        const na = a + aN;
        if (na >= maxA) return null;
        return [na, Math.min(an, maxA - na)];
      }
      if (end > a0) return [a, Math.min(an + aN, maxA - a)]; // insertion inside: expand
      return [a, an];
    }
    const dEnd = a0 + aN;
    const overlap = Math.max(0, Math.min(end, dEnd) - Math.max(a, a0));
    const n = an - overlap;
    if (n <= 0) return null;
    const na = a < a0 ? a : a >= dEnd ? a - aN : a0;
    return [na, n];
  };
  const rectFn = (x: Rect): Rect | null | 'conflict' => {
    const { a, an, b, bn } = toAB(x);
    const bandStart = b0; const bandEnd = b0 + bN;
    if (b + bn <= bandStart || b >= bandEnd) return x;
    if (a + an <= a0) return x; // entirely before the shift point: unaffected
    if (b < bandStart || b + bn > bandEnd) return 'conflict';
    const m = moveSpan(a, an);
    return m ? fromAB(m[0], m[1], b, bn) : null;
  };
  const rectSplit = (x: Rect): Rect[] => {
    const r = rectFn(x);
    if (r === null) return [];
    if (r !== 'conflict') return [r];
    const band = vertical ? rect(0, b0, MAX_ROWS, bN) : rect(b0, 0, bN, MAX_COLS);
    const inside = intersect(x, band);
    const outside = subtract(x, band);
    const moved = inside ? rectFn(inside) : null;
    return [...outside, ...(moved && moved !== 'conflict' ? [moved] : [])];
  };
  return { point, rect: rectFn, rectSplit };
}

export { formatRect, MAX_COLS, MAX_ROWS };
export type { Scalar };
