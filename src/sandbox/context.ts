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
 * - A failing statement fails the sync; the statements before it in the same sync stay applied,
 *   as in Excel (nothing loaded becomes readable). `partialOnError: false` makes a failed sync
 *   apply nothing (kinder than Excel; only for tests that name why).
 * - The JSON size of each request (everything queued between two syncs) and of each response
 *   (everything loaded) is measured (UTF-8 bytes); over the limit (default 5 MB, Excel on the web)
 *   the sync fails with RequestPayloadSizeLimitExceeded / ResponsePayloadSizeLimitExceeded.
 *   The sandbox's request encoding is not Office.js's wire format: sizes are close, not equal.
 */
import { SandboxError } from './errors.js';
import type { WorkbookModel } from './model.js';
import type { SandboxWorkbook } from './workbook.js';
import { err, jsonBytes, NullObjectSkip, type Action, type ProxyBase } from './proxy-base.js';
import { WorkbookProxy } from './workbook-proxy.js';
// Registers ConditionalFormatCollectionProxy for ranges (see `late` in proxy-base.ts).
import './conditional-format-proxy.js';

export { SandboxClientResult } from './proxy-base.js';

// ---------------------------------------------------------------- context

export interface SandboxOptions {
  /** Request/response limit in bytes (default 5 * 1024 * 1024, Excel on the web). */
  payloadLimitBytes?: number;
  /**
   * Keep statements applied before a failing one, as Excel does (default true). false makes a
   * failed sync apply nothing: kinder than Excel, for tests that say why they need it.
   */
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
  /** @internal Queue index of the statement that failed the last sync (-1: none, or not a statement). */
  lastFailedIndex = -1;
  /** @internal Excel.run's `delayForCellEdit` for this context (request flag 64 through the Office.js client). */
  delayForCellEdit = false;

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
    this.lastFailedIndex = -1;
    const sb = this.sandbox;
    const limit = sb.options.payloadLimitBytes;
    let reqBytes = 2;
    for (const a of actions) reqBytes += jsonBytes({ s: a.statement, p: a.payload }) + 1;
    sb.recordSync(actions.length, reqBytes);
    // Office.js resolves the promise asynchronously; so do we.
    await Promise.resolve();
    await sb.admit(this.delayForCellEdit);
    if (reqBytes > limit) {
      throw err('RequestPayloadSizeLimitExceeded', `The request payload (${reqBytes} bytes) exceeds the limit of ${limit} bytes. Split the work into smaller batches (fewer cells per sync).`, 'RequestContext.sync');
    }
    const model = this.model;
    const partial = sb.options.partialOnError;
    const faultAt = sb.takeFault(actions.length);
    const commits: (() => void)[] = [];
    let respBytes = 2;
    this.memoResets = [];
    this.applying = true;
    let failed: { error: unknown } | null = null;
    if (!partial) model.begin();
    try {
      for (let i = 0; i < actions.length; i++) {
        const a = actions[i];
        if (partial) model.begin();
        try {
          if (i === faultAt) throw err('GeneralException', `Injected failure of this sync at statement ${i + 1} of ${actions.length} (the statements before it stay applied, as in Excel).`, 'RequestContext.sync');
          if (a.write && sb.mode.readOnly) throw err('AccessDenied', 'The workbook is open read-only: it cannot be changed. Save a copy or ask for edit access, then try again.', 'Workbook.readOnly');
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
          this.lastFailedIndex = i;
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

function decorate(e: unknown, statement: string): unknown {
  if (e instanceof SandboxError) return e.withStatement(statement);
  if (e instanceof Error) {
    const g = new SandboxError('GeneralException', `Sandbox internal error in "${statement}": ${e.message}`, undefined, statement);
    return g;
  }
  return e;
}
