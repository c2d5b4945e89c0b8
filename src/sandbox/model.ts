/**
 * The sandbox's in-memory workbook state: sheets of cells stored per column (one array per
 * attribute per column, never an object per cell, so 1,048,575 rows x 10 columns fit and a
 * full-height read in chunks is linear), tables, conditional formats, data validations, settings,
 * selection and protection. Mutations go through `Tx` (tx.ts) so a failed sync can be rolled back.
 * The stored shapes are in sheet-model.ts, typed input in input.ts, insert/delete in shift.ts.
 *
 * This module is pure TypeScript with no Node or DOM imports (it runs in the browser too).
 */
import { MAX_COLS, MAX_ROWS, type Rect, rect, intersect, subtract, containsCell, formatRect } from './address.js';
import { CellError, type Scalar, evaluateFormula, FormulaUnsupportedError } from './formula.js';
import { SandboxError } from './errors.js';
import {
  ATTRS, CONTENT_ATTRS, FORMAT_ATTRS, SheetModel, type Attr, type ColumnData, type ListRule, type SelectionModel,
  type StoredValue, type ValidationModel, type WorkbookState,
} from './sheet-model.js';
import { Tx } from './tx.js';
import type { CellWrite } from './input.js';
import { shiftCells } from './shift.js';

export { CellError };
export * from './sheet-model.js';
export { Tx } from './tx.js';
export * from './input.js';

/** The value a reader sees (Range.values). */
export type ReadValue = number | string | boolean;

export class WorkbookModel implements WorkbookState {
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
  /** @internal */
  freshen(s: SheetModel, c: number, attr: Attr): unknown[] | undefined {
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
    shiftCells(this, s, rr, shift === 'Down' ? 'insertDown' : 'insertRight');
  }

  /** Delete cells in `rr`, shifting cells Up or Left (see `insert`). */
  delete(s: SheetModel, rr: Rect, shift: 'Up' | 'Left'): void {
    shiftCells(this, s, rr, shift === 'Up' ? 'deleteUp' : 'deleteLeft');
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

export { formatRect, MAX_COLS, MAX_ROWS };
export type { Scalar };
