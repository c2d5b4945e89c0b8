/**
 * Issue 9, items 4, 5 and 9: degenerate groups without borrowing, the money floor, and flags that
 * agree with the score written to the sheet.
 *
 * Expected values are computed here from the definitions: type-7 quartiles (Hyndman & Fan 1996;
 * R's default `quantile`), IQR / 1.349 as R's `stats::IQR` documentation gives for a
 * normal-consistent scale (2 qnorm(3/4) = 1.3489795, value of qnorm from R, from memory checked
 * against src/scoring/inverseNormal.ts below), median and MAD by hand.
 */
import { describe, expect, test } from 'vitest';
import { buildPlan, planToJson } from '../../src/report/index.js';
import { countFlaggedAt, explainRow, explainRowShort, inverseNormal, scoreTable, type ScoreOptions } from '../../src/scoring/index.js';
import { formatScoreAgainst } from '../../src/scoring/format.js';
import { expectNear } from './helpers.js';

const ROBUST: ScoreOptions = { method: 'robust', direction: 'both', logScale: false, minGroupSize: 3, smallGroups: 'pool' };

function score(values: readonly number[], options: ScoreOptions, keys?: readonly string[]) {
  const groupColumns = keys ? [{ name: 'Kind', cells: keys }] : [];
  const result = scoreTable({ valueColumns: [{ name: 'Amount', cells: values }], groupColumns }, options);
  return { result, col: result.columns[0] };
}

/** Type-7 quantile, written independently of src/scoring. */
function q7(values: readonly number[], p: number): number {
  const x = [...values].sort((a, b) => a - b);
  const h = (x.length - 1) * p;
  const lo = Math.floor(h);
  return x[lo] + (h - lo) * ((x[Math.min(lo + 1, x.length - 1)] ?? x[lo]) - x[lo]);
}

describe('MAD = 0: the group\'s own IQR / 1.349, which its unusual claims cannot widen', () => {
  // 12 identical allowances of 45.00 among 8 others, plus two large per-diems (n = 22): more than
  // half at the median (MAD = 0), the IQR from the group's own quartiles.
  const allowances = [38, 40, 42, 43, ...Array<number>(12).fill(45), 47, 48, 50, 52];
  const withPerDiems = (perDiem: number) => [...allowances, perDiem, perDiem];

  test('the constant is 2 Phi^-1(3/4) (R: 2 * qnorm(0.75) = 1.348979500392163)', () => {
    expectNear(2 * inverseNormal(0.75), 1.348979500392163, 1e-12);
  });

  test('two per-diems of 300 are flagged; the scale is IQR / 1.349 of the group, the same with per-diems of 3,000', () => {
    for (const perDiem of [300, 3000]) {
      const x = withPerDiems(perDiem);
      const { col } = score(x, ROBUST);
      const g = col.groups[0];
      expect(g.fallbacks).toContain('mad-zero-used-iqr');
      const iqr = q7(x, 0.75) - q7(x, 0.25);
      expect(iqr).toBe(1.5); // Q1 = 45, Q3 = 45 + 0.75 x (47 - 45)
      expectNear(g.scale!, iqr / 1.348979500392163, 1e-9);
      expect([col.flagged[20], col.flagged[21]]).toEqual([1, 1]);
    }
    // The mean absolute deviation (the fallback before) grows with the per-diems: 10x here.
    const meanAd = (x: number[]) => x.reduce((s, v) => s + Math.abs(v - 45), 0) / x.length;
    expect(meanAd(withPerDiems(3000)) / meanAd(withPerDiems(300))).toBeGreaterThan(8);
  });
});

describe('a group whose middle half is one amount: the money floor as unit, never another group\'s spread', () => {
  const identical = [...Array<number>(60).fill(45), 45.01];

  test('a one-cent difference among 60 identical amounts does not score in the hundreds of thousands', () => {
    const none = score(identical, ROBUST).col;
    expect(none.groups[0].fallbacks).toEqual(['no-spread']);
    expect(Math.abs(none.scores[60])).toBeLessThan(1);
    expect(none.flagged[60]).toBe(0);
    const floor = score(identical, { ...ROBUST, ignoreWithin: 1 }).col;
    expect(floor.groups[0].fallbacks).toEqual(['spread-zero-used-floor']);
    expectNear(floor.scores[60], 0.01, 1e-9); // 0.01 from the median in units of 1.00
    expect(floor.flagged[60]).toBe(0);
  });

  test('with ignore-within 1.00 a per-diem of 300 among them is flagged with score 255 (255 ignore-within amounts)', () => {
    const { col } = score([...identical, 300], { ...ROBUST, ignoreWithin: 1 });
    expectNear(col.scores[61], 255, 1e-12);
    expect(col.flagged[61]).toBe(1);
  });

  test('MAD = 0 with a spread of its own: the cent scores below 0.01 on IQR / 1.349, nothing borrowed', () => {
    // 22 of 40 at 45.00 (MAD = 0); Q1 = 45, Q3 = 52 + 0.25 x (55 - 52) = 52.75 (type 7).
    const above = [47, 50, 52, 55, 58, 60, 62, 65, 70, 75, 80, 85, 90];
    const x = [...Array<number>(22).fill(45), 20, 30, 35, 40, ...above, 45.01];
    const { col } = score(x, ROBUST);
    expect(col.groups[0].fallbacks).toEqual(['mad-zero-used-iqr']);
    expect(q7(x, 0.75) - q7(x, 0.25)).toBe(7.75);
    expectNear(col.scores[39], 0.01 / (7.75 / 1.348979500392163), 1e-6);
  });

  test('MAD = 0 (a fixed allowance), one cent off with ignore-within 0.01: within the floor, not flagged', () => {
    const { result, col } = score([...identical, 300], { ...ROBUST, ignoreWithin: 0.01 });
    expectNear(col.scores[60], 1, 1e-9); // one ignore-within amount from the median
    expect(col.withinFloor?.[60]).toBe(1);
    expect(col.flagged[60]).toBe(0);
    expect(col.flagged[61]).toBe(1);
    expect(explainRow(result, col, 60)).toMatch(/Not flagged\./);
  });

  test('a group of tiny amounts next to large groups can be flagged, and its fences do not move with the other groups', () => {
    const tiny = [...Array<number>(20).fill(0.5), 0.45, 0.55, 2.5];
    const big = Array.from({ length: 30 }, (_, i) => 1000 + 37 * i);
    const opts: ScoreOptions = { method: 'skew', direction: 'both', logScale: false, minGroupSize: 5, smallGroups: 'pool', ignoreWithin: 0.05 };
    const alone = score(tiny, opts, tiny.map(() => 'tiny'));
    const keys = [...tiny.map(() => 'tiny'), ...big.map(() => 'big'), ...big.map(() => 'bigger')];
    const crowd = score([...tiny, ...big, ...big.map((v) => v * 50)], opts, keys);
    const gAlone = alone.col.groups[0];
    const gCrowd = crowd.col.groups.find((g) => g.label === 'tiny')!;
    expect(gCrowd.fallbacks).toContain('spread-zero-used-floor');
    expect([gCrowd.lower, gCrowd.upper]).toEqual([gAlone.lower, gAlone.upper]);
    expectNear(gCrowd.upper!, 0.5 + 3 * 0.05, 1e-12); // Q3 + k x floor, k = 3 (skew default)
    expect(crowd.col.flagged[22]).toBe(1);
  });
});

describe('the money floor (ignore-within)', () => {
  // Robust z: median 100, MAD 1 (scaled 1.4826); 106 is 4.05 robust z above (flagged at 3.5), 6 away.
  const x = [97, 98, 99, 99, 100, 100, 100, 101, 101, 102, 103, 106];

  test('a claim past the cutoff within the amount of the median is not flagged; its score stays', () => {
    const plain = score(x, ROBUST).col;
    expect(plain.flagged[11]).toBe(1);
    const { result, col } = score(x, { ...ROBUST, ignoreWithin: 6 });
    expect(col.flagged[11]).toBe(0);
    expect(col.scores[11]).toBe(plain.scores[11]);
    expect(col.groups[0].withinFloor).toBe(1);
    expect(explainRow(result, col, 11)).toMatch(/within 6\.00 of the centre \(the ignore-within amount\), so it is not flagged/);
    expect(explainRowShort(result, col, 11)).toMatch(/within 6\.00: not flagged/);
    // Just outside the floor it is flagged again.
    expect(score(x, { ...ROBUST, ignoreWithin: 5.99 }).col.flagged[11]).toBe(1);
  });

  test('counts at other cutoffs (review budget) leave out claims within the floor', () => {
    // Without the floor one claim passes 3.5 and 12 - 3 = 9 pass 0.5 (|x - 100| > 0.74); with a
    // floor of 6 every claim lies within 6 of the median, so none counts at any cutoff.
    expect([countFlaggedAt(score(x, ROBUST).col, 3.5).total, countFlaggedAt(score(x, ROBUST).col, 0.5).total]).toEqual([1, 9]);
    const { col } = score(x, { ...ROBUST, ignoreWithin: 6 });
    expect([countFlaggedAt(col, 3.5).total, countFlaggedAt(col, 0.5).total]).toEqual([0, 0]);
  });

  test('shown in the notes (parameters, group table) and in --json', () => {
    const { result } = score(x, { ...ROBUST, ignoreWithin: 6 });
    const table = { source: 't', sheetName: 'S', headers: ['Amount'], columns: [x], rowCount: x.length, headerRow: 1, firstColumn: 0 };
    const plan = buildPlan(result, { when: new Date(0), source: 't', table, idColumn: null });
    const params = plan.notes.sections.find((s) => s.title === 'Parameters')!.rows;
    expect(String(params.find((r) => r[0] === 'Ignore within')?.[1])).toMatch(/^6: .*\(1 claim past the cutoff kept unflagged\)/);
    const groups = plan.notes.sections.find((s) => s.title === 'Groups: Amount')!.rows;
    expect(groups[1][groups[0].indexOf('Past the cutoff but within the ignore-within amount')]).toBe(1);
    const json = planToJson(plan);
    expect(json.ignoreWithin).toBe(6);
    expect(json.groups[0].withinFloor).toBe(1);
    expect(json.rows[11].withinFloor).toBe(true);
  });
});

describe('item 9: a score near the cutoff is explained with the decimals that decide it', () => {
  test('the plan writes every score rounded to 2 decimals (full precision waits for the undo fix)', () => {
    const x = [97, 98, 99, 99, 100, 100, 100, 101, 101, 102, 103, 106];
    const { result, col } = score(x, ROBUST);
    const table = { source: 't', sheetName: 'S', headers: ['Amount'], columns: [x], rowCount: x.length, headerRow: 1, firstColumn: 0 };
    const plan = buildPlan(result, { when: new Date(0), source: 't', table, idColumn: null });
    const written = plan.columns.find((c) => c.kind === 'score')!;
    expect(written.numberFormat).toBe('0.00');
    for (let r = 0; r < x.length; r++) expect(written.values[r]).toBe(Math.round(col.scores[r] * 100) / 100);
  });

  test('a score just past the cutoff reads with the decimals that show it (3.504 at 3.5, not 3.5)', () => {
    expect(formatScoreAgainst(3.504, 3.5)).toBe('3.504');
    expect(formatScoreAgainst(3.5000001, 3.5)).toBe('3.5000001');
    expect(formatScoreAgainst(3.5, 3.5)).toBe('3.5');
    expect(formatScoreAgainst(3.496, 3.5)).toBe('3.496');
    expect(formatScoreAgainst(6.24, 3.5)).toBe('6.2');
    expect(formatScoreAgainst(0.004, 0)).toBe('0.004');
  });
});
