/** Ranges: cells, their values and formats, derived ranges, insert/delete/clear, and multi-area ranges. */
import { MAX_COLS, MAX_ROWS, type Rect, rect, formatAddress, intersect, parseAddress, inGrid } from './address.js';
import { CellError, type SheetModel, interpretInput, type Attr } from './model.js';
import type { SandboxContext } from './context.js';
import { err, late, assertWritable, ProxyBase, CollectionBase, type LoadArg, type RangeTarget, type SandboxClientResult } from './proxy-base.js';
import { cellInput, formatText } from './cells.js';
import { RangeFormatProxy } from './format-proxy.js';
import { readCellProperties, writeCellProperties } from './cell-properties.js';
import { DataValidationProxy } from './validation-proxy.js';
import type { WorksheetProxy } from './worksheet-proxy.js';
import type { TableCollectionProxy } from './table-proxy.js';
import type { ConditionalFormatCollectionProxy } from './conditional-format-proxy.js';

// ---------------------------------------------------------------- ranges

const RANGE_SCALARS = [
  'address', 'addressLocal', 'values', 'valueTypes', 'formulas', 'formulasLocal', 'numberFormat', 'numberFormatLocal', 'text',
  'rowIndex', 'columnIndex', 'rowCount', 'columnCount', 'cellCount', 'isEntireColumn', 'isEntireRow',
] as const;

/** Merged areas Range.getMergedAreasOrNullObject returns at most (Microsoft's documentation of the method). */
export const MAX_MERGED_AREAS = 512;

export class RangeProxy extends ProxyBase<RangeTarget> {
  protected readonly entity = 'Range';
  protected readonly scalars = RANGE_SCALARS;
  private _format?: RangeFormatProxy;
  private _ws?: WorksheetProxy;
  private _cfs?: ConditionalFormatCollectionProxy;
  private _dv?: DataValidationProxy;

  constructor(ctx: SandboxContext, path: string, orNull: boolean, private readonly resolver: () => RangeTarget | null) {
    super(ctx, path, orNull);
  }
  protected resolveRaw(): RangeTarget | null {
    return this.resolver();
  }
  protected override stillValid(t: RangeTarget): boolean {
    return this.context.model.sheets.includes(t.sheet);
  }
  override nav(name: string): ProxyBase<unknown> | undefined {
    if (name === 'format') return this.format;
    if (name === 'worksheet') return this.worksheet;
    if (name === 'dataValidation') return this.dataValidation;
    if (name === 'conditionalFormats') return this.conditionalFormats;
    return undefined;
  }

  protected read(t: RangeTarget, prop: string): unknown {
    const m = this.context.model;
    const { sheet, rect: r } = t;
    const grid = (f: (row: number, col: number) => unknown): unknown[][] => {
      const out: unknown[][] = new Array<unknown[]>(r.rows);
      for (let i = 0; i < r.rows; i++) {
        const row = new Array(r.cols);
        for (let j = 0; j < r.cols; j++) row[j] = f(r.r0 + i, r.c0 + j);
        out[i] = row;
      }
      return out;
    };
    const value = (row: number, col: number) => {
      const v = m.readValue(sheet, row, col);
      return v === null ? '' : v instanceof CellError ? v.code : v;
    };
    switch (prop) {
      case 'address':
      case 'addressLocal':
        return formatAddress(sheet.name, r);
      case 'values':
        return this.fastGrid(sheet, r, 'v') ?? grid(value);
      case 'valueTypes':
        return grid((row, col) => {
          const v = m.readValue(sheet, row, col);
          if (v === null) return 'Empty';
          if (v instanceof CellError) return 'Error';
          if (typeof v === 'number') return 'Double';
          if (typeof v === 'boolean') return 'Boolean';
          return 'String';
        });
      case 'formulas':
      case 'formulasLocal':
        return grid((row, col) => m.getAttr(sheet, row, col, 'f') ?? value(row, col));
      case 'numberFormat':
      case 'numberFormatLocal':
        return grid((row, col) => m.getAttr(sheet, row, col, 'nf') ?? 'General');
      case 'text':
        return grid((row, col) => formatText(value(row, col), m.getAttr(sheet, row, col, 'nf')));
      case 'rowIndex': return r.r0;
      case 'columnIndex': return r.c0;
      case 'rowCount': return r.rows;
      case 'columnCount': return r.cols;
      case 'cellCount': return r.rows * r.cols;
      case 'isEntireColumn': return r.r0 === 0 && r.rows === MAX_ROWS;
      case 'isEntireRow': return r.c0 === 0 && r.cols === MAX_COLS;
    }
    return undefined;
  }

  /** Fast path for values when no cell in the rect has a formula: one pass per column. */
  private fastGrid(sheet: SheetModel, r: Rect, _attr: Attr): unknown[][] | null {
    for (let j = 0; j < r.cols; j++) {
      const f = sheet.cols[r.c0 + j]?.f;
      if (f) for (let i = r.r0; i < Math.min(f.length, r.r0 + r.rows); i++) if (f[i] !== undefined) return null;
    }
    const out: unknown[][] = new Array<unknown[]>(r.rows);
    for (let i = 0; i < r.rows; i++) out[i] = new Array(r.cols);
    for (let j = 0; j < r.cols; j++) {
      const v = sheet.cols[r.c0 + j]?.v;
      for (let i = 0; i < r.rows; i++) {
        const x = v ? v[r.r0 + i] : undefined;
        out[i][j] = x === undefined ? '' : x instanceof CellError ? x.code : x;
      }
    }
    return out;
  }

  get address(): string { return this.get('address'); }
  get addressLocal(): string { return this.get('addressLocal'); }
  get rowIndex(): number { return this.get('rowIndex'); }
  get columnIndex(): number { return this.get('columnIndex'); }
  get rowCount(): number { return this.get('rowCount'); }
  get columnCount(): number { return this.get('columnCount'); }
  get cellCount(): number { return this.get('cellCount'); }
  get isEntireColumn(): boolean { return this.get('isEntireColumn'); }
  get isEntireRow(): boolean { return this.get('isEntireRow'); }
  get valueTypes(): string[][] { return this.get('valueTypes'); }
  get text(): string[][] { return this.get('text'); }

  get values(): unknown[][] { return this.get('values'); }
  /** 2-D array matching the range, or one scalar for every cell. Strings are interpreted as typed input (see interpretInput). */
  set values(v: unknown[][]) { this.setCells('values', v); }
  get formulas(): unknown[][] { return this.get('formulas'); }
  set formulas(v: unknown[][]) { this.setCells('formulas', v); }
  get formulasLocal(): unknown[][] { return this.get('formulasLocal'); }
  set formulasLocal(v: unknown[][]) { this.setCells('formulasLocal', v); }

  private setCells(prop: string, v: unknown): void {
    this.setProp(prop, v, (t) => {
      const where = `Range.${prop}`;
      assertWritable(t.sheet, where);
      const at = cellInput(v, t.rect, where);
      const m = this.context.model;
      const { r0, c0, rows, cols } = t.rect;
      // Interpret every cell first (column by column) so a bad cell leaves the range untouched;
      // then apply each column as runs (one undo-log entry per column and attribute).
      const planned: { c: number; vs: unknown[]; fs: unknown[]; qs: unknown[]; ns: unknown[] | null }[] = [];
      for (let j = 0; j < cols; j++) {
        const c = c0 + j;
        const col = t.sheet.cols[c];
        const curV = col?.v; const curF = col?.f; const curQ = col?.qp; const curN = col?.nf;
        const vs = new Array(rows); const fs = new Array(rows); const qs = new Array(rows);
        let ns: unknown[] | null = null;
        for (let i = 0; i < rows; i++) {
          const r = r0 + i;
          const x = at(i, j);
          if (typeof x === 'number' && Number.isFinite(x)) { vs[i] = x; fs[i] = undefined; qs[i] = undefined; continue; }
          if (x === null || x === undefined) {
            vs[i] = curV?.[r]; fs[i] = curF?.[r]; qs[i] = curQ?.[r];
            continue;
          }
          const w = interpretInput(x, curN?.[r], `${where} at ${formatAddress(t.sheet.name, rect(r, c, 1, 1))}`);
          vs[i] = w.v; fs[i] = w.f; qs[i] = w.qp;
          if (w.nf !== undefined) {
            if (!ns) { ns = new Array(rows); for (let k = 0; k < rows; k++) ns[k] = curN?.[r0 + k]; }
            ns[i] = w.nf;
          }
        }
        planned.push({ c, vs, fs, qs, ns });
      }
      for (const p of planned) {
        m.writeRun(t.sheet, p.c, 'v', r0, p.vs);
        m.writeRun(t.sheet, p.c, 'f', r0, p.fs);
        m.writeRun(t.sheet, p.c, 'qp', r0, p.qs);
        if (p.ns) m.writeRun(t.sheet, p.c, 'nf', r0, p.ns);
      }
    });
  }

  get numberFormat(): string[][] { return this.get('numberFormat'); }
  set numberFormat(v: string[][]) { this.setFormats('numberFormat', v); }
  get numberFormatLocal(): string[][] { return this.get('numberFormatLocal'); }
  set numberFormatLocal(v: string[][]) { this.setFormats('numberFormatLocal', v); }
  private setFormats(prop: string, v: unknown): void {
    this.setProp(prop, v, (t) => {
      const where = `Range.${prop}`;
      assertWritable(t.sheet, where);
      const at = cellInput(v, t.rect, where);
      const m = this.context.model;
      for (let i = 0; i < t.rect.rows; i++) for (let j = 0; j < t.rect.cols; j++) {
        const x = at(i, j);
        if (x === null || x === undefined) continue;
        if (typeof x !== 'string') throw err('InvalidArgument', `${where}: a number format must be a string.`, where);
      }
      const run = new Array(t.rect.rows);
      for (let j = 0; j < t.rect.cols; j++) {
        const c = t.rect.c0 + j;
        for (let i = 0; i < t.rect.rows; i++) {
          const x = at(i, j) as string | null | undefined;
          run[i] = x === null || x === undefined ? m.getAttr(t.sheet, t.rect.r0 + i, c, 'nf') : x === 'General' ? undefined : x;
        }
        m.writeRun(t.sheet, c, 'nf', t.rect.r0, run);
      }
    });
  }

  get worksheet(): WorksheetProxy {
    return (this._ws ??= new late.WorksheetProxy(this.context, `${this.path}.worksheet`, false, () => this.target().sheet));
  }
  get format(): RangeFormatProxy {
    return (this._format ??= new RangeFormatProxy(this.context, `${this.path}.format`, this));
  }
  get conditionalFormats(): ConditionalFormatCollectionProxy {
    return (this._cfs ??= new late.ConditionalFormatCollectionProxy(this.context, `${this.path}.conditionalFormats`, this));
  }
  get dataValidation(): DataValidationProxy {
    return (this._dv ??= new DataValidationProxy(this.context, `${this.path}.dataValidation`, this));
  }

  private derive(name: string, f: (t: RangeTarget) => Rect | null, orNull = false, nullMessage?: string): RangeProxy {
    return new RangeProxy(this.context, `${this.path}.${name}`, orNull, () => {
      const t = this.target();
      const r = f(t);
      if (r === null) {
        if (orNull) return null;
        throw err('ItemNotFound', nullMessage ?? `${name}: no such range.`, `Range.${name.split('(')[0]}`);
      }
      if (!inGrid(r)) throw err('InvalidArgument', `${name} would extend outside the grid (1,048,576 rows x 16,384 columns) or be empty.`, `Range.${name.split('(')[0]}`);
      return { sheet: t.sheet, rect: r };
    });
  }

  getCell(row: number, column: number): RangeProxy {
    return this.derive(`getCell(${row},${column})`, (t) => rect(t.rect.r0 + row, t.rect.c0 + column, 1, 1));
  }
  getResizedRange(deltaRows: number, deltaColumns: number): RangeProxy {
    return this.derive(`getResizedRange(${deltaRows},${deltaColumns})`, (t) => rect(t.rect.r0, t.rect.c0, t.rect.rows + deltaRows, t.rect.cols + deltaColumns));
  }
  getOffsetRange(rowOffset: number, columnOffset: number): RangeProxy {
    return this.derive(`getOffsetRange(${rowOffset},${columnOffset})`, (t) => rect(t.rect.r0 + rowOffset, t.rect.c0 + columnOffset, t.rect.rows, t.rect.cols));
  }
  getEntireColumn(): RangeProxy {
    return this.derive('getEntireColumn()', (t) => rect(0, t.rect.c0, MAX_ROWS, t.rect.cols));
  }
  getEntireRow(): RangeProxy {
    return this.derive('getEntireRow()', (t) => rect(t.rect.r0, 0, t.rect.rows, MAX_COLS));
  }
  getColumn(column: number): RangeProxy {
    return this.derive(`getColumn(${column})`, (t) => {
      if (column < 0 || column >= t.rect.cols) throw err('InvalidArgument', `Column ${column} is outside the range.`, 'Range.getColumn');
      return rect(t.rect.r0, t.rect.c0 + column, t.rect.rows, 1);
    });
  }
  getRow(row: number): RangeProxy {
    return this.derive(`getRow(${row})`, (t) => {
      if (row < 0 || row >= t.rect.rows) throw err('InvalidArgument', `Row ${row} is outside the range.`, 'Range.getRow');
      return rect(t.rect.r0 + row, t.rect.c0, 1, t.rect.cols);
    });
  }
  getLastRow(): RangeProxy {
    return this.derive('getLastRow()', (t) => rect(t.rect.r0 + t.rect.rows - 1, t.rect.c0, 1, t.rect.cols));
  }
  getLastColumn(): RangeProxy {
    return this.derive('getLastColumn()', (t) => rect(t.rect.r0, t.rect.c0 + t.rect.cols - 1, t.rect.rows, 1));
  }
  getLastCell(): RangeProxy {
    return this.derive('getLastCell()', (t) => rect(t.rect.r0 + t.rect.rows - 1, t.rect.c0 + t.rect.cols - 1, 1, 1));
  }
  getColumnsAfter(count = 1): RangeProxy {
    return this.derive(`getColumnsAfter(${count})`, (t) => rect(t.rect.r0, t.rect.c0 + t.rect.cols, t.rect.rows, count));
  }
  getRowsBelow(count = 1): RangeProxy {
    return this.derive(`getRowsBelow(${count})`, (t) => rect(t.rect.r0 + t.rect.rows, t.rect.c0, count, t.rect.cols));
  }
  /** The contiguous non-empty block around the range's top-left cell (Ctrl+*). */
  getSurroundingRegion(): RangeProxy {
    return this.derive('getSurroundingRegion()', (t) => this.context.model.surroundingRegion(t.sheet, rect(t.rect.r0, t.rect.c0, 1, 1)));
  }
  private other(x: RangeProxy | string, t: RangeTarget, where: string): Rect {
    if (typeof x === 'string') {
      const p = parseAddress(x);
      if (!p) throw err('InvalidArgument', `"${x}" is not a valid range address.`, where);
      if (p.sheet !== null && p.sheet.toLowerCase() !== t.sheet.name.toLowerCase()) throw err('InvalidArgument', `${where}: "${x}" is on another sheet.`, where);
      return p.rect;
    }
    const o = x.target();
    if (o.sheet !== t.sheet) throw err('InvalidArgument', `${where}: the ranges are on different sheets.`, where);
    return o.rect;
  }
  getIntersection(anotherRange: RangeProxy | string): RangeProxy {
    return this.derive('getIntersection(...)', (t) => intersect(t.rect, this.other(anotherRange, t, 'Range.getIntersection')), false, 'The ranges do not intersect.');
  }
  getIntersectionOrNullObject(anotherRange: RangeProxy | string): RangeProxy {
    return this.derive('getIntersectionOrNullObject(...)', (t) => intersect(t.rect, this.other(anotherRange, t, 'Range.getIntersectionOrNullObject')), true);
  }
  getBoundingRect(anotherRange: RangeProxy | string): RangeProxy {
    return this.derive('getBoundingRect(...)', (t) => {
      const o = this.other(anotherRange, t, 'Range.getBoundingRect');
      const r0 = Math.min(t.rect.r0, o.r0); const c0 = Math.min(t.rect.c0, o.c0);
      const r1 = Math.max(t.rect.r0 + t.rect.rows, o.r0 + o.rows); const c1 = Math.max(t.rect.c0 + t.rect.cols, o.c0 + o.cols);
      return rect(r0, c0, r1 - r0, c1 - c0);
    });
  }
  /** Used part of this range; ItemNotFound when it is blank (Excel documents that). */
  getUsedRange(valuesOnly?: boolean): RangeProxy {
    return this.derive(`getUsedRange(${valuesOnly ? 'true' : ''})`, (t) => {
      const u = this.context.model.usedRect(t.sheet, !!valuesOnly);
      return u ? intersect(u, t.rect) : null;
    }, false, 'The range is blank (no used cells).');
  }
  getUsedRangeOrNullObject(valuesOnly?: boolean): RangeProxy {
    return this.derive(`getUsedRangeOrNullObject(${valuesOnly ? 'true' : ''})`, (t) => {
      const u = this.context.model.usedRect(t.sheet, !!valuesOnly);
      return u ? intersect(u, t.rect) : null;
    }, true);
  }

  /** Inserts cells over this range, shifting existing ones Down or Right; returns the inserted range. */
  insert(shift: 'Down' | 'Right'): RangeProxy {
    const result = new RangeProxy(this.context, `${this.path}.insert(${shift})`, false, () => this.target());
    this.call(`insert(${shift})`, shift, (t) => {
      assertWritable(t.sheet, 'Range.insert');
      if (shift !== 'Down' && shift !== 'Right') throw err('InvalidArgument', `insert: shift must be "Down" or "Right" (got ${String(shift)}).`, 'Range.insert');
      this.context.model.insert(t.sheet, t.rect, shift);
      result.bind(t);
    });
    return result;
  }
  delete(shift: 'Up' | 'Left'): void {
    this.call(`delete(${shift})`, shift, (t) => {
      assertWritable(t.sheet, 'Range.delete');
      if (shift !== 'Up' && shift !== 'Left') throw err('InvalidArgument', `delete: shift must be "Up" or "Left" (got ${String(shift)}).`, 'Range.delete');
      this.context.model.delete(t.sheet, t.rect, shift);
    });
  }
  /** applyTo: "All" (default), "Formats" (also removes conditional formats there), "Contents". Hyperlink options are not modelled. */
  clear(applyTo: 'All' | 'Formats' | 'Contents' = 'All'): void {
    this.call(`clear(${applyTo})`, applyTo, (t) => {
      assertWritable(t.sheet, 'Range.clear');
      if (!['All', 'Formats', 'Contents'].includes(applyTo)) throw err('NotImplemented', `clear("${applyTo}") is not modelled by the sandbox.`, 'Range.clear');
      this.context.model.clear(t.sheet, t.rect, applyTo);
    });
  }
  /** Per-cell formats (ExcelApi 1.9): font bold and colour, fill colour, wrap (see cell-properties.ts). */
  getCellProperties(cellPropertiesLoadOptions: unknown): SandboxClientResult<unknown[][]> {
    return this.callResult('getCellProperties', cellPropertiesLoadOptions, (t) => readCellProperties(this.context.model, t, cellPropertiesLoadOptions));
  }
  setCellProperties(cellPropertiesData: unknown): void {
    this.call('setCellProperties', cellPropertiesData, (t) => {
      assertWritable(t.sheet, 'Range.setCellProperties');
      writeCellProperties(this.context.model, t, cellPropertiesData);
    });
  }
  /** Selects the range (and activates its sheet); selection-changed listeners fire after the run. */
  select(): void {
    this.call('select', null, (t) => {
      const m = this.context.model;
      if (t.sheet.visibility !== 'Visible') throw err('InvalidOperation', `Cannot select on hidden sheet "${t.sheet.name}".`, 'Range.select');
      m.activeSheetId = t.sheet.id;
      m.selection = { sheetId: t.sheet.id, areas: [{ ...t.rect }] };
    });
  }
  /**
   * The merged areas that meet this range, whole (ExcelApi 1.13); a null object when there are
   * none. Excel refuses more than 512 areas: so does the sandbox.
   */
  getMergedAreasOrNullObject(): RangeAreasProxy {
    return new RangeAreasProxy(this.context, `${this.path}.getMergedAreasOrNullObject()`, true, () => {
      const t = this.target();
      const rects = t.sheet.merges.filter((m) => intersect(m, t.rect) !== null);
      if (rects.length === 0) return null;
      if (rects.length > MAX_MERGED_AREAS) {
        throw err('GeneralException', `The range has ${rects.length} merged areas; Excel returns at most ${MAX_MERGED_AREAS}.`, 'Range.getMergedAreasOrNullObject');
      }
      return { sheet: t.sheet, rects: rects.map((m) => ({ ...m })) };
    });
  }
  getTables(fullyContained?: boolean): TableCollectionProxy {
    return new late.TableCollectionProxy(this.context, `${this.path}.getTables(${fullyContained ? 'true' : ''})`, null, this, !!fullyContained);
  }
}

export class RangeAreasProxy extends ProxyBase<{ sheet: SheetModel; rects: Rect[] }> {
  protected readonly entity = 'RangeAreas';
  protected readonly scalars = ['address', 'addressLocal', 'areaCount', 'cellCount'] as const;
  private _areas?: RangeCollectionProxy;
  private _ws?: WorksheetProxy;
  constructor(ctx: SandboxContext, path: string, orNull: boolean, private readonly resolver: () => { sheet: SheetModel; rects: Rect[] } | null) {
    super(ctx, path, orNull);
  }
  protected resolveRaw() {
    return this.resolver();
  }
  protected read(t: { sheet: SheetModel; rects: Rect[] }, prop: string): unknown {
    switch (prop) {
      case 'address':
      case 'addressLocal':
        return t.rects.map((r) => formatAddress(t.sheet.name, r)).join(',');
      case 'areaCount': return t.rects.length;
      case 'cellCount': return t.rects.reduce((n, r) => n + r.rows * r.cols, 0);
    }
    return undefined;
  }
  override nav(name: string): ProxyBase<unknown> | undefined {
    return name === 'areas' ? this.areas : undefined;
  }
  get address(): string { return this.get('address'); }
  get areaCount(): number { return this.get('areaCount'); }
  get cellCount(): number { return this.get('cellCount'); }
  get areas(): RangeCollectionProxy {
    return (this._areas ??= new RangeCollectionProxy(this.context, `${this.path}.areas`, this));
  }
  get worksheet(): WorksheetProxy {
    return (this._ws ??= new late.WorksheetProxy(this.context, `${this.path}.worksheet`, false, () => this.target().sheet));
  }
}

export class RangeCollectionProxy extends CollectionBase<{ sheet: SheetModel; rects: Rect[] }, RangeProxy> {
  protected readonly entity = 'RangeCollection';
  protected readonly scalars = [] as const;
  readonly itemScalars = RANGE_SCALARS;
  constructor(ctx: SandboxContext, path: string, private readonly owner: RangeAreasProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.owner.target();
  }
  protected read(): unknown {
    return undefined;
  }
  protected list(t: { sheet: SheetModel; rects: Rect[] }): RangeProxy[] {
    return t.rects.map((r, i) => {
      const p = new RangeProxy(this.context, `${this.path}.getItemAt(${i})`, false, () => ({ sheet: t.sheet, rect: r }));
      p.bind({ sheet: t.sheet, rect: r });
      return p;
    });
  }
  getItemAt(index: number): RangeProxy {
    return new RangeProxy(this.context, `${this.path}.getItemAt(${index})`, false, () => {
      const t = this.owner.target();
      const r = t.rects[index];
      if (!r) throw err('ItemNotFound', `There is no area ${index} (the range has ${t.rects.length}).`, 'RangeCollection.getItemAt');
      return { sheet: t.sheet, rect: r };
    });
  }
  override load(arg?: LoadArg): this {
    // Range items default to address only, to keep responses small.
    return super.load(arg ?? 'address');
  }
}
