/**
 * The one hook that owns the task pane's state. It talks to the workbook only through the
 * injected `WorkbookLayer`; components receive `PaneModel` and only render it.
 */
import { useCallback, useDeferredValue, useEffect, useMemo, useReducer, useRef } from 'react';
import type { RunSettings, WorkbookLayer } from '../workbook/api.js';
import {
  budgetCutoff,
  chartFor,
  previewOf,
  summarisePreview,
  type ChartData,
  type PreviewSummary,
} from './engine.js';
import { initialState, previewKey, reducer, rowsToMark, type PaneState } from './state.js';

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
  readonly goTo: (index: number) => void;
  readonly check: (row: number, on: boolean) => void;
  readonly setDrafts: (d: { status?: string; note?: string }) => void;
  readonly saveMark: () => void;
  readonly askRemove: (open: boolean) => void;
  readonly remove: (includeNotes: boolean) => void;
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
  readonly actions: PaneActions;
}

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
        if (table.hasResults) await loadExceptions(stateRef.current.exceptions[stateRef.current.current]?.row ?? null);
      } catch (error) {
        if (mounted.current) dispatch({ type: 'failed', error });
      }
    },
    [layer, loadExceptions],
  );

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
          if (active && stateRef.current.busy === null) void detect(true);
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
  }, [layer, detect]);

  // Back from the sheet (the pane's window regains focus): statuses may have been edited there.
  useEffect(() => {
    const onFocus = () => {
      const st = stateRef.current;
      if (st.busy === null && st.table?.hasResults) {
        loadExceptions(st.exceptions[st.current]?.row ?? null).catch((error: unknown) => dispatch({ type: 'failed', error }));
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

  // Scoring follows the settings a moment later on big tables, so typing and sliding stay responsive.
  const settings = useDeferredValue(state.settings);
  const data = state.preview && state.preview.key === key ? state.preview.data : null;

  const attempt = useMemo(() => {
    if (!data || !settings || settings.valueColumns.length === 0) return null;
    return previewOf(data, settings);
  }, [data, settings]);
  const scored = attempt?.result ?? null;
  const previewError = attempt?.error ?? null;

  const preview = useMemo(() => (scored && settings ? summarisePreview(scored, settings) : null), [scored, settings]);

  const chartGroups = useMemo(() => {
    const first = preview?.columns.find((c) => c.column === (state.chartColumn ?? settings?.valueColumns[0])) ?? preview?.columns[0];
    if (!first) return [];
    return [...first.groups].sort((a, b) => b.flagged - a.flagged || b.n - a.n).map((g) => g.label);
  }, [preview, state.chartColumn, settings]);

  const chart = useMemo(() => {
    if (!data || !settings || chartGroups.length === 0) return null;
    const column = state.chartColumn && settings.valueColumns.includes(state.chartColumn) ? state.chartColumn : settings.valueColumns[0];
    const group = state.chartGroup && chartGroups.includes(state.chartGroup) ? state.chartGroup : chartGroups[0];
    try {
      return chartFor(data, settings, column, group);
    } catch {
      return null;
    }
  }, [data, settings, chartGroups, state.chartGroup, state.chartColumn]);

  const runWith = useCallback(
    async (chosen: RunSettings) => {
      const table = stateRef.current.table;
      if (!table) return;
      const controller = new AbortController();
      abortRef.current = controller;
      dispatch({ type: 'run-start' });
      const timer = setTimeout(() => dispatch({ type: 'show-progress' }), PROGRESS_DELAY_MS);
      try {
        const summary = await layer.run(table, chosen, (progress) => dispatch({ type: 'run-progress', progress }), controller.signal);
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

  const actions = useMemo<PaneActions>(
    () => ({
      refresh: () => void detect(false),
      setSettings: (patch) => dispatch({ type: 'settings', patch }),
      setChart: (group, column) => dispatch({ type: 'chart', group, ...(column !== undefined ? { column } : {}) }),
      setBudget: (text) => dispatch({ type: 'budget', text }),
      applyBudget: () => {
        const s = stateRef.current.settings;
        const n = Number(stateRef.current.budget.trim());
        if (!s || !scored) return;
        if (!Number.isInteger(n) || n < 0) {
          dispatch({ type: 'notice', text: 'Enter how many claims you can review as a whole number, e.g. 25.' });
          return;
        }
        const answer = budgetCutoff(scored, n);
        if (answer.kind === 'all-fit') {
          dispatch({
            type: 'notice',
            text: `All ${answer.flaggable} claims that any cutoff could flag fit in ${n}, so the budget does not set a cutoff; it stays at ${s.cutoff}.`,
          });
          return;
        }
        if (answer.kind === 'none') {
          dispatch({ type: 'notice', text: 'No cutoff gives that many claims with these settings.' });
          return;
        }
        dispatch({ type: 'settings', patch: { cutoff: answer.cutoff } });
      },
      run: () => {
        const s = stateRef.current.settings;
        if (s) void runWith(s);
      },
      rerunSaved: () => {
        void (async () => {
          try {
            const saved = await layer.loadSettings();
            if (!saved) {
              dispatch({ type: 'notice', text: 'This workbook has no saved run yet. Choose the columns and press Run.' });
              return;
            }
            dispatch({ type: 'settings', patch: saved });
            await runWith(saved);
          } catch (error) {
            dispatch({ type: 'failed', error });
          }
        })();
      },
      cancel: () => abortRef.current?.abort(),
      move: (delta) => {
        const st = stateRef.current;
        if (st.exceptions.length === 0) return;
        const n = st.exceptions.length;
        const next = (((st.current + delta) % n) + n) % n;
        dispatch({ type: 'goto', index: next });
        selectRow(st.exceptions[next].row);
      },
      goTo: (index) => {
        const st = stateRef.current;
        const e = st.exceptions[index];
        if (!e) return;
        dispatch({ type: 'goto', index });
        selectRow(e.row);
      },
      check: (row, on) => dispatch({ type: 'check', row, on }),
      setDrafts: (d) => dispatch({ type: 'drafts', ...d }),
      saveMark: () => {
        const st = stateRef.current;
        const rows = rowsToMark(st);
        if (rows.length === 0) return;
        const keepRow = st.exceptions[st.current]?.row ?? null;
        dispatch({ type: 'busy', busy: 'marking' });
        layer
          .mark(rows, st.statusDraft || null, st.noteDraft)
          .then(async () => {
            dispatch({ type: 'marked', count: rows.length });
            await loadExceptions(keepRow);
          })
          .catch((error: unknown) => dispatch({ type: 'failed', error }));
      },
      askRemove: (open) => dispatch({ type: 'confirm-remove', open }),
      remove: (includeNotes) => {
        dispatch({ type: 'busy', busy: 'removing' });
        layer
          .remove(includeNotes)
          .then(() => dispatch({ type: 'removed', includeNotes }))
          .catch((error: unknown) => dispatch({ type: 'failed', error }));
      },
      dismiss: () => dispatch({ type: 'dismiss' }),
    }),
    [layer, detect, runWith, loadExceptions, scored, selectRow],
  );

  return { state, preview, previewError, chart, chartGroups, actions };
}
