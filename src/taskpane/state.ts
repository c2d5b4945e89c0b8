/**
 * The task pane's state and its pure reducer. `usePaneState` (the only hook that owns state) feeds
 * it actions; components only render what is here. No I/O, no React: testable in Node.
 */
import type { MethodId } from '../scoring/types.js';
import { DEFAULT_OPTIONS } from '../scoring/types.js';
import type {
  DetectedColumn,
  DetectedTable,
  Exception,
  PreviewData,
  RunProgress,
  RunSettings,
  RunSummary,
} from '../workbook/api.js';
import { TailmarkError } from '../workbook/api.js';
import { methodDefaultCutoff } from './engine.js';

export type Busy = null | 'detecting' | 'running' | 'marking' | 'removing' | 'loading';

export interface PaneError {
  /** TailmarkError code, or 'unexpected'. */
  readonly code: string;
  readonly message: string;
}

export interface PaneState {
  readonly table: DetectedTable | null;
  /** The reviewer's current choices (a draft until Run). */
  readonly settings: RunSettings | null;
  /** What the workbook remembers from the last run. */
  readonly saved: RunSettings | null;
  readonly preview: { readonly key: string; readonly data: PreviewData } | null;
  readonly previewLoading: boolean;
  /** Group label and value column the chart shows (null = the one with most flags). */
  readonly chartGroup: string | null;
  readonly chartColumn: string | null;
  /** Text in the "I can review N claims" field. */
  readonly budget: string;
  readonly busy: Busy;
  readonly progress: RunProgress | null;
  /** Progress shows only once a run has taken longer than a moment. */
  readonly showProgress: boolean;
  readonly summary: RunSummary | null;
  readonly exceptions: readonly Exception[];
  /** Index into `exceptions` of the claim under review. */
  readonly current: number;
  /** Data rows ticked for a bulk mark. */
  readonly checked: readonly number[];
  readonly statusDraft: string;
  readonly noteDraft: string;
  /** The reviewer has edited the drafts since they were loaded: a refresh must not overwrite them. */
  readonly draftDirty: boolean;
  readonly error: PaneError | null;
  readonly notice: string | null;
  readonly confirmRemove: boolean;
}

export const initialState: PaneState = {
  table: null,
  settings: null,
  saved: null,
  preview: null,
  previewLoading: false,
  chartGroup: null,
  chartColumn: null,
  budget: '',
  busy: 'detecting',
  progress: null,
  showProgress: false,
  summary: null,
  exceptions: [],
  current: 0,
  checked: [],
  statusDraft: '',
  noteDraft: '',
  draftDirty: false,
  error: null,
  notice: null,
  confirmRemove: false,
};

export type Action =
  | { readonly type: 'busy'; readonly busy: Busy }
  | { readonly type: 'detected'; readonly table: DetectedTable; readonly saved: RunSettings | null }
  | { readonly type: 'failed'; readonly error: unknown }
  | { readonly type: 'settings'; readonly patch: Partial<RunSettings> }
  | { readonly type: 'preview-loading' }
  | { readonly type: 'preview-loaded'; readonly key: string; readonly data: PreviewData }
  | { readonly type: 'chart'; readonly group?: string | null; readonly column?: string | null }
  | { readonly type: 'budget'; readonly text: string }
  | { readonly type: 'run-start' }
  | { readonly type: 'run-progress'; readonly progress: RunProgress }
  | { readonly type: 'show-progress' }
  | { readonly type: 'run-done'; readonly summary: RunSummary; readonly settings: RunSettings }
  | { readonly type: 'exceptions'; readonly list: readonly Exception[]; readonly keepRow?: number | null }
  | { readonly type: 'move'; readonly delta: number }
  | { readonly type: 'goto'; readonly index: number }
  | { readonly type: 'check'; readonly row: number; readonly on: boolean }
  | { readonly type: 'check-none' }
  | { readonly type: 'drafts'; readonly status?: string; readonly note?: string }
  | { readonly type: 'marked'; readonly count: number }
  | { readonly type: 'confirm-remove'; readonly open: boolean }
  | { readonly type: 'removed'; readonly includeNotes: boolean }
  | { readonly type: 'notice'; readonly text: string | null }
  | { readonly type: 'dismiss' };

/** Turns anything thrown into what the pane shows. */
export function toPaneError(error: unknown): PaneError {
  if (error instanceof TailmarkError) return { code: error.code, message: error.message };
  const code = typeof error === 'object' && error !== null && 'code' in error ? String(error.code) : '';
  const message = error instanceof Error ? error.message : String(error);
  // Office.js errors carry a code such as "InvalidSelection" or "AccessDenied".
  return { code: code ? `office:${code}` : 'unexpected', message };
}

function isAmountLike(c: DetectedColumn): boolean {
  return c.guess === 'amount' || (c.guess !== 'id' && c.guess !== 'date' && c.numericShare >= 0.8);
}

/** Columns offered as value columns: mostly numbers. */
export function valueCandidates(table: DetectedTable): readonly DetectedColumn[] {
  return table.columns.filter((c) => c.numericShare > 0 && c.guess !== 'empty' && c.guess !== 'date' && c.guess !== 'id');
}

/** Columns offered as group columns: keys and short text. */
export function groupCandidates(table: DetectedTable): readonly DetectedColumn[] {
  return table.columns.filter((c) => c.guess !== 'empty' && c.guess !== 'amount' && c.guess !== 'date' && c.guess !== 'id');
}

/** True when every column a saved setting names is present in the table. */
export function settingsFit(table: DetectedTable, s: RunSettings): boolean {
  const headers = new Set(table.columns.map((c) => c.header));
  return (
    s.valueColumns.length > 0 &&
    s.valueColumns.every((h) => headers.has(h)) &&
    s.groupColumns.every((h) => headers.has(h)) &&
    (s.idColumn === null || headers.has(s.idColumn))
  );
}

const PEER_HEADER = /cost.?cent|categor|department|dept|expense.?type|account|division|unit|region|project|team/i;

/**
 * Grouping columns to propose: key-like columns whose header names a usual peer dimension (cost
 * centre, category...), else the coarsest key columns (fewest distinct values). At most two.
 */
export function guessGroupColumns(columns: readonly DetectedColumn[]): DetectedColumn[] {
  const keys = columns.filter((c) => c.guess === 'key');
  const named = keys.filter((c) => PEER_HEADER.test(c.header));
  const pool = named.length > 0 ? named : [...keys].sort((a, b) => a.distinct - b.distinct);
  return pool.slice(0, 2);
}

/** The starting choices for a freshly detected table: saved settings when they fit, else our guesses. */
export function initialSettings(table: DetectedTable, saved: RunSettings | null): RunSettings {
  if (saved && settingsFit(table, saved)) return saved;
  const amount = table.columns.find((c) => c.guess === 'amount') ?? table.columns.find(isAmountLike);
  const keys = guessGroupColumns(table.columns.filter((c) => c !== amount));
  const id = table.columns.find((c) => c.guess === 'id');
  const method: MethodId = DEFAULT_OPTIONS.method;
  return {
    valueColumns: amount ? [amount.header] : [],
    groupColumns: keys.map((c) => c.header),
    idColumn: id ? id.header : null,
    method,
    cutoff: methodDefaultCutoff(method),
    direction: DEFAULT_OPTIONS.direction,
    logScale: DEFAULT_OPTIONS.logScale,
    minGroupSize: DEFAULT_OPTIONS.minGroupSize,
    smallGroups: DEFAULT_OPTIONS.smallGroups,
    decimal: 'auto',
  };
}

/** Applies a change to the draft settings, keeping them consistent. */
export function patchSettings(s: RunSettings, patch: Partial<RunSettings>): RunSettings {
  let next: RunSettings = { ...s, ...patch };
  if (patch.method !== undefined && patch.method !== s.method && patch.cutoff === undefined) {
    next = { ...next, cutoff: methodDefaultCutoff(patch.method) };
  }
  if (patch.valueColumns) {
    // A column cannot be both scored and a grouping key.
    const values = new Set(patch.valueColumns);
    next = { ...next, groupColumns: next.groupColumns.filter((g) => !values.has(g)) };
  }
  if (patch.groupColumns) {
    const groups = new Set(patch.groupColumns);
    next = { ...next, valueColumns: next.valueColumns.filter((v) => !groups.has(v)) };
  }
  if (!Number.isFinite(next.minGroupSize) || next.minGroupSize < 2) next = { ...next, minGroupSize: 2 };
  return next;
}

/** Key of the raw data the preview needs (columns only: method and cutoff do not need a re-read). */
export function previewKey(table: DetectedTable, s: RunSettings): string {
  return JSON.stringify([table.address, table.rowCount, s.valueColumns, s.groupColumns]);
}

/** Status labels that mean the follow-up is finished. The others count as open. */
export function isDone(status: string, doneLabels: readonly string[]): boolean {
  return doneLabels.includes(status);
}

export function reviewCounts(list: readonly Exception[], doneLabels: readonly string[]): { open: number; done: number } {
  let done = 0;
  for (const e of list) if (isDone(e.status, doneLabels)) done++;
  return { open: list.length - done, done };
}

function sameTable(a: DetectedTable | null, b: DetectedTable): boolean {
  if (!a) return false;
  if (a.sheetName !== b.sheetName) return false;
  const ha = a.columns.map((c) => c.header).join('\u001f');
  const hb = b.columns.map((c) => c.header).join('\u001f');
  // Our own result columns may have been added since: compare the reviewer's data columns.
  return hb.startsWith(ha) || ha.startsWith(hb);
}

function clampIndex(i: number, n: number): number {
  if (n === 0) return 0;
  return ((i % n) + n) % n;
}

function draftsFor(list: readonly Exception[], index: number): { statusDraft: string; noteDraft: string; draftDirty: false } {
  const e = list[index];
  return { statusDraft: e ? e.status : '', noteDraft: e ? e.note : '', draftDirty: false };
}

export function reducer(state: PaneState, action: Action): PaneState {
  switch (action.type) {
    case 'busy':
      return { ...state, busy: action.busy };
    case 'detected': {
      const keep = sameTable(state.table, action.table) && state.settings !== null;
      const settings = keep && state.settings ? state.settings : initialSettings(action.table, action.saved);
      return {
        ...state,
        table: action.table,
        saved: action.saved,
        settings,
        busy: state.busy === 'detecting' ? null : state.busy,
        error: null,
        ...(keep ? {} : { chartGroup: null, chartColumn: null, preview: null, summary: null, exceptions: [], current: 0, checked: [] }),
      };
    }
    case 'failed': {
      const error = toPaneError(action.error);
      if (error.code === 'cancelled') {
        return { ...state, busy: null, progress: null, showProgress: false, notice: 'Run cancelled. The workbook is as it was before the run.' };
      }
      return { ...state, busy: null, progress: null, showProgress: false, previewLoading: false, error };
    }
    case 'settings':
      if (!state.settings) return state;
      return { ...state, settings: patchSettings(state.settings, action.patch), notice: null };
    case 'preview-loading':
      return { ...state, previewLoading: true };
    case 'preview-loaded':
      return { ...state, preview: { key: action.key, data: action.data }, previewLoading: false };
    case 'chart':
      return {
        ...state,
        chartGroup: action.group !== undefined ? action.group : state.chartGroup,
        chartColumn: action.column !== undefined ? action.column : state.chartColumn,
      };
    case 'budget':
      return { ...state, budget: action.text };
    case 'run-start':
      return { ...state, busy: 'running', progress: null, showProgress: false, error: null, notice: null, confirmRemove: false };
    case 'run-progress':
      return { ...state, progress: action.progress };
    case 'show-progress':
      return state.busy === 'running' ? { ...state, showProgress: true } : state;
    case 'run-done':
      return {
        ...state,
        busy: null,
        progress: null,
        showProgress: false,
        summary: action.summary,
        saved: action.settings,
        settings: action.settings,
        table: state.table ? { ...state.table, hasResults: true } : state.table,
        notice: null,
      };
    case 'exceptions': {
      const list = action.list;
      let current = clampIndex(state.current, list.length);
      if (action.keepRow !== undefined && action.keepRow !== null) {
        const at = list.findIndex((e) => e.row === action.keepRow);
        if (at >= 0) current = at;
      }
      const rows = new Set(list.map((e) => e.row));
      const sameClaim = list[current]?.row === state.exceptions[state.current]?.row;
      const drafts = state.draftDirty && sameClaim ? {} : draftsFor(list, current);
      return { ...state, exceptions: list, current, checked: state.checked.filter((r) => rows.has(r)), ...drafts };
    }
    case 'move': {
      if (state.exceptions.length === 0) return state;
      const current = clampIndex(state.current + action.delta, state.exceptions.length);
      return { ...state, current, ...draftsFor(state.exceptions, current) };
    }
    case 'goto': {
      if (state.exceptions.length === 0) return state;
      const current = clampIndex(action.index, state.exceptions.length);
      return { ...state, current, ...draftsFor(state.exceptions, current) };
    }
    case 'check': {
      const set = new Set(state.checked);
      if (action.on) set.add(action.row);
      else set.delete(action.row);
      return { ...state, checked: [...set].sort((a, b) => a - b) };
    }
    case 'check-none':
      return { ...state, checked: [] };
    case 'drafts':
      return {
        ...state,
        statusDraft: action.status !== undefined ? action.status : state.statusDraft,
        noteDraft: action.note !== undefined ? action.note : state.noteDraft,
        draftDirty: true,
      };
    case 'marked':
      return { ...state, busy: null, checked: [], draftDirty: false, notice: `Saved the mark on ${action.count} claim${action.count === 1 ? '' : 's'}.` };
    case 'confirm-remove':
      return { ...state, confirmRemove: action.open };
    case 'removed':
      return {
        ...state,
        busy: null,
        confirmRemove: false,
        summary: null,
        exceptions: [],
        current: 0,
        checked: [],
        table: state.table ? { ...state.table, hasResults: false } : state.table,
        notice: action.includeNotes
          ? 'Removed the result columns, highlighting and the notes sheet. Your own cells are untouched.'
          : 'Removed the result columns and highlighting. The notes sheet is kept. Your own cells are untouched.',
      };
    case 'notice':
      return { ...state, notice: action.text };
    case 'dismiss':
      return { ...state, error: null, notice: null };
  }
}

/** The rows a mark applies to: the ticked ones, else the claim under review. */
export function rowsToMark(state: PaneState): readonly number[] {
  if (state.checked.length > 0) return state.checked;
  const e = state.exceptions[state.current];
  return e ? [e.row] : [];
}
