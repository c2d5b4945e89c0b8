import { readFileSync } from 'node:fs';
import { expect } from 'vitest';
import { fileURLToPath } from 'node:url';
import { mulberry32 } from '../../src/demo/random.js';

export interface RSet {
  x: number[]; median: number; mad: number; mad1: number; mean: number; sd: number; q1: number; q3: number;
  meanAbsDevMedian: number; robustZ: (number | null)[]; classicZ: (number | null)[];
}
export interface SciPyFixture {
  norm: { z: number; sf: number; cdf: number }[];
  ppf: { p: number; ppf: number }[];
  sets: Record<string, { madNormal: number; madRaw: number; iqr: number }>;
}

const ref = (name: string): unknown =>
  JSON.parse(readFileSync(fileURLToPath(new URL(`../reference/${name}`, import.meta.url)), 'utf8'));

/** R 4.2 stats + robustbase fixture, made by test/reference/make-r-fixture.R. */
export const rStats = (): Record<string, RSet> => {
  const all = ref('r-stats.json') as Record<string, RSet | string>;
  return Object.fromEntries(Object.entries(all).filter(([k]) => !k.startsWith('_'))) as Record<string, RSet>;
};
/** SciPy fixture, made by test/reference/make-scipy-fixture.py. */
export const scipy = (): SciPyFixture => ref('scipy.json') as SciPyFixture;

/**
 * Asserts |actual - expected| <= max(abs, rel * |expected|). On failure vitest prints both numbers, the
 * gap and the tolerance (toBeCloseTo only knows an absolute number of decimal places).
 */
export function expectNear(actual: number, expected: number, rel = 1e-12, abs = 1e-12): void {
  const tolerance = Math.max(abs, rel * Math.abs(expected));
  expect(Math.abs(actual - expected), `got ${actual}, expected ${expected} within ${tolerance}`).toBeLessThanOrEqual(tolerance);
}

/** Deterministic PRNG (mulberry32). */
export const rng = mulberry32;
export function normalSample(n: number, seed: number): number[] {
  const r = rng(seed);
  const out: number[] = [];
  for (let i = 0; i < n; i++) out.push(Math.sqrt(-2 * Math.log(1 - r())) * Math.cos(2 * Math.PI * r()));
  return out;
}
