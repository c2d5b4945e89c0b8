/**
 * The one hook that owns the task pane's state. It talks to the workbook only through the
 * injected `WorkbookLayer`; components receive `PaneModel` and only render it.
 */
import { useCallback, useDeferredValue, useEffect, useMemo, useReducer, useRef, useState } from 'react';
import type { BudgetAnswer } from '../pipeline/budget.js';
import { toCsv } from '../report/marksExport.js';
import type { Exception, PreviewData, ReviewPrefs, RunSettings, WorkbookLayer } from '../workbook/api.js';
import { downloadBlob } from './download.js';
import type { ChartData, ClaimContext, PreviewSummary } from './engine.js';
import { createPaneEngine } from './paneEngine.js';
import {
  DONE_LABELS,
  initialState,
  labelOf,
  previewKey,
  reducer,
  reviewView,
  rowsToMark,
  stepRow,
  type Area,
  type PaneState,
  type ReviewFilter,
  type ReviewOrder,
} from './state.js';
import { selectionActions } from './selection.js';

/** How long a run may take before the progress bar appears, ms. */
export const PROGRESS_DELAY_MS = 300;
/** How long after our own selectRow we wait for its selection-changed event, ms. */
export const OWN_SELECTION_GRACE_MS = 1000;

export interface PaneActions {
  readonly refresh: () => void;
  readonly setSettings: (patch: Partial<RunSettings>) => void;
  readonly setChart: (group: string | null, column?: string | null) => void;
  readonly setBudget: (text: string) => void;
  readonly applyBudget: () => void;
  readonly run: () => void;
  readonly rerunSaved: () => void;
  readonly cancel: () => void;
  readonly move: (delta: number) => void;
  /** Show a claim (any data row); held back while the drafts are unsaved. */
  readonly goToRow: (row: number) => void;
  /** Answer to the unsaved-changes question of a held-back move. */
  readonly resolvePending: (answer: 'save' | 'discard' | 'stay') => void;
  readonly setOrder: (order: ReviewOrder) => void;
  readonly setFilter: (filter: ReviewFilter) => void;
  readonly setPrefs: (prefs: ReviewPrefs) => void;
  readonly check: (row: number, on: boolean) => void;
  readonly setDrafts: (d: { status?: string; note?: string }) => void;
  readonly saveMark: () => void;
  /** Save the current claim's status and note, then show the next claim of the list. */
  readonly saveAndNext: () => void;
  readonly setCutoffReason: (text: string) => void;
  readonly askRemove: (open: boolean) => void;
  readonly remove: (includeNotes: boolean, keepMarks: boolean) => void;
  /** Keep the marks before a removal: a CSV download or a new sheet; resolves to what happened, in words. */
  readonly exportMarks: (to: 'csv' | 'sheet') => Promise<string>;
  readonly fold: (area: Area, folded: boolean) => void;
  readonly showAllGroups: (on: boolean) => void;
  readonly dismiss: () => void;
}

export interface PaneModel {
  readonly state: PaneState;
  readonly preview: PreviewSummary | null;
  /** Why the preview could not be worked out (shown in place of it), or null. */
  readonly previewError: string | null;
  readonly chart: ChartData | null;
  /** Groups offered in the chart picker, most flags first. */
  readonly chartGroups: readonly string[];
  /** The follow-up list as ordered and filtered. */
  readonly view: readonly Exception[];
  /** The claim under review in its peer group (null when the data read for the pane is not the last run's). */
  readonly context: ClaimContext | null;
  readonly actions: PaneActions;
}

/** Same columns as the last run, so the pane's own read of the data lines up with the sheet's results. */
function sameColumns(a: RunSettings, b: RunSettings): boolean {
  return JSON.stringify([a.valueColumns, a.groupColumns]) === JSON.stringify([b.valueColumns, b.groupColumns]);
}

/** File name of the marks saved before a removal. */
const MARKS_CSV_NAME = 'tailmark-marks.csv';

export function usePaneState(layer: WorkbookLayer): PaneModel {
  const [state, dispatch] = useReducer(reducer, initialState);
  const stateRef = useRef(state);
  stateRef.current = state;
  const abortRef = useRef<AbortController | null>(null);
  /** Selection-changed events still expected from our own selectRow calls (not the reviewer's). */
  const ownEvents = useRef(0);
  const mounted = useRef(true);

  const loadExceptions = useCallback(
    async (keepRow: number | null = null) => {
      const list = await layer.listExceptions();
      if (mounted.current) dispatch({ type: 'exceptions', list, keepRow });
    },
    [layer],
  );

  const detect = useCallback(
    async (quiet: boolean) => {
      if (!quiet) dispatch({ type: 'busy', busy: 'detecting' });
      try {
        const [table, saved] = await Promise.all([layer.detect(), layer.loadSettings()]);
        if (!mounted.current) return;
        dispatch({ type: 'detected', table, saved });
        if (table.hasResults) {
          await loadExceptions(stateRef.current.currentRow);
          // A claim row selected in the sheet is shown in the follow-up view.
          const row = table.selectedRow;
          if (quiet && row !== null && row !== undefined && mounted.current) dispatch({ type: 'goto', row, fromSheet: true });
        }
      } catch (error) {
        if (mounted.current) dispatch({ type: 'failed', error });
      }
    },
    [layer, loadExceptions],
  );

  /** A selection change in the sheet: after a run, only the selected claim and the rows it may have changed. */
  const follow = useCallback(async () => {
    try {
      const actions = await selectionActions(layer, stateRef.current);
      if (actions === 'detect') return await detect(true);
      if (mounted.current) actions.forEach(dispatch);
    } catch (error) {
      if (mounted.current) dispatch({ type: 'failed', error, area: 'review' });
    }
  }, [layer, detect]);

  // First detection and following the selection.
  useEffect(() => {
    mounted.current = true;
    let active = true;
    let unsubscribe: (() => void) | null = null;
    let timer: ReturnType<typeof setTimeout> | null = null;
    void detect(false);
    layer
      .onSelectionChanged(() => {
        if (!active) return;
        if (ownEvents.current > 0) {
          ownEvents.current--;
          return;
        }
        if (timer) clearTimeout(timer);
        timer = setTimeout(() => {
          // While a run or a mark is writing, the selection moves because of us: ignore it.
          if (active && stateRef.current.busy === null) void follow();
        }, 120);
      })
      .then((off) => {
        if (active) unsubscribe = off;
        else off();
      })
      .catch((error: unknown) => {
        if (active) dispatch({ type: 'failed', error });
      });
    return () => {
      active = false;
      mounted.current = false;
      if (timer) clearTimeout(timer);
      unsubscribe?.();
    };
  }, [layer, detect, follow]);

  // Back from the sheet (the pane's window regains focus): statuses may have been edited there.
  useEffect(() => {
    const onFocus = () => {
      const st = stateRef.current;
      if (st.busy === null && st.table?.hasResults) {
        loadExceptions(st.currentRow).catch((error: unknown) => dispatch({ type: 'failed', error, area: 'review' }));
      }
    };
    window.addEventListener('focus', onFocus);
    return () => window.removeEventListener('focus', onFocus);
  }, [loadExceptions]);

  // Read the chosen columns for the live preview whenever they change.
  const key = state.table && state.settings ? previewKey(state.table, state.settings) : null;
  useEffect(() => {
    const { table, settings } = stateRef.current;
    if (!key || !table || !settings || settings.valueColumns.length === 0) return;
    if (stateRef.current.preview?.key === key) return;
    let stale = false;
    dispatch({ type: 'preview-loading' });
    layer
      .readForPreview(table, settings)
      .then((data) => {
        if (!stale && mounted.current) dispatch({ type: 'preview-loaded', key, data });
      })
      .catch((error: unknown) => {
        if (!stale && mounted.current) dispatch({ type: 'failed', error });
      });
    return () => {
      stale = true;
    };
  }, [key, layer]);

  // What-if scoring (live counts, chart, budget, the claim's context) happens in a worker that holds
  // the pane's read of the data (paneEngine.ts); the pane's thread only asks and shows the answers.
  const engine = useMemo(() => createPaneEngine(), []);
  useEffect(() => () => engine.dispose(), [engine]);
  const settings = useDeferredValue(state.settings);
  const data = state.preview && state.preview.key === key ? state.preview.data : null;
  useEffect(() => {
    if (data) engine.setData(data);
  }, [engine, data]);

  // The live counts: the last answer stays shown until the next one arrives.
  const [live, setLive] = useState<{ data: PreviewData; summary: PreviewSummary | null; error: string | null } | null>(null);
  useEffect(() => {
    if (!data || !settings || settings.valueColumns.length === 0) return;
    let stale = false;
    engine
      .ask({ kind: 'summary', settings })
      .then((a) => {
        if (a && !stale && mounted.current) setLive({ data, summary: a.summary, error: a.error });
      })
      .catch((e: unknown) => {
        if (!stale && mounted.current) setLive({ data, summary: null, error: e instanceof Error ? e.message : String(e) });
      });
    return () => {
      stale = true;
    };
  }, [engine, data, settings]);
  const current = live && live.data === data && settings && settings.valueColumns.length > 0 ? live : null;
  const preview = current?.summary ?? null;
  const previewError = current?.error ?? null;

  const chartGroups = useMemo(() => {
    const first = preview?.columns.find((c) => c.column === (state.chartColumn ?? settings?.valueColumns[0])) ?? preview?.columns[0];
    if (!first) return [];
    return [...first.groups].sort((a, b) => b.flagged - a.flagged || b.n - a.n).map((g) => g.label);
  }, [preview, state.chartColumn, settings]);

  const chartAsk = useMemo(() => {
    if (!data || !settings || chartGroups.length === 0) return null;
    const column = state.chartColumn && settings.valueColumns.includes(state.chartColumn) ? state.chartColumn : settings.valueColumns[0];
    const group = state.chartGroup && chartGroups.includes(state.chartGroup) ? state.chartGroup : chartGroups[0];
    return { kind: 'chart' as const, settings, column, group };
  }, [data, settings, chartGroups, state.chartGroup, state.chartColumn]);
  const [charted, setCharted] = useState<{ ask: object; chart: ChartData | null } | null>(null);
  useEffect(() => {
    if (!chartAsk) return;
    let stale = false;
    engine
      .ask(chartAsk)
      .then((a) => {
        if (a && !stale && mounted.current) setCharted({ ask: chartAsk, chart: a.chart });
      })
      .catch(() => {
        if (!stale && mounted.current) setCharted({ ask: chartAsk, chart: null });
      });
    return () => {
      stale = true;
    };
  }, [engine, chartAsk]);
  // The last chart stays until the next is drawn (null when there is nothing to draw).
  const chart = chartAsk ? (charted?.chart ?? null) : null;

  const runWith = useCallback(
    async (picked: RunSettings) => {
      const table = stateRef.current.table;
      if (!table) return;
      // The reviewer's name and follow-up columns travel with the run settings (kept in the workbook).
      const { prefs } = stateRef.current;
      const chosen: RunSettings = { ...picked, reviewer: prefs.reviewer, detailColumns: prefs.detailColumns };
      const controller = new AbortController();
      abortRef.current = controller;
      dispatch({ type: 'run-start' });
      const timer = setTimeout(() => dispatch({ type: 'show-progress' }), PROGRESS_DELAY_MS);
      try {
        const record = { cutoffReason: stateRef.current.cutoffReason, budget: stateRef.current.budgetUsed };
        const summary = await layer.run(table, chosen, (progress) => dispatch({ type: 'run-progress', progress }), controller.signal, record);
        clearTimeout(timer);
        if (!mounted.current) return;
        dispatch({ type: 'run-done', summary, settings: chosen });
        await loadExceptions(null);
        const fresh = await layer.detect().catch(() => null);
        if (fresh && mounted.current) dispatch({ type: 'detected', table: fresh, saved: chosen });
      } catch (error) {
        clearTimeout(timer);
        if (mounted.current) dispatch({ type: 'failed', error });
      } finally {
        abortRef.current = null;
      }
    },
    [layer, loadExceptions],
  );

  const selectRow = useCallback(
    (row: number) => {
      ownEvents.current++;
      layer
        .selectRow(row)
        .catch((error: unknown) => dispatch({ type: 'failed', error }))
        .finally(() => {
          // If the selection did not actually move, no event comes: stop waiting for it.
          setTimeout(() => {
            if (ownEvents.current > 0) ownEvents.current--;
          }, OWN_SELECTION_GRACE_MS);
        });
    },
    [layer],
  );

  // The reviewer's kept choices (name or initials, the follow-up view's columns).
  useEffect(() => {
    layer
      .loadReviewPrefs()
      .then((prefs) => {
        if (mounted.current) dispatch({ type: 'prefs', prefs });
      })
      .catch((error: unknown) => {
        if (mounted.current) dispatch({ type: 'failed', error, area: 'review' });
      });
  }, [layer]);

  // The claim under review as the sheet shows it.
  const hasResults = state.table?.hasResults === true;
  useEffect(() => {
    const row = state.currentRow;
    // A claim selected in the sheet arrives with its row already read (selectionActions).
    if (row === null || !hasResults || stateRef.current.claim?.row === row) return;
    let stale = false;
    layer
      .readClaim(row)
      .then((claim) => {
        if (!stale && mounted.current) dispatch({ type: 'claim', claim });
      })
      .catch((error: unknown) => {
        if (!stale && mounted.current) dispatch({ type: 'failed', error, area: 'review' });
      });
    return () => {
      stale = true;
    };
  }, [layer, state.currentRow, hasResults]);

  const view = useMemo(() => reviewView(state.exceptions, state.order, state.filter, labelOf, DONE_LABELS), [state.exceptions, state.order, state.filter]);

  // The claim's peer-group context, from the pane's read of the same columns scored with the last
  // run's settings (in the worker).
  const saved = state.saved;
  const contextSettings =
    data && saved && state.settings && sameColumns(saved, state.settings) && data.valueColumns.length === saved.valueColumns.length ? saved : null;
  const [contexted, setContexted] = useState<{ settings: RunSettings; data: PreviewData; row: number; context: ClaimContext | null } | null>(null);
  useEffect(() => {
    const row = state.currentRow;
    if (!contextSettings || !data || row === null) return;
    let stale = false;
    engine
      .ask({ kind: 'context', settings: contextSettings, row })
      .then((a) => {
        if (a && !stale && mounted.current) setContexted({ settings: contextSettings, data, row, context: a.context });
      })
      .catch(() => {
        if (!stale && mounted.current) setContexted({ settings: contextSettings, data, row, context: null });
      });
    return () => {
      stale = true;
    };
  }, [engine, data, contextSettings, state.currentRow]);
  const context =
    contexted && contexted.settings === contextSettings && contexted.data === data && contexted.row === state.currentRow ? contexted.context : null;

  const viewRef = useRef(view);
  viewRef.current = view;

  /** Show a row (after any unsaved-drafts question); selects it in the sheet unless it came from there. */
  const show = useCallback(
    (row: number, fromSheet: boolean) => {
      const st = stateRef.current;
      if (row === st.currentRow) return;
      dispatch({ type: 'goto', row, fromSheet });
      if (!st.draftDirty && !fromSheet) selectRow(row);
    },
    [selectRow],
  );

  const save = useCallback(
    async (rows: readonly number[], status: string, note: string, keepRow: number | null, quiet: boolean): Promise<boolean> => {
      dispatch({ type: 'busy', busy: 'marking' });
      try {
        await layer.mark(rows, status || null, note);
        dispatch({ type: 'marked', count: rows.length, quiet });
        await loadExceptions(keepRow);
        return true;
      } catch (error) {
        dispatch({ type: 'failed', error, area: 'review' });
        return false;
      }
    },
    [layer, loadExceptions],
  );

  const dataRef = useRef(data);
  dataRef.current = data;
  /** What a review budget's answer does: set the cutoff, or say why it does not. */
  const budgetAnswered = useCallback((answer: BudgetAnswer, n: number, cutoff: number) => {
    if (answer.kind === 'all-fit') {
      dispatch({
        type: 'notice',
        area: 'method',
        text: `All ${answer.flaggable} claims that any cutoff could flag fit in ${n}, so the budget does not set a cutoff; it stays at ${cutoff}.`,
      });
      return;
    }
    if (answer.kind === 'none') {
      dispatch({ type: 'notice', area: 'method', text: 'No cutoff gives that many claims with these settings.' });
      return;
    }
    dispatch({ type: 'budget-applied', cutoff: answer.cutoff, claims: n });
  }, []);

  const actions = useMemo<PaneActions>(
    () => ({
      refresh: () => void detect(false),
      setSettings: (patch) => dispatch({ type: 'settings', patch }),
      setChart: (group, column) => dispatch({ type: 'chart', group, ...(column !== undefined ? { column } : {}) }),
      setBudget: (text) => dispatch({ type: 'budget', text }),
      applyBudget: () => {
        const s = stateRef.current.settings;
        const text = stateRef.current.budget.trim();
        const n = Number(text);
        if (!s || !dataRef.current) return;
        if (text === '' || !Number.isInteger(n) || n < 1) {
          dispatch({ type: 'notice', area: 'method', text: 'Enter how many claims you can review as a whole number of at least 1, e.g. 25.' });
          return;
        }
        void engine.ask({ kind: 'budget', settings: s, claims: n }).then((a) => {
          if (a && mounted.current) budgetAnswered(a.answer, n, s.cutoff);
        }, (error: unknown) => dispatch({ type: 'failed', error, area: 'method' }));
      },
      setCutoffReason: (text) => dispatch({ type: 'cutoff-reason', text }),
      run: () => {
        const s = stateRef.current.settings;
        if (s) void runWith(s);
      },
      rerunSaved: () => {
        void (async () => {
          try {
            const saved = await layer.loadSettings();
            if (!saved) {
              dispatch({ type: 'notice', area: 'run', text: 'This workbook has no saved run yet. Choose the columns and press Run.' });
              return;
            }
            dispatch({ type: 'settings', patch: saved });
            await runWith(saved);
          } catch (error) {
            dispatch({ type: 'failed', error, area: 'run' });
          }
        })();
      },
      cancel: () => abortRef.current?.abort(),
      move: (delta) => {
        const st = stateRef.current;
        const next = stepRow(viewRef.current, st.currentRow, delta);
        if (next !== null) show(next, false);
      },
      goToRow: (row) => show(row, false),
      resolvePending: (answer) => {
        const st = stateRef.current;
        const p = st.pending;
        if (!p) return;
        if (answer === 'stay') {
          dispatch({ type: 'pending-done' });
          return;
        }
        const go = () => {
          dispatch({ type: 'goto', row: p.row, fromSheet: p.fromSheet, force: true });
          if (!p.fromSheet) selectRow(p.row);
        };
        if (answer === 'discard') {
          go();
          return;
        }
        const rows = rowsToMark(st);
        void save(rows, st.statusDraft, st.noteDraft, st.currentRow, true).then((ok) => {
          if (ok) go();
        });
      },
      setOrder: (order) => dispatch({ type: 'order', order }),
      setFilter: (filter) => dispatch({ type: 'filter', filter }),
      setPrefs: (prefs) => {
        dispatch({ type: 'prefs', prefs });
        layer.saveReviewPrefs(prefs).catch((error: unknown) => dispatch({ type: 'failed', error, area: 'review' }));
      },
      check: (row, on) => dispatch({ type: 'check', row, on }),
      setDrafts: (d) => dispatch({ type: 'drafts', ...d }),
      saveMark: () => {
        const st = stateRef.current;
        const rows = rowsToMark(st);
        if (rows.length === 0) return;
        void save(rows, st.statusDraft, st.noteDraft, st.currentRow, false);
      },
      saveAndNext: () => {
        const st = stateRef.current;
        const row = st.currentRow;
        if (row === null || st.busy !== null) return;
        const rows = rowsToMark(st);
        // The next claim as the list stands now (saving may take this one out of a filtered list).
        const next = stepRow(viewRef.current, row, 1);
        const last = next === null || next === row || (viewRef.current.length > 0 && viewRef.current[viewRef.current.length - 1].row === row);
        void save(rows, st.statusDraft, st.noteDraft, last ? row : next, true).then((ok) => {
          if (!ok) return;
          if (last) {
            dispatch({ type: 'notice', area: 'review', text: 'Saved. That was the last claim in this list.' });
          } else if (next !== null) {
            selectRow(next);
          }
        });
      },
      askRemove: (open) => dispatch({ type: 'confirm-remove', open }),
      remove: (includeNotes, keepMarks) => {
        const st = stateRef.current;
        const marks = st.exceptions.filter((e) => (e.status !== '' && e.status !== labelOf('open')) || e.note !== '').length;
        dispatch({ type: 'busy', busy: 'removing' });
        layer
          .remove(includeNotes, keepMarks)
          .then(() =>
            dispatch({ type: 'removed', includeNotes, keptMarks: keepMarks ? marks : 0, lostMarks: keepMarks ? 0 : marks }),
          )
          .catch((error: unknown) => dispatch({ type: 'failed', error, area: 'manage' }));
      },
      exportMarks: async (to) => {
        try {
          const out = await layer.exportMarks(to === 'sheet');
          const n = out.rows.length - 1;
          const what = `${n} ${n === 1 ? 'claim' : 'claims'} with a status or note`;
          if (to === 'sheet') return `Copied ${what} to the new sheet "${out.sheet}". That sheet is yours: Tailmark never changes or removes it.`;
          downloadBlob(new Blob([toCsv(out.rows)], { type: 'text/csv;charset=utf-8' }), MARKS_CSV_NAME);
          return `Saved ${what} as ${MARKS_CSV_NAME} (your browser's downloads).`;
        } catch (e) {
          return `Could not keep the marks: ${e instanceof Error ? e.message : String(e)}`;
        }
      },
      fold: (area, folded) => dispatch({ type: 'fold', area, folded }),
      showAllGroups: (on) => dispatch({ type: 'all-groups', on }),
      dismiss: () => dispatch({ type: 'dismiss' }),
    }),
    [layer, detect, runWith, engine, budgetAnswered, selectRow, show, save],
  );

  return { state, preview, previewError, chart, chartGroups, view, context, actions };
}
