import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, test } from 'vitest';
import { medcouple } from '../../src/scoring/medcouple.js';
import { tukeyHinges } from '../../src/scoring/tukeyHinges.js';
import { scoreTable } from '../../src/scoring/index.js';
import { rng } from './helpers.js';

interface McSet { x: number[]; mc: number; mcDefinition: number; fivenum: number[]; fence: number[]; out: number[] }
const fixture = JSON.parse(readFileSync(fileURLToPath(new URL('../reference/r-medcouple.json', import.meta.url)), 'utf8')) as Record<string, McSet | string>;
const sets = Object.entries(fixture).filter(([k]) => !k.startsWith('_')) as [string, McSet][];

/** The published definition evaluated by brute force over all pairs (O(n^2)), written independently here. */
function medcoupleByDefinition(xs: readonly number[]): number {
  const x = [...xs].sort((a, b) => a - b);
  const n = x.length;
  const m = n % 2 ? x[(n - 1) / 2] : (x[n / 2 - 1] + x[n / 2]) / 2;
  const zp = x.filter((v) => v >= m).map((v) => v - m).sort((a, b) => b - a);
  const zm = x.filter((v) => v <= m).map((v) => v - m).sort((a, b) => b - a);
  const h: number[] = [];
  zp.forEach((a, i) => zm.forEach((b, j) => h.push(a === 0 && b === 0 ? Math.sign(zp.length - 1 - i - j) : (a + b) / (a - b))));
  h.sort((a, b) => a - b);
  const N = h.length;
  return N % 2 ? h[(N - 1) / 2] : (h[N / 2 - 1] + h[N / 2]) / 2;
}

describe('medcouple against R robustbase (test/reference/make-r-medcouple.R)', () => {
  test.each(sets)('%s: mc equals the published definition evaluated in R (robustbase mc(x, doReflect = TRUE) where it agrees)', (name, s) => {
    expect(medcouple(s.x)).toBeCloseTo(s.mcDefinition, 12);
    // robustbase agrees with the definition everywhere except 3-4 values all but one tied at the median.
    if (name !== 'size3ties') expect(medcouple(s.x)).toBeCloseTo(s.mc, 12);
  });
  test('size3ties: robustbase reports 1 where the definition gives 0.5 (recorded, not followed)', () => {
    const s = Object.fromEntries(sets).size3ties;
    expect([s.mc, s.mcDefinition, medcouple(s.x)]).toEqual([1, 0.5, 0.5]);
  });
  test.each(sets)("%s: Tukey's hinges equal R fivenum", (_name, s) => {
    const h = tukeyHinges(s.x);
    expect([h.low, h.high]).toEqual([s.fivenum[1], s.fivenum[3]]);
  });
  test('symmetric data: MC = 0; mirrored data: MC changes sign (R: symmetric9 mc = 0)', () => {
    const s = Object.fromEntries(sets);
    expect(medcouple(s.symmetric9.x)).toBe(0);
    expect(medcouple(s.lognormal60.x.map((v) => -v))).toBeCloseTo(-s.lognormal60.mc, 12);
    expect(s.leftskew25.mc).toBeLessThan(0);
  });
  test('degenerate input: empty NaN, n = 1 and 2 give 0, all equal 0', () => {
    expect([medcouple([]), medcouple([4]), medcouple([1, 9]), medcouple([3, 3, 3, 3])]).toEqual([NaN, 0, 0, 0]);
  });
});

describe('medcouple: fast algorithm equals the brute-force definition (computed in this test)', () => {
  test('3,000 seeded samples, n 1..120, half with many ties', () => {
    const r = rng(5);
    for (let t = 0; t < 3000; t++) {
      const n = 1 + Math.floor(r() * 120);
      const ties = r() < 0.5;
      const xs = Array.from({ length: n }, () => (ties ? Math.round(Math.exp(r() * 3)) : Math.exp(2 * r()) * (r() < 0.5 ? -1 : 1)));
      const fast = medcouple(xs);
      const slow = medcoupleByDefinition(xs);
      if (Math.abs(fast - slow) > 1e-13) expect({ t, n, fast }).toEqual({ t, n, fast: slow });
    }
  });
  test('24 seeded samples, n 200..800 (several rounds before the candidates are gathered), amounts in cents with and without ties', () => {
    const r = rng(11);
    for (let t = 0; t < 24; t++) {
      const n = 200 + Math.floor(r() * 600);
      const kind = t % 3;
      const xs = Array.from({ length: n }, () =>
        kind === 0 ? Math.round(100 * Math.exp(3 + r() * 2)) / 100 : kind === 1 ? Math.round(Math.exp(r() * 4)) : Math.round(r() * 6) * 10);
      const fast = medcouple(xs);
      const slow = medcoupleByDefinition(xs);
      if (Math.abs(fast - slow) > 1e-13) expect({ t, n, fast }).toEqual({ t, n, fast: slow });
    }
  });
});

describe('adjusted method against R robustbase adjboxStats (coef 1.5, a = -4, b = 3)', () => {
  test.each(sets.filter(([name]) => name !== 'size3ties'))('%s: fences and flagged values', (_name, s) => {
    const res = scoreTable(
      { valueColumns: [{ name: 'Amount', cells: s.x }], groupColumns: [] },
      { method: 'adjusted', direction: 'both', logScale: false, minGroupSize: 1, smallGroups: 'pool' },
    );
    const col = res.columns[0];
    const g = col.groups[0];
    expect(g.lower).toBeCloseTo(s.fence[0], 9);
    expect(g.upper).toBeCloseTo(s.fence[1], 9);
    const flaggedValues = s.x.filter((_, i) => col.flagged[i] === 1).sort((a, b) => a - b);
    expect(flaggedValues).toEqual(s.out);
    expect(g.medcouple).toBeCloseTo(s.mc, 12);
  });
});

describe('skew-aware fences (default method) from R robustbase figures (fivenum hinges, mc)', () => {
  test.each(sets.filter(([name]) => name !== 'size3ties'))('%s: long side as the adjusted boxplot, short side Tukey, k = 3', (_name, s) => {
    const res = scoreTable(
      { valueColumns: [{ name: 'Amount', cells: s.x }], groupColumns: [] },
      { method: 'skew', direction: 'both', logScale: false, minGroupSize: 1, smallGroups: 'pool' },
    );
    const g = res.columns[0].groups[0];
    const [q1, q3] = [s.fivenum[1], s.fivenum[3]];
    const iqr = q3 - q1;
    const k = 3;
    // Hubert & Vandervieren (2008) on the long side, Tukey (1977) on the short side.
    const lower = s.mc >= 0 ? q1 - k * iqr : q1 - k * Math.exp(-3 * s.mc) * iqr;
    const upper = s.mc >= 0 ? q3 + k * Math.exp(3 * s.mc) * iqr : q3 + k * iqr;
    expect(res.columns[0].cutoff).toBe(3);
    expect(g.lower).toBeCloseTo(lower, 9);
    expect(g.upper).toBeCloseTo(upper, 9);
  });
});
