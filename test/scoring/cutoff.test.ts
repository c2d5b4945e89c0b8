import { describe, expect, it } from 'vitest';
import {
  countFlaggedAt, cutoffForBudget, defaultCutoff, describeCutoff, iqrFenceInSds, oneInN, scoreTable, tailProbability,
  type MethodId, type ScoreOptions, type Direction,
} from '../../src/scoring/index.js';
import { normalSample, rng, scipy } from './helpers.js';

describe('defaultCutoff', () => {
  it('robust 3.5 (Iglewicz & Hoaglin 1993), classic 3 (common practice), IQR 1.5 (Tukey 1977)', () => {
    expect(defaultCutoff('robust')).toBe(3.5);
    expect(defaultCutoff('classic')).toBe(3);
    expect(defaultCutoff('iqr')).toBe(1.5);
  });
});

describe('tailProbability and oneInN (SciPy norm.sf fixture)', () => {
  const sf = (z: number): number => scipy().norm.find((r) => r.z === z)!.sf;
  it('one-sided for high / low, two-sided for both', () => {
    expect(tailProbability(3.5, 'high')).toBeCloseTo(sf(3.5), 15);
    expect(tailProbability(3.5, 'low')).toBeCloseTo(sf(3.5), 15);
    expect(tailProbability(3.5, 'both')).toBeCloseTo(2 * sf(3.5), 15);
    expect(tailProbability(-3, 'both')).toBeCloseTo(2 * sf(3), 15);
  });
  it('"about 1 in 4,300" for the one-sided 3.5 tail (1/2.326e-4 = 4,299); 2 significant figures', () => {
    expect(oneInN(sf(3.5))).toBe('about 1 in 4,300');
    expect(oneInN(2 * sf(3.5))).toBe('about 1 in 2,100');
    expect(oneInN(2 * sf(3))).toBe('about 1 in 370');
    expect(oneInN(0.05)).toBe('about 1 in 20');
    expect(oneInN(0.3)).toBe('about 1 in 3.3');
    expect(oneInN(1)).toBe('about 1 in 1');
    expect(oneInN(0)).toBe('practically never');
    expect(oneInN(NaN)).toBe('n/a');
    expect(oneInN(sf(6))).toBe('about 1 in 1,000,000,000');
  });
});

describe('describeCutoff', () => {
  it('IQR fence for normal data sits at 0.6745 + 1.349k SDs (Q3 = 0.6745 sigma, IQR = 1.349 sigma; Phi^-1(0.75) from SciPy ppf)', () => {
    const z75 = scipy().ppf.find((r) => r.p === 0.75)!.ppf;
    expect(iqrFenceInSds(1.5)).toBeCloseTo(z75 + 2 * z75 * 1.5, 12);
    expect(iqrFenceInSds(1.5)).toBeCloseTo(2.698, 3);
    expect(iqrFenceInSds(3)).toBeCloseTo(0.6745 * 7, 3); // 4.7214
    const text = describeCutoff('iqr', 1.5, 'both');
    expect(text).toContain('2.70 SDs');
    expect(text).toContain('about 1 in 140'); // 2 x Q(2.698) = 0.00698
  });
  it('robust and classic name the scale, the direction and the chance', () => {
    expect(describeCutoff('robust', 3.5, 'high')).toMatch(/Robust z cutoff 3\.5.*scaled MADs.*above.*high side.*about 1 in 4,300/);
    expect(describeCutoff('classic', 3, 'both')).toMatch(/Classic z cutoff 3:.*standard deviations away from.*Both sides.*about 1 in 370.*masking/);
  });
});

describe('cutoffForBudget and countFlaggedAt', () => {
  const opts = (method: MethodId, direction: Direction, cutoff?: number): ScoreOptions => ({
    method, direction, logScale: false, minGroupSize: 5, smallGroups: 'pool', ...(cutoff !== undefined ? { cutoff } : {}),
  });
  const table = (seed: number) => {
    const r = rng(seed);
    const z = normalSample(600, seed);
    const cc = z.map(() => `CC-${Math.floor(r() * 12)}`);
    // amounts rounded to whole units: many ties in scores
    const amt = z.map((v, i) => Math.round(Math.exp(4 + 0.7 * v) + (i % 97 === 0 ? 900 : 0)));
    return { valueColumns: [{ name: 'Amount', cells: amt }], groupColumns: [{ name: 'CC', cells: cc }] };
  };
  for (const method of ['robust', 'classic', 'iqr'] as const) {
    for (const direction of ['both', 'high', 'low'] as const) {
      it(`${method}, ${direction}: countFlaggedAt agrees with a re-run of scoreTable; the budget cutoff never exceeds the budget and is the smallest`, () => {
        const input = table(method.length * 7 + direction.length);
        const col = scoreTable(input, opts(method, direction)).columns[0];
        expect(countFlaggedAt(col, col.cutoff).total).toBe(col.flaggedRows);
        for (const c of [0.5, 1, 2, 2.5, 4]) {
          const rerun = scoreTable(input, opts(method, direction, c)).columns[0];
          const counted = countFlaggedAt(col, c);
          expect(counted.total).toBe(rerun.flaggedRows);
          expect(Array.from(counted.perGroup)).toEqual(rerun.groups.map((g) => g.flagged));
        }
        for (const budget of [0, 1, 5, 20, 100, 10_000]) {
          const c = cutoffForBudget(col, budget);
          const at = scoreTable(input, opts(method, direction, c)).columns[0].flaggedRows;
          expect(at).toBeLessThanOrEqual(budget);
          // smallest: any smaller cutoff flags more than the budget (unless everything already fits at 0)
          if (c > 0) expect(countFlaggedAt(col, c * (1 - 1e-9)).total).toBeGreaterThan(budget);
        }
      });
    }
  }
  it('ties: with three rows tied at the top and budget 2, none of the tied rows is flagged', () => {
    const x = [10, 11, 9, 10, 12, 8, 10, 11, 9, 10, 500, 500, 500];
    const col = scoreTable({ valueColumns: [{ name: 'A', cells: x }], groupColumns: [] }, opts('classic', 'high')).columns[0];
    const c = cutoffForBudget(col, 2);
    expect(c).toBeCloseTo(col.scores[10], 12);
    expect(countFlaggedAt(col, c).total).toBe(0);
    expect(cutoffForBudget(col, 3)).toBeLessThan(c);
    expect(countFlaggedAt(col, cutoffForBudget(col, 3)).total).toBe(3);
  });
});
