/**
 * The base of the sandbox's proxy objects: strict load/sync reads, queued writes and calls, null
 * objects, collections, and the helpers every proxy shares (error constructors, payload sizes).
 * See context.ts for the behaviour of a sync.
 */
import { SandboxError, type SandboxErrorCode } from './errors.js';
import type { Rect } from './address.js';
import type { SheetModel } from './model.js';
import type { SandboxContext } from './context.js';
import type { WorksheetProxy } from './worksheet-proxy.js';
import type { TableCollectionProxy } from './table-proxy.js';
import type { ConditionalFormatCollectionProxy } from './conditional-format-proxy.js';

// ---------------------------------------------------------------- helpers

const encoder = new TextEncoder();
let scratch = new Uint8Array(1 << 16);

/** UTF-8 byte length (TextEncoder exists in browsers and Node; encodeInto reuses one buffer). */
export function utf8Length(s: string): number {
  if (scratch.length < s.length * 3) scratch = new Uint8Array(s.length * 3);
  return encoder.encodeInto(s, scratch).written;
}

export function jsonBytes(x: unknown): number {
  const s = JSON.stringify(x);
  return s === undefined ? 0 : utf8Length(s);
}

export const err = (code: SandboxErrorCode, message: string, location?: string) => new SandboxError(code, message, location);

export function notLoaded(entity: string, prop: string): SandboxError {
  return err(
    'PropertyNotLoaded',
    `The property '${prop}' is not available. Before reading the property's value, call the load method on the containing object (${entity}) and call "context.sync()" on the associated request context.`,
    `${entity}.${prop}`,
  );
}

export type LoadArg = string | string[] | { select?: string | string[]; expand?: string | string[] } | undefined;

export function parseLoadArg(arg: LoadArg): string[] {
  if (arg === undefined || arg === null) return [];
  const split = (x: string | string[] | undefined): string[] =>
    x === undefined ? [] : (Array.isArray(x) ? x : x.split(',')).map((p) => p.trim()).filter((p) => p.length > 0);
  if (typeof arg === 'string' || Array.isArray(arg)) return split(arg);
  return [...split(arg.select), ...split(arg.expand)];
}

export interface Action {
  readonly statement: string;
  readonly payload: unknown;
  /** Changes the workbook (refused when the workbook is read-only). */
  readonly write?: boolean;
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

/** Thrown when a statement reaches a null object; the statement is skipped, not failed. */
export class NullObjectSkip extends Error {
  constructor(path: string) {
    super(`${path} is a null object`);
    this.name = 'NullObjectSkip';
  }
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
  /** @internal Whether `load()` knows this scalar property. */
  hasScalar(name: string): boolean {
    return this.scalars.includes(name);
  }
  /** @internal Child proxies reachable by name for nested load paths ("format/fill/color"). */
  nav(_name: string): ProxyBase<unknown> | undefined {
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
      write: true,
      run: () => { apply(this.target()); },
    });
    this._data[prop] = value;
  }

  /** Queue a method call. */
  protected call(method: string, payload: unknown, apply: (t: T) => void): void {
    const write = method !== 'select' && method !== 'activate';
    this.context.enqueue({ statement: `${this.path}.${method}(...)`, payload, write, run: () => { apply(this.target()); } });
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
export abstract class CollectionBase<T, I extends ProxyBase<unknown>> extends ProxyBase<T> {
  private _items: I[] | undefined;
  protected abstract list(t: T): I[];
  /** @internal */ abstract readonly itemScalars: readonly string[];

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

export interface RangeTarget {
  readonly sheet: SheetModel;
  readonly rect: Rect;
}

export function assertWritable(sheet: SheetModel, where: string): void {
  if (sheet.protected) {
    throw err('AccessDenied', `The cell or chart you're trying to change is on a protected sheet ("${sheet.name}"). Unprotect the sheet to make changes.`, where);
  }
}

/**
 * Constructors a range needs from modules that themselves build ranges (a range reaches its
 * worksheet, its tables and its rules). Each of those modules registers its class here when it
 * loads, so at run time the proxy modules import one another in one direction only.
 */
export const late = {} as {
  WorksheetProxy: typeof WorksheetProxy;
  TableCollectionProxy: typeof TableCollectionProxy;
  ConditionalFormatCollectionProxy: typeof ConditionalFormatCollectionProxy;
};
