import fc from 'fast-check';
import { describe, it } from 'vitest';
import { scoreTable, type ColumnScores, type MethodId, type RawCell, type ScoreOptions } from '../../src/scoring/index.js';

// Property tests (fast-check, fixed seeds so failures reproduce).
const SEED = 424242;
const METHODS: MethodId[] = ['robust', 'classic', 'iqr'];
const opts = (method: MethodId, extra: Partial<ScoreOptions> = {}): ScoreOptions => ({
  method, direction: 'both', logScale: false, minGroupSize: 3, smallGroups: 'pool', ...extra,
});
const score = (amounts: RawCell[], keys: RawCell[], o: ScoreOptions): ColumnScores =>
  scoreTable({ valueColumns: [{ name: 'Amount', cells: amounts }], groupColumns: [{ name: 'CC', cells: keys }] }, o).columns[0];

/** Amounts in cents up to 1,000,000.00, credits included; keys from a small set. */
const rowsArb = fc.array(fc.record({ cents: fc.integer({ min: -100_000_000, max: 100_000_000 }), key: fc.constantFrom('A', 'B', 'C', 'D') }), { minLength: 1, maxLength: 60 });
const close = (a: number, b: number): boolean => (Number.isNaN(a) && Number.isNaN(b)) || Math.abs(a - b) <= 1e-6 * Math.max(1, Math.abs(a), Math.abs(b));

describe('invariance (row shuffle, positive scaling, shift)', () => {
  for (const method of METHODS) {
    it(`${method}: scores unchanged under a row shuffle`, () => {
      fc.assert(
        fc.property(rowsArb, fc.integer(), (rows, salt) => {
          const perm = rows.map((_, i) => i).sort((a, b) => ((a * 7919 + salt) % 101) - ((b * 7919 + salt) % 101) || a - b);
          const a = score(rows.map((r) => r.cents / 100), rows.map((r) => r.key), opts(method));
          const b = score(perm.map((i) => rows[i].cents / 100), perm.map((i) => rows[i].key), opts(method));
          return perm.every((src, j) => close(a.scores[src], b.scores[j]));
        }),
        { seed: SEED, numRuns: 150 },
      );
    });
    it(`${method}: scores unchanged when every amount is multiplied by a positive factor`, () => {
      fc.assert(
        fc.property(rowsArb, fc.double({ min: 0.001, max: 1000, noNaN: true }), (rows, k) => {
          const a = score(rows.map((r) => r.cents / 100), rows.map((r) => r.key), opts(method));
          const b = score(rows.map((r) => (r.cents / 100) * k), rows.map((r) => r.key), opts(method));
          return rows.every((_, i) => close(a.scores[i], b.scores[i]));
        }),
        { seed: SEED, numRuns: 150 },
      );
    });
    it(`${method}: scores unchanged when every amount is shifted by a constant`, () => {
      fc.assert(
        fc.property(rowsArb, fc.integer({ min: -100_000_000, max: 100_000_000 }), (rows, shiftCents) => {
          const a = score(rows.map((r) => r.cents / 100), rows.map((r) => r.key), opts(method));
          const b = score(rows.map((r) => (r.cents + shiftCents) / 100), rows.map((r) => r.key), opts(method));
          // the MAD = 0 fallback magnifies rounding; compare with a tolerance relative to the score
          return rows.every((_, i) => close(a.scores[i], b.scores[i]) || Math.abs(a.scores[i] - b.scores[i]) <= 1e-6 * Math.abs(a.scores[i]) + 1e-4);
        }),
        { seed: SEED, numRuns: 150 },
      );
    });
  }
});

const errorCell = fc.constantFrom('#N/A', '#VALUE!', '#DIV/0!').map((code) => ({ kind: 'error' as const, code }));
const anyCell: fc.Arbitrary<RawCell> = fc.oneof(
  fc.double(), // includes NaN, +-Infinity, +-0, subnormals and +-1.797e308
  fc.double({ noNaN: true, noDefaultInfinity: true }),
  fc.integer({ min: -1e9, max: 1e9 }),
  fc.constantFrom(0, 5e-324, -5e-324, 1.7976931348623157e308, -1.7976931348623157e308, 1e-300, 1e300),
  fc.string(),
  fc.constantFrom('1,234.50', '(120.00)', '120.00-', '£5', 'EUR 7', '  ', '#N/A', 'TRUE', '1e999'),
  fc.boolean(),
  fc.date(),
  fc.constant(null),
  fc.constant(undefined),
  errorCell,
);
const anyKey: fc.Arbitrary<RawCell> = fc.oneof(fc.constantFrom('A', ' A', 'B', '', null, 1, '1'), fc.string({ maxLength: 3 }), fc.date(), errorCell);

describe('no NaN or Infinity reaches GroupStats or a scored row, for ANY input', () => {
  for (const method of METHODS) {
    for (const logScale of [false, true]) {
      it(`${method}${logScale ? ', log scale' : ''}: arbitrary RawCell arrays`, () => {
        fc.assert(
          fc.property(
            fc.array(fc.tuple(anyCell, anyKey), { maxLength: 40 }),
            fc.constantFrom<'pool' | 'skip'>('pool', 'skip'),
            fc.constantFrom<'both' | 'high' | 'low'>('both', 'high', 'low'),
            fc.integer({ min: 1, max: 10 }),
            (rows, smallGroups, direction, minGroupSize) => {
              const col = score(rows.map((r) => r[0]), rows.map((r) => r[1]), opts(method, { logScale, smallGroups, direction, minGroupSize }));
              for (const g of [...col.groups, col.pooled]) {
                for (const [k, v] of Object.entries(g)) {
                  if (typeof v === 'number' && !Number.isFinite(v)) throw new Error(`GroupStats.${k} = ${v}`);
                }
              }
              for (let r = 0; r < rows.length; r++) {
                const scored = col.exclusion[r] === 0 && col.population[r] !== 0;
                if (scored && !Number.isFinite(col.scores[r])) throw new Error(`row ${r} score ${col.scores[r]}`);
                if (!scored && !Number.isNaN(col.scores[r])) throw new Error(`row ${r} unscored but score ${col.scores[r]}`);
                if (!scored && col.flagged[r] !== 0) throw new Error(`row ${r} unscored but flagged`);
              }
              return true;
            },
          ),
          { seed: SEED, numRuns: 300 },
        );
      });
    }
  }
});

describe('classic |z| <= (n - 1)/sqrt(n) (Shiffler 1988)', () => {
  it('holds in every group for random data', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 2, maxLength: 80 }), (xs) => {
        const col = score(xs, xs.map(() => 'G'), opts('classic', { minGroupSize: 2 }));
        const bound = (xs.length - 1) / Math.sqrt(xs.length);
        return Array.from(col.scores).every((z) => Math.abs(z) <= bound * (1 + 1e-9) + 1e-12);
      }),
      { seed: SEED, numRuns: 300 },
    );
  });
});
