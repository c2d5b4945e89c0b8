/**
 * The task pane's state and its pure reducer. `usePaneState` (the only hook that owns state) feeds
 * it actions; components only render what is here. No I/O, no React: testable in Node.
 */
import type { MethodId } from '../scoring/types.js';
import { DEFAULT_OPTIONS } from '../scoring/types.js';
import { REVIEW_STATUSES, statusLabel } from '../report/style.js';
import type { ReviewStatus } from '../report/types.js';
import type {
  ClaimRecord,
  DetectedColumn,
  DetectedTable,
  Exception,
  PreviewData,
  ReviewPrefs,
  RunProgress,
  RunSettings,
  RunSummary,
} from '../workbook/api.js';
import { TailmarkError } from '../workbook/api.js';
import { methodDefaultCutoff } from './engine.js';

export type Busy = null | 'detecting' | 'running' | 'marking' | 'removing' | 'loading';

/** The pane's sections: each can fold, and a message shows in the section whose control caused it. */
export const AREAS = ['table', 'method', 'chart', 'run', 'review', 'manage'] as const;
export type Area = (typeof AREAS)[number];

/** Orders of the follow-up list. */
export type ReviewOrder = 'score' | 'group' | 'sheet';
/** Status filters of the follow-up list: all, not finished, one status (by id), or no status. */
export type ReviewFilter = 'all' | 'unfinished' | 'none' | ReviewStatus['id'];

export interface PaneError {
  /** TailmarkError code, or 'unexpected'. */
  readonly code: string;
  readonly message: string;
  /** The section whose action failed (the message shows there). */
  readonly area?: Area;
}

export interface PaneNotice {
  readonly text: string;
  readonly area: Area;
}

/** What a pending move is waiting for: the reviewer's answer about an unsaved status or note. */
export interface PendingMove {
  /** Data row the reviewer asked to go to. */
  readonly row: number;
  /** True when the request came from a selection in the sheet (no need to select the row again). */
  readonly fromSheet: boolean;
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
  /** The budget (claims) that set the current cutoff, until the cutoff is changed another way. */
  readonly budgetUsed: number | null;
  /** Optional reason the reviewer gives for a cutoff other than the saved one (goes to the log). */
  readonly cutoffReason: string;
  readonly busy: Busy;
  readonly progress: RunProgress | null;
  /** Progress shows only once a run has taken longer than a moment. */
  readonly showProgress: boolean;
  readonly summary: RunSummary | null;
  readonly exceptions: readonly Exception[];
  /** Data row of the claim under review (an exception, or any row picked in the sheet); null = none. */
  readonly currentRow: number | null;
  readonly order: ReviewOrder;
  readonly filter: ReviewFilter;
  /** A move held back because the drafts are unsaved. */
  readonly pending: PendingMove | null;
  /** The current claim as the sheet shows it (null while loading). */
  readonly claim: ClaimRecord | null;
  readonly prefs: ReviewPrefs;
  /** Data rows ticked for a bulk mark. */
  readonly checked: readonly number[];
  readonly statusDraft: string;
  readonly noteDraft: string;
  /** The reviewer has edited the drafts since they were loaded: a refresh must not overwrite them. */
  readonly draftDirty: boolean;
  readonly error: PaneError | null;
  readonly notice: PaneNotice | null;
  readonly confirmRemove: boolean;
  readonly folded: readonly Area[];
  /** Show every peer group in the run summary, not only those that matter. */
  readonly allGroups: boolean;
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
  budgetUsed: null,
  cutoffReason: '',
  busy: 'detecting',
  progress: null,
  showProgress: false,
  summary: null,
  exceptions: [],
  currentRow: null,
  order: 'score',
  filter: 'all',
  pending: null,
  claim: null,
  prefs: { reviewer: null, detailColumns: null },
  checked: [],
  statusDraft: '',
  noteDraft: '',
  draftDirty: false,
  error: null,
  notice: null,
  confirmRemove: false,
  folded: [],
  allGroups: false,
};

export type Action =
  | { readonly type: 'busy'; readonly busy: Busy }
  | { readonly type: 'detected'; readonly table: DetectedTable; readonly saved: RunSettings | null }
  | { readonly type: 'failed'; readonly error: unknown; readonly area?: Area }
  | { readonly type: 'settings'; readonly patch: Partial<RunSettings> }
  | { readonly type: 'preview-loading' }
  | { readonly type: 'preview-loaded'; readonly key: string; readonly data: PreviewData }
  | { readonly type: 'chart'; readonly group?: string | null; readonly column?: string | null }
  | { readonly type: 'budget'; readonly text: string }
  | { readonly type: 'budget-applied'; readonly cutoff: number; readonly claims: number }
  | { readonly type: 'cutoff-reason'; readonly text: string }
  | { readonly type: 'run-start' }
  | { readonly type: 'run-progress'; readonly progress: RunProgress }
  | { readonly type: 'show-progress' }
  | { readonly type: 'run-done'; readonly summary: RunSummary; readonly settings: RunSettings }
  | { readonly type: 'exceptions'; readonly list: readonly Exception[]; readonly keepRow?: number | null }
  /** Rows of the follow-up list read again (a selection change): null = neither flagged nor marked now. */
  | { readonly type: 'exception-rows'; readonly rows: readonly { readonly row: number; readonly exception: Exception | null }[] }
  | { readonly type: 'goto'; readonly row: number; readonly fromSheet?: boolean; readonly force?: boolean; readonly claim?: ClaimRecord | null }
  | { readonly type: 'pending-done' }
  | { readonly type: 'order'; readonly order: ReviewOrder }
  | { readonly type: 'filter'; readonly filter: ReviewFilter }
  | { readonly type: 'claim'; readonly claim: ClaimRecord }
  | { readonly type: 'prefs'; readonly prefs: ReviewPrefs }
  | { readonly type: 'check'; readonly row: number; readonly on: boolean }
  | { readonly type: 'check-none' }
  | { readonly type: 'drafts'; readonly status?: string; readonly note?: string }
  | { readonly type: 'discard-drafts' }
  | { readonly type: 'marked'; readonly count: number; readonly quiet?: boolean }
  | { readonly type: 'confirm-remove'; readonly open: boolean }
  | { readonly type: 'removed'; readonly includeNotes: boolean; readonly keptMarks: number; readonly lostMarks: number }
  | { readonly type: 'notice'; readonly text: string | null; readonly area?: Area }
  | { readonly type: 'fold'; readonly area: Area; readonly folded: boolean }
  | { readonly type: 'all-groups'; readonly on: boolean }
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

/**
 * Columns offered as group columns: key-like columns only. Free text (notes, descriptions), dates,
 * ids and amounts would make a group per claim; a column already chosen stays offered.
 */
const NOT_A_PEER_GROUP = /note|comment|descr|memo|remark|purpose|detail|reason|date|time|\bday\b|when/i;

export function groupCandidates(table: DetectedTable, chosen: readonly string[] = []): readonly DetectedColumn[] {
  return table.columns.filter((c) => (c.guess === 'key' && !NOT_A_PEER_GROUP.test(c.header)) || chosen.includes(c.header));
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
    reviewer: null,
    detailColumns: null,
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


/** Statuses after which a claim's follow-up is finished. */
export const DONE_LABELS: readonly string[] = REVIEW_STATUSES.filter((r) => r.id === 'cleared' || r.id === 'escalated').map((r) => r.label);
export const labelOf = (id: ReviewStatus['id']): string => statusLabel(id);

/** Status labels that mean the follow-up is finished. The others count as open. */
export function isDone(status: string, doneLabels: readonly string[]): boolean {
  return doneLabels.includes(status);
}

export function reviewCounts(list: readonly Exception[], doneLabels: readonly string[]): { open: number; done: number } {
  let done = 0;
  for (const e of list) if (isDone(e.status, doneLabels)) done++;
  return { open: list.length - done, done };
}

/** Does an exception pass a status filter? `labelOf` maps a status id to its label. */
export function passesFilter(e: Exception, filter: ReviewFilter, labelOf: (id: ReviewStatus['id']) => string, doneLabels: readonly string[]): boolean {
  switch (filter) {
    case 'all':
      return true;
    case 'unfinished':
      return !isDone(e.status, doneLabels);
    case 'none':
      return e.status === '';
    default:
      return e.status === labelOf(filter) || (filter === 'open' && e.status === '');
  }
}

const magnitude = (e: Exception) => (e.score === null ? -1 : Math.abs(e.score));

/**
 * The follow-up list as the reviewer asked to see it: filtered by status, then ordered by score
 * (largest |score| first), by peer group (then score), or in sheet order. Ties keep sheet order.
 */
export function reviewView(
  list: readonly Exception[],
  order: ReviewOrder,
  filter: ReviewFilter,
  labelOf: (id: ReviewStatus['id']) => string,
  doneLabels: readonly string[],
): Exception[] {
  const out = list.filter((e) => passesFilter(e, filter, labelOf, doneLabels));
  const bySheet = (a: Exception, b: Exception) => a.row - b.row;
  if (order === 'sheet') return out.sort(bySheet);
  if (order === 'score') return out.sort((a, b) => magnitude(b) - magnitude(a) || bySheet(a, b));
  return out.sort((a, b) => (a.group < b.group ? -1 : a.group > b.group ? 1 : 0) || magnitude(b) - magnitude(a) || bySheet(a, b));
}

/** The row after (delta > 0) or before the current one in a view, wrapping; null for an empty view. */
export function stepRow(view: readonly Exception[], currentRow: number | null, delta: number): number | null {
  if (view.length === 0) return null;
  const at = currentRow === null ? -1 : view.findIndex((e) => e.row === currentRow);
  if (at < 0) return delta >= 0 ? view[0].row : view[view.length - 1].row;
  const n = view.length;
  return view[(((at + delta) % n) + n) % n].row;
}

function sameTable(a: DetectedTable | null, b: DetectedTable): boolean {
  if (!a) return false;
  if (a.sheetName !== b.sheetName) return false;
  const ha = a.columns.map((c) => c.header).join('\u001f');
  const hb = b.columns.map((c) => c.header).join('\u001f');
  // Our own result columns may have been added since: compare the reviewer's data columns.
  return hb.startsWith(ha) || ha.startsWith(hb);
}

function draftsFor(list: readonly Exception[], row: number | null): { statusDraft: string; noteDraft: string; draftDirty: false } {
  const e = row === null ? undefined : list.find((x) => x.row === row);
  return { statusDraft: e ? e.status : '', noteDraft: e ? e.note : '', draftDirty: false };
}

/** The section a failure belongs to, from what the pane was doing. */
function areaOf(busy: Busy): Area {
  switch (busy) {
    case 'running':
      return 'run';
    case 'marking':
      return 'review';
    case 'removing':
      return 'manage';
    default:
      return 'table';
  }
}

const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

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
        error: state.error?.area === 'table' ? null : state.error,
        ...(keep
          ? {}
          : { chartGroup: null, chartColumn: null, preview: null, summary: null, exceptions: [], currentRow: null, claim: null, checked: [], pending: null }),
      };
    }
    case 'failed': {
      const error = toPaneError(action.error);
      const area = action.area ?? areaOf(state.busy);
      if (error.code === 'cancelled') {
        return {
          ...state,
          busy: null,
          progress: null,
          showProgress: false,
          notice: { area: 'run', text: 'Run cancelled. The workbook is as it was before the run.' },
        };
      }
      return { ...state, busy: null, progress: null, showProgress: false, previewLoading: false, error: { ...error, area } };
    }
    case 'settings': {
      if (!state.settings) return state;
      const next = patchSettings(state.settings, action.patch);
      // A cutoff set any other way than from the budget is no longer "from a review budget".
      const budgetUsed = action.patch.cutoff !== undefined || next.method !== state.settings.method ? null : state.budgetUsed;
      return { ...state, settings: next, budgetUsed, notice: state.notice?.area === 'method' ? null : state.notice };
    }
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
    case 'budget-applied':
      if (!state.settings) return state;
      return { ...state, settings: patchSettings(state.settings, { cutoff: action.cutoff }), budgetUsed: action.claims, notice: null };
    case 'cutoff-reason':
      return { ...state, cutoffReason: action.text };
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
        cutoffReason: '',
        allGroups: false,
        // After a run the reviewer's work is the follow-up: fold the choices away.
        folded: [...new Set<Area>([...state.folded, 'table', 'method', 'chart'])],
      };
    case 'exceptions': {
      const list = action.list;
      const rows = new Set(list.map((e) => e.row));
      let currentRow = state.currentRow;
      if (action.keepRow !== undefined && action.keepRow !== null) currentRow = action.keepRow;
      else if (currentRow !== null && !rows.has(currentRow) && state.claim?.row !== currentRow) currentRow = null;
      if (currentRow === null && list.length > 0) {
        // Start with the first claim of the list as the reviewer orders it (worst first by default).
        const first = reviewView(list, state.order, state.filter, labelOf, DONE_LABELS)[0] ?? list[0];
        currentRow = first.row;
      }
      const sameClaim = currentRow === state.currentRow;
      const drafts = state.draftDirty && sameClaim ? {} : draftsFor(list, currentRow);
      return {
        ...state,
        exceptions: list,
        currentRow,
        claim: sameClaim ? state.claim : null,
        checked: state.checked.filter((r) => rows.has(r)),
        ...drafts,
      };
    }
    case 'exception-rows': {
      const fresh = new Map(action.rows.map((u) => [u.row, u.exception]));
      const list = [...state.exceptions.filter((e) => !fresh.has(e.row)), ...action.rows.flatMap((u) => (u.exception ? [u.exception] : []))];
      return reducer(state, { type: 'exceptions', list: list.sort((a, b) => a.row - b.row) });
    }
    case 'goto': {
      const claim = action.claim ?? null;
      if (action.row === state.currentRow) return { ...state, pending: null, ...(claim ? { claim } : {}) };
      if (state.draftDirty && !action.force) return { ...state, pending: { row: action.row, fromSheet: action.fromSheet === true } };
      return { ...state, currentRow: action.row, claim, pending: null, ...draftsFor(state.exceptions, action.row) };
    }
    case 'pending-done':
      return { ...state, pending: null };
    case 'order':
      return { ...state, order: action.order };
    case 'filter':
      return { ...state, filter: action.filter };
    case 'claim':
      return action.claim.row === state.currentRow ? { ...state, claim: action.claim } : state;
    case 'prefs':
      return { ...state, prefs: action.prefs };
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
    case 'discard-drafts':
      return { ...state, ...draftsFor(state.exceptions, state.currentRow) };
    case 'marked':
      return {
        ...state,
        busy: null,
        checked: [],
        draftDirty: false,
        notice: action.quiet ? state.notice : { area: 'review', text: `Saved the mark on ${plural(action.count, 'claim')}.` },
      };
    case 'confirm-remove':
      return { ...state, confirmRemove: action.open };
    case 'removed': {
      const parts = [
        action.keptMarks > 0
          ? `Removed the score, flag and reason columns and the highlighting. The status and note columns stay as plain cells (${plural(action.keptMarks, 'marked claim')}); a later run picks them up again.`
          : 'Removed the result columns and the highlighting.',
        action.lostMarks > 0 ? `${plural(action.lostMarks, 'status or note', 'statuses and notes')} were deleted with them.` : '',
        action.includeNotes ? 'The notes and log sheets were deleted.' : 'The notes and log sheets are kept.',
        'Your claim data was not changed.',
      ];
      return {
        ...state,
        busy: null,
        confirmRemove: false,
        summary: null,
        exceptions: [],
        currentRow: null,
        claim: null,
        pending: null,
        checked: [],
        table: state.table ? { ...state.table, hasResults: false } : state.table,
        notice: { area: 'manage', text: parts.filter(Boolean).join(' ') },
      };
    }
    case 'notice':
      return { ...state, notice: action.text === null ? null : { text: action.text, area: action.area ?? 'table' } };
    case 'fold': {
      const rest = state.folded.filter((a) => a !== action.area);
      return { ...state, folded: action.folded ? [...rest, action.area] : rest };
    }
    case 'all-groups':
      return { ...state, allGroups: action.on };
    case 'dismiss':
      return { ...state, error: null, notice: null };
  }
}

/** The rows a mark applies to: the ticked ones, else the claim under review. */
export function rowsToMark(state: PaneState): readonly number[] {
  if (state.checked.length > 0) return state.checked;
  return state.currentRow === null ? [] : [state.currentRow];
}

/** Claims that carry a reviewer's mark (a status other than the default, or a note). */
export function markedCount(list: readonly Exception[], defaultLabel: string): number {
  let n = 0;
  for (const e of list) if ((e.status !== '' && e.status !== defaultLabel) || e.note !== '') n++;
  return n;
}
