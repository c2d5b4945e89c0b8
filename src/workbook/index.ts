/**
 * The workbook layer: the only code that touches Excel.*.
 * `createWorkbookLayer(Excel.run, { runInContext: Excel.run })` in the add-in;
 * `createWorkbookLayer(sandbox.run, { runInContext: sandbox.run })` in tests, the preview page and
 * `tailmark sandbox` (runInContext is optional: see WorkbookLayerOptions).
 *
 * Every action is one `run(...)` (one Excel.run) with a bounded number of context.sync() calls
 * that grows with the number of cells only.
 */
import type { AsyncPipeline } from '../pipeline/index.js';
import type { ClaimRecord, DetectedTable, MarksExport, Exception, PreviewData, ReviewPrefs, RunProgress, RunRecord, RunSettings, RunSummary, SelectionFollow, WorkbookLayer } from './api.js';
import { TailmarkError } from './api.js';
import { detectTable } from './detect.js';
import { exportMarkRows } from './export-marks.js';
import {
  listExceptionRows,
  loadReviewPrefs,
  loadRunSettings,
  markRows,
  previewColumns,
  readClaimRow,
  removeResults,
  saveReviewPrefs,
  selectDataRow,
} from './ops.js';
import { followSelection } from './follow.js';
import { runScoring } from './run.js';
import { Syncer, makeBudget, PAYLOAD_LIMIT, SAFETY } from './sync.js';

/** `Excel.run(options, batch)`: every action passes its run options (delayForCellEdit, mergeUndoGroup). */
export type ExcelRunner = <T>(options: Excel.RunOptions, batch: (context: Excel.RequestContext) => Promise<T>) => Promise<T>;

/**
 * Excel.run's overload that runs a batch on an existing context (`Excel.run(context, batch)`), used
 * to remove an event handler through the context that added it. `Excel.run` itself and the
 * sandbox's `run` both have this shape.
 */
export type ExcelContextRunner = <T>(
  context: OfficeExtension.ClientRequestContext,
  batch: (context: Excel.RequestContext) => Promise<T>,
) => Promise<T>;

export interface WorkbookLayerOptions {
  /** Host request/response limit in bytes (default 5 MB, Excel on the web). */
  readonly payloadLimit?: number;
  /** Share of the limit planned per sync (default 0.6). */
  readonly safety?: number;
  /** Clock for the run log and notes (default: now). */
  readonly now?: () => Date;
  /**
   * `Excel.run` again (its `run(context, batch)` form): lets onSelectionChanged register its handler
   * in one short run and remove it later on the handler's own context, as Microsoft documents.
   * Without it the registering run stays open until unsubscribe (the fallback).
   */
  readonly runInContext?: ExcelContextRunner;
  /** How a run's pipeline runs: the pane and the preview pass a worker-backed one (default: same thread). */
  readonly pipeline?: AsyncPipeline;
  /** Called with errors of background work (removing a selection handler). */
  readonly onBackgroundError?: (e: unknown) => void;
  /**
   * Requirement-set check (default: Office.context.requirements.isSetSupported where Office is
   * loaded, else false). Decides whether a run asks for one undo step (mergeUndoGroup, ExcelApi 1.20).
   */
  readonly isSetSupported?: (name: string, version: string) => boolean;
}

/**
 * Without Office.js the layer runs on the sandbox (tests, the preview page, `tailmark sandbox`),
 * which models the feature-detected members up to ExcelApi 1.13 (merged areas), not undo groups (1.20).
 */
const SANDBOX_EXCEL_API = [1, 13];

/** Office's requirement check when Office.js is loaded; the sandbox's (SANDBOX_EXCEL_API) elsewhere. */
function officeSupports(name: string, version: string): boolean {
  if (typeof Office === 'undefined') {
    const [major, minor] = version.split('.').map(Number);
    return name === 'ExcelApi' && (major < SANDBOX_EXCEL_API[0] || (major === SANDBOX_EXCEL_API[0] && (minor ?? 0) <= SANDBOX_EXCEL_API[1]));
  }
  const requirements = Office.context?.requirements;
  return requirements ? requirements.isSetSupported(name, version) : false;
}

/**
 * Options of every Excel.run: wait while the user is editing a cell instead of failing
 * (delayForCellEdit; the client ignores it where the host lacks it), and make the run one undo
 * step where ExcelApi 1.20 is supported (feature-detected: the manifest asks for less).
 */
export function runOptions(supports: (name: string, version: string) => boolean): Excel.RunOptions {
  return supports('ExcelApi', '1.20') ? { delayForCellEdit: true, mergeUndoGroup: true } : { delayForCellEdit: true };
}

/** What the last action cost, as this layer counted it. */
export interface OperationStats {
  readonly action: string;
  readonly syncs: number;
  /** Largest request we queued between two syncs (our estimate of the JSON payload). */
  readonly maxRequestBytes: number;
  /** Largest response we received in one sync (JSON length of what was loaded). */
  readonly maxResponseBytes: number;
}

export interface RunDetails {
  readonly summary: RunSummary;
  readonly marksKept: number;
  /** Column letters of our result columns, in plan order. */
  readonly resultColumns: readonly string[];
}

export interface TailmarkWorkbookLayer extends WorkbookLayer {
  /** Stats of the most recent action (null before the first). */
  readonly lastStats: OperationStats | null;
  /** Details of the most recent successful run() (null before the first). */
  readonly lastRun: RunDetails | null;
}

export function createWorkbookLayer(run: ExcelRunner, options: WorkbookLayerOptions = {}): TailmarkWorkbookLayer {
  const budget = makeBudget(options.payloadLimit ?? PAYLOAD_LIMIT, options.safety ?? SAFETY);
  const now = options.now ?? (() => new Date());
  let lastStats: OperationStats | null = null;
  let lastRun: RunDetails | null = null;
  const supports = options.isSetSupported ?? officeSupports;

  async function act<T>(action: string, body: (sync: Syncer) => Promise<T>): Promise<T> {
    let syncer: Syncer | null = null;
    try {
      return await run(runOptions(supports), async (context) => {
        syncer = new Syncer(context, budget);
        return body(syncer);
      });
    } finally {
      const s: Syncer | null = syncer;
      if (s !== null) {
        const done: Syncer = s;
        lastStats = { action, syncs: done.syncs, maxRequestBytes: done.maxRequest, maxResponseBytes: done.maxResponse };
      }
    }
  }

  const layer: TailmarkWorkbookLayer = {
    get lastStats() {
      return lastStats;
    },
    get lastRun() {
      return lastRun;
    },
    detect(): Promise<DetectedTable> {
      return act('detect', (s) => detectTable(s));
    },
    readForPreview(table: DetectedTable, settings: RunSettings): Promise<PreviewData> {
      return act('preview', (s) => previewColumns(s, table, settings, supports));
    },
    async run(table: DetectedTable, settings: RunSettings, onProgress?: (p: RunProgress) => void, signal?: AbortSignal, record?: RunRecord): Promise<RunSummary> {
      if (signal?.aborted) throw new TailmarkError('cancelled', 'Cancelled. Nothing was written to the workbook.');
      const out = await act('run', (s) =>
        runScoring(s, table, settings, {
          now,
          ...(onProgress ? { onProgress } : {}),
          ...(signal ? { signal } : {}),
          ...(record ? { record } : {}),
          ...(options.pipeline ? { pipeline: options.pipeline } : {}),
          supports,
        }),
      );
      lastRun = { summary: out.summary, marksKept: out.marksKept, resultColumns: out.resultColumns };
      return out.summary;
    },
    remove(includeNotes: boolean, keepMarks = false): Promise<void> {
      return act('remove', (s) => removeResults(s, includeNotes, keepMarks));
    },
    exportMarks(toSheet: boolean): Promise<MarksExport> {
      return act('exportMarks', async (s) => {
        const out = await exportMarkRows(s, toSheet, now());
        return { rows: out.grid, sheet: out.sheet };
      });
    },
    readClaim(row: number): Promise<ClaimRecord> {
      return act('readClaim', (s) => readClaimRow(s, row));
    },
    loadReviewPrefs(): Promise<ReviewPrefs> {
      return act('loadReviewPrefs', (s) => loadReviewPrefs(s));
    },
    saveReviewPrefs(prefs: ReviewPrefs): Promise<void> {
      return act('saveReviewPrefs', (s) => saveReviewPrefs(s, prefs));
    },
    loadSettings(): Promise<RunSettings | null> {
      return act('loadSettings', (s) => loadRunSettings(s));
    },
    listExceptions(): Promise<readonly Exception[]> {
      return act('listExceptions', (s) => listExceptionRows(s));
    },
    followSelection(refresh: readonly number[]): Promise<SelectionFollow> {
      return act('followSelection', (s) => followSelection(s, refresh));
    },
    selectRow(row: number): Promise<void> {
      return act('selectRow', (s) => selectDataRow(s, row));
    },
    mark(rows: readonly number[], status: string | null, note: string | null): Promise<void> {
      return act('mark', (s) => markRows(s, rows, status, note, now()));
    },
    async onSelectionChanged(handler: () => void): Promise<() => void> {
      const runIn = options.runInContext;
      if (runIn) {
        // Microsoft's pattern ("Work with events using the Excel JavaScript API"): register in one
        // Excel.run, keep the EventHandlerResult, and later remove it in a batch run on its context.
        const result = await run(runOptions(supports), async (context) => {
          const r = context.workbook.onSelectionChanged.add(() => {
            handler();
            return Promise.resolve();
          });
          await context.sync();
          return r;
        });
        let removed = false;
        return () => {
          if (removed) return;
          removed = true;
          runIn(result.context, async (ctx) => {
            result.remove();
            await ctx.sync();
          }).catch((e: unknown) => options.onBackgroundError?.(e));
        };
      }
      // Fallback when the host gives no way to resume a context: the registration lives in an
      // Excel.run that stays open until unsubscribe, and is removed, and synced, through it.
      let release: () => void = () => undefined;
      const released = new Promise<void>((r) => {
        release = r;
      });
      await new Promise<void>((registered, failed) => {
        run(runOptions(supports), async (context) => {
          const result = context.workbook.onSelectionChanged.add(() => {
            handler();
            return Promise.resolve();
          });
          await context.sync();
          registered();
          await released;
          result.remove();
          await context.sync();
        }).catch((e: unknown) => {
          failed(e);
          options.onBackgroundError?.(e);
        });
      });
      let done = false;
      return () => {
        if (done) return;
        done = true;
        release();
      };
    },
  };
  return layer;
}

export { TailmarkError } from './api.js';
export type * from './api.js';
export { REQUIRED_EXCEL_API } from './api-members.js';
