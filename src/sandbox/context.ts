/**
 * The Office.js-like proxy layer of the sandbox: a RequestContext whose proxy objects behave like
 * Excel's, strictly.
 *
 * - Properties are readable only after `load()` and `context.sync()`; reading earlier throws an
 *   error with code "PropertyNotLoaded" naming the property (as Office.js does). Setting a property
 *   makes the set value readable locally (Office.js does the same).
 * - Property writes and method calls are queued and applied in order at `sync()`. Object paths
 *   (getItem, getRange...) are resolved at sync, when first used, and then stay bound.
 * - `...OrNullObject` results expose `isNullObject` after a sync; property writes and method calls
 *   on a null object (or on objects reached from one) do nothing, as in Excel (Microsoft's own
 *   samples rely on `worksheets.getItemOrNullObject("Sample").delete()`); loaded properties of a
 *   null object read as null.
 * - A sync is atomic by default: if any queued statement fails, nothing from that sync is applied
 *   and nothing loaded becomes readable. Real Excel may have applied the statements before the
 *   failing one; `partialOnError: true` models that (statements before the failure stay applied).
 * - The JSON size of each request (everything queued between two syncs) and of each response
 *   (everything loaded) is measured (UTF-8 bytes); over the limit (default 5 MB, Excel on the web)
 *   the sync fails with RequestPayloadSizeLimitExceeded / ResponsePayloadSizeLimitExceeded.
 *   The sandbox's request encoding is not Office.js's wire format: sizes are close, not equal.
 */
import { MAX_COLS, MAX_ROWS, type Rect, rect, formatAddress, formatRect, intersect, parseAddress, inGrid, contains } from './address.js';
import { SandboxError, type SandboxErrorCode } from './errors.js';
import {
  CellError, DEFAULT_COLUMN_WIDTH, WorkbookModel, SheetModel, interpretInput, normaliseColour, isDateFormat, serialToIso,
  type ConditionalFormatModel, type TableModel, type Attr,
} from './model.js';
import { generalText } from './formula.js';
import type { SandboxWorkbook } from './workbook.js';

// ---------------------------------------------------------------- helpers

const encoder = new TextEncoder();
let scratch = new Uint8Array(1 << 16);

/** UTF-8 byte length (TextEncoder exists in browsers and Node; encodeInto reuses one buffer). */
function utf8Length(s: string): number {
  if (scratch.length < s.length * 3) scratch = new Uint8Array(s.length * 3);
  return encoder.encodeInto(s, scratch).written;
}

function jsonBytes(x: unknown): number {
  const s = JSON.stringify(x);
  return s === undefined ? 0 : utf8Length(s);
}

const err = (code: SandboxErrorCode, message: string, location?: string) => new SandboxError(code, message, location);

function notLoaded(entity: string, prop: string): SandboxError {
  return err(
    'PropertyNotLoaded',
    `The property '${prop}' is not available. Before reading the property's value, call the load method on the containing object (${entity}) and call "context.sync()" on the associated request context.`,
    `${entity}.${prop}`,
  );
}

type LoadArg = string | string[] | { select?: string | string[]; expand?: string | string[] } | undefined;

function parseLoadArg(arg: LoadArg): string[] {
  if (arg === undefined || arg === null) return [];
  const split = (x: string | string[] | undefined): string[] =>
    x === undefined ? [] : (Array.isArray(x) ? x : x.split(',')).map((p) => p.trim()).filter((p) => p.length > 0);
  if (typeof arg === 'string' || Array.isArray(arg)) return split(arg);
  return [...split(arg.select), ...split(arg.expand)];
}

interface Action {
  readonly statement: string;
  readonly payload: unknown;
  /** Runs against the model; may return a commit callback (applied when the sync succeeds) and response bytes. */
  readonly run: () => { commit?: () => void; responseBytes?: number } | void;
}

/** Result of a method returning a primitive (getCount, getRangeEdge...). */
export class SandboxClientResult<T> {
  private v: T | undefined;
  private set = false;
  /** @internal */
  _resolve(v: T): void {
    this.v = v;
    this.set = true;
  }
  get value(): T {
    if (!this.set) throw err('ValueNotLoaded', 'The value of the result object has not been loaded yet. Before reading the value property, call "context.sync()" on the associated request context.', 'ClientResult.value');
    return this.v as T;
  }
}

// ---------------------------------------------------------------- context

export interface SandboxOptions {
  /** Request/response limit in bytes (default 5 * 1024 * 1024, Excel on the web). */
  payloadLimitBytes?: number;
  /** Keep statements applied before a failing one (as Excel may). Default false: a failed sync applies nothing. */
  partialOnError?: boolean;
}

export class SandboxContext {
  readonly workbook: WorkbookProxy;
  readonly trackedObjects = { add: (_o: unknown) => undefined, remove: (_o: unknown) => undefined };
  /** @internal */ queue: Action[] = [];
  /** @internal */ pendingNull: ProxyBase<unknown>[] = [];
  /** @internal */ memoResets: (() => void)[] = [];
  /** @internal */ syncCount = 0;
  /** @internal */ closed = false;
  /** @internal */ applying = false;

  constructor(readonly sandbox: SandboxWorkbook) {
    this.workbook = new WorkbookProxy(this);
  }

  /** @internal */
  get model(): WorkbookModel {
    return this.sandbox.model;
  }

  /** @internal */
  enqueue(a: Action): void {
    if (this.closed) {
      throw err('InvalidRequestContext', `Cannot queue "${a.statement}": its Excel.run batch has finished. Create objects inside the run that uses them.`);
    }
    this.queue.push(a);
  }

  async sync<T>(passThroughValue?: T): Promise<T> {
    if (this.closed) throw err('InvalidRequestContext', 'context.sync() called after its Excel.run batch finished.');
    const actions = this.queue;
    const nulls = this.pendingNull;
    this.queue = [];
    this.pendingNull = [];
    this.syncCount++;
    const sb = this.sandbox;
    const limit = sb.options.payloadLimitBytes;
    let reqBytes = 2;
    for (const a of actions) reqBytes += jsonBytes({ s: a.statement, p: a.payload }) + 1;
    sb.recordSync(actions.length, reqBytes);
    // Office.js resolves the promise asynchronously; so do we.
    await Promise.resolve();
    if (reqBytes > limit) {
      throw err('RequestPayloadSizeLimitExceeded', `The request payload (${reqBytes} bytes) exceeds the limit of ${limit} bytes. Split the work into smaller batches (fewer cells per sync).`, 'RequestContext.sync');
    }
    const model = this.model;
    const partial = sb.options.partialOnError;
    const commits: (() => void)[] = [];
    let respBytes = 2;
    this.memoResets = [];
    this.applying = true;
    let failed: { error: unknown } | null = null;
    if (!partial) model.begin();
    try {
      for (const a of actions) {
        if (partial) model.begin();
        try {
          const r = a.run();
          if (r?.commit) commits.push(r.commit);
          if (r?.responseBytes) respBytes += r.responseBytes + 1;
        } catch (e) {
          if (e instanceof NullObjectSkip) {
            // A statement on a null object does nothing (Excel's behaviour).
            if (partial) model.commit();
            continue;
          }
          if (partial) model.rollback();
          throw decorate(e, a.statement);
        }
        if (partial) model.commit();
      }
      for (const p of nulls) {
        const c = p._resolveNullness();
        commits.push(c);
      }
      if (respBytes > limit) {
        throw err('ResponsePayloadSizeLimitExceeded', `The response payload (${respBytes} bytes) exceeds the limit of ${limit} bytes. Load fewer cells per sync.`, 'RequestContext.sync');
      }
    } catch (e) {
      failed = { error: e };
    } finally {
      this.applying = false;
    }
    sb.recordResponse(respBytes);
    if (failed !== null) {
      if (!partial) model.rollback();
      for (const f of this.memoResets) f();
      this.memoResets = [];
      throw failed.error;
    }
    if (!partial) model.commit();
    this.memoResets = [];
    for (const c of commits) c();
    return passThroughValue as T;
  }
}

/** Thrown when a statement reaches a null object; the statement is skipped, not failed. */
export class NullObjectSkip extends Error {
  constructor(path: string) {
    super(`${path} is a null object`);
    this.name = 'NullObjectSkip';
  }
}

function decorate(e: unknown, statement: string): unknown {
  if (e instanceof SandboxError) return e.withStatement(statement);
  if (e instanceof Error) {
    const g = new SandboxError('GeneralException', `Sandbox internal error in "${statement}": ${e.message}`, undefined, statement);
    return g;
  }
  return e;
}

// ---------------------------------------------------------------- proxy base

export abstract class ProxyBase<T> {
  /** @internal */ _data: Record<string, unknown> = {};
  /** @internal */ _isNull: boolean | undefined;
  /** @internal */ memo: T | null | undefined;
  private readonly createdAt: number;
  protected abstract readonly entity: string;
  /** Scalar properties `load()` with no argument loads (and that may be named in load). */
  protected abstract readonly scalars: readonly string[];

  constructor(
    readonly context: SandboxContext,
    /** @internal */ readonly path: string,
    /** @internal */ readonly orNull: boolean,
  ) {
    this.createdAt = context.syncCount;
    if (orNull) context.pendingNull.push(this);
  }

  /** Resolve the object path against the current model; null when it does not exist. */
  protected abstract resolveRaw(): T | null;
  /** Whether a bound target still exists (e.g. the sheet was not deleted since). */
  protected stillValid(_t: T): boolean {
    return true;
  }
  /** Read one scalar property from the target. */
  protected abstract read(t: T, prop: string): unknown;
  /** Child proxies reachable by name for nested load paths ("format/fill/color"). */
  protected nav(_name: string): ProxyBase<unknown> | undefined {
    return undefined;
  }

  /** @internal */
  bind(t: T): void {
    this.memo = t;
  }

  /** @internal Resolve (memoised), or null for a missing object. */
  targetOrNull(): T | null {
    if (this.memo === undefined || (this.memo !== null && !this.stillValid(this.memo))) {
      const wasUndefined = this.memo === undefined;
      const prev = this.memo;
      const t = this.resolveRaw();
      this.memo = t;
      const ctx = this.context;
      if (ctx.applying) ctx.memoResets.push(() => { this.memo = wasUndefined ? undefined : prev; });
    }
    return this.memo;
  }

  /**
   * @internal Resolve, or throw ItemNotFound; for a null object (or an object reached from one)
   * throw NullObjectSkip, which makes the queued statement a no-op — as in Excel, where e.g.
   * `worksheets.getItemOrNullObject("x").delete()` does nothing when "x" does not exist.
   */
  target(): T {
    const t = this.targetOrNull();
    if (t === null) {
      if (this.orNull) throw new NullObjectSkip(this.path);
      throw err('ItemNotFound', `The requested resource doesn't exist: ${this.path}.`, this.entity);
    }
    return t;
  }

  /** @internal */
  _resolveNullness(): () => void {
    let isNull: boolean;
    try {
      isNull = this.targetOrNull() === null;
    } catch (e) {
      if (!(e instanceof NullObjectSkip)) throw e;
      isNull = true;
    }
    return () => { this._isNull = isNull; };
  }

  get isNullObject(): boolean {
    if (this.orNull) {
      if (this._isNull === undefined) throw notLoaded(this.entity, 'isNullObject');
      return this._isNull;
    }
    if (this.context.syncCount === this.createdAt) throw notLoaded(this.entity, 'isNullObject');
    return this._isNull ?? false;
  }

  /** Loaded properties of a null object read as null (Office.js does not throw for them). */
  protected get<V>(prop: string): V {
    if (Object.prototype.hasOwnProperty.call(this._data, prop)) return this._data[prop] as V;
    if (this._isNull === true) return null as V;
    throw notLoaded(this.entity, prop);
  }

  /** Queue a property write; the value is readable locally at once (as in Office.js). */
  protected setProp(prop: string, value: unknown, apply: (t: T) => void): void {
    this.context.enqueue({
      statement: `${this.path}.${prop} = ...`,
      payload: value,
      run: () => { apply(this.target()); },
    });
    this._data[prop] = value;
  }

  /** Queue a method call. */
  protected call(method: string, payload: unknown, apply: (t: T) => void): void {
    this.context.enqueue({ statement: `${this.path}.${method}(...)`, payload, run: () => { apply(this.target()); } });
  }

  /** Queue a method returning a primitive ClientResult. */
  protected callResult<V>(method: string, payload: unknown, compute: (t: T) => V): SandboxClientResult<V> {
    const res = new SandboxClientResult<V>();
    this.context.enqueue({
      statement: `${this.path}.${method}(...)`,
      payload,
      run: () => {
        const v = compute(this.target());
        return { commit: () => res._resolve(v), responseBytes: jsonBytes(v) };
      },
    });
    return res;
  }

  /** @internal Read the given props now (at sync time). */
  _readProps(props: readonly string[]): Record<string, unknown> {
    let t: T | null;
    try {
      t = this.targetOrNull();
    } catch (e) {
      if (e instanceof NullObjectSkip) return {};
      throw e;
    }
    const out: Record<string, unknown> = {};
    if (t === null) {
      if (!this.orNull) throw err('ItemNotFound', `The requested resource doesn't exist: ${this.path}.`, this.entity);
      return out;
    }
    for (const p of props) out[p] = this.read(t, p);
    return out;
  }

  load(arg?: LoadArg): this {
    const paths = parseLoadArg(arg);
    const own: string[] = [];
    const childLoads = new Map<string, string[]>();
    if (paths.length === 0) own.push(...this.scalars);
    for (const p of paths) {
      const [head, ...rest] = p.split('/');
      if (this.scalars.includes(head)) { own.push(head); continue; }
      const child = this.nav(head);
      if (!child) throw err('InvalidArgument', `Cannot load "${p}": ${this.entity} has no property "${head}" (or the sandbox does not model it).`, `${this.entity}.load`);
      const list = childLoads.get(head) ?? [];
      if (rest.length) list.push(rest.join('/'));
      childLoads.set(head, list);
    }
    for (const [head, list] of childLoads) this.nav(head)!.load(list.length ? list : undefined);
    if (own.length) {
      const props = [...new Set(own)];
      this.context.enqueue({
        statement: `${this.path}.load(${props.join(',')})`,
        payload: props,
        run: () => {
          let data: Record<string, unknown>;
          try {
            data = this._readProps(props);
          } catch (e) {
            if (e instanceof NullObjectSkip) return { commit: () => { this._isNull = true; } };
            throw e;
          }
          return { commit: () => { Object.assign(this._data, data); }, responseBytes: jsonBytes(data) };
        },
      });
    }
    return this;
  }

  toJSON(): Record<string, unknown> {
    return { ...this._data };
  }
}

// ---------------------------------------------------------------- collections

/** A collection proxy: `items` readable after load; item proxies bound to concrete targets. */
abstract class CollectionBase<T, I extends ProxyBase<unknown>> extends ProxyBase<T> {
  private _items: I[] | undefined;
  protected abstract list(t: T): I[];
  protected abstract readonly itemScalars: readonly string[];

  get items(): I[] {
    if (this._items === undefined) throw notLoaded(this.entity, 'items');
    return this._items;
  }

  override load(arg?: LoadArg): this {
    const paths = parseLoadArg(arg).map((p) => (p.startsWith('items/') ? p.slice(6) : p)).filter((p) => p !== 'items' && p !== '$all');
    const own = paths.filter((p) => this.scalars.includes(p));
    const itemProps = paths.filter((p) => !this.scalars.includes(p));
    for (const p of itemProps) {
      if (!this.itemScalars.includes(p)) throw err('InvalidArgument', `Cannot load "${p}" on the items of ${this.entity} (not a property, or not modelled by the sandbox).`, `${this.entity}.load`);
    }
    const props = itemProps.length ? [...new Set(itemProps)] : [...this.itemScalars];
    this.context.enqueue({
      statement: `${this.path}.load(items/${props.join(',')})`,
      payload: props,
      run: () => {
        let t: T;
        try {
          t = this.target();
        } catch (e) {
          if (e instanceof NullObjectSkip) return { commit: () => { this._items = []; this._isNull = true; } };
          throw e;
        }
        const items = this.list(t);
        const datas = items.map((it) => it._readProps(props));
        const ownData: Record<string, unknown> = {};
        for (const p of own) ownData[p] = this.read(t, p);
        return {
          commit: () => {
            items.forEach((it, i) => Object.assign(it._data, datas[i]));
            this._items = items;
            Object.assign(this._data, ownData);
          },
          responseBytes: jsonBytes(datas) + jsonBytes(ownData),
        };
      },
    });
    return this;
  }

  getCount(): SandboxClientResult<number> {
    return this.callResult('getCount', null, (t) => this.list(t).length);
  }

  override toJSON(): Record<string, unknown> {
    return { ...this._data, items: (this._items ?? []).map((i) => i.toJSON()) };
  }
}

// ---------------------------------------------------------------- workbook

interface RangeTarget {
  readonly sheet: SheetModel;
  readonly rect: Rect;
}

function assertWritable(sheet: SheetModel, where: string): void {
  if (sheet.protected) {
    throw err('AccessDenied', `The cell or chart you're trying to change is on a protected sheet ("${sheet.name}"). Unprotect the sheet to make changes.`, where);
  }
}

export class WorkbookProxy extends ProxyBase<WorkbookModel> {
  protected readonly entity = 'Workbook';
  protected readonly scalars = ['name'] as const;
  readonly worksheets: WorksheetCollectionProxy;
  readonly tables: TableCollectionProxy;
  readonly settings: SettingCollectionProxy;
  readonly onSelectionChanged: SelectionEventProxy;

  constructor(ctx: SandboxContext) {
    super(ctx, 'workbook', false);
    this.worksheets = new WorksheetCollectionProxy(ctx);
    this.tables = new TableCollectionProxy(ctx, 'workbook.tables', null);
    this.settings = new SettingCollectionProxy(ctx);
    this.onSelectionChanged = new SelectionEventProxy(ctx);
  }
  protected resolveRaw(): WorkbookModel {
    return this.context.model;
  }
  protected read(_t: WorkbookModel, prop: string): unknown {
    if (prop === 'name') return this.context.sandbox.name;
    return undefined;
  }
  get name(): string {
    return this.get('name');
  }

  /** The single selected range; fails with InvalidSelection when several areas are selected (as Excel documents). */
  getSelectedRange(): RangeProxy {
    return new RangeProxy(this.context, 'workbook.getSelectedRange()', false, () => {
      const m = this.context.model;
      const sel = m.selection;
      const sheet = m.sheetById(sel.sheetId) ?? m.activeSheet();
      if (sel.areas.length !== 1) throw err('InvalidSelection', 'The current selection has multiple areas; getSelectedRange() needs a single range. Use getSelectedRanges().', 'Workbook.getSelectedRange');
      return { sheet, rect: sel.areas[0] };
    });
  }

  getSelectedRanges(): RangeAreasProxy {
    return new RangeAreasProxy(this.context, 'workbook.getSelectedRanges()', false, () => {
      const m = this.context.model;
      const sheet = m.sheetById(m.selection.sheetId) ?? m.activeSheet();
      return { sheet, rects: m.selection.areas.map((a) => ({ ...a })) };
    });
  }

  getActiveCell(): RangeProxy {
    return new RangeProxy(this.context, 'workbook.getActiveCell()', false, () => {
      const m = this.context.model;
      const sheet = m.sheetById(m.selection.sheetId) ?? m.activeSheet();
      const a = m.selection.areas[0];
      return { sheet, rect: rect(a.r0, a.c0, 1, 1) };
    });
  }
}

export class SelectionEventProxy {
  constructor(private readonly ctx: SandboxContext) {}
  add(handler: (args: { workbook: unknown; type: string }) => unknown): EventHandlerResultProxy {
    const result = new EventHandlerResultProxy(this.ctx);
    this.ctx.enqueue({
      statement: 'workbook.onSelectionChanged.add(handler)',
      payload: null,
      run: () => ({ commit: () => { result.id = this.ctx.sandbox.addSelectionListener(handler); } }),
    });
    return result;
  }
}

export class EventHandlerResultProxy {
  /** @internal */ id = -1;
  constructor(readonly context: SandboxContext) {}
  remove(): void {
    this.context.enqueue({
      statement: 'EventHandlerResult.remove()',
      payload: null,
      run: () => ({ commit: () => { this.context.sandbox.removeSelectionListener(this.id); } }),
    });
  }
}

// ---------------------------------------------------------------- worksheets

export class WorksheetCollectionProxy extends CollectionBase<WorkbookModel, WorksheetProxy> {
  protected readonly entity = 'WorksheetCollection';
  protected readonly scalars = [] as const;
  protected readonly itemScalars = WORKSHEET_SCALARS;
  constructor(ctx: SandboxContext) {
    super(ctx, 'workbook.worksheets', false);
  }
  protected resolveRaw(): WorkbookModel {
    return this.context.model;
  }
  protected read(): unknown {
    return undefined;
  }
  protected list(t: WorkbookModel): WorksheetProxy[] {
    return t.sheets.map((s) => {
      const p = new WorksheetProxy(this.context, `worksheets.getItem(${JSON.stringify(s.name)})`, false, () => s);
      p.bind(s);
      return p;
    });
  }
  getActiveWorksheet(): WorksheetProxy {
    return new WorksheetProxy(this.context, 'worksheets.getActiveWorksheet()', false, () => this.context.model.activeSheet());
  }
  getItem(key: string): WorksheetProxy {
    return new WorksheetProxy(this.context, `worksheets.getItem(${JSON.stringify(key)})`, false, () => this.find(key));
  }
  getItemOrNullObject(key: string): WorksheetProxy {
    return new WorksheetProxy(this.context, `worksheets.getItemOrNullObject(${JSON.stringify(key)})`, true, () => this.find(key));
  }
  private find(key: string): SheetModel | null {
    const m = this.context.model;
    return m.sheetByName(key) ?? m.sheetById(key) ?? null;
  }
  getFirst(): WorksheetProxy {
    return new WorksheetProxy(this.context, 'worksheets.getFirst()', false, () => this.context.model.sheets[0] ?? null);
  }
  /** Adds a sheet (named "SheetN" when no name is given); a clashing name fails with ItemAlreadyExists. */
  add(name?: string): WorksheetProxy {
    let created: SheetModel | null = null;
    const p = new WorksheetProxy(this.context, `worksheets.add(${JSON.stringify(name ?? null)})`, false, () => created);
    this.context.enqueue({
      statement: `worksheets.add(${JSON.stringify(name ?? null)})`,
      payload: name ?? null,
      run: () => {
        const m = this.context.model;
        let n = name;
        if (n === undefined || n === null) {
          let i = m.sheets.length + 1;
          while (m.sheetByName(`Sheet${i}`)) i++;
          n = `Sheet${i}`;
        }
        created = m.addSheet(n);
        p.bind(created);
        this.context.memoResets.push(() => { created = null; p.memo = undefined; });
      },
    });
    return p;
  }
}

const WORKSHEET_SCALARS = ['name', 'id', 'position', 'visibility'] as const;

export class WorksheetProxy extends ProxyBase<SheetModel> {
  protected readonly entity = 'Worksheet';
  protected readonly scalars = WORKSHEET_SCALARS;
  private _protection?: WorksheetProtectionProxy;
  private _tables?: TableCollectionProxy;

  constructor(ctx: SandboxContext, path: string, orNull: boolean, private readonly resolver: () => SheetModel | null) {
    super(ctx, path, orNull);
  }
  protected resolveRaw(): SheetModel | null {
    return this.resolver();
  }
  protected override stillValid(t: SheetModel): boolean {
    return this.context.model.sheets.includes(t);
  }
  protected read(t: SheetModel, prop: string): unknown {
    switch (prop) {
      case 'name': return t.name;
      case 'id': return t.id;
      case 'position': return this.context.model.sheets.indexOf(t);
      case 'visibility': return t.visibility;
    }
    return undefined;
  }
  protected override nav(name: string): ProxyBase<unknown> | undefined {
    if (name === 'protection') return this.protection;
    if (name === 'tables') return this.tables;
    return undefined;
  }

  get name(): string { return this.get('name'); }
  set name(v: string) {
    this.setProp('name', v, (t) => {
      const m = this.context.model;
      m.checkSheetName(v, t);
      m.touch(t);
      t.name = v;
    });
  }
  get id(): string { return this.get('id'); }
  get position(): number { return this.get('position'); }
  set position(v: number) {
    this.setProp('position', v, (t) => {
      const m = this.context.model;
      if (!Number.isInteger(v) || v < 0 || v >= m.sheets.length) throw err('InvalidArgument', `Position ${v} is outside 0..${m.sheets.length - 1}.`, 'Worksheet.position');
      const rest = m.sheets.filter((s) => s !== t);
      rest.splice(v, 0, t);
      m.sheets = rest;
    });
  }
  get visibility(): string { return this.get('visibility'); }
  set visibility(v: 'Visible' | 'Hidden' | 'VeryHidden') {
    this.setProp('visibility', v, (t) => {
      if (!['Visible', 'Hidden', 'VeryHidden'].includes(v)) throw err('InvalidArgument', `Unknown visibility "${String(v)}".`, 'Worksheet.visibility');
      const m = this.context.model;
      if (v !== 'Visible' && m.sheets.filter((s) => s.visibility === 'Visible' && s !== t).length === 0) throw err('InvalidOperation', 'At least one sheet must stay visible.', 'Worksheet.visibility');
      m.touch(t);
      t.visibility = v;
    });
  }

  get protection(): WorksheetProtectionProxy {
    return (this._protection ??= new WorksheetProtectionProxy(this.context, `${this.path}.protection`, this));
  }
  get tables(): TableCollectionProxy {
    return (this._tables ??= new TableCollectionProxy(this.context, `${this.path}.tables`, this));
  }

  /** Range by A1 address; no address = the whole sheet. An address naming another sheet fails with InvalidArgument. */
  getRange(address?: string): RangeProxy {
    return new RangeProxy(this.context, `${this.path}.getRange(${JSON.stringify(address ?? '')})`, false, () => {
      const sheet = this.target();
      if (address === undefined || address === '') return { sheet, rect: rect(0, 0, MAX_ROWS, MAX_COLS) };
      const p = parseAddress(address);
      if (!p) throw err('InvalidArgument', `"${address}" is not a valid range address (the grid ends at XFD1048576).`, 'Worksheet.getRange');
      if (p.sheet !== null && p.sheet.toLowerCase() !== sheet.name.toLowerCase()) throw err('InvalidArgument', `Address "${address}" names another sheet than "${sheet.name}".`, 'Worksheet.getRange');
      return { sheet, rect: p.rect };
    });
  }
  /** 0-based indexes; a range beyond row 1,048,576 or column XFD fails with InvalidArgument. */
  getRangeByIndexes(startRow: number, startColumn: number, rowCount: number, columnCount: number): RangeProxy {
    return new RangeProxy(this.context, `${this.path}.getRangeByIndexes(${startRow},${startColumn},${rowCount},${columnCount})`, false, () => {
      const r = rect(startRow, startColumn, rowCount, columnCount);
      if (!inGrid(r)) throw err('InvalidArgument', `getRangeByIndexes(${startRow}, ${startColumn}, ${rowCount}, ${columnCount}) is outside the grid (1,048,576 rows x 16,384 columns) or empty.`, 'Worksheet.getRangeByIndexes');
      return { sheet: this.target(), rect: r };
    });
  }
  getCell(row: number, column: number): RangeProxy {
    return this.getRangeByIndexes(row, column, 1, 1);
  }
  /** Used range; a blank sheet gives A1 (as Excel documents). */
  getUsedRange(valuesOnly?: boolean): RangeProxy {
    return new RangeProxy(this.context, `${this.path}.getUsedRange(${valuesOnly ? 'true' : ''})`, false, () => {
      const sheet = this.target();
      return { sheet, rect: this.context.model.usedRect(sheet, !!valuesOnly) ?? rect(0, 0, 1, 1) };
    });
  }
  /** Used range, or a null object on a blank sheet. */
  getUsedRangeOrNullObject(valuesOnly?: boolean): RangeProxy {
    return new RangeProxy(this.context, `${this.path}.getUsedRangeOrNullObject(${valuesOnly ? 'true' : ''})`, true, () => {
      const sheet = this.target();
      const u = this.context.model.usedRect(sheet, !!valuesOnly);
      return u ? { sheet, rect: u } : null;
    });
  }
  delete(): void {
    this.call('delete', null, (t) => this.context.model.deleteSheet(t));
  }
  activate(): void {
    this.call('activate', null, (t) => {
      const m = this.context.model;
      if (t.visibility !== 'Visible') throw err('InvalidOperation', `Sheet "${t.name}" is hidden and cannot be activated.`, 'Worksheet.activate');
      if (m.activeSheetId !== t.id) {
        m.activeSheetId = t.id;
        m.selection = { sheetId: t.id, areas: [rect(0, 0, 1, 1)] };
      }
    });
  }
}

export class WorksheetProtectionProxy extends ProxyBase<SheetModel> {
  protected readonly entity = 'WorksheetProtection';
  protected readonly scalars = ['protected'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly ws: WorksheetProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw(): SheetModel {
    return this.ws.target();
  }
  protected read(t: SheetModel, prop: string): unknown {
    return prop === 'protected' ? t.protected : undefined;
  }
  get protected(): boolean { return this.get('protected'); }
  /** Protects the sheet. The sandbox then rejects every cell, format, rule, validation and table write on it with AccessDenied (Excel lets options allow some; not modelled). */
  protect(_options?: unknown, password?: string): void {
    this.call('protect', { password: password ? '***' : null }, (t) => {
      if (t.protected) throw err('InvalidOperation', `Sheet "${t.name}" is already protected.`, 'WorksheetProtection.protect');
      this.context.model.touch(t);
      t.protected = true;
      this.context.sandbox.passwords.set(t.id, password ?? '');
    });
  }
  unprotect(password?: string): void {
    this.call('unprotect', null, (t) => {
      const pw = this.context.sandbox.passwords.get(t.id) ?? '';
      if (t.protected && pw !== '' && pw !== password) throw err('InvalidArgument', 'The password is incorrect.', 'WorksheetProtection.unprotect');
      this.context.model.touch(t);
      t.protected = false;
    });
  }
}

// ---------------------------------------------------------------- ranges

const RANGE_SCALARS = [
  'address', 'addressLocal', 'values', 'valueTypes', 'formulas', 'formulasLocal', 'numberFormat', 'numberFormatLocal', 'text',
  'rowIndex', 'columnIndex', 'rowCount', 'columnCount', 'cellCount', 'isEntireColumn', 'isEntireRow',
] as const;

type Grid = unknown[][];

function isGrid(x: unknown): x is Grid {
  return Array.isArray(x) && x.every((row) => Array.isArray(row));
}

/** Shape check: a 2-D array must match the range exactly; a non-array scalar is broadcast to every cell (Excel accepts that at run time, though @types/office-js types it as any[][]). */
function cellInput(input: unknown, r: Rect, where: string): (i: number, j: number) => unknown {
  if (Array.isArray(input)) {
    if (!isGrid(input)) throw err('InvalidArgument', `${where}: expected a 2-D array (array of rows).`, where);
    if (input.length !== r.rows || input.some((row) => row.length !== r.cols)) {
      const got = `${input.length} x ${input[0]?.length ?? 0}`;
      throw err('InvalidArgument', `${where}: the array is ${got} but the range ${formatRect(r)} is ${r.rows} x ${r.cols}. The number of rows or columns in the input array doesn't match the size or dimensions of the range.`, where);
    }
    return (i, j) => input[i][j];
  }
  return () => input;
}

function formatText(v: unknown, nf: string | undefined): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') {
    if (!nf || nf === 'General') return generalText(v);
    if (nf === '@') return generalText(v);
    if (isDateFormat(nf)) return serialToIso(v);
    const pct = nf.endsWith('%');
    const core = pct ? nf.slice(0, -1) : nf;
    const dec = (core.split('.')[1] ?? '').replace(/[^0#]/g, '').length;
    const x = pct ? v * 100 : v;
    let s = Math.abs(x).toFixed(dec);
    if (core.includes(',')) {
      const [ip, fp] = s.split('.');
      s = ip.replace(/\B(?=(\d{3})+(?!\d))/g, ',') + (fp !== undefined ? '.' + fp : '');
    }
    return (x < 0 ? '-' : '') + s + (pct ? '%' : '');
  }
  if (typeof v === 'boolean') return v ? 'TRUE' : 'FALSE';
  return String(v);
}

export class RangeProxy extends ProxyBase<RangeTarget> {
  protected readonly entity = 'Range';
  protected readonly scalars = RANGE_SCALARS;
  private _format?: RangeFormatProxy;
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
  protected override nav(name: string): ProxyBase<unknown> | undefined {
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
    return new WorksheetProxy(this.context, `${this.path}.worksheet`, false, () => this.target().sheet);
  }
  get format(): RangeFormatProxy {
    return (this._format ??= new RangeFormatProxy(this.context, `${this.path}.format`, this));
  }
  get conditionalFormats(): ConditionalFormatCollectionProxy {
    return (this._cfs ??= new ConditionalFormatCollectionProxy(this.context, `${this.path}.conditionalFormats`, this));
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
  /** Selects the range (and activates its sheet); selection-changed listeners fire after the run. */
  select(): void {
    this.call('select', null, (t) => {
      const m = this.context.model;
      if (t.sheet.visibility !== 'Visible') throw err('InvalidOperation', `Cannot select on hidden sheet "${t.sheet.name}".`, 'Range.select');
      m.activeSheetId = t.sheet.id;
      m.selection = { sheetId: t.sheet.id, areas: [{ ...t.rect }] };
    });
  }
  getTables(fullyContained?: boolean): TableCollectionProxy {
    return new TableCollectionProxy(this.context, `${this.path}.getTables(${fullyContained ? 'true' : ''})`, null, this, !!fullyContained);
  }
}

export class RangeAreasProxy extends ProxyBase<{ sheet: SheetModel; rects: Rect[] }> {
  protected readonly entity = 'RangeAreas';
  protected readonly scalars = ['address', 'addressLocal', 'areaCount', 'cellCount'] as const;
  private _areas?: RangeCollectionProxy;
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
  protected override nav(name: string): ProxyBase<unknown> | undefined {
    return name === 'areas' ? this.areas : undefined;
  }
  get address(): string { return this.get('address'); }
  get areaCount(): number { return this.get('areaCount'); }
  get cellCount(): number { return this.get('cellCount'); }
  get areas(): RangeCollectionProxy {
    return (this._areas ??= new RangeCollectionProxy(this.context, `${this.path}.areas`, this));
  }
  get worksheet(): WorksheetProxy {
    return new WorksheetProxy(this.context, `${this.path}.worksheet`, false, () => this.target().sheet);
  }
}

export class RangeCollectionProxy extends CollectionBase<{ sheet: SheetModel; rects: Rect[] }, RangeProxy> {
  protected readonly entity = 'RangeCollection';
  protected readonly scalars = [] as const;
  protected readonly itemScalars = RANGE_SCALARS;
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
  override load(arg?: LoadArg): this {
    // Range items default to address only, to keep responses small.
    return super.load(arg ?? 'address');
  }
}

// ---------------------------------------------------------------- formats

/**
 * The common value of a cell attribute over a range, or null when cells differ. Rows beyond the
 * longest stored array all hold the default, so whole-column ranges cost O(stored rows).
 */
function uniform<V>(t: RangeTarget, attr: Attr, dflt: V): V | null {
  let first: V | undefined;
  let set = false;
  for (let j = 0; j < t.rect.cols; j++) {
    const arr = t.sheet.cols[t.rect.c0 + j]?.[attr] as unknown[] | undefined;
    const stored = arr ? Math.min(arr.length, t.rect.r0 + t.rect.rows) : t.rect.r0;
    for (let r = t.rect.r0; r < stored; r++) {
      const v = ((arr as unknown[])[r] ?? dflt) as V;
      if (!set) { first = v; set = true; } else if (v !== first) return null;
    }
    if (stored < t.rect.r0 + t.rect.rows) {
      if (!set) { first = dflt; set = true; } else if (dflt !== first) return null;
    }
  }
  return first === undefined ? null : first;
}

export class RangeFormatProxy extends ProxyBase<RangeTarget> {
  protected readonly entity = 'RangeFormat';
  protected readonly scalars = ['columnWidth', 'rowHeight', 'wrapText'] as const;
  readonly fill: RangeFillProxy;
  readonly font: RangeFontProxy;
  constructor(ctx: SandboxContext, path: string, private readonly range: RangeProxy) {
    super(ctx, path, false);
    this.fill = new RangeFillProxy(ctx, `${path}.fill`, range);
    this.font = new RangeFontProxy(ctx, `${path}.font`, range);
  }
  protected resolveRaw() {
    return this.range.target();
  }
  protected override nav(name: string): ProxyBase<unknown> | undefined {
    return name === 'fill' ? this.fill : name === 'font' ? this.font : undefined;
  }
  protected read(t: RangeTarget, prop: string): unknown {
    switch (prop) {
      case 'columnWidth': {
        let w: number | null = null;
        for (let j = 0; j < t.rect.cols; j++) {
          const x = t.sheet.widths.get(t.rect.c0 + j) ?? DEFAULT_COLUMN_WIDTH;
          if (j === 0) w = x; else if (x !== w) return null;
        }
        return w;
      }
      case 'rowHeight': return 15;
      case 'wrapText': return uniform(t, 'wrap', false);
    }
    return undefined;
  }
  get columnWidth(): number { return this.get('columnWidth'); }
  /** Width in points (Excel's unit for this property). */
  set columnWidth(v: number) {
    this.setProp('columnWidth', v, (t) => {
      assertWritable(t.sheet, 'RangeFormat.columnWidth');
      if (typeof v !== 'number' || !(v >= 0) || v > 255 * 7.5) throw err('InvalidArgument', `columnWidth ${v} is not a valid width in points.`, 'RangeFormat.columnWidth');
      this.context.model.touch(t.sheet);
      for (let j = 0; j < t.rect.cols; j++) t.sheet.widths.set(t.rect.c0 + j, v);
    });
  }
  get rowHeight(): number { return this.get('rowHeight'); }
  get wrapText(): boolean { return this.get('wrapText'); }
  set wrapText(v: boolean) {
    this.setProp('wrapText', v, (t) => {
      assertWritable(t.sheet, 'RangeFormat.wrapText');
      eachCell(t, (r, c) => this.context.model.setAttr(t.sheet, r, c, 'wrap', v ? true : undefined));
    });
  }
  /**
   * Sets column widths from the longest displayed text in each column of the range (sandbox
   * approximation: 7 points per character + 5, at least 12; Excel measures the rendered font).
   */
  autofitColumns(): void {
    this.call('autofitColumns', null, (t) => {
      assertWritable(t.sheet, 'RangeFormat.autofitColumns');
      const m = this.context.model;
      const used = m.usedRect(t.sheet, true);
      m.touch(t.sheet);
      for (let j = 0; j < t.rect.cols; j++) {
        const c = t.rect.c0 + j;
        let longest = 0;
        if (used) {
          const r0 = Math.max(t.rect.r0, used.r0);
          const r1 = Math.min(t.rect.r0 + t.rect.rows, used.r0 + used.rows);
          for (let r = r0; r < r1; r++) {
            const v = m.readValue(t.sheet, r, c);
            if (v === null) continue;
            const s = formatText(v instanceof CellError ? v.code : v, m.getAttr(t.sheet, r, c, 'nf'));
            if (s.length > longest) longest = s.length;
          }
        }
        if (longest > 0) t.sheet.widths.set(c, Math.max(12, longest * 7 + 5));
      }
    });
  }
  autofitRows(): void {
    this.call('autofitRows', null, () => undefined);
  }
}

function eachCell(t: RangeTarget, f: (row: number, col: number) => void): void {
  for (let j = 0; j < t.rect.cols; j++) for (let i = 0; i < t.rect.rows; i++) f(t.rect.r0 + i, t.rect.c0 + j);
}

export class RangeFillProxy extends ProxyBase<RangeTarget> {
  protected readonly entity = 'RangeFill';
  protected readonly scalars = ['color'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly range: RangeProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.range.target();
  }
  /** Uniform fill as "#RRGGBB"; "#FFFFFF" for no fill (as Excel reports); null when mixed. */
  protected read(t: RangeTarget, prop: string): unknown {
    if (prop !== 'color') return undefined;
    return uniform(t, 'fill', '#FFFFFF');
  }
  get color(): string { return this.get('color'); }
  set color(v: string) {
    this.setProp('color', v, (t) => {
      assertWritable(t.sheet, 'RangeFill.color');
      const c = normaliseColour(v, 'RangeFill.color');
      eachCell(t, (r, col) => this.context.model.setAttr(t.sheet, r, col, 'fill', c));
    });
  }
  clear(): void {
    this.call('clear', null, (t) => {
      assertWritable(t.sheet, 'RangeFill.clear');
      eachCell(t, (r, c) => this.context.model.setAttr(t.sheet, r, c, 'fill', undefined));
    });
  }
}

export class RangeFontProxy extends ProxyBase<RangeTarget> {
  protected readonly entity = 'RangeFont';
  protected readonly scalars = ['color', 'bold'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly range: RangeProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.range.target();
  }
  protected read(t: RangeTarget, prop: string): unknown {
    if (prop === 'color') return uniform(t, 'font', '#000000');
    if (prop === 'bold') return uniform(t, 'bold', false);
    return undefined;
  }
  get color(): string { return this.get('color'); }
  set color(v: string) {
    this.setProp('color', v, (t) => {
      assertWritable(t.sheet, 'RangeFont.color');
      const c = normaliseColour(v, 'RangeFont.color');
      eachCell(t, (r, col) => this.context.model.setAttr(t.sheet, r, col, 'font', c));
    });
  }
  get bold(): boolean { return this.get('bold'); }
  set bold(v: boolean) {
    this.setProp('bold', v, (t) => {
      assertWritable(t.sheet, 'RangeFont.bold');
      eachCell(t, (r, c) => this.context.model.setAttr(t.sheet, r, c, 'bold', v ? true : undefined));
    });
  }
}

// ---------------------------------------------------------------- conditional formats

interface CfTarget {
  readonly sheet: SheetModel;
  readonly id: string;
}

function findCf(t: CfTarget): ConditionalFormatModel {
  const cf = t.sheet.cfs.find((c) => c.id === t.id);
  if (!cf) throw err('ItemNotFound', 'The conditional format no longer exists.', 'ConditionalFormat');
  return cf;
}

function mutateCf(ctx: SandboxContext, t: CfTarget, f: (cf: ConditionalFormatModel) => void): void {
  assertWritable(t.sheet, 'ConditionalFormat');
  ctx.model.touch(t.sheet);
  f(findCf(t));
}

export class ConditionalFormatCollectionProxy extends CollectionBase<RangeTarget, ConditionalFormatProxy> {
  protected readonly entity = 'ConditionalFormatCollection';
  protected readonly scalars = [] as const;
  protected readonly itemScalars = ['id', 'type', 'priority', 'stopIfTrue'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly range: RangeProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.range.target();
  }
  protected read(): unknown {
    return undefined;
  }
  /** Rules whose ranges intersect this range, in priority order. */
  protected list(t: RangeTarget): ConditionalFormatProxy[] {
    return t.sheet.cfs
      .filter((cf) => cf.rects.some((r) => intersect(r, t.rect)))
      .map((cf) => {
        const p = new ConditionalFormatProxy(this.context, `${this.path}.getItem(${JSON.stringify(cf.id)})`, false, () => ({ sheet: t.sheet, id: cf.id }));
        p.bind({ sheet: t.sheet, id: cf.id });
        return p;
      });
  }
  /** Only "Custom" is modelled; other types fail with NotImplemented. The new rule gets priority 0 (evaluated first), as in Excel. */
  add(type: string): ConditionalFormatProxy {
    let created: CfTarget | null = null;
    const p = new ConditionalFormatProxy(this.context, `${this.path}.add(${JSON.stringify(type)})`, false, () => created);
    this.context.enqueue({
      statement: `${this.path}.add(${JSON.stringify(type)})`,
      payload: type,
      run: () => {
        const t = this.range.target();
        assertWritable(t.sheet, 'ConditionalFormatCollection.add');
        if (type !== 'Custom') throw err('NotImplemented', `Conditional format type "${type}" is not modelled by the sandbox (only "Custom").`, 'ConditionalFormatCollection.add');
        const m = this.context.model;
        m.touch(t.sheet);
        const cf: ConditionalFormatModel = {
          id: m.newId('cf'), type: 'Custom', rects: [{ ...t.rect }], anchor: { row: t.rect.r0, col: t.rect.c0 },
          formula: '', fill: null, font: null, bold: null, stopIfTrue: false,
        };
        t.sheet.cfs.unshift(cf);
        created = { sheet: t.sheet, id: cf.id };
        p.bind(created);
      },
    });
    return p;
  }
  getItem(id: string): ConditionalFormatProxy {
    return new ConditionalFormatProxy(this.context, `${this.path}.getItem(${JSON.stringify(id)})`, false, () => {
      const t = this.range.target();
      return t.sheet.cfs.some((c) => c.id === id) ? { sheet: t.sheet, id } : null;
    });
  }
  getItemAt(index: number): ConditionalFormatProxy {
    return new ConditionalFormatProxy(this.context, `${this.path}.getItemAt(${index})`, false, () => {
      const items = this.list(this.range.target());
      return items[index]?.memo ?? null;
    });
  }
  /** Deletes every rule intersecting the range (Excel's clearAll). Tailmark must not call it on user ranges. */
  clearAll(): void {
    this.call('clearAll', null, (t) => {
      assertWritable(t.sheet, 'ConditionalFormatCollection.clearAll');
      this.context.model.touch(t.sheet);
      t.sheet.cfs = t.sheet.cfs.filter((cf) => !cf.rects.some((r) => intersect(r, t.rect)));
    });
  }
}

export class ConditionalFormatProxy extends ProxyBase<CfTarget> {
  protected readonly entity = 'ConditionalFormat';
  protected readonly scalars = ['id', 'type', 'priority', 'stopIfTrue'] as const;
  readonly custom: CustomConditionalFormatProxy;
  constructor(ctx: SandboxContext, path: string, orNull: boolean, private readonly resolver: () => CfTarget | null) {
    super(ctx, path, orNull);
    this.custom = new CustomConditionalFormatProxy(ctx, `${path}.custom`, this);
  }
  protected resolveRaw() {
    return this.resolver();
  }
  protected override stillValid(t: CfTarget): boolean {
    return t.sheet.cfs.some((c) => c.id === t.id);
  }
  protected override nav(name: string): ProxyBase<unknown> | undefined {
    return name === 'custom' ? this.custom : undefined;
  }
  protected read(t: CfTarget, prop: string): unknown {
    const cf = findCf(t);
    switch (prop) {
      case 'id': return cf.id;
      case 'type': return cf.type;
      case 'priority': return t.sheet.cfs.indexOf(cf);
      case 'stopIfTrue': return cf.stopIfTrue;
    }
    return undefined;
  }
  get id(): string { return this.get('id'); }
  get type(): string { return this.get('type'); }
  get priority(): number { return this.get('priority'); }
  /** Moves the rule to that position in the sheet's priority order (0 = evaluated first). */
  set priority(v: number) {
    this.setProp('priority', v, (t) => mutateCf(this.context, t, (cf) => {
      if (!Number.isInteger(v) || v < 0) throw err('InvalidArgument', `priority must be a non-negative integer (got ${v}).`, 'ConditionalFormat.priority');
      const rest = t.sheet.cfs.filter((c) => c !== cf);
      rest.splice(Math.min(v, rest.length), 0, cf);
      t.sheet.cfs = rest;
    }));
  }
  get stopIfTrue(): boolean { return this.get('stopIfTrue'); }
  set stopIfTrue(v: boolean) {
    this.setProp('stopIfTrue', v, (t) => mutateCf(this.context, t, (cf) => { cf.stopIfTrue = !!v; }));
  }
  /** The rule's range; InvalidOperation when it has several areas (use getRanges). */
  getRange(): RangeProxy {
    return new RangeProxy(this.context, `${this.path}.getRange()`, false, () => {
      const t = this.target();
      const cf = findCf(t);
      if (cf.rects.length !== 1) throw err('InvalidOperation', 'The conditional format applies to several areas; use getRanges().', 'ConditionalFormat.getRange');
      return { sheet: t.sheet, rect: cf.rects[0] };
    });
  }
  getRangeOrNullObject(): RangeProxy {
    return new RangeProxy(this.context, `${this.path}.getRangeOrNullObject()`, true, () => {
      const t = this.targetOrNull();
      if (!t) return null;
      const cf = t.sheet.cfs.find((c) => c.id === t.id);
      return cf && cf.rects.length === 1 ? { sheet: t.sheet, rect: cf.rects[0] } : null;
    });
  }
  getRanges(): RangeAreasProxy {
    return new RangeAreasProxy(this.context, `${this.path}.getRanges()`, false, () => {
      const t = this.target();
      return { sheet: t.sheet, rects: findCf(t).rects.map((r) => ({ ...r })) };
    });
  }
  delete(): void {
    this.call('delete', null, (t) => {
      assertWritable(t.sheet, 'ConditionalFormat.delete');
      findCf(t);
      this.context.model.touch(t.sheet);
      t.sheet.cfs = t.sheet.cfs.filter((c) => c.id !== t.id);
    });
  }
}

export class CustomConditionalFormatProxy extends ProxyBase<CfTarget> {
  protected readonly entity = 'CustomConditionalFormat';
  protected readonly scalars = [] as const;
  readonly rule: ConditionalFormatRuleProxy;
  readonly format: ConditionalRangeFormatProxy;
  constructor(ctx: SandboxContext, path: string, readonly owner: ConditionalFormatProxy) {
    super(ctx, path, false);
    this.rule = new ConditionalFormatRuleProxy(ctx, `${path}.rule`, owner);
    this.format = new ConditionalRangeFormatProxy(ctx, `${path}.format`, owner);
  }
  protected resolveRaw() {
    return this.owner.target();
  }
  protected read(): unknown {
    return undefined;
  }
  protected override nav(name: string): ProxyBase<unknown> | undefined {
    return name === 'rule' ? this.rule : name === 'format' ? this.format : undefined;
  }
}

export class ConditionalFormatRuleProxy extends ProxyBase<CfTarget> {
  protected readonly entity = 'ConditionalFormatRule';
  protected readonly scalars = ['formula', 'formulaLocal'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly owner: ConditionalFormatProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.owner.target();
  }
  protected read(t: CfTarget, prop: string): unknown {
    return prop === 'formula' || prop === 'formulaLocal' ? findCf(t).formula : undefined;
  }
  get formula(): string { return this.get('formula'); }
  /** The rule formula, relative references written against the top-left cell of the rule's range. */
  set formula(v: string) {
    this.setProp('formula', v, (t) => mutateCf(this.context, t, (cf) => {
      if (typeof v !== 'string' || v.length === 0) throw err('InvalidArgument', 'A conditional format rule formula must be a non-empty string.', 'ConditionalFormatRule.formula');
      cf.formula = v.startsWith('=') ? v : `=${v}`;
    }));
  }
  get formulaLocal(): string { return this.get('formulaLocal'); }
  set formulaLocal(v: string) { this.formula = v; }
}

export class ConditionalRangeFormatProxy extends ProxyBase<CfTarget> {
  protected readonly entity = 'ConditionalRangeFormat';
  protected readonly scalars = [] as const;
  readonly fill: CfFillProxy;
  readonly font: CfFontProxy;
  constructor(ctx: SandboxContext, path: string, private readonly owner: ConditionalFormatProxy) {
    super(ctx, path, false);
    this.fill = new CfFillProxy(ctx, `${path}.fill`, owner);
    this.font = new CfFontProxy(ctx, `${path}.font`, owner);
  }
  protected resolveRaw() {
    return this.owner.target();
  }
  protected read(): unknown {
    return undefined;
  }
  protected override nav(name: string): ProxyBase<unknown> | undefined {
    return name === 'fill' ? this.fill : name === 'font' ? this.font : undefined;
  }
}

export class CfFillProxy extends ProxyBase<CfTarget> {
  protected readonly entity = 'ConditionalRangeFill';
  protected readonly scalars = ['color'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly owner: ConditionalFormatProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.owner.target();
  }
  protected read(t: CfTarget, prop: string): unknown {
    return prop === 'color' ? findCf(t).fill : undefined;
  }
  get color(): string { return this.get('color'); }
  set color(v: string) {
    this.setProp('color', v, (t) => mutateCf(this.context, t, (cf) => { cf.fill = normaliseColour(v, 'ConditionalRangeFill.color'); }));
  }
  clear(): void {
    this.call('clear', null, (t) => mutateCf(this.context, t, (cf) => { cf.fill = null; }));
  }
}

export class CfFontProxy extends ProxyBase<CfTarget> {
  protected readonly entity = 'ConditionalRangeFont';
  protected readonly scalars = ['color', 'bold'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly owner: ConditionalFormatProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.owner.target();
  }
  protected read(t: CfTarget, prop: string): unknown {
    const cf = findCf(t);
    return prop === 'color' ? cf.font : prop === 'bold' ? cf.bold : undefined;
  }
  get color(): string { return this.get('color'); }
  set color(v: string) {
    this.setProp('color', v, (t) => mutateCf(this.context, t, (cf) => { cf.font = normaliseColour(v, 'ConditionalRangeFont.color'); }));
  }
  get bold(): boolean { return this.get('bold'); }
  set bold(v: boolean) {
    this.setProp('bold', v, (t) => mutateCf(this.context, t, (cf) => { cf.bold = !!v; }));
  }
  clear(): void {
    this.call('clear', null, (t) => mutateCf(this.context, t, (cf) => { cf.font = null; cf.bold = null; }));
  }
}

// ---------------------------------------------------------------- data validation

export class DataValidationProxy extends ProxyBase<RangeTarget> {
  protected readonly entity = 'DataValidation';
  protected readonly scalars = ['type', 'rule', 'ignoreBlanks'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly range: RangeProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.range.target();
  }
  /** "None" when no cell has a rule; "List" when one list rule covers every cell; "Inconsistent" otherwise (rule then reads {}). */
  protected read(t: RangeTarget, prop: string): unknown {
    const m = this.context.model;
    const vs = m.validationsIn(t.sheet, t.rect);
    const single = vs.length === 1 && coversRect(vs[0].rects, t.rect) ? vs[0] : null;
    switch (prop) {
      case 'type': return vs.length === 0 ? 'None' : single ? 'List' : 'Inconsistent';
      case 'rule': return single ? { list: { ...single.rule.list } } : {};
      case 'ignoreBlanks': return single ? single.ignoreBlanks : true;
    }
    return undefined;
  }
  get type(): string { return this.get('type'); }
  get rule(): { list?: { source: string; inCellDropDown: boolean } } { return this.get('rule'); }
  /**
   * Only list rules are modelled: { list: { source: "A,B,C" | "=$A$1:$A$3", inCellDropDown?: boolean } }.
   * Setting a rule replaces any validation on those cells (the sandbox does not require clear() first).
   */
  set rule(v: { list?: { source: unknown; inCellDropDown?: boolean } }) {
    this.setProp('rule', v, (t) => {
      assertWritable(t.sheet, 'DataValidation.rule');
      const keys = v && typeof v === 'object' ? Object.keys(v).filter((k) => (v as Record<string, unknown>)[k] !== undefined) : [];
      if (keys.length !== 1 || keys[0] !== 'list') throw err('NotImplemented', `The sandbox models only list validation rules (got ${JSON.stringify(keys)}).`, 'DataValidation.rule');
      const src = v.list!.source;
      if (typeof src !== 'string' || src.length === 0) throw err('InvalidArgument', 'A list validation needs a non-empty source string.', 'DataValidation.rule');
      this.context.model.setValidation(t.sheet, t.rect, { list: { source: src, inCellDropDown: v.list!.inCellDropDown ?? true } }, true);
    });
  }
  get ignoreBlanks(): boolean { return this.get('ignoreBlanks'); }
  set ignoreBlanks(v: boolean) {
    this.setProp('ignoreBlanks', v, (t) => {
      assertWritable(t.sheet, 'DataValidation.ignoreBlanks');
      const m = this.context.model;
      m.touch(t.sheet);
      for (const x of m.validationsIn(t.sheet, t.rect)) x.ignoreBlanks = !!v;
    });
  }
  clear(): void {
    this.call('clear', null, (t) => {
      assertWritable(t.sheet, 'DataValidation.clear');
      this.context.model.clearValidation(t.sheet, t.rect);
    });
  }
}

function coversRect(rects: Rect[], r: Rect): boolean {
  if (rects.some((x) => contains(x, r))) return true;
  let area = 0;
  for (const x of rects) {
    const i = intersect(x, r);
    if (i) area += i.rows * i.cols;
  }
  return area === r.rows * r.cols; // validation rects are kept disjoint
}

// ---------------------------------------------------------------- tables

interface TableTarget {
  readonly sheet: SheetModel;
  readonly id: string;
}

function findTable(m: WorkbookModel, id: string): { sheet: SheetModel; table: TableModel } | null {
  for (const sheet of m.sheets) {
    const table = sheet.tables.find((t) => t.id === id);
    if (table) return { sheet, table };
  }
  return null;
}

function tableNameOk(m: WorkbookModel, name: string, exceptId?: string): void {
  if (!/^[A-Za-z_\\][A-Za-z0-9_.\\]*$/.test(name) || name.length > 255 || /^[A-Za-z]{1,3}[0-9]+$/.test(name) || /^[RrCc]$/.test(name)) {
    throw err('InvalidArgument', `"${name}" is not a valid table name (start with a letter or _, no spaces, not a cell address).`, 'Table.name');
  }
  for (const s of m.sheets) for (const t of s.tables) {
    if (t.id !== exceptId && t.name.toLowerCase() === name.toLowerCase()) throw err('ItemAlreadyExists', `A table named "${name}" already exists.`, 'Table.name');
  }
}

export class TableCollectionProxy extends CollectionBase<WorkbookModel, TableProxy> {
  protected readonly entity = 'TableCollection';
  protected readonly scalars = ['count'] as const;
  protected readonly itemScalars = ['id', 'name', 'showHeaders', 'showTotals'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly ws: WorksheetProxy | null, private readonly inRange?: RangeProxy, private readonly fully = false) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.context.model;
  }
  protected read(t: WorkbookModel, prop: string): unknown {
    return prop === 'count' ? this.list(t).length : undefined;
  }
  get count(): number { return this.get('count'); }
  private all(m: WorkbookModel): { sheet: SheetModel; table: TableModel }[] {
    let sheets = m.sheets;
    let within: RangeTarget | null = null;
    if (this.inRange) { within = this.inRange.target(); sheets = [within.sheet]; }
    else if (this.ws) sheets = [this.ws.target()];
    const out: { sheet: SheetModel; table: TableModel }[] = [];
    for (const sheet of sheets) for (const table of sheet.tables) {
      if (within && !(this.fully ? contains(within.rect, table.rect) : intersect(within.rect, table.rect))) continue;
      out.push({ sheet, table });
    }
    return out;
  }
  protected list(m: WorkbookModel): TableProxy[] {
    return this.all(m).map(({ sheet, table }) => {
      const p = new TableProxy(this.context, `tables.getItem(${JSON.stringify(table.name)})`, false, () => ({ sheet, id: table.id }));
      p.bind({ sheet, id: table.id });
      return p;
    });
  }
  getItem(key: string): TableProxy {
    return new TableProxy(this.context, `${this.path}.getItem(${JSON.stringify(key)})`, false, () => this.find(key));
  }
  getItemOrNullObject(key: string): TableProxy {
    return new TableProxy(this.context, `${this.path}.getItemOrNullObject(${JSON.stringify(key)})`, true, () => this.find(key));
  }
  getItemAt(index: number): TableProxy {
    return new TableProxy(this.context, `${this.path}.getItemAt(${index})`, false, () => {
      const x = this.all(this.context.model)[index];
      return x ? { sheet: x.sheet, id: x.table.id } : null;
    });
  }
  getFirst(): TableProxy {
    return this.getItemAt(0);
  }
  private find(key: string): TableTarget | null {
    const x = this.all(this.context.model).find(({ table }) => table.name.toLowerCase() === key.toLowerCase() || table.id === key);
    return x ? { sheet: x.sheet, id: x.table.id } : null;
  }
  /**
   * Creates a table over `address` (string, optionally sheet-qualified, or a Range). With
   * hasHeaders false, Excel generates headers "Column1".. and shifts the data down one row (as the
   * docs say); a header-only range gets one empty data row. Overlapping another table fails with InvalidOperation.
   */
  add(address: string | RangeProxy, hasHeaders: boolean): TableProxy {
    let created: TableTarget | null = null;
    const p = new TableProxy(this.context, `${this.path}.add(...)`, false, () => created);
    this.context.enqueue({
      statement: `${this.path}.add(${typeof address === 'string' ? JSON.stringify(address) : address.path}, ${hasHeaders})`,
      payload: typeof address === 'string' ? address : null,
      run: () => {
        const m = this.context.model;
        let sheet: SheetModel;
        let r: Rect;
        if (typeof address === 'string') {
          const pa = parseAddress(address);
          if (!pa) throw err('InvalidArgument', `"${address}" is not a valid range address.`, 'TableCollection.add');
          const named = pa.sheet !== null ? m.sheetByName(pa.sheet) : undefined;
          if (pa.sheet !== null && !named) throw err('ItemNotFound', `Sheet "${pa.sheet}" does not exist.`, 'TableCollection.add');
          sheet = named ?? (this.ws ? this.ws.target() : m.activeSheet());
          r = pa.rect;
        } else {
          const t = address.target();
          sheet = t.sheet;
          r = t.rect;
        }
        assertWritable(sheet, 'TableCollection.add');
        if (r.rows === MAX_ROWS || r.cols === MAX_COLS) throw err('InvalidArgument', 'A table cannot span an entire row or column.', 'TableCollection.add');
        for (const s of m.sheets) for (const x of s.tables) {
          if (s === sheet && intersect(x.rect, r)) throw err('InvalidOperation', `A table can't overlap another table ("${x.name}").`, 'TableCollection.add');
        }
        m.touch(sheet);
        let tr = r;
        if (!hasHeaders) {
          m.insert(sheet, rect(r.r0, r.c0, 1, r.cols), 'Down');
          for (let j = 0; j < r.cols; j++) m.applyWrite(sheet, r.r0, r.c0 + j, { v: `Column${j + 1}`, f: undefined, qp: undefined });
          tr = rect(r.r0, r.c0, r.rows + 1, r.cols);
        } else {
          // Header cells must be distinct non-empty text: Excel fills blanks and renames duplicates.
          const seen = new Set<string>();
          for (let j = 0; j < r.cols; j++) {
            const v = m.readValue(sheet, r.r0, r.c0 + j);
            let name = v === null ? '' : generalText(v instanceof CellError ? v.code : v);
            if (name === '') name = `Column${j + 1}`;
            let unique = name;
            for (let k = 2; seen.has(unique.toLowerCase()); k++) unique = `${name}${k}`;
            seen.add(unique.toLowerCase());
            if (v === null || unique !== name || typeof v !== 'string') m.applyWrite(sheet, r.r0, r.c0 + j, { v: unique, f: undefined, qp: undefined });
          }
          if (r.rows === 1) tr = rect(r.r0, r.c0, 2, r.cols);
        }
        let i = 1;
        const names = new Set(m.sheets.flatMap((s) => s.tables.map((x) => x.name.toLowerCase())));
        while (names.has(`table${i}`)) i++;
        const table: TableModel = { id: m.newId('table'), name: `Table${i}`, rect: tr, showHeaders: true };
        sheet.tables.push(table);
        created = { sheet, id: table.id };
        p.bind(created);
      },
    });
    return p;
  }
}

export class TableProxy extends ProxyBase<TableTarget> {
  protected readonly entity = 'Table';
  protected readonly scalars = ['id', 'name', 'showHeaders', 'showTotals'] as const;
  readonly columns: TableColumnCollectionProxy;
  readonly rows: TableRowCollectionProxy;
  constructor(ctx: SandboxContext, path: string, orNull: boolean, private readonly resolver: () => TableTarget | null) {
    super(ctx, path, orNull);
    this.columns = new TableColumnCollectionProxy(ctx, `${path}.columns`, this);
    this.rows = new TableRowCollectionProxy(ctx, `${path}.rows`, this);
  }
  protected resolveRaw() {
    return this.resolver();
  }
  protected override stillValid(t: TableTarget): boolean {
    return findTable(this.context.model, t.id) !== null;
  }
  protected override nav(name: string): ProxyBase<unknown> | undefined {
    if (name === 'columns') return this.columns;
    if (name === 'rows') return this.rows;
    if (name === 'worksheet') return this.worksheet;
    return undefined;
  }
  /** @internal */
  model(): { sheet: SheetModel; table: TableModel } {
    const t = this.target();
    const x = findTable(this.context.model, t.id);
    if (!x) throw err('ItemNotFound', 'The table no longer exists.', 'Table');
    return x;
  }
  protected read(t: TableTarget, prop: string): unknown {
    const x = findTable(this.context.model, t.id);
    if (!x) throw err('ItemNotFound', 'The table no longer exists.', 'Table');
    switch (prop) {
      case 'id': return x.table.id;
      case 'name': return x.table.name;
      case 'showHeaders': return x.table.showHeaders;
      case 'showTotals': return false;
    }
    return undefined;
  }
  get id(): string { return this.get('id'); }
  get name(): string { return this.get('name'); }
  set name(v: string) {
    this.setProp('name', v, () => {
      const x = this.model();
      tableNameOk(this.context.model, v, x.table.id);
      this.context.model.touch(x.sheet);
      x.table.name = v;
    });
  }
  get showHeaders(): boolean { return this.get('showHeaders'); }
  get showTotals(): boolean { return this.get('showTotals'); }
  get worksheet(): WorksheetProxy {
    return new WorksheetProxy(this.context, `${this.path}.worksheet`, false, () => this.model().sheet);
  }
  private part(name: string, f: (tr: Rect) => Rect): RangeProxy {
    return new RangeProxy(this.context, `${this.path}.${name}()`, false, () => {
      const x = this.model();
      return { sheet: x.sheet, rect: f(x.table.rect) };
    });
  }
  getRange(): RangeProxy { return this.part('getRange', (r) => r); }
  getHeaderRowRange(): RangeProxy { return this.part('getHeaderRowRange', (r) => rect(r.r0, r.c0, 1, r.cols)); }
  getDataBodyRange(): RangeProxy { return this.part('getDataBodyRange', (r) => rect(r.r0 + 1, r.c0, r.rows - 1, r.cols)); }
  /** Deletes the table and its cells' contents and formats (Excel's Table.delete); convertToRange keeps the cells. */
  delete(): void {
    this.call('delete', null, () => {
      const x = this.model();
      assertWritable(x.sheet, 'Table.delete');
      const m = this.context.model;
      m.touch(x.sheet);
      x.sheet.tables = x.sheet.tables.filter((t) => t.id !== x.table.id);
      m.clear(x.sheet, x.table.rect, 'All');
    });
  }
  convertToRange(): RangeProxy {
    const r = new RangeProxy(this.context, `${this.path}.convertToRange()`, false, () => null);
    this.call('convertToRange', null, () => {
      const x = this.model();
      assertWritable(x.sheet, 'Table.convertToRange');
      this.context.model.touch(x.sheet);
      x.sheet.tables = x.sheet.tables.filter((t) => t.id !== x.table.id);
      r.bind({ sheet: x.sheet, rect: x.table.rect });
    });
    return r;
  }
}

interface ColumnTarget {
  readonly tableId: string;
  /** Column offset within the table at resolution time. */
  readonly index: number;
}

export class TableColumnCollectionProxy extends CollectionBase<TableTarget, TableColumnProxy> {
  protected readonly entity = 'TableColumnCollection';
  protected readonly scalars = ['count'] as const;
  protected readonly itemScalars = ['id', 'index', 'name', 'values'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly table: TableProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.table.target();
  }
  protected read(_t: TableTarget, prop: string): unknown {
    return prop === 'count' ? this.table.model().table.rect.cols : undefined;
  }
  get count(): number { return this.get('count'); }
  protected list(t: TableTarget): TableColumnProxy[] {
    const x = this.table.model();
    return Array.from({ length: x.table.rect.cols }, (_, i) => {
      const p = new TableColumnProxy(this.context, `${this.path}.getItemAt(${i})`, false, () => ({ tableId: t.id, index: i }), this.table);
      p.bind({ tableId: t.id, index: i });
      return p;
    });
  }
  override load(arg?: LoadArg): this {
    // Loading items without naming properties loads id/index/name (not values, to keep responses small).
    return super.load(arg ?? ['id', 'index', 'name']);
  }
  private byName(name: string): ColumnTarget | null {
    const x = this.table.model();
    const m = this.context.model;
    for (let j = 0; j < x.table.rect.cols; j++) {
      const v = m.readValue(x.sheet, x.table.rect.r0, x.table.rect.c0 + j);
      const h = v === null ? '' : generalText(v instanceof CellError ? v.code : v);
      if (h.toLowerCase() === name.toLowerCase() || String(j + 1) === name) return { tableId: x.table.id, index: j };
    }
    return null;
  }
  getItem(key: string | number): TableColumnProxy {
    return new TableColumnProxy(this.context, `${this.path}.getItem(${JSON.stringify(key)})`, false, () => this.byName(String(key)), this.table);
  }
  getItemOrNullObject(key: string | number): TableColumnProxy {
    return new TableColumnProxy(this.context, `${this.path}.getItemOrNullObject(${JSON.stringify(key)})`, true, () => this.byName(String(key)), this.table);
  }
  getItemAt(index: number): TableColumnProxy {
    return new TableColumnProxy(this.context, `${this.path}.getItemAt(${index})`, false, () => {
      const x = this.table.model();
      return index >= 0 && index < x.table.rect.cols ? { tableId: x.table.id, index } : null;
    }, this.table);
  }
  /**
   * Adds a column at `index` (null/-1/undefined = at the end). Cells in the table's rows from that
   * position shift right (sandbox choice; Excel may instead use an empty adjacent column).
   * `values` is a 2-D array of table-height rows x 1 (header first) or a scalar for every cell;
   * `name` overrides the header. Duplicate header names get a numeric suffix, as in Excel.
   */
  add(index?: number | null, values?: unknown, name?: string | null): TableColumnProxy {
    let created: ColumnTarget | null = null;
    const p = new TableColumnProxy(this.context, `${this.path}.add(...)`, false, () => created, this.table);
    this.context.enqueue({
      statement: `${this.path}.add(${index ?? null}, ..., ${JSON.stringify(name ?? null)})`,
      payload: { index: index ?? null, values: values ?? null, name: name ?? null },
      run: () => {
        const x = this.table.model();
        const m = this.context.model;
        assertWritable(x.sheet, 'TableColumnCollection.add');
        const tr = x.table.rect;
        const at = index === undefined || index === null || index === -1 ? tr.cols : index;
        if (!Number.isInteger(at) || at < 0 || at > tr.cols) throw err('InvalidArgument', `Column index ${index} is outside 0..${tr.cols}.`, 'TableColumnCollection.add');
        if (tr.c0 + tr.cols >= MAX_COLS) throw err('InvalidArgument', 'The table already reaches column XFD.', 'TableColumnCollection.add');
        let input: (i: number) => unknown = () => null;
        if (values !== undefined && values !== null) {
          if (Array.isArray(values)) {
            if (values.length !== tr.rows || values.some((row) => !Array.isArray(row) || row.length !== 1)) {
              throw err('InvalidArgument', `TableColumnCollection.add: values must be ${tr.rows} rows x 1 column (header row included).`, 'TableColumnCollection.add');
            }
            input = (i) => (values as unknown[][])[i][0];
          } else input = () => values;
        }
        const writes = Array.from({ length: tr.rows }, (_, i) => {
          const v = input(i);
          return v === null || v === undefined ? null : interpretInput(v, m.getAttr(x.sheet, tr.r0 + i, tr.c0 + at, 'nf'), 'TableColumnCollection.add');
        });
        const col = tr.c0 + at;
        m.insert(x.sheet, rect(tr.r0, col, tr.rows, 1), 'Right');
        const after = findTable(m, x.table.id)!;
        if (at === tr.cols) after.table.rect = rect(tr.r0, tr.c0, tr.rows, tr.cols + 1);
        for (let i = 1; i < tr.rows; i++) { const w = writes[i]; if (w) m.applyWrite(x.sheet, tr.r0 + i, col, w); }
        // Header: the name, else the header value, else "ColumnN"; made unique.
        let header = name ?? null;
        if (header === null) {
          const hv = values !== undefined && values !== null ? input(0) : null;
          header = hv === null || hv === undefined || hv === '' ? null : String(hv);
        }
        const existing = new Set<string>();
        for (let j = 0; j < after.table.rect.cols; j++) {
          if (after.table.rect.c0 + j === col) continue;
          const v = m.readValue(x.sheet, tr.r0, after.table.rect.c0 + j);
          existing.add((v === null ? '' : generalText(v instanceof CellError ? v.code : v)).toLowerCase());
        }
        let base = header ?? `Column${at + 1}`;
        if (header === null) { let k = at + 1; while (existing.has(`column${k}`)) k++; base = `Column${k}`; }
        let unique = base;
        for (let k = 2; existing.has(unique.toLowerCase()); k++) unique = `${base}${k}`;
        m.applyWrite(x.sheet, tr.r0, col, { v: unique, f: undefined, qp: undefined });
        created = { tableId: x.table.id, index: at };
        p.bind(created);
      },
    });
    return p;
  }
}

export class TableColumnProxy extends ProxyBase<ColumnTarget> {
  protected readonly entity = 'TableColumn';
  protected readonly scalars = ['id', 'index', 'name', 'values'] as const;
  constructor(ctx: SandboxContext, path: string, orNull: boolean, private readonly resolver: () => ColumnTarget | null, private readonly table: TableProxy) {
    super(ctx, path, orNull);
  }
  protected resolveRaw() {
    return this.resolver();
  }
  private where(t: ColumnTarget): { sheet: SheetModel; table: TableModel; col: number } {
    const x = findTable(this.context.model, t.tableId);
    if (!x || t.index >= x.table.rect.cols) throw err('ItemNotFound', 'The table column no longer exists.', 'TableColumn');
    return { ...x, col: x.table.rect.c0 + t.index };
  }
  protected read(t: ColumnTarget, prop: string): unknown {
    const { sheet, table, col } = this.where(t);
    const m = this.context.model;
    const val = (r: number) => {
      const v = m.readValue(sheet, r, col);
      return v === null ? '' : v instanceof CellError ? v.code : v;
    };
    switch (prop) {
      case 'id': return t.index + 1;
      case 'index': return t.index;
      case 'name': return generalText(val(table.rect.r0));
      case 'values': return Array.from({ length: table.rect.rows }, (_, i) => [val(table.rect.r0 + i)]);
    }
    return undefined;
  }
  get id(): number { return this.get('id'); }
  get index(): number { return this.get('index'); }
  get name(): string { return this.get('name'); }
  set name(v: string) {
    this.setProp('name', v, (t) => {
      const { sheet, table, col } = this.where(t);
      assertWritable(sheet, 'TableColumn.name');
      this.context.model.applyWrite(sheet, table.rect.r0, col, { v, f: undefined, qp: undefined });
    });
  }
  get values(): unknown[][] { return this.get('values'); }
  set values(v: unknown[][]) {
    this.setProp('values', v, (t) => {
      const { sheet, table, col } = this.where(t);
      assertWritable(sheet, 'TableColumn.values');
      const at = cellInput(v, rect(table.rect.r0, col, table.rect.rows, 1), 'TableColumn.values');
      const m = this.context.model;
      const writes = Array.from({ length: table.rect.rows }, (_, i) => {
        const x = at(i, 0);
        return x === null || x === undefined ? null : interpretInput(x, m.getAttr(sheet, table.rect.r0 + i, col, 'nf'), 'TableColumn.values');
      });
      writes.forEach((w, i) => { if (w) m.applyWrite(sheet, table.rect.r0 + i, col, w); });
    });
  }
  private part(name: string, f: (tr: Rect, col: number) => Rect): RangeProxy {
    return new RangeProxy(this.context, `${this.path}.${name}()`, false, () => {
      const { sheet, table, col } = this.where(this.target());
      return { sheet, rect: f(table.rect, col) };
    });
  }
  getRange(): RangeProxy { return this.part('getRange', (r, c) => rect(r.r0, c, r.rows, 1)); }
  getHeaderRowRange(): RangeProxy { return this.part('getHeaderRowRange', (r, c) => rect(r.r0, c, 1, 1)); }
  getDataBodyRange(): RangeProxy { return this.part('getDataBodyRange', (r, c) => rect(r.r0 + 1, c, r.rows - 1, 1)); }
  /** Deletes the column's cells (table rows only), shifting cells on the right left. */
  delete(): void {
    this.call('delete', null, (t) => {
      const { sheet, table, col } = this.where(t);
      assertWritable(sheet, 'TableColumn.delete');
      if (table.rect.cols === 1) throw err('InvalidOperation', 'Cannot delete the only column of a table; delete the table instead.', 'TableColumn.delete');
      this.context.model.delete(sheet, rect(table.rect.r0, col, table.rect.rows, 1), 'Left');
    });
  }
  /** @internal */
  get owner(): TableProxy {
    return this.table;
  }
}

export class TableRowCollectionProxy extends ProxyBase<TableTarget> {
  protected readonly entity = 'TableRowCollection';
  protected readonly scalars = ['count'] as const;
  constructor(ctx: SandboxContext, path: string, private readonly table: TableProxy) {
    super(ctx, path, false);
  }
  protected resolveRaw() {
    return this.table.target();
  }
  protected read(_t: TableTarget, prop: string): unknown {
    return prop === 'count' ? this.table.model().table.rect.rows - 1 : undefined;
  }
  get count(): number { return this.get('count'); }
  getCount(): SandboxClientResult<number> {
    return this.callResult('getCount', null, () => this.table.model().table.rect.rows - 1);
  }
  /** Appends/inserts data rows (cells below shift down within the table's columns). */
  add(index?: number | null, values?: unknown[][]): void {
    this.call('add', { index: index ?? null, values: values ?? null }, () => {
      const x = this.table.model();
      const m = this.context.model;
      assertWritable(x.sheet, 'TableRowCollection.add');
      const tr = x.table.rect;
      const n = values ? values.length : 1;
      if (values && values.some((r) => !Array.isArray(r) || r.length !== tr.cols)) throw err('InvalidArgument', `Each row must have ${tr.cols} values.`, 'TableRowCollection.add');
      const at = index === undefined || index === null || index === -1 ? tr.rows - 1 : index;
      if (!Number.isInteger(at) || at < 0 || at > tr.rows - 1) throw err('InvalidArgument', `Row index ${index} is outside 0..${tr.rows - 1}.`, 'TableRowCollection.add');
      const row = tr.r0 + 1 + at;
      m.insert(x.sheet, rect(row, tr.c0, n, tr.cols), 'Down');
      const after = findTable(m, x.table.id)!;
      if (at === tr.rows - 1) after.table.rect = rect(tr.r0, tr.c0, tr.rows + n, tr.cols);
      if (values) values.forEach((vr, i) => vr.forEach((v, j) => {
        const w = interpretInput(v, m.getAttr(x.sheet, row + i, tr.c0 + j, 'nf'), 'TableRowCollection.add');
        m.applyWrite(x.sheet, row + i, tr.c0 + j, w);
      }));
    });
  }
}

// ---------------------------------------------------------------- settings

export class SettingCollectionProxy extends CollectionBase<WorkbookModel, SettingProxy> {
  protected readonly entity = 'SettingCollection';
  protected readonly scalars = [] as const;
  protected readonly itemScalars = ['key', 'value'] as const;
  constructor(ctx: SandboxContext) {
    super(ctx, 'workbook.settings', false);
  }
  protected resolveRaw() {
    return this.context.model;
  }
  protected read(): unknown {
    return undefined;
  }
  protected list(t: WorkbookModel): SettingProxy[] {
    return [...t.settings.keys()].map((k) => {
      const p = new SettingProxy(this.context, `settings.getItem(${JSON.stringify(k)})`, false, () => (this.context.model.settings.has(k) ? k : null));
      p.bind(k);
      return p;
    });
  }
  /** Adds or replaces a setting. The value must be JSON-serialisable (else InvalidArgument). */
  add(key: string, value: unknown): SettingProxy {
    const p = new SettingProxy(this.context, `settings.getItem(${JSON.stringify(key)})`, false, () => (this.context.model.settings.has(key) ? key : null));
    this.context.enqueue({
      statement: `settings.add(${JSON.stringify(key)}, ...)`,
      payload: { key, value: value === undefined ? null : value },
      run: () => {
        if (typeof key !== 'string' || key.length === 0) throw err('InvalidArgument', 'A setting key must be a non-empty string.', 'SettingCollection.add');
        let json: string | undefined;
        try { json = JSON.stringify(value); } catch { json = undefined; }
        if (json === undefined) throw err('InvalidArgument', `Setting "${key}": the value is not JSON-serialisable.`, 'SettingCollection.add');
        this.context.model.settings.set(key, json);
        p.bind(key);
      },
    });
    p._data.key = key;
    p._data.value = value;
    return p;
  }
  getItem(key: string): SettingProxy {
    return new SettingProxy(this.context, `settings.getItem(${JSON.stringify(key)})`, false, () => (this.context.model.settings.has(key) ? key : null));
  }
  getItemOrNullObject(key: string): SettingProxy {
    return new SettingProxy(this.context, `settings.getItemOrNullObject(${JSON.stringify(key)})`, true, () => (this.context.model.settings.has(key) ? key : null));
  }
}

export class SettingProxy extends ProxyBase<string> {
  protected readonly entity = 'Setting';
  protected readonly scalars = ['key', 'value'] as const;
  constructor(ctx: SandboxContext, path: string, orNull: boolean, private readonly resolver: () => string | null) {
    super(ctx, path, orNull);
  }
  protected resolveRaw() {
    return this.resolver();
  }
  protected override stillValid(t: string): boolean {
    return this.context.model.settings.has(t);
  }
  protected read(t: string, prop: string): unknown {
    if (prop === 'key') return t;
    if (prop === 'value') return JSON.parse(this.context.model.settings.get(t)!);
    return undefined;
  }
  get key(): string { return this.get('key'); }
  get value(): unknown { return this.get('value'); }
  set value(v: unknown) {
    this.setProp('value', v, (t) => {
      let json: string | undefined;
      try { json = JSON.stringify(v); } catch { json = undefined; }
      if (json === undefined) throw err('InvalidArgument', `Setting "${t}": the value is not JSON-serialisable.`, 'Setting.value');
      this.context.model.settings.set(t, json);
    });
  }
  delete(): void {
    this.call('delete', null, (t) => { this.context.model.settings.delete(t); });
  }
}
