import { describe, expect, it } from 'vitest';
import { erfc, inverseNormal, MAD_NORMAL_CONSTANT, mean, normalCdf, normalUpperTail, sampleStandardDeviation } from '../../src/scoring/index.js';
import { expectNear, normalSample, scipy } from './helpers.js';

describe('normal distribution against a published standard normal table', () => {
  // Standard normal table values (e.g. Abramowitz & Stegun, Handbook of Mathematical Functions, Table 26.1;
  // the same figures appear in any statistics textbook table), to the digits printed there.
  it('Phi(1.96) = 0.9750, Phi(1) = 0.8413, Phi(2) = 0.9772, Phi(3) = 0.99865', () => {
    expect(normalCdf(1.96)).toBeCloseTo(0.975, 4);
    expect(normalCdf(1)).toBeCloseTo(0.8413, 4);
    expect(normalCdf(2)).toBeCloseTo(0.9772, 4);
    expect(normalCdf(3)).toBeCloseTo(0.99865, 5);
    expect(normalCdf(0)).toBe(0.5);
  });
  it('upper tail at 3.5 is about 2.326e-4 (1 in 4,300)', () => {
    expect(normalUpperTail(3.5)).toBeCloseTo(2.326e-4, 7);
  });
});

describe('normal distribution against SciPy 1.17 (norm.sf, norm.cdf, norm.ppf) — test/reference/scipy.json', () => {
  const f = scipy();
  for (const { z, sf, cdf } of f.norm) {
    it(`z = ${z}: sf and cdf to 1e-12 relative`, () => {
      expectNear(normalUpperTail(z), sf, 1e-12, 1e-300);
      expectNear(normalCdf(z), cdf, 1e-12, 1e-300);
    });
  }
  for (const { p, ppf } of f.ppf) {
    it(`inverse normal at p = ${p} to 1e-12`, () => {
      expectNear(inverseNormal(p), ppf, 1e-12, 1e-14);
    });
  }
  it('erfc edge cases (documented): erfc(0) = 1, odd symmetry erfc(-x) = 2 - erfc(x), NaN passes through', () => {
    expect(erfc(0)).toBe(1);
    expectNear(erfc(-1.3), 2 - erfc(1.3), 1e-15);
    expect(erfc(NaN)).toBeNaN();
    expect(erfc(40)).toBe(0);
    expect(inverseNormal(0)).toBe(-Infinity);
    expect(inverseNormal(1)).toBe(Infinity);
    expect(inverseNormal(1.2)).toBeNaN();
  });
});

describe('common practice, no source', () => {
  it('about 68 / 95 / 99.7 % of a large seeded normal sample lie within 1 / 2 / 3 SD', () => {
    const x = normalSample(200_000, 99);
    const m = mean(x);
    const s = sampleStandardDeviation(x);
    const share = (k: number): number => x.filter((v) => Math.abs(v - m) <= k * s).length / x.length;
    expect(share(1)).toBeGreaterThan(0.677);
    expect(share(1)).toBeLessThan(0.688);
    expect(share(2)).toBeGreaterThan(0.951);
    expect(share(2)).toBeLessThan(0.9555);
    expect(share(3)).toBeGreaterThan(0.9965);
    expect(share(3)).toBeLessThan(0.9981);
  });
  it('1.4826 is 1/Phi^-1(0.75) to four decimals (via our inverse normal)', () => {
    const exact = 1 / inverseNormal(0.75);
    expect(exact).toBeCloseTo(1.482602, 6);
    expect(Math.abs(exact - MAD_NORMAL_CONSTANT)).toBeLessThan(5e-5);
    // and 0.6745 (Iglewicz & Hoaglin's constant) is Phi^-1(0.75) to four decimals
    expect(inverseNormal(0.75)).toBeCloseTo(0.6745, 4);
  });
});
