/**
 * SandboxWorkbook: an in-memory workbook that implements, strictly, the part of the Excel
 * JavaScript API that Tailmark uses (see context.ts for the proxy rules), plus test helpers:
 * direct setup without syncs, `highlightAt` (evaluates our conditional-format rules),
 * `validationAt`, `snapshot()` / `diffSnapshots()` for "nothing lost" checks, and `stats`.
 *
 * Runs in Node and in the browser (no Node-only imports).
 */
import { type Rect, rect, parseAddress, formatRect, formatAddress, columnIndex, intersect, MAX_COLS, MAX_ROWS } from './address.js';
import { SandboxError } from './errors.js';
import { CellError, WorkbookModel, type SheetModel, type StoredValue, dateToSerial, normaliseColour } from './model.js';
import { SandboxContext, type SandboxOptions } from './context.js';
import { evaluateFormula } from './formula.js';
import { cellSnapshot, snapshotOf, type CellSnapshot, type SandboxSnapshot } from './snapshot.js';

import { newBytes, type Batch, type SandboxCellInput, type SandboxRun, type SandboxStats, type SelectionHandler } from './workbook-types.js';

export type { ByteStats, SandboxStats, SandboxCellInput, SandboxRun, SelectionHandler } from './workbook-types.js';

/** Excel.run's options object (delayForCellEdit, mergeUndoGroup), as opposed to a context or client object. */
function isRunOptions(a: unknown): a is Excel.RunOptions {
  return typeof a === 'object' && a !== null && !(a instanceof SandboxContext) && !('context' in a);
}

export class SandboxWorkbook {
  /** @internal */ readonly model = new WorkbookModel();
  readonly options: Required<SandboxOptions>;
  name = 'Book1';
  /** @internal */ readonly passwords = new Map<string, string>();
  private readonly listeners = new Map<number, SelectionHandler>();
  private nextListener = 1;
  private pendingEvents: Promise<void>[] = [];
  /** What an import (sandboxFromExcelJs) met but could not carry, one line each. */
  readonly importNotes: string[] = [];
  /** Errors thrown by selection-changed handlers (flushEvents rethrows the first). */
  readonly eventErrors: unknown[] = [];

  /**
   * States the user can put Excel in, switched on for tests: editing a cell (Excel then refuses
   * every request, or holds it when the run asked for `delayForCellEdit`), a read-only workbook
   * (every write statement fails with AccessDenied), and workbook-structure protection (adding,
   * deleting, renaming, moving or hiding sheets fails with AccessDenied).
   */
  readonly mode = { cellEdit: false, readOnly: false, structureProtected: false };
  private cellEditWaiters: (() => void)[] = [];
  /** The options of the last `run(options, batch)` (delayForCellEdit, mergeUndoGroup), for tests. */
  lastRunOptions: Excel.RunOptions | null = null;

  readonly stats: SandboxStats = {
    runs: 0, syncs: 0, requests: 0, requestBytes: newBytes(), responseBytes: newBytes(),
    reset: () => {
      const s = this.stats;
      s.runs = 0; s.syncs = 0; s.requests = 0; s.requestBytes = newBytes(); s.responseBytes = newBytes();
    },
  };

  constructor(options: SandboxOptions = {}) {
    this.options = {
      payloadLimitBytes: options.payloadLimitBytes ?? 5 * 1024 * 1024,
      partialOnError: options.partialOnError ?? true,
    };
  }

  /**
   * Like Excel.run: a fresh RequestContext per batch; queued work left at the end is synced
   * (as Excel.run does); afterwards the context's objects cannot queue more work.
   * `run(objectOrContext, batch)` reuses an earlier context (Excel.run's overload), e.g. to remove
   * an event handler: `run(handlerResult.context, async (ctx) => { handlerResult.remove(); await ctx.sync(); })`.
   * This is the one place where the sandbox's context is presented as an Excel.RequestContext:
   * the proxies implement the members Tailmark uses, not the whole interface, so the type is
   * asserted here, at the boundary, and nowhere else.
   */
  readonly run: SandboxRun = (<T>(a: unknown, b?: unknown): Promise<T> => {
    if (typeof a === 'function') return this.runIn<T>(new SandboxContext(this), a as Batch<T>);
    if (isRunOptions(a) && typeof b === 'function') {
      this.lastRunOptions = { ...a };
      const fresh = new SandboxContext(this);
      fresh.delayForCellEdit = a.delayForCellEdit === true;
      return this.runIn<T>(fresh, b as Batch<T>);
    }
    const ctx = a instanceof SandboxContext ? a : (a as { context?: unknown } | null)?.context;
    if (!(ctx instanceof SandboxContext) || ctx.sandbox !== this || typeof b !== 'function') {
      return Promise.reject(new SandboxError('InvalidArgument', 'run(object, batch): the object must be a context or an object of this sandbox, and batch a function.'));
    }
    return this.runIn<T>(ctx, b as Batch<T>);
  });

  private async runIn<T>(ctx: SandboxContext, batch: Batch<T>): Promise<T> {
    this.stats.runs++;
    const before = this.selectionKey();
    ctx.closed = false;
    try {
      const result = await batch(ctx as unknown as Excel.RequestContext);
      if (ctx.queue.length > 0) await ctx.sync();
      return result;
    } finally {
      ctx.queue = [];
      ctx.closed = true;
      if (this.selectionKey() !== before) this.fireSelectionChanged();
    }
  }

  /** Syncs left before an injected failure (null: none armed). */
  private faultCountdown: number | null = null;
  /** Whether an armed fault has fired. */
  faultFired = false;

  /**
   * Make the k-th sync from now (1 = the next) fail part-way, as a sync fails in Excel: the
   * statements before the failing one (the first half of that request) stay applied.
   */
  failSyncAt(k: number): void {
    this.faultCountdown = k;
    this.faultFired = false;
  }

  /** @internal Called by each sync: the index of the statement that must fail, or -1. */
  takeFault(statements: number): number {
    if (this.faultCountdown === null) return -1;
    this.faultCountdown--;
    if (this.faultCountdown > 0) return -1;
    this.faultCountdown = null;
    this.faultFired = true;
    return Math.floor(statements / 2);
  }

  /** Enter or leave cell-edit mode; leaving it releases requests held by `delayForCellEdit`. */
  setCellEditMode(on: boolean): void {
    this.mode.cellEdit = on;
    if (!on) {
      const ws = this.cellEditWaiters;
      this.cellEditWaiters = [];
      for (const w of ws) w();
    }
  }

  /** @internal Excel's check before a request runs: refused or held while a cell is being edited. */
  async admit(delayForCellEdit: boolean): Promise<void> {
    if (!this.mode.cellEdit) return;
    if (!delayForCellEdit) {
      throw new SandboxError('InvalidOperationInCellEditMode', 'Excel is in cell-editing mode. Please exit the edit mode by pressing ENTER or TAB or selecting another cell, and then try again.', 'RequestContext.sync');
    }
    await new Promise<void>((r) => this.cellEditWaiters.push(r));
  }

  /** The same context object `run` hands out, typed as the sandbox's own classes (for sandbox tests). */
  newContext(): SandboxContext {
    return new SandboxContext(this);
  }

  /** @internal */
  recordSync(statements: number, bytes: number): void {
    const s = this.stats;
    s.syncs++;
    s.requests += statements;
    s.requestBytes.last = bytes;
    s.requestBytes.total += bytes;
    if (bytes > s.requestBytes.max) s.requestBytes.max = bytes;
  }

  /** @internal */
  recordResponse(bytes: number): void {
    const s = this.stats.responseBytes;
    s.last = bytes;
    s.total += bytes;
    if (bytes > s.max) s.max = bytes;
  }

  // ------------------------------------------------------------ events

  /** @internal */
  addSelectionListener(h: SelectionHandler): number {
    const id = this.nextListener++;
    this.listeners.set(id, h);
    return id;
  }

  /** @internal */
  removeSelectionListener(id: number): void {
    this.listeners.delete(id);
  }

  get selectionListenerCount(): number {
    return this.listeners.size;
  }

  /** @internal The selection now, as a key to compare after a request (the Office.js bridge). */
  selectionKeyNow(): string {
    return this.selectionKey();
  }

  /** @internal Fire selection-changed listeners when the selection differs from `before`. */
  notifySelectionIfChanged(before: string): void {
    if (this.selectionKey() !== before) this.fireSelectionChanged();
  }

  private selectionKey(): string {
    const s = this.model.selection;
    return `${s.sheetId}|${s.areas.map(formatRect).join(',')}`;
  }

  private fireSelectionChanged(): void {
    for (const h of [...this.listeners.values()]) {
      const ctx = new SandboxContext(this);
      const p = Promise.resolve()
        .then(() => h({ workbook: ctx.workbook, type: 'WorkbookSelectionChanged' }))
        .then(() => undefined, (e: unknown) => { this.eventErrors.push(e); });
      this.pendingEvents.push(p);
    }
  }

  /** Wait until every selection-changed handler fired so far has settled; rethrows the first handler error. */
  async flushEvents(): Promise<void> {
    while (this.pendingEvents.length) {
      const ps = this.pendingEvents;
      this.pendingEvents = [];
      await Promise.all(ps);
    }
    if (this.eventErrors.length) throw this.eventErrors[0];
  }

  /** Simulate the user selecting one or more areas ("A1:B3" or ["A1:A5", "C1:C5"]) on a sheet; fires listeners. */
  userSelect(sheet: string, areas: string | string[]): void {
    const s = this.sheet(sheet);
    const list = (Array.isArray(areas) ? areas : areas.split(',')).map((a) => this.rectOf(a));
    const before = this.selectionKey();
    this.model.activeSheetId = s.id;
    this.model.selection = { sheetId: s.id, areas: list };
    if (this.selectionKey() !== before) this.fireSelectionChanged();
  }

  // ------------------------------------------------------------ direct setup (no sync, untracked)

  private sheet(name: string): SheetModel {
    const s = this.model.sheetByName(name);
    if (!s) throw new SandboxError('ItemNotFound', `Sandbox: no sheet named "${name}".`);
    return s;
  }

  private rectOf(a1: string): Rect {
    const p = parseAddress(a1);
    if (!p) throw new SandboxError('InvalidArgument', `Sandbox: "${a1}" is not an address.`);
    return p.rect;
  }

  addSheet(name: string): this {
    this.model.addSheet(name);
    return this;
  }

  sheetNames(): string[] {
    return this.model.sheets.map((s) => s.name);
  }

  /** Store a cell exactly as given (strings stay text; a Date becomes a serial with format yyyy-mm-dd). */
  setCell(sheet: string, row: number, col: number, cell: SandboxCellInput | number | string | boolean | Date | null): void {
    const s = this.sheet(sheet);
    if (row < 0 || row >= MAX_ROWS || col < 0 || col >= MAX_COLS) throw new SandboxError('InvalidArgument', `Sandbox: cell (${row}, ${col}) is outside the grid.`);
    const m = this.model;
    const c: SandboxCellInput =
      cell instanceof Date ? { value: dateToSerial(cell.getUTCFullYear(), cell.getUTCMonth() + 1, cell.getUTCDate()), numberFormat: 'yyyy-mm-dd' }
        : cell === null || typeof cell !== 'object' || cell instanceof CellError ? { value: cell } : cell;
    if ('value' in c || 'formula' in c) {
      const v = c.value;
      m.setAttr(s, row, col, 'v', v === null || v === '' ? undefined : v);
      m.setAttr(s, row, col, 'f', c.formula);
      m.setAttr(s, row, col, 'qp', undefined);
    }
    if (c.numberFormat !== undefined) m.setAttr(s, row, col, 'nf', c.numberFormat === 'General' ? undefined : c.numberFormat);
    if (c.fill !== undefined) m.setAttr(s, row, col, 'fill', normaliseColour(c.fill, 'setCell'));
    if (c.font !== undefined) m.setAttr(s, row, col, 'font', normaliseColour(c.font, 'setCell'));
    if (c.bold !== undefined) m.setAttr(s, row, col, 'bold', c.bold || undefined);
    if (c.wrap !== undefined) m.setAttr(s, row, col, 'wrap', c.wrap || undefined);
  }

  /** Store a block of raw values with its top-left at `topLeft` ("A1"). Column-wise, so large blocks are fast. */
  setValues(sheet: string, topLeft: string, rows: readonly (readonly unknown[])[]): void {
    const s = this.sheet(sheet);
    const at = this.rectOf(topLeft);
    const width = rows.reduce((w, r) => Math.max(w, r.length), 0);
    if (at.c0 + width > MAX_COLS || at.r0 + rows.length > MAX_ROWS) throw new SandboxError('InvalidArgument', 'Sandbox: block extends outside the grid.');
    for (let j = 0; j < width; j++) {
      // Fast path: plain scalars go straight into the column's value array.
      const scalars: StoredValue[] = new Array<StoredValue>(rows.length);
      let plain = true;
      for (let i = 0; i < rows.length; i++) {
        const v = rows[i][j];
        if (v === undefined || v === null || v === '') { scalars[i] = undefined; continue; }
        const t = typeof v;
        if (t === 'number' || t === 'string' || t === 'boolean' || v instanceof CellError) scalars[i] = v as StoredValue;
        else { plain = false; break; }
      }
      if (plain) {
        this.model.bulkValues(s, at.c0 + j, at.r0, scalars);
        continue;
      }
      for (let i = 0; i < rows.length; i++) {
        const v = rows[i][j];
        if (v === undefined || v === null || v === '') continue;
        if (v instanceof Date || v instanceof CellError || typeof v !== 'object') {
          this.setCell(sheet, at.r0 + i, at.c0 + j, v as number | string | boolean | Date | CellError as never);
        } else this.setCell(sheet, at.r0 + i, at.c0 + j, v);
      }
    }
  }

  setColumnWidth(sheet: string, column: string, points: number): void {
    this.sheet(sheet).widths.set(columnIndex(column), points);
  }

  setProtected(sheet: string, on: boolean): void {
    this.sheet(sheet).protected = on;
  }

  /** Merge cells directly, as a user would (the first cell keeps its value; the others are emptied, as Excel does). */
  mergeCells(sheet: string, address: string): void {
    const s = this.sheet(sheet);
    const r = this.rectOf(address);
    if (s.merges.some((m) => intersect(m, r) !== null)) throw new Error(`${address} overlaps a merged area.`);
    for (let i = 0; i < r.rows; i++) for (let j = 0; j < r.cols; j++) if (i > 0 || j > 0) this.setCell(sheet, r.r0 + i, r.c0 + j, null);
    s.merges.push(r);
  }

  /** Add a table directly (headers must already be in the first row). */
  addTable(sheet: string, address: string, name: string): void {
    const s = this.sheet(sheet);
    s.tables.push({ id: this.model.newId('table'), name, rect: this.rectOf(address), showHeaders: true });
  }

  /** Add a custom conditional format directly (lowest priority, i.e. evaluated after existing ones). */
  addConditionalFormat(sheet: string, address: string, formula: string, format: { fill?: string; font?: string; bold?: boolean }): void {
    const s = this.sheet(sheet);
    const r = this.rectOf(address);
    s.cfs.push({
      id: this.model.newId('cf'), type: 'Custom', rects: [r], anchor: { row: r.r0, col: r.c0 },
      formula: formula.startsWith('=') ? formula : `=${formula}`,
      fill: format.fill ? normaliseColour(format.fill, 'addConditionalFormat') : null,
      font: format.font ? normaliseColour(format.font, 'addConditionalFormat') : null,
      bold: format.bold ?? null, stopIfTrue: false,
    });
  }

  addListValidation(sheet: string, address: string, source: string, inCellDropDown = true): void {
    this.model.setValidation(this.sheet(sheet), this.rectOf(address), { list: { source, inCellDropDown } }, true);
  }

  setSetting(key: string, value: unknown): void {
    this.model.settings.set(key, JSON.stringify(value));
  }

  getSetting(key: string): unknown {
    const j = this.model.settings.get(key);
    return j === undefined ? undefined : JSON.parse(j);
  }

  /** Select directly without firing listeners. */
  setSelection(sheet: string, areas: string | string[]): void {
    const s = this.sheet(sheet);
    this.model.activeSheetId = s.id;
    this.model.selection = { sheetId: s.id, areas: (Array.isArray(areas) ? areas : areas.split(',')).map((a) => this.rectOf(a)) };
  }

  /** Current selection as "Sheet!A1:B2" addresses. */
  selection(): string[] {
    const m = this.model;
    const s = m.sheetById(m.selection.sheetId) ?? m.activeSheet();
    return m.selection.areas.map((a) => formatAddress(s.name, a));
  }

  // ------------------------------------------------------------ inspection

  /** What Range.values would report for one cell ("" for empty, "#N/A" for errors). */
  valueAt(sheet: string, row: number, col: number): number | string | boolean {
    const v = this.model.readValue(this.sheet(sheet), row, col);
    return v === null ? '' : v instanceof CellError ? v.code : v;
  }

  /**
   * How far the sheet is used, counted from A1: rows through the last used row and columns through
   * the last used column (values, formulas or formats; `valuesOnly` counts values and formulas
   * only, as getUsedRange(true) does). { rows: 0, cols: 0 } for an empty sheet.
   */
  usedRange(sheet: string, valuesOnly = false): { rows: number; cols: number } {
    const r = this.model.usedRect(this.sheet(sheet), valuesOnly);
    return r ? { rows: r.r0 + r.rows, cols: r.c0 + r.cols } : { rows: 0, cols: 0 };
  }

  /** Width of a 0-based column in points when one was set (setColumnWidth, format.columnWidth, import), else null (the default). */
  columnWidth(sheet: string, col: number): number | null {
    return this.sheet(sheet).widths.get(col) ?? null;
  }

  /** Raw stored cell (formula, number format, quote prefix...) or null when nothing is stored. */
  cellAt(sheet: string, row: number, col: number): CellSnapshot | null {
    return cellSnapshot(this.sheet(sheet), row, col);
  }

  /** Values of a block, as Range.values would read them. */
  valuesOf(sheet: string, address: string): (number | string | boolean)[][] {
    const r = this.rectOf(address);
    const out: (number | string | boolean)[][] = [];
    for (let i = 0; i < r.rows; i++) {
      const row: (number | string | boolean)[] = [];
      for (let j = 0; j < r.cols; j++) row.push(this.valueAt(sheet, r.r0 + i, r.c0 + j));
      out.push(row);
    }
    return out;
  }

  /**
   * The format of the first custom conditional-format rule (in priority order, 0 first) that
   * applies to the cell and evaluates to TRUE / non-zero, or null. Rule formulas are evaluated by
   * the sandbox's small evaluator (formula.ts), which throws on anything it does not support.
   * stopIfTrue is not needed: only the first match is reported.
   */
  highlightAt(sheet: string, row: number, col: number): { fill: string | null; font: string | null; bold: boolean | null } | null {
    return this.model.highlightAt(this.sheet(sheet), row, col);
  }

  /** The list a cell's validation allows (a comma list split and trimmed, or a range reference's values), or null. */
  validationAt(sheet: string, row: number, col: number): string[] | null {
    const s = this.sheet(sheet);
    const v = s.validations.find((x) => x.rects.some((r) => row >= r.r0 && row < r.r0 + r.rows && col >= r.c0 && col < r.c0 + r.cols));
    if (!v) return null;
    const src = v.rule.list.source;
    if (!src.startsWith('=')) return src.split(',').map((x) => x.trim());
    const ref = src.slice(1);
    const p = parseAddress(ref);
    if (!p) {
      // A single-value formula: evaluate it (throws when unsupported).
      const res = evaluateFormula(src, (r, c) => this.model.readValue(s, r, c));
      return [String(res)];
    }
    const target = p.sheet ? this.sheet(p.sheet) : s;
    const out: string[] = [];
    for (let i = 0; i < p.rect.rows; i++) for (let j = 0; j < p.rect.cols; j++) {
      const x = this.model.readValue(target, p.rect.r0 + i, p.rect.c0 + j);
      if (x !== null) out.push(x instanceof CellError ? x.code : String(x));
    }
    return out;
  }

  /** Deep plain-JSON copy of everything the workbook holds, for before/after comparisons. */
  snapshot(): SandboxSnapshot {
    return snapshotOf(this.model);
  }
}

/** Build a one-sheet sandbox from raw rows (strings stay text, Dates become serials with a date format). */
export function sandboxFromRows(sheetName: string, rows: readonly (readonly unknown[])[], options?: SandboxOptions): SandboxWorkbook {
  const sb = new SandboxWorkbook(options);
  sb.addSheet(sheetName);
  sb.setValues(sheetName, 'A1', rows);
  return sb;
}

export { rect };
