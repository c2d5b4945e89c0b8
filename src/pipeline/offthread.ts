/**
 * Running the pipeline without blocking its caller's thread.
 *
 * `AsyncPipeline` is what a host hands the workbook layer: the same run as `runPipeline`, awaited,
 * with progress and cancellation. Two implementations:
 *  - `createWorkerPipeline(spawn)`: the run happens in a worker (a Web Worker in the task pane and
 *    the preview page, a worker thread in Node). The table goes over in row slices (one message
 *    each, so the sender's thread is never held for long), the plan comes back with its score
 *    arrays transferred, not copied. Cancel terminates the worker: it answers at once, whatever
 *    the worker is doing, and the next run starts a fresh one.
 *  - `runPipelineYielding`: the same thread, for hosts without workers (tests in Node). It yields
 *    to the event loop between the steps (resolve, score, plan) and checks the signal there; a step
 *    itself is not split, so this is a fallback, not a way to keep a page responsive.
 *
 * The message protocol is below (`ToWorker`, `FromWorker`); `servePipeline` is the worker's side,
 * shared by every worker entry. Pure: no DOM, Node or Office imports; the hosts supply the port.
 */
import type { PlanCell } from '../report/types.js';
import type { RawCell } from '../scoring/types.js';
import { columnsToRead, resolveColumns } from './columns.js';
import { ERROR_CODES, TailmarkError, type ErrorCode } from './errors.js';
import { runPipeline, type PipelineContext, type PipelineRun, type PipelineTable } from './run.js';
import { validateSettings, type SettingsInput } from './settings.js';

/** Phases a run reports: sending the table over, scoring, building the plan. */
export type PipelinePhase = 'sending' | 'scoring' | 'planning';

export interface PipelineJob {
  /** fraction in 0..1 within the phase. */
  readonly onProgress?: (phase: PipelinePhase, fraction: number) => void;
  /** Aborting rejects the run with TailmarkError('cancelled') at once (worker) or at the next step (same thread). */
  readonly signal?: AbortSignal;
}

export type AsyncPipeline = (table: PipelineTable, input: SettingsInput, ctx: PipelineContext & PipelineJob) => Promise<PipelineRun>;

export function cancelledError(): TailmarkError {
  return new TailmarkError('cancelled', 'Cancelled. Nothing was written to the workbook.');
}

/** Yield to the event loop (a macrotask, so timers, input and rendering get their turn). */
function yieldNow(): Promise<void> {
  return new Promise((r) => setTimeout(r, 0));
}

/** Same-thread fallback: `runPipeline` with a yield and a cancel check between its steps. */
export const runPipelineYielding: AsyncPipeline = async (table, input, ctx) => {
  const check = () => {
    if (ctx.signal?.aborted) throw cancelledError();
  };
  check();
  ctx.onProgress?.('scoring', 0);
  await yieldNow();
  check();
  let scoredAt = 0;
  const run = runPipeline(table, input, {
    ...ctx,
    onScored: () => {
      scoredAt = 1;
      ctx.onScored?.();
    },
  });
  // runPipeline is one call; report its two halves after the fact (the yield lets the pane paint).
  ctx.onProgress?.('planning', scoredAt);
  await yieldNow();
  check();
  ctx.onProgress?.('planning', 1);
  return run;
};

// ---------------------------------------------------------------------------------------------
// The message protocol

/** What the table is, without its cells (they follow in `cells` messages). */
export interface TableShape {
  readonly source: string;
  readonly sheetName: string;
  readonly headers: readonly (string | null)[];
  readonly rowCount: number;
  readonly headerRow: number;
  readonly firstColumn: number;
}

export type ToWorker =
  | {
      readonly type: 'start';
      readonly id: number;
      readonly shape: TableShape;
      readonly settings: SettingsInput;
      readonly when: number;
      readonly reasonText?: 'eager' | 'on-demand';
      readonly marks?: PipelineContext['marks'];
      readonly previousMarks?: PipelineContext['previousMarks'];
      readonly inputNotes?: PipelineContext['inputNotes'];
      /** Table columns whose cells will be sent (the others are not needed by the run). */
      readonly columns: readonly number[];
      /** Rows per message for the plan's columns on the way back. */
      readonly sliceRows: number;
    }
  /** Rows `offset .. offset + cells.length - 1` of table column `column`. */
  | { readonly type: 'cells'; readonly id: number; readonly column: number; readonly offset: number; readonly cells: readonly RawCell[] }
  /** All cells sent: run. */
  | { readonly type: 'run'; readonly id: number }
  /** Stop (the client also terminates the worker; this lets a worker that is between runs drop the job). */
  | { readonly type: 'cancel'; readonly id: number };

/** The plan as it travels: without its table (the caller has it) and with score arrays transferred. */
export type WirePipelineRun = Omit<PipelineRun, 'plan'> & { readonly plan: Omit<PipelineRun['plan'], 'table'> };

export type FromWorker =
  | {
      readonly type: 'progress';
      readonly id: number;
      readonly phase: PipelinePhase;
      readonly fraction: number;
      /** With phase 'planning' after the plan is built: plan cells (rows x columns) that follow in `column` messages. */
      readonly total?: number;
    }
  /** Rows `offset ..` of plan column `index` (sent before `result`, whose plan columns then hold no values). */
  | { readonly type: 'column'; readonly id: number; readonly index: number; readonly offset: number; readonly values: readonly PlanCell[] }
  | { readonly type: 'result'; readonly id: number; readonly run: WirePipelineRun }
  | { readonly type: 'error'; readonly id: number; readonly code: ErrorCode | null; readonly message: string; readonly line?: number };

/** The typed arrays of a run's result, to transfer rather than copy. */
export function transferablesOf(run: Pick<PipelineRun, 'result'>): ArrayBuffer[] {
  const out = new Set<ArrayBuffer>();
  for (const c of run.result.columns) {
    for (const a of [c.values, c.scores, c.flagged, c.exclusion, c.groupOf, c.population, c.fenceMultiple]) {
      if (a && a.buffer instanceof ArrayBuffer) out.add(a.buffer);
    }
  }
  return [...out];
}

/** What a worker entry needs from its host: send a message, optionally transferring buffers. */
export type PostToHost = (msg: FromWorker, transfer?: ArrayBuffer[]) => void;

/**
 * The worker's side of the protocol: returns the message handler. One job at a time; a `start`
 * replaces any job not yet run.
 */
export function servePipeline(post: PostToHost): (msg: ToWorker) => void {
  let job: { id: number; start: Extract<ToWorker, { type: 'start' }>; columns: RawCell[][] } | null = null;
  return (msg) => {
    switch (msg.type) {
      case 'start': {
        const columns = msg.shape.headers.map(() => new Array<RawCell>(0));

        job = { id: msg.id, start: msg, columns };
        return;
      }
      case 'cells': {
        if (!job || job.id !== msg.id) return;
        // Slices of a column come in order: append (keeps the array packed).
        const into = job.columns[msg.column];
        for (let i = 0; i < msg.cells.length; i++) into.push(msg.cells[i]);
        return;
      }
      case 'cancel':
        if (job && job.id === msg.id) job = null;
        return;
      case 'run': {
        if (!job || job.id !== msg.id) return;
        const { id, start, columns } = job;
        job = null;
        try {
          post({ type: 'progress', id, phase: 'scoring', fraction: 0 });
          const run = runPipeline({ ...start.shape, columns }, start.settings, {
            when: new Date(start.when),
            ...(start.reasonText ? { reasonText: start.reasonText } : {}),
            ...(start.marks ? { marks: start.marks } : {}),
            ...(start.previousMarks ? { previousMarks: start.previousMarks } : {}),
            ...(start.inputNotes ? { inputNotes: start.inputNotes } : {}),
            onScored: () => post({ type: 'progress', id, phase: 'planning', fraction: 0 }),
          });
          // Plan columns go in row slices: one large message would hold the receiving thread
          // for as long as it takes to copy every row's text (about half a second at 300,000 rows).
          const slice = start.sliceRows;
          const total = run.plan.columns.reduce((n, c) => n + c.values.length, 0);
          post({ type: 'progress', id, phase: 'planning', fraction: 0, total });
          run.plan.columns.forEach((col, index) => {
            for (let offset = 0; offset < col.values.length; offset += slice) {
              post({ type: 'column', id, index, offset, values: col.values.slice(offset, offset + slice) });
            }
          });
          const { table: _table, ...plan } = run.plan;
          const wire: WirePipelineRun = { ...run, plan: { ...plan, columns: plan.columns.map((c) => ({ ...c, values: [] })) } };
          post({ type: 'result', id, run: wire }, transferablesOf(run));
        } catch (e) {
          if (e instanceof TailmarkError) post({ type: 'error', id, code: e.code, message: e.message, ...(e.line !== undefined ? { line: e.line } : {}) });
          else post({ type: 'error', id, code: null, message: e instanceof Error ? (e.stack ?? e.message) : String(e) });
        }
        return;
      }
    }
  };
}

// ---------------------------------------------------------------------------------------------
// The caller's side

/** A started worker, as the client sees it (a Web Worker or a Node worker thread, adapted). */
export interface PipelinePort {
  post(msg: ToWorker): void;
  /** Registers the one message listener. */
  listen(onMessage: (msg: FromWorker) => void, onFailure: (why: string) => void): void;
  terminate(): void;
}

export interface WorkerPipelineOptions {
  /** Rows per `cells` message (default 20,000): bounds how long one message holds the sender. */
  readonly sliceRows?: number;
}

/**
 * An AsyncPipeline backed by a worker from `spawn`. Keeps one idle worker between runs; a run
 * that is cancelled or fails with a crash terminates its worker and the next run spawns another.
 */
export function createWorkerPipeline(spawn: () => PipelinePort, options: WorkerPipelineOptions = {}): AsyncPipeline {
  const sliceRows = Math.max(1, options.sliceRows ?? 20_000);
  let idle: PipelinePort | null = null;
  let nextId = 1;
  return async (table, input, ctx) => {
    const { signal, onProgress } = ctx;
    if (signal?.aborted) throw cancelledError();
    // Validate and resolve here too: a wrong setting is reported before anything is sent, and
    // only the columns the run reads travel.
    const settings = validateSettings(input, ctx.words);
    // With marks read from the table (the default), every column travels: the marks sit in ours.
    const needed =
      table.rowCount < 1 ? [] : ctx.marks === 'host' ? columnsToRead(resolveColumns(table.headers, settings, table.source)) : table.headers.map((_h, i) => i);
    const port = idle ?? spawn();
    idle = null;
    const id = nextId++;
    return await new Promise<PipelineRun>((resolve, reject) => {
      let done = false;
      const planValues: PlanCell[][] = [];
      let received = 0;
      let expected = 0;
      const finish = (keep: boolean) => {
        done = true;
        signal?.removeEventListener('abort', onAbort);
        if (keep && idle === null) idle = port;
        else port.terminate();
      };
      const onAbort = () => {
        if (done) return;
        port.post({ type: 'cancel', id });
        finish(false);
        reject(cancelledError());
      };
      signal?.addEventListener('abort', onAbort);
      port.listen(
        (msg) => {
          if (done || msg.id !== id) return;
          if (msg.type === 'progress') {
            if (msg.phase === 'planning' && msg.total === undefined) ctx.onScored?.();
            if (msg.phase === 'planning' && msg.total !== undefined) expected = msg.total;
            onProgress?.(msg.phase, msg.fraction);
          } else if (msg.type === 'column') {
            // Slices of a column arrive in order: appending keeps the array packed (writing
            // far past the end of an empty array would make it a slow dictionary).
            const into = (planValues[msg.index] ??= []);
            for (let i = 0; i < msg.values.length; i++) into.push(msg.values[i]);
            received += msg.values.length;
            onProgress?.('planning', Math.min(1, received / Math.max(1, expected)));
          } else if (msg.type === 'result') {
            finish(true);
            const columns = msg.run.plan.columns.map((c, k) => ({ ...c, values: planValues[k] ?? [] }));
            resolve({ ...msg.run, plan: { ...msg.run.plan, columns, table: { ...table, headers: table.headers.map((h) => h ?? '') } } });
          } else {
            finish(msg.code !== null);
            reject(msg.code !== null && (ERROR_CODES as readonly string[]).includes(msg.code) ? new TailmarkError(msg.code, msg.message, msg.line) : new Error(`The scoring worker failed: ${msg.message}`));
          }
        },
        (why) => {
          if (done) return;
          finish(false);
          reject(new Error(`The scoring worker stopped: ${why}`));
        },
      );
      const { columns: _cells, ...shape } = table;
      port.post({ type: 'start', id, shape, settings: input, when: ctx.when.getTime(), ...(ctx.reasonText ? { reasonText: ctx.reasonText } : {}),
        ...(ctx.marks ? { marks: ctx.marks } : {}),
        ...(ctx.previousMarks ? { previousMarks: ctx.previousMarks } : {}),
        ...(ctx.inputNotes ? { inputNotes: ctx.inputNotes } : {}),
        columns: needed,
        sliceRows,
      });
      // Send the cells in slices, yielding between them, then run.
      void (async () => {
        const total = needed.length * Math.ceil(table.rowCount / sliceRows) || 1;
        let sent = 0;
        for (const c of needed) {
          const col = table.columns[c];
          for (let offset = 0; offset < table.rowCount; offset += sliceRows) {
            if (done) return;
            const cells: RawCell[] = [];
            const end = Math.min(table.rowCount, offset + sliceRows);
            for (let r = offset; r < end; r++) cells.push(col[r]);
            port.post({ type: 'cells', id, column: c, offset, cells });
            onProgress?.('sending', ++sent / total);
            await yieldNow();
          }
        }
        if (!done) port.post({ type: 'run', id });
      })();
    });
  };
}
