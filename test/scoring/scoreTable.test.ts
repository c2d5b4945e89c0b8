import { describe, expect, it } from 'vitest';
import {
  describeColumn, EXCLUSION_REASONS, MEANAD_NORMAL_CONSTANT, scoreTable, type RawCell, type ScoreOptions, type ScoreResult,
} from '../../src/scoring/index.js';
import { expectNear, rStats } from './helpers.js';

const base: ScoreOptions = { method: 'robust', direction: 'both', logScale: false, minGroupSize: 1, smallGroups: 'pool' };
const one = (cells: RawCell[], options: Partial<ScoreOptions> = {}, groups: RawCell[][] = []): ScoreResult =>
  scoreTable(
    { valueColumns: [{ name: 'Amount', cells }], groupColumns: groups.map((g, i) => ({ name: `Key${i}`, cells: g })) },
    { ...base, ...options },
  );

describe('robust and classic z per value against R (test/reference/r-stats.json)', () => {
  for (const [name, d] of Object.entries(rStats())) {
    it(`${name}: robust z = (x - median) / mad(x) as R computes it; classic z = (x - mean) / sd(x)`, () => {
      const robust = one(d.x).columns[0];
      const classic = one(d.x, { method: 'classic' }).columns[0];
      const g = describeColumn(robust).groups[0];
      expectNear(g.median!, d.median);
      expectNear(g.scaledMad!, d.mad);
      expectNear(g.mad!, d.mad1);
      expectNear(g.q1!, d.q1);
      expectNear(g.q3!, d.q3);
      expectNear(g.mean!, d.mean, 1e-14);
      expectNear(g.sd!, d.sd, 1e-13);
      d.x.forEach((_, i) => {
        const rz = d.robustZ[i];
        if (rz !== null) expectNear(robust.scores[i], rz, 1e-12);
        expectNear(classic.scores[i], d.classicZ[i]!, 1e-12, 1e-14);
      });
    });
  }
  it('MAD = 0 set: R gives no robust z (division by 0); we use 1.2533 x meanAD around the median (R: mean(abs(x - median(x))))', () => {
    const d = rStats().madzero;
    const col = one(d.x).columns[0];
    const g = col.groups[0];
    expect(describeColumn(col).groups[0].mad).toBe(0);
    expect(g.fallbacks).toContain('mad-zero-used-meanad');
    expectNear(g.scale!, Math.sqrt(Math.PI / 2) * d.meanAbsDevMedian, 1e-13);
    expect(MEANAD_NORMAL_CONSTANT).toBeCloseTo(1.2533, 4);
    d.x.forEach((x, i) => expectNear(col.scores[i], (x - d.median) / g.scale!, 1e-12));
    // 310 is far out; the 45s sit at the centre
    expect(col.flagged[10]).toBe(1);
    expect(col.scores[0]).toBe(0);
  });
});

describe('NIST/SEMATECH e-Handbook 1.3.5.17 (modified z-score, Iglewicz & Hoaglin)', () => {
  // From memory of the Handbook page: M_i = 0.6745 (x_i - median) / MAD, and |M_i| > 3.5 labels a potential outlier.
  it('robust z equals 0.6745 (x - median) / MAD up to the rounding of the constants (|1.4826 x 0.6745 - 1| < 2e-5)', () => {
    const d = rStats().lognormal40;
    const col = one(d.x).columns[0];
    d.x.forEach((x, i) => {
      const m = (0.6745 * (x - d.median)) / d.mad1;
      expect(Math.abs(col.scores[i] - m)).toBeLessThanOrEqual(2e-5 * Math.abs(m) + 1e-12);
    });
  });
  it('default cutoff 3.5: M = 3.6 flagged, M = 3.4 not, M = 3.5 exactly not (strictly greater)', () => {
    // median 100, MAD 10 (raw) -> scaled MAD 14.826; x = 100 + M x 14.826
    const core = [80, 85, 90, 95, 100, 100, 105, 110, 115, 120, 90, 110];
    const x = [...core, 100 + 3.6 * 14.826, 100 - 3.4 * 14.826];
    const col = one(x).columns[0];
    expect(col.cutoff).toBe(3.5);
    const g = describeColumn(col).groups[0];
    expect(g.median).toBe(100);
    expect(g.mad).toBe(10);
    expect(col.flagged[12]).toBe(1);
    expect(col.flagged[13]).toBe(0);
    expect(col.scores[12]).toBeCloseTo(3.6, 10);
    const exact = one([...core, 100 + 3.5 * 14.826, 100]).columns[0];
    expect(exact.scores[12]).toBeCloseTo(3.5, 12);
  });
});

describe('masking on invented data: three large claims hide from classic z but not from robust z', () => {
  // Invented cost centre: 12 ordinary travel claims near 100 and three of 2,400-2,700.
  const x = rStats().masking.x;
  it('classic z (cutoff 3) flags none of them; robust z (3.5) flags all three', () => {
    const classic = one(x, { method: 'classic' }).columns[0];
    const robust = one(x).columns[0];
    expect(classic.groups[0].fallbacks).not.toContain('cutoff-unreachable'); // (15-1)/sqrt(15) = 3.61 > 3
    expect(classic.flaggedRows).toBe(0);
    expect(Array.from(robust.flagged.slice(12))).toEqual([1, 1, 1]);
    expect(robust.flaggedRows).toBe(3);
  });
});

describe('degenerate groups (explicit fallbacks)', () => {
  it('all equal: robust no-spread, classic sd-zero, scores 0, nothing flagged, no bounds', () => {
    const x = new Array<number>(12).fill(42.5);
    for (const method of ['robust', 'classic'] as const) {
      const col = one(x, { method }).columns[0];
      const g = col.groups[0];
      expect(g.fallbacks).toContain(method === 'robust' ? 'no-spread' : 'sd-zero');
      expect(Array.from(col.scores)).toEqual(new Array<number>(12).fill(0));
      expect(col.flaggedRows).toBe(0);
      expect(g.scale).toBeNull();
      expect(g.lower).toBeNull();
      expect(g.upper).toBeNull();
      expect(g.center).toBe(42.5);
    }
  });
  it('classic: cutoff-unreachable when (n - 1)/sqrt(n) <= cutoff (Shiffler 1988): n = 10 gives 2.846 < 3', () => {
    const col = one([1, 2, 3, 4, 5, 6, 7, 8, 9, 1000], { method: 'classic' }).columns[0];
    const g = col.groups[0];
    expect(g.fallbacks).toContain('cutoff-unreachable');
    expect(g.maxAttainableZ).toBeCloseTo(9 / Math.sqrt(10), 12);
    expect(Math.max(...Array.from(col.scores))).toBeLessThanOrEqual(9 / Math.sqrt(10));
    expect(col.flaggedRows).toBe(0);
    const n11 = one([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 1000], { method: 'classic' }).columns[0];
    expect(n11.groups[0].fallbacks).not.toContain('cutoff-unreachable'); // 10/sqrt(11) = 3.015
  });
  it("IQR = 0: fences use the whole column's IQR ('iqr-zero'); if that is 0 too, the group is not scored", () => {
    const cc = [...new Array<string>(10).fill('A'), ...new Array<string>(10).fill('B')];
    const amt = [5, 5, 5, 5, 5, 5, 5, 5, 5, 60, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10];
    const col = one(amt, { method: 'iqr', minGroupSize: 8 }, [cc]).columns[0];
    const a = col.groups[0];
    expect(a.fallbacks).toEqual(['iqr-zero']);
    const whole = describeColumn(col).whole;
    const colIqr = whole.q3! - whole.q1!;
    expect(colIqr).toBeGreaterThan(0);
    expect(a.scale).toBe(colIqr);
    expect(a.upper).toBeCloseTo(5 + 1.5 * colIqr, 12);
    expect(col.scores[9]).toBeCloseTo((60 - (5 + 1.5 * colIqr)) / colIqr, 12);
    const flat = one(new Array<number>(10).fill(3), { method: 'iqr' }).columns[0];
    expect(flat.groups[0].fallbacks).toEqual(['iqr-zero']);
    expect(flat.groups[0].population).toBe('none');
    expect(flat.scoredRows).toBe(0);
    expect(Array.from(flat.scores).filter((s) => !Number.isNaN(s))).toEqual([]);
  });
  it('no NaN or Infinity in GroupStats for empty, one-value and two-value groups', () => {
    const res = one(['x', 5, 5, 7], { minGroupSize: 1 }, [['E', 'S', 'T', 'T']]).columns[0];
    for (const g of [...res.groups, res.pooled]) {
      for (const [k, v] of Object.entries(g)) if (typeof v === 'number') expect(Number.isFinite(v), `${g.key} ${k} = ${v}`).toBe(true);
    }
    expect(res.groups[0].n).toBe(0);
    expect(describeColumn(res).groups[0].median).toBeNull();
    expect(describeColumn(res).groups[1].sd).toBeNull();
    expect(res.groups[1].maxAttainableZ).toBeNull();
  });
});

describe('small groups: pool or skip (minGroupSize)', () => {
  const cc = [...new Array<string>(9).fill('Big'), 'Tiny', 'Tiny', 'Tiny'];
  const amt = [100, 102, 98, 101, 99, 103, 97, 100, 100, 100, 5000, 99];
  it("pool: the small group's rows are scored against the whole column (population 'column')", () => {
    const col = one(amt, { minGroupSize: 8 }, [cc]).columns[0];
    const tiny = col.groups[1];
    expect(tiny.population).toBe('column');
    expect(tiny.fallbacks).toContain('small-pooled');
    expect(col.population[10]).toBe(2);
    expect(col.population[0]).toBe(1);
    expect(col.scores[10]).toBeCloseTo((5000 - describeColumn(col).whole.median!) / describeColumn(col).whole.scaledMad!, 10);
    expect(col.flagged[10]).toBe(1);
    expect(col.pooled.flagged).toBe(1);
    expect(tiny.flagged).toBe(1);
  });
  it("skip: left unscored (population 'none', NaN scores)", () => {
    const col = one(amt, { minGroupSize: 8, smallGroups: 'skip' }, [cc]).columns[0];
    const tiny = col.groups[1];
    expect(tiny.population).toBe('none');
    expect(tiny.fallbacks).toEqual(['small-skipped']);
    expect(tiny.center).toBeNull();
    expect(Number.isNaN(col.scores[10])).toBe(true);
    expect(col.population[10]).toBe(0);
    expect(col.scoredRows).toBe(9);
  });
});

describe('grouping', () => {
  it('several key columns: trimmed, "(blank)" label, " / " label, U+001F key; numbers and Dates as text', () => {
    const k1: RawCell[] = [' CC-410 ', 'CC-410', null, 410, new Date(Date.UTC(2024, 2, 5)), 'CC-410'];
    const k2: RawCell[] = ['Travel', 'Travel ', 'Meals', 'Meals', 'Meals', ''];
    const res = one([1, 2, 3, 4, 5, 6], {}, [k1, k2]).columns[0];
    expect(res.groups.map((g) => g.label)).toEqual(['CC-410 / Travel', '(blank) / Meals', '410 / Meals', '2024-03-05 / Meals', 'CC-410 / (blank)']);
    expect(res.groups[0].key).toBe('CC-410\u001fTravel');
    expect(res.groups[1].keyParts).toEqual(['', 'Meals']);
    expect(res.groups[0].rows).toBe(2);
    expect(Array.from(res.groupOf)).toEqual([0, 0, 1, 2, 3, 4]);
  });
  it('one key column: "A", " A" and "A " are the same group; a number 1 and text "1" too', () => {
    const res = one([1, 2, 3, 4, 5], {}, [['A', ' A', 'A ', 1, '1']]).columns[0];
    expect(res.groups.length).toBe(2);
    expect(Array.from(res.groupOf)).toEqual([0, 0, 0, 1, 1]);
  });
  it('zero key columns: one group "(all rows)"', () => {
    const res = one([1, 2, 3]);
    expect(res.columns[0].groups.map((g) => g.label)).toEqual(['(all rows)']);
    expect(res.groupColumns).toEqual([]);
  });
});

describe('exclusions, log scale, directions, bounds', () => {
  it('counts exclusions per reason per group and for the column; values NaN there', () => {
    const cells: RawCell[] = [10, '', '#N/A', true, new Date(), 'abc', NaN, '1,000.00', { kind: 'error', code: '#REF!' }];
    const col = one(cells).columns[0];
    expect(col.excludedCounts).toEqual({ blank: 1, error: 2, boolean: 1, date: 1, text: 1, 'non-finite': 1, 'not-positive-for-log': 0 });
    expect(col.groups[0].excluded).toEqual(col.excludedCounts);
    expect(col.groups[0].n).toBe(2);
    expect(col.groups[0].rows).toBe(9);
    expect(Number.isNaN(col.values[2])).toBe(true);
    expect(col.values[7]).toBe(1000);
    expect(EXCLUSION_REASONS[col.exclusion[2] - 1]).toBe('error');
    expect(col.exclusion[0]).toBe(0);
  });
  it('log scale: ln(x) scored, x <= 0 excluded, bounds back in original units', () => {
    const x = [100, 120, 80, 150, 90, 110, 130, 95, 0, -20, 5000];
    const col = one(x, { logScale: true }).columns[0];
    const g = col.groups[0];
    expect(col.excludedCounts['not-positive-for-log']).toBe(2);
    expect(g.n).toBe(9);
    const logs = x.filter((v) => v > 0).map(Math.log).sort((a, b) => a - b);
    expect(g.center).toBeCloseTo(logs[4], 12); // median of 9 logs
    expect(describeColumn(col).groups[0].median).toBe(110); // descriptive stats stay in amounts
    expect(g.upper).toBeCloseTo(Math.exp(g.center! + 3.5 * g.scale!), 8);
    expect(g.lower).toBeCloseTo(Math.exp(g.center! - 3.5 * g.scale!), 8);
    expect(col.flagged[10]).toBe(1);
    expect(col.scores[0]).toBeCloseTo((Math.log(100) - g.center!) / g.scale!, 12);
  });
  it('direction high flags only above, low only below; the other bound is null', () => {
    const x = [10, 11, 9, 10, 12, 8, 10, 11, 9, 100, -80];
    const hi = one(x, { direction: 'high' }).columns[0];
    const lo = one(x, { direction: 'low' }).columns[0];
    expect(hi.flagged[9]).toBe(1);
    expect(hi.flagged[10]).toBe(0);
    expect(lo.flagged[9]).toBe(0);
    expect(lo.flagged[10]).toBe(1);
    expect(hi.groups[0].lower).toBeNull();
    expect(lo.groups[0].upper).toBeNull();
  });
  it("IQR score on Microsoft's QUARTILE.INC data (Q1 3.5, Q3 9.25, IQR 5.75) with k = 0.25", () => {
    const col = one([1, 2, 4, 7, 8, 9, 10, 12], { method: 'iqr', cutoff: 0.25 }).columns[0];
    const g = col.groups[0];
    expect(g.upper).toBeCloseTo(9.25 + 0.25 * 5.75, 12);
    expect(g.lower).toBeCloseTo(3.5 - 0.25 * 5.75, 12);
    expect(col.scores[7]).toBeCloseTo((12 - 10.6875) / 5.75, 12);
    expect(col.scores[0]).toBeCloseTo((1 - 2.0625) / 5.75, 12);
    expect(col.scores[1]).toBeCloseTo((2 - 2.0625) / 5.75, 12);
    expect(col.scores[4]).toBe(0);
    expect(Array.from(col.flagged)).toEqual([1, 1, 0, 0, 0, 0, 0, 1]);
    const high = one([1, 2, 4, 7, 8, 9, 10, 12], { method: 'iqr', cutoff: 0.25, direction: 'high' }).columns[0];
    expect(Array.from(high.flagged)).toEqual([0, 0, 0, 0, 0, 0, 0, 1]);
    expect(high.scores[0]).toBeLessThan(0); // score stays signed whatever the direction
  });
});

describe('contract details', () => {
  it('fills options with defaults (robust 3.5, classic 3, IQR 1.5) and several value columns share the grouping', () => {
    const res = scoreTable(
      { valueColumns: [{ name: 'A', cells: [1, 2, 3] }, { name: 'B', cells: [3, 2, 1] }], groupColumns: [{ name: 'K', cells: ['x', 'x', 'y'] }] },
      { method: 'classic', direction: 'both', logScale: false, minGroupSize: 8, smallGroups: 'pool' },
    );
    expect(res.options.cutoff).toBe(3);
    expect(res.options.decimalComma).toBe(false);
    expect(res.columns.map((c) => c.column)).toEqual(['A', 'B']);
    expect(res.rowCount).toBe(3);
    expect(res.columns[0].groupOf).toBe(res.columns[1].groupOf);
    expect(one([1], { method: 'iqr' }).options.cutoff).toBe(1.5);
    expect(one([1]).options.cutoff).toBe(3.5);
  });
  it('decimalComma option reaches the parser', () => {
    expect(one(['1.234,50'], { decimalComma: true }).columns[0].values[0]).toBe(1234.5);
  });
  it('bad input: columns of different lengths are named; options outside the contract are a programming error', () => {
    expect(() => scoreTable({ valueColumns: [{ name: 'Amount', cells: [1, 2] }], groupColumns: [{ name: 'Cost centre', cells: ['a'] }] }, base))
      .toThrow(/Cost centre.*1 rows.*2/);
    // The user's settings are checked (and worded) by the pipeline: test/pipeline/settings.test.ts.
    expect(() => one([1], { cutoff: -1 })).toThrow(RangeError);
    expect(() => one([1], { cutoff: NaN })).toThrow(RangeError);
    expect(() => one([1], { method: 'fancy' as never })).toThrow(/Unknown scoring method "fancy"/);
    expect(() => one([1], { minGroupSize: 0 })).toThrow(RangeError);
    expect(() => one([1], { direction: 'up' as never })).toThrow(RangeError);
  });
  it('never mutates the input cells', () => {
    const cells: RawCell[] = [3, '1', null, 2];
    const keys: RawCell[] = [' a', 'a', 'b', 'b'];
    one(cells, {}, [keys]);
    expect(cells).toEqual([3, '1', null, 2]);
    expect(keys).toEqual([' a', 'a', 'b', 'b']);
  });
  it('every GroupStats field is present', () => {
    const g = one([1, 2, 3, 4]).columns[0].groups[0];
    expect(Object.keys(g).sort()).toEqual([
      'center', 'chanceRate', 'chanceRateAtMost', 'excluded', 'fallbacks', 'fenceFrom', 'flagged', 'key', 'keyParts', 'label', 'lower', 'maxAttainableZ',
      'medcouple', 'n', 'population', 'rows', 'scale', 'unreachable', 'upper',
    ]);
  });
  it('an empty table scores to empty arrays', () => {
    const res = one([]);
    expect(res.rowCount).toBe(0);
    expect(res.columns[0].scores.length).toBe(0);
    expect(res.columns[0].pooled.n).toBe(0);
  });
});
