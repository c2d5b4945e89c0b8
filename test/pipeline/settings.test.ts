/**
 * The one settings validation (src/pipeline/settings.ts) and the run (src/pipeline/run.ts).
 * Defaults: robust 3.5 (Iglewicz & Hoaglin 1993), classic 3 (common practice, no source), IQR k = 1.5
 * (Tukey 1977); minimum group 8 is the project's own default.
 */
import { describe, expect, it } from 'vitest';
import {
  SETTING_KEYS,
  TailmarkError,
  defaultSettings,
  engineOptions,
  runPipeline,
  settingsFromSaved,
  validateSettings,
} from '../../src/pipeline/index.js';
import { parseSettings } from '../../src/workbook/state.js';
import { scorePreview } from '../../src/taskpane/engine.js';

const cols = { valueColumns: ['Amount'], groupColumns: ['Team'] };

function codeOf(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    return e instanceof TailmarkError ? `${e.code}: ${e.message}` : `other: ${String(e)}`;
  }
  return 'no error';
}

describe('validateSettings', () => {
  it('fills defaults; the cutoff follows the method', () => {
    // Default method: skew-aware fences, k = 3 (Tukey 1977 "far out"; see src/scoring/methods/adjusted.ts).
    expect(validateSettings(cols).cutoff).toBe(3);
    expect(validateSettings({ ...cols, method: 'robust' }).cutoff).toBe(3.5);
    expect(validateSettings({ ...cols, method: 'classic' }).cutoff).toBe(3);
    expect(validateSettings({ ...cols, method: 'iqr' }).cutoff).toBe(1.5);
    expect(validateSettings(cols)).toEqual({
      valueColumns: ['Amount'], groupColumns: ['Team'], idColumn: null, method: 'skew', cutoff: 3,
      direction: 'both', logScale: false, minGroupSize: 8, smallGroups: 'pool', widen: 'drop-first', decimal: 'auto', reviewer: null, detailColumns: null,
    });
    expect(Object.keys(defaultSettings()).sort()).toEqual([...SETTING_KEYS].sort());
  });

  it('the cutoff must be above 0 for every method, and every host says so the same way', () => {
    for (const method of ['robust', 'classic', 'iqr']) {
      for (const cutoff of [0, -1, Number.NaN, Number.POSITIVE_INFINITY]) {
        expect(codeOf(() => validateSettings({ ...cols, method, cutoff }))).toMatch(/^bad-settings: The cutoff must be a number above 0/);
      }
    }
    // Saved workbook settings go through the same check.
    expect(parseSettings(JSON.stringify({ ...validateSettings(cols), cutoff: 0 }))).toBeNull();
    // So do the pane's preview and the batch command's options (test/cli/errors.test.ts).
    expect(codeOf(() => scorePreview({ valueColumns: [{ name: 'Amount', cells: [1, 2, 3] }], groupColumns: [] }, { ...validateSettings(cols), cutoff: 0 }))).toMatch(/^bad-settings/);
  });

  it('names the setting as the host asks, and shows the value as typed', () => {
    const msg = codeOf(() => validateSettings({ ...cols, minGroupSize: 2.5 }, { nameOf: (k) => `--${k}`, shown: () => '"2.5"' }));
    expect(msg).toBe('bad-settings: --minGroupSize must be a whole number of at least 1; got "2.5"');
    expect(codeOf(() => validateSettings({ ...cols, method: 'median' }))).toBe('bad-settings: The method must be one of robust, classic, iqr, adjusted, skew; got "median"');
    expect(codeOf(() => validateSettings({ valueColumns: ['A'], groupColumns: ['A'] }))).toMatch(/"A" is given both as an amount column and as a group column/);
    expect(codeOf(() => validateSettings({ valueColumns: [] }))).toMatch(/must name at least one column/);
  });

  it('a workbook saved before a setting existed loads with its default; a bad stored value is refused', () => {
    const old = { valueColumns: ['Amount'], groupColumns: [], idColumn: null, method: 'iqr', cutoff: 2 };
    expect(settingsFromSaved(JSON.stringify(old))).toEqual({ ...defaultSettings('iqr'), ...old });
    expect(settingsFromSaved('{not json')).toBeNull();
    expect(settingsFromSaved(JSON.stringify({ ...old, direction: 'up' }))).toBeNull();
  });

  it('maps to the engine options one to one', () => {
    const s = validateSettings({ ...cols, method: 'classic', cutoff: 2.5, direction: 'high', logScale: true, minGroupSize: 5, smallGroups: 'skip', decimal: 'comma' });
    expect(engineOptions(s)).toEqual({ method: 'classic', cutoff: 2.5, direction: 'high', logScale: true, minGroupSize: 5, smallGroups: 'skip', widen: 'drop-first', decimal: 'comma', decimalComma: true });
    // A workbook saved with the older tick box keeps its meaning.
    expect(settingsFromSaved({ ...cols, decimalComma: true })?.decimal).toBe('comma');
  });
});

describe('runPipeline', () => {
  const table = {
    source: 'test table',
    sheetName: 'Claims',
    headers: ['Team', null, 'Amount'],
    columns: [['a', 'a', 'a', 'a', 'a'], ['x', 'x', 'x', 'x', 'x'], [10, 11, 12, 13, 500]],
    rowCount: 5,
    headerRow: 1,
    firstColumn: 0,
  };

  it('resolves headers ignoring case and spaces, scores and plans', () => {
    const run = runPipeline(table, { valueColumns: [' amount '], groupColumns: ['team'], minGroupSize: 2, method: 'robust' }, { when: new Date(0) });
    expect(run.columns).toEqual({ value: [2], group: [0], id: null });
    // Median 12, MAD 1 -> robust z of 500 = (500 - 12) / 1.4826 = 329.15 (worked by hand from the definition).
    expect(run.result.columns[0].scores[4]).toBeCloseTo(488 / 1.4826, 6);
    expect(run.plan.columns.map((c) => c.kind)).toEqual(['score', 'flag', 'reason', 'status', 'note']);
  });

  it('our own columns (null headers) cannot be chosen; a column without numbers is named with what it holds', () => {
    expect(codeOf(() => runPipeline(table, { valueColumns: ['Nope'] }, { when: new Date(0) }))).toBe(
      'bad-settings: value column "Nope" not found in test table; headers are: "Team", "Amount"',
    );
    expect(codeOf(() => runPipeline(table, { valueColumns: ['Team'] }, { when: new Date(0) }))).toBe(
      'no-numbers: value column "Team" has no numbers in test table (5 text that is not a number)',
    );
  });
});

describe('reviewer name', () => {
  it('is optional, kept as typed, and refused when blank or longer than 60 characters', () => {
    const cols = { valueColumns: ['Amount'] };
    expect(validateSettings(cols).reviewer).toBeNull();
    expect(validateSettings({ ...cols, reviewer: 'T.R.' }).reviewer).toBe('T.R.');
    expect(() => validateSettings({ ...cols, reviewer: '   ' })).toThrow(/reviewer name must be a name or initials/);
    expect(() => validateSettings({ ...cols, reviewer: 'x'.repeat(61) })).toThrow(/1 to 60 characters/);
  });
});
