/**
 * Answers the requests of Microsoft's real Excel client library (`@microsoft/office-js`) from the
 * sandbox, so that code written against Office.js runs through the real client: its object paths,
 * its request JSON, its batching and its client-side errors.
 *
 * The client hands every `context.sync()` to `OfficeExtension.HttpUtility`'s send function as a
 * POST to `<session url>/ProcessQuery?flags=N` whose body is
 * `{ Actions: [...], ObjectPaths: { id: { ObjectPathType, Name, ParentObjectPathId, ArgumentInfo } } }`.
 * This bridge replays each request on a sandbox context (one per client context, told apart by the
 * session url) and answers `{ Results: [{ ActionId, Value }], Error? }` as Excel does:
 *
 * - Object paths (1 global = the workbook, 3 method, 4 property, 5 indexer = `getItem`, 7 null)
 *   become sandbox proxies; a path is built once per client context and kept (the client asks the
 *   server to keep references), so a `worksheets.add()` path sent again is not added twice.
 * - Actions: 1 instantiate (fails with ItemNotFound for a missing `getItem`, answers null for a
 *   null object), 2/7 query (`load`), 3 method, 4 set property, 9 update; 5 trace and the
 *   reference-keeping methods are acknowledged and ignored.
 * - Query answers use Excel's wire names (PascalCase, collection items under `_Items`); items that
 *   have an id carry it (`_Id`), so the client addresses them by id afterwards (`getItem(id)`).
 * - A failing statement answers `Error { Code, Message, Location, ActionIndex }`; what the
 *   statements before it did stays as the sandbox's failure mode leaves it.
 * - Request flag 64 (`delayForCellEdit`) is reported to the sandbox's cell-edit check.
 *
 * Pure: no Node or DOM imports. The loader of the client script lives with the host that uses it.
 */
import { SandboxError } from './errors.js';
import type { SandboxContext } from './context.js';
import { CollectionBase, NullObjectSkip, ProxyBase, SandboxClientResult, jsonBytes } from './proxy-base.js';
import type { SandboxWorkbook } from './workbook.js';

export interface WireRequest {
  readonly url: string;
  readonly method: string;
  readonly headers?: Record<string, string>;
  readonly body?: unknown;
}

export interface WireResponse {
  statusCode: number;
  headers: Record<string, string>;
  body: string;
}

/** Real request/response sizes as the client sent and received them (UTF-8 bytes of the JSON text). */
export interface WireStats {
  requests: number;
  requestBytes: { max: number; total: number; last: number };
  responseBytes: { max: number; total: number; last: number };
  /** Requests that only released kept references (the client's clean-up at the end of an Excel.run). */
  releaseRequests: number;
  /** Request flags of the last request (64 = delayForCellEdit). */
  lastFlags: number;
  reset(): void;
}

interface PathInfo {
  readonly Id: number;
  readonly ObjectPathType: number;
  readonly Name: string;
  readonly ParentObjectPathId?: number;
  readonly ArgumentInfo?: { Arguments?: unknown[]; ReferencedObjectPathIds?: number[] };
}

interface ActionInfo {
  readonly Id: number;
  readonly ActionType: number;
  readonly Name: string;
  readonly ObjectPathId: number;
  readonly ArgumentInfo?: { Arguments?: unknown[]; ReferencedObjectPathIds?: number[] };
  readonly QueryInfo?: { Select?: string[]; Expand?: string[]; Top?: number; Skip?: number };
  readonly ObjectState?: Record<string, unknown>;
}

interface RequestBody {
  readonly Actions?: ActionInfo[];
  readonly ObjectPaths?: Record<string, PathInfo>;
}

type Node = ProxyBase<unknown> | { readonly nullObject: true };

interface ClientContext {
  readonly ctx: SandboxContext;
  readonly paths: Map<number, { key: string; node: Node }>;
  /** Objects the client asked the server to keep (`_KeepReference`), by the reference id we answered. */
  readonly refs: Map<string, Node>;
}

const NULL: Node = { nullObject: true };

const camel = (s: string) => (s.length ? s[0].toLowerCase() + s.slice(1) : s);
const pascal = (s: string) => (s.length ? s[0].toUpperCase() + s.slice(1) : s);

function bytesOf(s: string): number {
  return new TextEncoder().encode(s).length;
}

function notImplemented(what: string): SandboxError {
  return new SandboxError('NotImplemented', `The sandbox does not model ${what}.`, what);
}

/** Members of a proxy, looked up by name (the proxies are plain classes; the client names members in PascalCase). */
function member(node: ProxyBase<unknown>, name: string): unknown {
  return (node as unknown as Record<string, unknown>)[name];
}

export class OfficeRequestBridge {
  private readonly contexts = new Map<string, ClientContext>();
  readonly stats: WireStats;

  constructor(readonly sandbox: SandboxWorkbook) {
    const fresh = () => ({ max: 0, total: 0, last: 0 });
    const stats: WireStats = {
      requests: 0, releaseRequests: 0, requestBytes: fresh(), responseBytes: fresh(), lastFlags: 0,
      reset: () => {
        stats.requests = 0; stats.releaseRequests = 0; stats.requestBytes = fresh(); stats.responseBytes = fresh();
      },
    };
    this.stats = stats;
  }

  /** Answer one request of the client's HTTP executor. `contextKey` tells client contexts apart (the session url). */
  async handle(req: WireRequest): Promise<WireResponse> {
    const text = typeof req.body === 'string' ? req.body : JSON.stringify(req.body ?? {});
    const body = JSON.parse(text) as RequestBody;
    const q = req.url.indexOf('/ProcessQuery');
    const key = q >= 0 ? req.url.slice(0, q) : req.url;
    const flags = Number(/[?&]flags=(-?\d+)/.exec(req.url)?.[1] ?? 0);
    const s = this.stats;
    s.requests++;
    const reqBytes = bytesOf(text);
    s.requestBytes.last = reqBytes; s.requestBytes.total += reqBytes; s.requestBytes.max = Math.max(s.requestBytes.max, reqBytes);
    s.lastFlags = flags;
    const acts = body.Actions ?? [];
    const release = (a: ActionInfo) => a.ActionType === 3 && a.Name === '_RemoveReference';
    if (acts.some(release) && acts.every((a) => release(a) || a.ActionType === 1)) s.releaseRequests++;
    const out = await this.process(key, body, flags);
    const respText = JSON.stringify(out);
    const respBytes = bytesOf(respText);
    s.responseBytes.last = respBytes; s.responseBytes.total += respBytes; s.responseBytes.max = Math.max(s.responseBytes.max, respBytes);
    return { statusCode: 200, headers: { 'content-type': 'application/json' }, body: respText };
  }

  private context(key: string): ClientContext {
    let c = this.contexts.get(key);
    if (!c) {
      c = { ctx: this.sandbox.newContext(), paths: new Map(), refs: new Map() };
      this.sandbox.stats.runs++;
      this.contexts.set(key, c);
    }
    return c;
  }

  private async process(key: string, body: RequestBody, flags: number): Promise<Record<string, unknown>> {
    const c = this.context(key);
    const ctx = c.ctx;
    const defs = body.ObjectPaths ?? {};
    const actions = body.Actions ?? [];
    const results: { ActionId: number; Value: unknown }[] = [];
    const traces: number[] = [];
    const after: (() => void)[] = [];
    /** Sandbox queue length after each action, to find the action of a failing statement. */
    const queueEnds: number[] = [];
    const selectionBefore = this.sandbox.selectionKeyNow();

    const resolve = (id: number): Node => {
      const def = defs[String(id)];
      const cached = c.paths.get(id);
      const k = def ? JSON.stringify(def) : cached?.key;
      if (cached && cached.key === k) return cached.node;
      if (!def) throw new SandboxError('InvalidObjectPath', `Object path ${id} is not known in this context.`, 'ObjectPath');
      const node = build(def);
      c.paths.set(id, { key: k!, node });
      return node;
    };
    const args = (info: PathInfo['ArgumentInfo']): unknown[] => {
      const list = info?.Arguments ?? [];
      const refs = info?.ReferencedObjectPathIds ?? [];
      return list.map((a, i) => (refs[i] ? resolve(refs[i]) : a));
    };
    const proxyOf = (n: Node, what: string): ProxyBase<unknown> => {
      if (n instanceof ProxyBase) return n;
      throw new NullObjectSkip(what);
    };
    const build = (def: PathInfo): Node => {
      switch (def.ObjectPathType) {
        case 1:
          return ctx.workbook;
        case 7:
          return NULL;
        case 6: {
          const n = c.refs.get(def.Name);
          if (!n) throw new SandboxError('InvalidObjectPath', `No object is kept under reference "${def.Name}".`, 'ObjectPath');
          return n;
        }
        case 4: {
          const parent = resolve(def.ParentObjectPathId!);
          if (!(parent instanceof ProxyBase)) return NULL;
          const v = member(parent, camel(def.Name));
          if (!(v instanceof ProxyBase)) throw notImplemented(`the property ${def.Name}`);
          return v;
        }
        case 3:
        case 5: {
          const parent = resolve(def.ParentObjectPathId!);
          if (!(parent instanceof ProxyBase)) return NULL;
          const name = def.ObjectPathType === 5 ? 'getItem' : camel(def.Name);
          const f = member(parent, name);
          if (typeof f !== 'function') throw notImplemented(`the method ${def.Name || 'getItem'}`);
          const v: unknown = (f as (...a: unknown[]) => unknown).apply(parent, args(def.ArgumentInfo));
          if (!(v instanceof ProxyBase)) throw notImplemented(`${def.Name} as an object path`);
          return v;
        }
        default:
          throw notImplemented(`object paths of type ${def.ObjectPathType}`);
      }
    };

    const keep = new Set(actions.filter((a) => a.ActionType === 3 && a.Name === '_KeepReference').map((a) => a.ObjectPathId));
    const keepRef = (pathId: number, n: Node): string => {
      const ref = `${c.refs.size + 1}:${pathId}`;
      c.refs.set(ref, n);
      return ref;
    };
    let buildError: { e: unknown; index: number } | null = null;
    for (let i = 0; i < actions.length && !buildError; i++) {
      const a = actions[i];
      try {
        this.action(a, resolve, args, proxyOf, ctx, results, after, keep.has(a.ObjectPathId) ? keepRef : null, traces);
      } catch (e) {
        buildError = { e, index: i };
      }
      queueEnds.push(ctx.queue.length);
    }
    if (buildError) {
      ctx.queue = [];
      ctx.pendingNull = [];
      return { Error: this.errorOf(buildError.e, buildError.index) };
    }
    try {
      ctx.delayForCellEdit = (flags & 64) !== 0;
      await ctx.sync();
    } catch (e) {
      const failed = ctx.lastFailedIndex;
      let index = -1;
      if (failed >= 0) index = queueEnds.findIndex((end) => end > failed);
      this.sandbox.notifySelectionIfChanged(selectionBefore);
      return { Error: this.errorOf(e, index), TraceIds: traces };
    }
    for (const f of after) f();
    this.sandbox.notifySelectionIfChanged(selectionBefore);
    return { Results: results, TraceIds: traces };
  }

  private action(
    a: ActionInfo,
    resolve: (id: number) => Node,
    args: (info: PathInfo['ArgumentInfo']) => unknown[],
    proxyOf: (n: Node, what: string) => ProxyBase<unknown>,
    ctx: SandboxContext,
    results: { ActionId: number; Value: unknown }[],
    after: (() => void)[],
    keepRef: ((pathId: number, n: Node) => string) | null,
    traces: number[],
  ): void {
    switch (a.ActionType) {
      case 1: {
        // Instantiate: resolve the path at this point of the request, as Excel does.
        const n = resolve(a.ObjectPathId);
        if (!(n instanceof ProxyBase)) {
          results.push({ ActionId: a.Id, Value: null });
          return;
        }
        if (n === ctx.workbook) return;
        let isNull = false;
        let id: unknown;
        const idName = idProp(n);
        ctx.enqueue({
          statement: `${n.path} (instantiate)`,
          payload: null,
          run: () => {
            try {
              if (n.orNull) isNull = n.targetOrNull() === null;
              else n.target();
              if (!isNull && idName) id = n._readProps([idName])[idName];
            } catch (e) {
              if (e instanceof NullObjectSkip) { isNull = true; return; }
              throw e;
            }
          },
        });
        // Excel answers an instantiation with the object's id or, for an object the client asked
        // to keep, a reference id; the client then addresses it that way in later requests
        // (the method path that made it, e.g. worksheets.add(), is not valid after the request).
        after.push(() => {
          if (isNull) results.push({ ActionId: a.Id, Value: null });
          else if (keepRef) results.push({ ActionId: a.Id, Value: { _ReferenceId: keepRef(a.ObjectPathId, n) } });
          else if (id !== undefined && id !== null) results.push({ ActionId: a.Id, Value: { _Id: id } });
        });
        return;
      }
      case 2:
      case 7: {
        const n = resolve(a.ObjectPathId);
        if (!(n instanceof ProxyBase)) {
          results.push({ ActionId: a.Id, Value: null });
          return;
        }
        const select = [...(a.QueryInfo?.Select ?? []), ...(a.QueryInfo?.Expand ?? [])].map((p) => p.split('/').map(camel).join('/'));
        // Excel answers an object's id with every load (`_Id`): the client then addresses the
        // object by id (e.g. a worksheet reached through getSelectedRange(), a path that is no
        // longer valid after the request, becomes worksheets.getItem(id)).
        const extra = n instanceof CollectionBase ? idProp(n.itemScalars) : idProp(n);
        const list = select.length === 0 ? undefined : extra && !select.includes(extra) ? [...select, extra] : select;
        n.load(list);
        after.push(() => {
          const value = n._isNull === true ? null : valueOf(n, select, extra);
          if (value && extra && !(n instanceof CollectionBase) && n._data[extra] !== undefined) (value as Record<string, unknown>)._Id = n._data[extra];
          results.push({ ActionId: a.Id, Value: value });
        });
        return;
      }
      case 3: {
        // Reference keeping is answered at instantiation; _ValidateArraySize precedes the client's
        // own split of a large array write into 1,500-cell row blocks (each block is checked when set).
        if (a.Name === '_KeepReference' || a.Name === '_RemoveReference' || a.Name === '_ValidateArraySize') return;
        const n = proxyOf(resolve(a.ObjectPathId), a.Name);
        const f = member(n, camel(a.Name));
        if (typeof f !== 'function') throw notImplemented(`the method ${a.Name}`);
        const r: unknown = (f as (...x: unknown[]) => unknown).apply(n, args(a.ArgumentInfo));
        if (r instanceof SandboxClientResult) {
          const res = r;
          after.push(() => results.push({ ActionId: a.Id, Value: res.value }));
        }
        return;
      }
      case 4: {
        const n = proxyOf(resolve(a.ObjectPathId), a.Name);
        setMember(n, camel(a.Name), args(a.ArgumentInfo)[0]);
        return;
      }
      case 9: {
        const n = proxyOf(resolve(a.ObjectPathId), 'update');
        for (const [k, v] of Object.entries(a.ObjectState ?? {})) setMember(n, camel(k), v);
        return;
      }
      case 5:
        // Trace: Excel lists the traces it reached (TraceIds); the client registers event
        // handlers only when the trace queued with them was reached.
        ctx.enqueue({ statement: 'trace', payload: a.Id, run: () => { traces.push(a.Id); } });
        return;
      case 6:
        return;
      default:
        throw notImplemented(`actions of type ${a.ActionType}`);
    }
  }

  private errorOf(e: unknown, actionIndex: number): Record<string, unknown> {
    if (e instanceof SandboxError) {
      return { Code: e.code, Message: e.message, Location: e.debugInfo.errorLocation ?? '', ActionIndex: actionIndex, HttpStatusCode: 400 };
    }
    const message = e instanceof Error ? e.message : String(e);
    return { Code: 'GeneralException', Message: `Sandbox bridge: ${message}`, Location: '', ActionIndex: actionIndex, HttpStatusCode: 500 };
  }
}

function setMember(n: ProxyBase<unknown>, name: string, v: unknown): void {
  let proto: object | null = Object.getPrototypeOf(n) as object | null;
  while (proto) {
    const d = Object.getOwnPropertyDescriptor(proto, name);
    if (d) {
      if (!d.set) break;
      d.set.call(n, v);
      return;
    }
    proto = Object.getPrototypeOf(proto) as object | null;
  }
  throw notImplemented(`setting ${name}`);
}

/** The property that identifies a collection's items (loaded with them so the client can address items by id). */
function idProp(x: readonly string[] | ProxyBase<unknown>): string | null {
  const has = (p: string) => (Array.isArray(x) ? x.includes(p) : (x as ProxyBase<unknown>).hasScalar(p));
  if (has('id')) return 'id';
  if (has('key')) return 'key';
  return null;
}

function valueOf(n: ProxyBase<unknown>, select: readonly string[], idName: string | null): unknown {
  if (n instanceof CollectionBase) {
    const list: ProxyBase<unknown>[] = (n as CollectionBase<unknown, ProxyBase<unknown>>).items;
    // The client names item properties with or without "items/" (a collection reached through a
    // navigation property, such as RangeAreas.areas, keeps the prefix).
    const itemSelect = select.map((p) => (p.startsWith('items/') ? p.slice(6) : p)).filter((p) => p !== 'items');
    const items = list.map((it) => {
      const v = objectValue(it, itemSelect);
      if (idName) {
        const id = it._data[idName];
        if (id !== undefined) v._Id = id;
      }
      return v;
    });
    const own = objectValue(n, []);
    delete own._Items;
    return { ...own, _Items: items };
  }
  return objectValue(n, select);
}

function objectValue(n: ProxyBase<unknown>, select: readonly string[]): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  const paths = select.length ? select : Object.keys(n._data);
  for (const p of paths) {
    const [head, ...rest] = p.split('/');
    if (rest.length === 0 && Object.prototype.hasOwnProperty.call(n._data, head)) {
      out[pascal(head)] = n._data[head];
      continue;
    }
    const child = n.nav(head);
    if (!child) continue;
    const sub = (out[pascal(head)] ??= {}) as Record<string, unknown>;
    if (child._isNull === true) { out[pascal(head)] = null; continue; }
    Object.assign(sub, objectValue(child, rest.length ? [rest.join('/')] : []));
  }
  return out;
}

/** Size helper shared with tests: UTF-8 bytes of a value's JSON. */
export const wireBytes = jsonBytes;
