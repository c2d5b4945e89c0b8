import { describe, expect, it } from 'vitest';
import { DEMO_GROUPS, demoClaims } from '../../src/demo/claims.js';
import { scoreTable } from '../../src/scoring/index.js';
import type { RawCell } from '../../src/scoring/types.js';
import * as ss from 'simple-statistics';
import { budgetCutoff, chartFor, claimContext, followColumn, scorePreview, summarisePreview } from '../../src/taskpane/engine.js';
import { validateSettings } from '../../src/pipeline/settings.js';
import { errorText } from '../../src/taskpane/messages.js';
import {
  guessGroupColumns,
  initialSettings,
  initialState,
  patchSettings,
  reducer,
  reviewCounts,
  reviewView,
  rowsToMark,
  stepRow,
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
    expect(st.notice?.text).toMatch(/as it was/);
    st = reducer(st, { type: 'failed', error: new TailmarkError('no-selection', 'Select a cell in your table.') });
    expect(st.error).toEqual({ code: 'no-selection', message: 'Select a cell in your table.', area: 'table' });
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

  const labels = (id: string) => ({ open: 'To look at', asked: 'Asked claimant', cleared: 'Cleared', escalated: 'Sent up' })[id] ?? id;

  it('orders the follow-up list by |score| (largest first), by group, or in sheet order, and filters by status', () => {
    const mixed: Exception[] = [
      { row: 5, claimId: 'A', group: 'b', value: 1, score: 3.6, status: 'To look at', note: '' },
      { row: 1, claimId: 'B', group: 'a', value: 1, score: -7.2, status: 'Cleared', note: '' },
      { row: 9, claimId: 'C', group: 'a', value: 1, score: 4.1, status: '', note: '' },
      { row: 3, claimId: 'D', group: 'b', value: 1, score: null, status: 'Asked claimant', note: 'x' },
    ];
    const done = ['Cleared', 'Sent up'];
    // Expected orders worked out by hand from the scores above.
    expect(reviewView(mixed, 'score', 'all', labels, done).map((e) => e.claimId)).toEqual(['B', 'C', 'A', 'D']);
    expect(reviewView(mixed, 'group', 'all', labels, done).map((e) => e.claimId)).toEqual(['B', 'C', 'A', 'D']);
    expect(reviewView(mixed, 'sheet', 'all', labels, done).map((e) => e.claimId)).toEqual(['B', 'D', 'A', 'C']);
    expect(reviewView(mixed, 'score', 'unfinished', labels, done).map((e) => e.claimId)).toEqual(['C', 'A', 'D']);
    // "To look at" also covers a flagged claim with an empty status cell.
    expect(reviewView(mixed, 'sheet', 'open', labels, done).map((e) => e.claimId)).toEqual(['A', 'C']);
    expect(reviewView(mixed, 'sheet', 'none', labels, done).map((e) => e.claimId)).toEqual(['C']);
    expect(stepRow(reviewView(mixed, 'score', 'all', labels, done), 1, 1)).toBe(9);
    expect(stepRow(reviewView(mixed, 'score', 'all', labels, done), 1, -1)).toBe(3);
    expect(stepRow([], 1, 1)).toBeNull();
  });

  it('starts at the largest score and loads the drafts of the claim shown', () => {
    let st = reducer(ready(), { type: 'exceptions', list });
    // Scores 4, 5, 6: the largest is row 30.
    expect(st.currentRow).toBe(30);
    expect(st.noteDraft).toBe('asked for receipt');
    st = reducer(st, { type: 'goto', row: 10 });
    expect(st.currentRow).toBe(10);
    expect(st.statusDraft).toBe('To look at');
    // After a refresh the same claim stays current even if the list order changed.
    st = reducer(st, { type: 'goto', row: 20 });
    st = reducer(st, { type: 'exceptions', list: [list[2], list[0], list[1]] });
    expect(st.currentRow).toBe(20);
  });

  it('never drops an unsaved note silently: a move waits for save, discard or stay', () => {
    let st = reducer(ready(), { type: 'exceptions', list, keepRow: 10 });
    st = reducer(st, { type: 'drafts', note: 'half-typed' });
    // A refresh under the reviewer keeps the draft.
    st = reducer(st, { type: 'exceptions', list, keepRow: 10 });
    expect(st.noteDraft).toBe('half-typed');
    // Moving on is held back and asks.
    st = reducer(st, { type: 'goto', row: 30 });
    expect(st.currentRow).toBe(10);
    expect(st.noteDraft).toBe('half-typed');
    expect(st.pending).toEqual({ row: 30, fromSheet: false });
    // "Stay here" keeps everything.
    st = reducer(st, { type: 'pending-done' });
    expect(st.pending).toBeNull();
    expect(st.noteDraft).toBe('half-typed');
    // A selection in the sheet asks too; "Discard" then moves and loads that claim's own note.
    st = reducer(st, { type: 'goto', row: 30, fromSheet: true });
    expect(st.pending).toEqual({ row: 30, fromSheet: true });
    st = reducer(st, { type: 'goto', row: 30, force: true });
    expect(st.currentRow).toBe(30);
    expect(st.noteDraft).toBe('asked for receipt');
    expect(st.draftDirty).toBe(false);
  });

  it('puts each message in the section whose action caused it', () => {
    let st = reducer({ ...ready(), busy: 'marking' }, { type: 'failed', error: new TailmarkError('protected', 'The sheet is protected.') });
    expect(st.error?.area).toBe('review');
    st = reducer({ ...ready(), busy: 'removing' }, { type: 'failed', error: new Error('x') });
    expect(st.error?.area).toBe('manage');
    st = reducer(ready(), { type: 'notice', text: 'hello', area: 'method' });
    expect(st.notice).toEqual({ text: 'hello', area: 'method' });
  });

  it('says after a removal what happened to the marks', () => {
    const kept = reducer(ready(), { type: 'removed', includeNotes: false, keptMarks: 3, lostMarks: 0 });
    expect(kept.notice?.text).toMatch(/3 marked claims/);
    expect(kept.notice?.text).not.toMatch(/untouched/);
    const lost = reducer(ready(), { type: 'removed', includeNotes: true, keptMarks: 0, lostMarks: 2 });
    expect(lost.notice?.text).toMatch(/2 statuses and notes were deleted/);
    expect(lost.notice?.area).toBe('manage');
  });

  it('remembers that a cutoff came from a review budget until it is changed another way', () => {
    let st = reducer(ready(), { type: 'budget-applied', cutoff: 4.2, claims: 25 });
    expect(st.settings?.cutoff).toBe(4.2);
    expect(st.budgetUsed).toBe(25);
    st = reducer(st, { type: 'settings', patch: { logScale: true } });
    expect(st.budgetUsed).toBe(25);
    st = reducer(st, { type: 'settings', patch: { cutoff: 3 } });
    expect(st.budgetUsed).toBeNull();
  });

  it('marks the ticked claims, else the current one', () => {
    let st = reducer(ready(), { type: 'exceptions', list });
    expect(rowsToMark(st)).toEqual([30]);
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
    widen: 'drop-first',
    decimal: 'auto',
    reviewer: null,
    detailColumns: null,
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
      // The pane runs with the engine's exact cutoff: the reducer keeps it unrounded.
      const st = reducer(ready(), { type: 'budget-applied', cutoff: cut, claims: budget });
      expect(st.settings?.cutoff).toBe(cut);
      if (answer.kind === 'cutoff') expect(at.columns[0].flaggedRows).toBe(answer.flagged);
    }
  });

  it('gives the follow-up view the centre and spread of the claim\'s peer group (checked with simple-statistics)', () => {
    const scored = scorePreview(data, settings);
    const col = scored.columns[0];
    const row = col.flagged.findIndex((f) => f === 1);
    expect(row).toBeGreaterThanOrEqual(0);
    expect(followColumn(scored, row)).toBe(0);
    const ctx = claimContext(scored, 0, row)!;
    const g = col.groupOf[row];
    const peers: number[] = [];
    for (let r = 0; r < col.values.length; r++) if (col.groupOf[r] === g && !Number.isNaN(col.values[r])) peers.push(col.values[r]);
    // simple-statistics 7.x: median, medianAbsoluteDeviation (unscaled), times 1.4826 as R's mad() does.
    expect(ctx.centreName).toBe('median');
    expect(ctx.centre).toBeCloseTo(ss.median(peers), 9);
    expect(ctx.spread).toBeCloseTo(1.4826 * ss.medianAbsoluteDeviation(peers), 9);
    expect(ctx.n).toBe(peers.length);
    expect(ctx.flagged).toBe(true);
    expect(ctx.reason).toMatch(/Flagged/);
    const larger = peers.filter((v) => v >= col.values[row]).length;
    expect(ctx.rankFromTop).toBe(larger);
    expect(ctx.strip.length).toBe(Math.min(peers.length, 240));
    const classic = claimContext(scorePreview(data, { ...settings, method: 'classic', cutoff: 3 }), 0, row)!;
    expect(classic.centreName).toBe('mean');
    expect(classic.centre).toBeCloseTo(ss.mean(peers), 9);
    expect(classic.spread).toBeCloseTo(ss.sampleStandardDeviation(peers), 9);
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
