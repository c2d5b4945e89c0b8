import * as ss from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import {
  inverseNormal, mad, MAD_NORMAL_CONSTANT, mean, meanAbsoluteDeviation, median, quantile, quickselect, sampleStandardDeviation,
} from '../../src/scoring/index.js';
import { expectNear, rng, rStats, scipy } from './helpers.js';

describe('statistics against R 4.2 (stats::median, mad, mean, sd, quantile type 7) — fixture test/reference/r-stats.json', () => {
  for (const [name, d] of Object.entries(rStats())) {
    it(`${name}: median, MAD (constant 1.4826 and 1), mean, sd, Q1/Q3, mean abs. deviation`, () => {
      expectNear(median(d.x), d.median);
      expectNear(mad(d.x, MAD_NORMAL_CONSTANT), d.mad);
      expectNear(mad(d.x), d.mad1);
      expectNear(mean(d.x), d.mean, 1e-14);
      expectNear(sampleStandardDeviation(d.x), d.sd, 1e-13);
      expectNear(quantile(d.x, 0.25), d.q1);
      expectNear(quantile(d.x, 0.75), d.q3);
      expectNear(meanAbsoluteDeviation(d.x), d.meanAbsDevMedian, 1e-13);
    });
  }
});

describe('statistics against SciPy 1.17 (median_abs_deviation, iqr) — fixture test/reference/scipy.json', () => {
  const r = rStats();
  for (const [name, s] of Object.entries(scipy().sets)) {
    it(`${name}: raw MAD, normal-scaled MAD (1/Phi^-1(0.75)), IQR`, () => {
      const x = r[name].x;
      expectNear(mad(x), s.madRaw);
      // SciPy's scale='normal' is the exact 1/Phi^-1(0.75) = 1.482602..., not the rounded 1.4826.
      expectNear(mad(x) / inverseNormal(0.75), s.madNormal, 1e-12);
      expectNear(quantile(x, 0.75) - quantile(x, 0.25), s.iqr, 1e-12);
    });
  }
});

describe("Microsoft's QUARTILE.INC documentation example", () => {
  // Data and QUARTILE.INC(A2:A9,1) = 3.5 as on https://support.microsoft.com/es-es/excel/functions/quartile-inc-function
  // (English text; the 3.5 row is visible there). QUARTILE.INC(A2:A9,3) = 9.25 is from memory of the same page,
  // and R's quantile(type = 7) gives 9.25 too (r-stats.json, set "quartileinc").
  const data = [1, 2, 4, 7, 8, 9, 10, 12];
  it('Q1 = 3.5 and Q3 = 9.25 (type 7)', () => {
    expect(quantile(data, 0.25)).toBe(3.5);
    expect(quantile(data, 0.75)).toBe(9.25);
    expect(quantile(data, 0.5)).toBe(median(data));
    expect(quantile(data, 0)).toBe(1);
    expect(quantile(data, 1)).toBe(12);
  });
});

describe('simple-statistics 7.12 as a second implementation, seeded random data', () => {
  // simple-statistics' quantile is documented (node_modules/simple-statistics/src/quantile.js) as linear
  // interpolation "equivalent to R's type=7", so it is compared as type 7; its MAD is unscaled like mad(x).
  const r = rng(7);
  for (let trial = 0; trial < 25; trial++) {
    const n = 1 + Math.floor(r() * 300);
    const x = Array.from({ length: n }, () => Math.round((r() < 0.1 ? 5000 : 200) * Math.exp(r() * 2) * 100) / 100);
    it(`trial ${trial} (n = ${n})`, () => {
      expectNear(median(x), ss.median(x));
      expectNear(mad(x), ss.medianAbsoluteDeviation(x));
      expectNear(mean(x), ss.mean(x), 1e-13);
      if (n >= 2) expectNear(sampleStandardDeviation(x), ss.sampleStandardDeviation(x), 1e-10);
      for (const p of [0.1, 0.25, 0.75, 0.9]) expectNear(quantile(x, p), ss.quantile(x, p), 1e-12);
    });
  }
});

describe('degenerate input and no mutation (documented behaviour)', () => {
  it('empty input gives NaN; n = 1 gives the value (SD NaN)', () => {
    expect(median([])).toBeNaN();
    expect(mad([])).toBeNaN();
    expect(mean([])).toBeNaN();
    expect(quantile([], 0.5)).toBeNaN();
    expect(quantile([1, 2], 1.5)).toBeNaN();
    expect(median([4])).toBe(4);
    expect(sampleStandardDeviation([4])).toBeNaN();
    expect(mad([4])).toBe(0);
  });
  it('all-equal values give SD exactly 0 and mean exactly the value (corrected two-pass)', () => {
    const x = Array(10).fill(0.1);
    expect(mean(x)).toBe(0.1);
    expect(sampleStandardDeviation(x)).toBe(0);
  });
  it('never mutates the caller array', () => {
    const x = [5, 3, 9, 1, 7];
    median(x); mad(x); quantile(x, 0.25); meanAbsoluteDeviation(x);
    expect(x).toEqual([5, 3, 9, 1, 7]);
  });
  it('quickselect places the k-th order statistic (checked against a full sort), including heavy ties', () => {
    const r = rng(11);
    for (let t = 0; t < 200; t++) {
      const n = 1 + Math.floor(r() * 2000);
      const a = Float64Array.from({ length: n }, () => (t % 3 === 0 ? Math.floor(r() * 3) : r()));
      const sorted = Float64Array.from(a).sort();
      const k = Math.floor(r() * n);
      quickselect(a, k);
      expect(a[k]).toBe(sorted[k]);
      let ordered = true;
      for (let i = 0; i < k; i++) if (!(a[i] <= a[k])) ordered = false;
      for (let i = k + 1; i < n; i++) if (!(a[i] >= a[k])) ordered = false;
      expect(ordered).toBe(true);
      expect(Float64Array.from(a).sort()).toEqual(sorted); // a permutation of the input
    }
  });
  it('quickselect stays correct on sorted and reversed input', () => {
    const up = Float64Array.from({ length: 5000 }, (_, i) => i);
    const down = Float64Array.from({ length: 5000 }, (_, i) => 5000 - i);
    quickselect(up, 1234);
    quickselect(down, 1234);
    expect(up[1234]).toBe(1234);
    expect(down[1234]).toBe(1235);
  });
});
