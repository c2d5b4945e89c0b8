import { describe, expect, it } from 'vitest';
import { DEMO_GROUPS, demoClaims } from '../../src/demo/claims.js';
import { scoreTable } from '../../src/scoring/index.js';
import type { RawCell } from '../../src/scoring/types.js';
import { budgetCutoff, chartFor, scorePreview, summarisePreview } from '../../src/taskpane/engine.js';
import { validateSettings } from '../../src/pipeline/settings.js';
import { errorText } from '../../src/taskpane/messages.js';
import {
  guessGroupColumns,
  initialSettings,
  initialState,
  patchSettings,
  reducer,
  reviewCounts,
  rowsToMark,
  settingsFit,
  type PaneState,
} from '../../src/taskpane/state.js';
import { luminance, pickTheme } from '../../src/taskpane/theme.js';
import { TailmarkError, type DetectedColumn, type DetectedTable, type Exception, type RunSettings } from '../../src/workbook/api.js';

const col = (index: number, header: string, guess: DetectedColumn['guess'], distinct = 10, numericShare = 0): DetectedColumn => ({
  index,
  header,
  guess,
  distinct,
  numericShare,
});

const TABLE: DetectedTable = {
  sheetName: 'Claims',
  address: 'Claims!A1:F101',
  tableName: null,
  rowCount: 100,
  hasResults: false,
  columns: [
    col(0, 'Claim ID', 'id', 100, 0),
    col(1, 'Employee', 'key', 40),
    col(2, 'Cost centre', 'key', 5),
    col(3, 'Category', 'key', 7),
    col(4, 'Amount', 'amount', 90, 1),
    col(5, 'Notes', 'text', 12),
  ],
};

const ready = (table = TABLE, saved: RunSettings | null = null): PaneState => reducer(initialState, { type: 'detected', table, saved });

describe('initial settings', () => {
  it('proposes the amount column, the peer-dimension keys and the claim id', () => {
    const s = initialSettings(TABLE, null);
    expect(s.valueColumns).toEqual(['Amount']);
    expect(s.groupColumns).toEqual(['Cost centre', 'Category']);
    expect(s.idColumn).toBe('Claim ID');
    // Defaults documented in src/scoring/types.ts: skew-aware fences, k = 3 (Tukey 1977 "far out").
    expect(s.method).toBe('skew');
    expect(s.cutoff).toBe(3);
  });

  it('falls back to the coarsest keys when no header names a peer dimension', () => {
    const cols = [col(0, 'Who', 'key', 40), col(1, 'Where', 'key', 3), col(2, 'What', 'key', 8)];
    expect(guessGroupColumns(cols).map((c) => c.header)).toEqual(['Where', 'What']);
  });

  it('reuses saved settings only when all their columns are present', () => {
    const saved: RunSettings = { ...initialSettings(TABLE, null), groupColumns: ['Employee'], method: 'iqr', cutoff: 2 };
    expect(settingsFit(TABLE, saved)).toBe(true);
    expect(initialSettings(TABLE, saved)).toBe(saved);
    const missing = { ...saved, groupColumns: ['Department'] };
    expect(settingsFit(TABLE, missing)).toBe(false);
    expect(initialSettings(TABLE, missing).groupColumns).toEqual(['Cost centre', 'Category']);
  });
});

describe('patchSettings', () => {
  const base = initialSettings(TABLE, null);
  it('resets the cutoff to the new method default (classic 3 = three-sigma, IQR k = 1.5 Tukey 1977)', () => {
    expect(patchSettings(base, { method: 'classic' }).cutoff).toBe(3);
    expect(patchSettings(base, { method: 'iqr' }).cutoff).toBe(1.5);
    expect(patchSettings(base, { method: 'classic', cutoff: 2.5 }).cutoff).toBe(2.5);
  });
  it('keeps a column from being both a value and a key', () => {
    const s = patchSettings(base, { valueColumns: ['Amount', 'Category'] });
    expect(s.groupColumns).toEqual(['Cost centre']);
    const t = patchSettings(s, { groupColumns: ['Cost centre', 'Amount'] });
    expect(t.valueColumns).toEqual(['Category']);
  });
  it('never lets the minimum group size drop below 2', () => {
    expect(patchSettings(base, { minGroupSize: 0 }).minGroupSize).toBe(2);
  });
});

describe('reducer', () => {
  it('keeps the reviewer choices when the selection moves within the same table', () => {
    let st = ready();
    st = reducer(st, { type: 'settings', patch: { cutoff: 4.2 } });
    st = reducer(st, { type: 'detected', table: { ...TABLE, hasResults: true }, saved: null });
    expect(st.settings?.cutoff).toBe(4.2);
    const other: DetectedTable = { ...TABLE, sheetName: 'Other', address: 'Other!A1:B3', columns: [col(0, 'X', 'key'), col(1, 'Y', 'amount', 3, 1)] };
    st = reducer(st, { type: 'detected', table: other, saved: null });
    expect(st.settings?.valueColumns).toEqual(['Y']);
    expect(st.settings?.cutoff).toBe(3);
  });

  it('turns a cancelled run into a notice and other errors into a message', () => {
    let st = reducer(ready(), { type: 'run-start' });
    expect(st.busy).toBe('running');
    st = reducer(st, { type: 'failed', error: new TailmarkError('cancelled', 'Run cancelled.') });
    expect(st.busy).toBeNull();
    expect(st.error).toBeNull();
    expect(st.notice).toMatch(/as it was/);
    st = reducer(st, { type: 'failed', error: new TailmarkError('no-selection', 'Select a cell in your table.') });
    expect(st.error).toEqual({ code: 'no-selection', message: 'Select a cell in your table.' });
    expect(errorText(st.error!).next).toMatch(/Use selection/);
  });

  it('shows progress only after the delay and only while running', () => {
    expect(reducer(ready(), { type: 'show-progress' }).showProgress).toBe(false);
    expect(reducer(reducer(ready(), { type: 'run-start' }), { type: 'show-progress' }).showProgress).toBe(true);
  });

  const list: Exception[] = [10, 20, 30].map((row, i) => ({
    row,
    claimId: `C${row}`,
    group: 'g',
    value: 100 + i,
    score: 4 + i,
    status: i === 1 ? 'Cleared' : 'To look at',
    note: i === 2 ? 'asked for receipt' : '',
  }));

  it('steps through exceptions with wrap-around and loads the drafts of the current one', () => {
    let st = reducer(ready(), { type: 'exceptions', list });
    expect(st.current).toBe(0);
    st = reducer(st, { type: 'move', delta: -1 });
    expect(st.current).toBe(2);
    expect(st.noteDraft).toBe('asked for receipt');
    st = reducer(st, { type: 'move', delta: 1 });
    expect(st.current).toBe(0);
    expect(st.statusDraft).toBe('To look at');
    // After a refresh the same claim stays current even if the list order changed.
    st = reducer(st, { type: 'goto', index: 1 });
    st = reducer(st, { type: 'exceptions', list: [list[2], list[0], list[1]], keepRow: 20 });
    expect(st.current).toBe(2);
  });

  it('keeps what the reviewer is typing when the list refreshes under it', () => {
    let st = reducer(ready(), { type: 'exceptions', list });
    st = reducer(st, { type: 'drafts', note: 'half-typed' });
    st = reducer(st, { type: 'exceptions', list, keepRow: 10 });
    expect(st.noteDraft).toBe('half-typed');
    // Moving on loads the next claim's own note.
    st = reducer(st, { type: 'move', delta: 2 });
    expect(st.noteDraft).toBe('asked for receipt');
    expect(st.draftDirty).toBe(false);
  });

  it('marks the ticked claims, else the current one', () => {
    let st = reducer(ready(), { type: 'exceptions', list });
    expect(rowsToMark(st)).toEqual([10]);
    st = reducer(st, { type: 'check', row: 30, on: true });
    st = reducer(st, { type: 'check', row: 20, on: true });
    expect(rowsToMark(st)).toEqual([20, 30]);
    st = reducer(st, { type: 'check', row: 20, on: false });
    expect(rowsToMark(st)).toEqual([30]);
  });

  it('counts open and done claims', () => {
    expect(reviewCounts(list, ['Cleared', 'Sent up'])).toEqual({ open: 2, done: 1 });
  });
});

describe('in-memory preview', () => {
  const demo = demoClaims({ rows: 600 });
  const column = (h: string): { name: string; cells: RawCell[] } => {
    const i = demo.headers.indexOf(h);
    return { name: h, cells: demo.rows.map((r) => r[i]) };
  };
  const data = { valueColumns: [column('Amount')], groupColumns: [column('Cost centre'), column('Category')] };
  const settings: RunSettings = {
    valueColumns: ['Amount'],
    groupColumns: ['Cost centre', 'Category'],
    idColumn: 'Claim ID',
    method: 'robust',
    cutoff: 3.5,
    direction: 'both',
    logScale: false,
    minGroupSize: 8,
    smallGroups: 'pool',
    decimal: 'auto',
  };

  it('counts the same flagged rows as scoring the table directly', () => {
    const direct = scoreTable(data, { method: 'robust', cutoff: 3.5, direction: 'both', logScale: false, minGroupSize: 8, smallGroups: 'pool' });
    const p = summarisePreview(scorePreview(data, settings), settings);
    expect(p.flaggedRows).toBe(direct.columns[0].flaggedRows);
    expect(p.columns[0].groups.reduce((a, g) => a + g.flagged, 0)).toBe(direct.columns[0].flaggedRows);
    expect(p.meaning).toMatch(/3\.5/);
  });

  it('finds a cutoff that keeps within a review budget', () => {
    const scored = scorePreview(data, settings);
    for (const budget of [0, 5, 12]) {
      const answer = budgetCutoff(scored, budget);
      expect(answer.kind).toBe('cutoff');
      const cut = answer.kind === 'cutoff' ? answer.cutoff : Number.NaN;
      const at = scoreTable(data, { method: 'robust', cutoff: cut, direction: 'both', logScale: false, minGroupSize: 8, smallGroups: 'pool' });
      expect(at.columns[0].flaggedRows).toBeLessThanOrEqual(budget);
    }
  });

  it('issue 7: a budget of at least the number of claims never gives cutoff 0 (which the run refuses)', () => {
    // Before: budgetCutoff returned 0 here, the preview flagged nearly every claim and Run refused
    // "cutoff must be above 0". Now the budget does not bind and says so; any cutoff it gives is valid.
    const scored = scorePreview(data, settings);
    const rows = scored.rowCount;
    for (const budget of [rows, rows + 1, 10 * rows]) {
      const answer = budgetCutoff(scored, budget);
      expect(answer.kind).toBe('all-fit');
      if (answer.kind === 'all-fit') expect(answer.flaggable).toBeLessThanOrEqual(rows);
    }
    for (const budget of [0, 1, 5, 12, 50, 200]) {
      const answer = budgetCutoff(scored, budget);
      if (answer.kind === 'cutoff') expect(validateSettings({ ...settings, cutoff: answer.cutoff }).cutoff).toBeGreaterThan(0);
    }
  });

  it('shows masking in the planted group: robust z flags the three large claims, classic z fewer', () => {
    const label = `${DEMO_GROUPS.masking.costCentre} / ${DEMO_GROUPS.masking.category}`;
    const chart = chartFor(data, settings, 'Amount', label);
    expect(chart).not.toBeNull();
    // The demo plants three large lodging claims among twenty ordinary nights (src/demo/claims.ts).
    expect(chart!.robust.flagged).toBeGreaterThanOrEqual(3);
    expect(chart!.classic.flagged).toBeLessThan(chart!.robust.flagged);
    expect(chart!.n).toBeGreaterThanOrEqual(23);
  });
});

describe('theme', () => {
  it('follows ?theme= first, then the Office background colour', () => {
    expect(pickTheme('?theme=dark', '#ffffff')).toBe('dark');
    expect(pickTheme('', '#262626')).toBe('dark');
    expect(pickTheme('', '#FFFFFF')).toBe('light');
    expect(pickTheme('', null)).toBe('light');
    // WCAG 2.x relative luminance: white 1, black 0.
    expect(luminance('#ffffff')).toBeCloseTo(1, 10);
    expect(luminance('#000000')).toBe(0);
  });
});
