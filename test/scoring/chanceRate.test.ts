import { describe, expect, test } from 'vitest';
import { chanceRate, maxReach, normalUpperTail, scoreTable, type MethodId } from '../../src/scoring/index.js';
import { normalSample } from './helpers.js';

// Chance rates come from the seeded simulation in scripts/simulate-chance-rates.mjs
// (src/scoring/chanceRateTable.ts). Checks: large groups against the normal tail (NIST/SEMATECH
// e-Handbook 1.3.6.7.1 for the normal distribution; Tukey's fence at 0.6745 (1 + 2k) SDs), and small
// groups against a fresh simulation with another seed, here in the test.

const bothTail = (z: number): number => 2 * normalUpperTail(z);

describe('chance rate of large groups equals the normal tail (within 4 binomial SEs of the 500,000-claim simulation)', () => {
  const se = (p: number): number => Math.sqrt((p * (1 - p)) / 500_000);
  test.each([
    ['robust', 3.5, bothTail(3.5)],
    ['classic', 3, bothTail(3)],
    ['iqr', 1.5, bothTail(0.6744897501960817 * 4)],
  ] as [MethodId, number, number][])('%s at %s, n = 2,000', (method, cutoff, want) => {
    const got = chanceRate(method, cutoff, 'both', 2000)!;
    expect(Math.abs(got.rate - want)).toBeLessThan(4 * se(want) + 0.02 * want);
  });
  test('one direction is half of both', () => {
    expect(chanceRate('robust', 3.5, 'high', 50)!.rate).toBeCloseTo(chanceRate('robust', 3.5, 'both', 50)!.rate / 2, 12);
  });
});

describe('chance rate at small group sizes matches a fresh simulation (another seed, here)', () => {
  test.each([
    ['robust', 3.5, 8],
    ['robust', 3.5, 20],
    ['skew', 3, 30],
    ['adjusted', 1.5, 40],
  ] as [MethodId, number, number][])('%s cutoff %s, groups of %s', (method, cutoff, n) => {
    const groups = Math.floor(100_000 / n);
    const x = normalSample(groups * n, 97 + n);
    const keys = x.map((_, i) => Math.floor(i / n));
    const col = scoreTable(
      { valueColumns: [{ name: 'x', cells: x }], groupColumns: [{ name: 'g', cells: keys }] },
      { method, cutoff, direction: 'both', logScale: false, minGroupSize: 1, smallGroups: 'skip' },
    ).columns[0];
    const observed = col.flaggedRows / x.length;
    const stated = chanceRate(method, cutoff, 'both', n)!;
    const se = Math.sqrt((stated.rate * (1 - stated.rate)) / x.length) + Math.sqrt((stated.rate * (1 - stated.rate)) / 500_000);
    expect(Math.abs(observed - stated.rate)).toBeLessThan(4 * se);
    // and each group reports it
    expect(col.groups[0].chanceRate).toBeCloseTo(stated.rate, 15);
  });
});

describe('unreachable cutoffs (maxReach) for every method', () => {
  test('robust z in a group of 2 is always +-0.6745 (one MAD from the median each); cutoff 3.5 unreachable', () => {
    const col = scoreTable({ valueColumns: [{ name: 'x', cells: [10, 250] }], groupColumns: [] }, { method: 'robust', direction: 'both', logScale: false, minGroupSize: 1, smallGroups: 'pool' }).columns[0];
    expect(Math.abs(col.scores[0])).toBeCloseTo(1 / 1.4826, 12);
    expect(col.groups[0].unreachable).toBe(true);
    expect(col.groups[0].fallbacks).toContain('cutoff-unreachable');
  });
  test('IQR fences can never flag a group of 3 at k = 1.5 (the largest reach is 1 IQR); a group of 5 can', () => {
    const three = scoreTable({ valueColumns: [{ name: 'x', cells: [1, 2, 1e9] }], groupColumns: [] }, { method: 'iqr', direction: 'both', logScale: false, minGroupSize: 1, smallGroups: 'pool' }).columns[0];
    expect(three.groups[0].unreachable).toBe(true);
    expect(three.flaggedRows).toBe(0);
    const five = scoreTable({ valueColumns: [{ name: 'x', cells: [1, 2, 3, 4, 1e9] }], groupColumns: [] }, { method: 'iqr', direction: 'both', logScale: false, minGroupSize: 1, smallGroups: 'pool' }).columns[0];
    expect(five.groups[0].unreachable).toBe(false);
    expect(five.flaggedRows).toBe(1);
  });
  test.each(['robust', 'classic', 'iqr', 'adjusted', 'skew'] as MethodId[])('%s: no random sample of 2-4 values passes the stated largest reach', (method) => {
    for (const n of [2, 3, 4]) {
      const groups = 4000;
      const x = normalSample(groups * n, 5 + n).map((v, i) => (i % 7 === 0 ? Math.exp(3 * v) : v));
      const keys = x.map((_, i) => Math.floor(i / n));
      const col = scoreTable(
        { valueColumns: [{ name: 'x', cells: x }], groupColumns: [{ name: 'g', cells: keys }] },
        { method, cutoff: 100, direction: 'both', logScale: false, minGroupSize: 1, smallGroups: 'skip' },
      ).columns[0];
      const reach = col.fenceMultiple ?? col.scores.map(Math.abs);
      let most = 0;
      for (const t of reach) if (t > most) most = t;
      expect({ n, most: most <= maxReach(method, n) + 1e-9 }).toEqual({ n, most: true });
    }
  });
});
