import * as ss from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import {
  describeColumn, groupRows, KEY_SEPARATOR, keyPart, MAD_NORMAL_CONSTANT, scoreTable, type ColumnScores, type GroupStats, type MethodId, type RawCell, type ScoreOptions,
} from '../../src/scoring/index.js';
import { expectNear, rng, rStats } from './helpers.js';

// The descriptive statistics of each group and of the whole column (`describeColumn`,
// src/scoring/describe.ts), checked against outside implementations, whatever the method scored.

const DESCRIPTIVE = ['median', 'mad', 'scaledMad', 'meanAbsDev', 'mean', 'sd', 'q1', 'q3'] as const;
const ALL_FIELDS = [
  'key', 'label', 'keyParts', 'rows', 'n', 'excluded', 'medcouple', 'fenceFrom',
  'center', 'scale', 'lower', 'upper', 'flagged', 'fallbacks', 'population', 'maxAttainableZ', 'chanceRate', 'chanceRateAtMost', 'unreachable',
];
const METHODS: MethodId[] = ['robust', 'classic', 'iqr', 'adjusted'];

const score = (amounts: RawCell[], keys: RawCell[], method: MethodId, extra: Partial<ScoreOptions> = {}): ColumnScores =>
  scoreTable(
    { valueColumns: [{ name: 'Amount', cells: amounts }], groupColumns: [{ name: 'Cost centre', cells: keys }] },
    { method, direction: 'both', logScale: false, minGroupSize: 5, smallGroups: 'pool', ...extra },
  ).columns[0];

/** The same statistics from simple-statistics 7.12 (its quantile is type 7, its MAD unscaled). */
function reference(x: number[]): Record<(typeof DESCRIPTIVE)[number], number | null> {
  const med = ss.median(x);
  const rawMad = ss.medianAbsoluteDeviation(x);
  return {
    median: med,
    mad: rawMad,
    scaledMad: MAD_NORMAL_CONSTANT * rawMad,
    meanAbsDev: ss.mean(x.map((v) => Math.abs(v - med))),
    mean: ss.mean(x),
    sd: x.length >= 2 ? ss.sampleStandardDeviation(x) : null,
    q1: ss.quantile(x, 0.25),
    q3: ss.quantile(x, 0.75),
  };
}

describe('describeColumn equals simple-statistics 7.12', () => {
  // Invented claims: 6 cost centres of different sizes (one below the minimum, so pooled), skewed amounts.
  const r = rng(2024);
  const keys: RawCell[] = [];
  const amounts: RawCell[] = [];
  const sizes = [40, 3, 17, 120, 9, 64];
  sizes.forEach((size, c) => {
    for (let i = 0; i < size; i++) {
      keys.push(`CC-${410 + c}`);
      amounts.push(Math.round(Math.exp(4 + c / 3 + r() * 1.5) * 100) / 100);
    }
  });
  for (const method of METHODS) {
    it(`${method}: every descriptive field of every group and of the whole column`, () => {
      const col = score(amounts, keys, method);
      const d = describeColumn(col);
      col.groups.forEach((_g, gi) => {
        const x = amounts.filter((_, i) => keys[i] === `CC-${410 + gi}`) as number[];
        const want = reference(x);
        for (const f of DESCRIPTIVE) {
          const got = d.groups[gi][f];
          const w = want[f];
          if (w === null) expect(got).toBeNull();
          else expectNear(got as number, w, 1e-12);
        }
      });
      const whole = reference(amounts as number[]);
      for (const f of DESCRIPTIVE) expectNear(d.whole[f] as number, whole[f] as number, 1e-12);
    });
  }
  it('describing twice gives the same numbers, and describing changes no score or flag', () => {
    const col = score(amounts, keys, 'classic');
    const scores = Float64Array.from(col.scores);
    const flags = Uint8Array.from(col.flagged);
    const first = describeColumn(col).groups.map((g) => g.median);
    expect(describeColumn(col).groups.map((g) => g.median)).toEqual(first);
    expect(Array.from(col.scores)).toEqual(Array.from(scores));
    expect(Array.from(col.flagged)).toEqual(Array.from(flags));
  });
});

describe('describeColumn against R 4.2 (test/reference/r-stats.json)', () => {
  for (const method of METHODS) {
    it(`${method}: median, MAD, mean, sd, Q1, Q3 and mean abs. deviation of each R set`, () => {
      for (const d of Object.values(rStats())) {
        const g = describeColumn(score(d.x, d.x.map(() => 'CC-410'), method, { minGroupSize: 1 })).groups[0];
        expectNear(g.median!, d.median);
        expectNear(g.scaledMad!, d.mad);
        expectNear(g.mad!, d.mad1);
        expectNear(g.mean!, d.mean, 1e-14);
        expectNear(g.sd!, d.sd, 1e-13);
        expectNear(g.q1!, d.q1);
        expectNear(g.q3!, d.q3);
        expectNear(g.meanAbsDev!, d.meanAbsDevMedian, 1e-13);
      }
    });
  }
  it('log scale: descriptive statistics stay in amounts (R), the centre is on the log scale', () => {
    const d = rStats().lognormal40;
    const col = score(d.x, d.x.map(() => 'A'), 'robust', { logScale: true, minGroupSize: 1 });
    const g = describeColumn(col).groups[0];
    expectNear(g.median!, d.median);
    expectNear(g.mean!, d.mean, 1e-14);
    expectNear(col.groups[0].center!, ss.median(d.x.map(Math.log)), 1e-12); // centre: median of ln amounts (simple-statistics)
  });
});

describe('descriptions after scoring, rows of groups interleaved (simple-statistics 7.12)', () => {
  // Classic accumulates mean and SD per group in row order; robust and IQR select in place in a
  // work buffer; describeColumn reads the column's results afterwards. Invented claims, groups
  // shuffled through the rows, messy cells mixed in.
  const r = rng(77);
  const keys: RawCell[] = [];
  const amounts: RawCell[] = [];
  const second: RawCell[] = [];
  const usable: number[][] = [[], [], [], []];
  const usable2: number[][] = [[], [], [], []];
  for (let i = 0; i < 400; i++) {
    const g = Math.floor(r() * 4);
    keys.push(`CC-${510 + g}`);
    const u = r();
    const x = Math.round(Math.exp(3 + g / 2 + r()) * 100) / 100;
    if (u < 0.04) amounts.push(null);
    else if (u < 0.07) amounts.push({ kind: 'error', code: '#N/A' });
    else if (u < 0.12) {
      amounts.push(x.toLocaleString('en-US', { minimumFractionDigits: 2 })); // text number, e.g. "1,234.50"
      usable[g].push(x);
    } else {
      amounts.push(x);
      usable[g].push(x);
    }
    const x2 = Math.round((50 + 30 * g + 20 * r()) * 100) / 100;
    second.push(x2);
    usable2[g].push(x2);
  }
  const run = (method: MethodId, extra: Partial<ScoreOptions> = {}): readonly ColumnScores[] =>
    scoreTable(
      { valueColumns: [{ name: 'Amount', cells: amounts }, { name: 'Mileage', cells: second }], groupColumns: [{ name: 'Cost centre', cells: keys }] },
      { method, direction: 'both', logScale: false, minGroupSize: 5, smallGroups: 'pool', ...extra },
    ).columns;
  const checkAll = (col: ColumnScores, sets: number[][]): void => {
    const d = describeColumn(col);
    col.groups.forEach((g, gi) => {
      const x = sets[Number(g.key.slice(3)) - 510];
      expect(g.n).toBe(x.length);
      expect(d.groups[gi].n).toBe(x.length);
      const want = reference(x);
      for (const f of DESCRIPTIVE) expectNear(d.groups[gi][f] as number, want[f] as number, 1e-12);
    });
    const whole = reference(sets.flat());
    for (const f of DESCRIPTIVE) expectNear(d.whole[f] as number, whole[f] as number, 1e-12);
  };
  for (const method of METHODS) {
    it(`${method}: scores first, then every descriptive statistic of both columns equals simple-statistics`, () => {
      const [col, col2] = run(method);
      // Read what scoring produced first (scores, centres), as a host does.
      let touched = 0;
      for (let i = 0; i < col.scores.length; i++) touched += Number.isNaN(col.scores[i]) ? 0 : 1;
      expect(touched).toBe(col.scoredRows);
      for (const g of col.groups) expect(g.center).not.toBeNull();
      checkAll(col, usable);
      checkAll(col2, usable2);
    });
  }
  it('classic: centre and scale (accumulated in row order) equal simple-statistics mean and SD', () => {
    const [col] = run('classic');
    col.groups.forEach((g) => {
      const x = usable[Number(g.key.slice(3)) - 510];
      expectNear(g.center!, ss.mean(x), 1e-13);
      expectNear(g.scale!, ss.sampleStandardDeviation(x), 1e-12);
    });
  });
  it('classic on log scale: centre and scale are mean and SD of ln amounts, descriptions in amounts', () => {
    const [col] = run('classic', { logScale: true });
    const d = describeColumn(col);
    col.groups.forEach((g, gi) => {
      const x = usable[Number(g.key.slice(3)) - 510];
      const lx = x.map(Math.log);
      expectNear(g.center!, ss.mean(lx), 1e-12);
      expectNear(g.scale!, ss.sampleStandardDeviation(lx), 1e-12);
      expectNear(d.groups[gi].median!, ss.median(x), 1e-12);
      expectNear(d.groups[gi].q3!, ss.quantile(x, 0.75), 1e-12);
    });
  });
  it('classic, extreme magnitudes (|x| ~ 1e300): mean and SD exact to rounding (simple-statistics on x / 2^996, scaled back)', () => {
    const base = [1.5, 2.25, 3, 1.75, 2.5, 4, 1.25, 2];
    const unit = 2 ** 996;
    const x = base.map((v) => v * unit);
    const ks = x.map((_, i) => (i % 2 === 0 ? 'A' : 'B'));
    const c = scoreTable(
      { valueColumns: [{ name: 'Amount', cells: [...x, ...x] }], groupColumns: [{ name: 'Cost centre', cells: [...ks, ...ks] }] },
      { method: 'classic', direction: 'both', logScale: false, minGroupSize: 2, smallGroups: 'pool' },
    ).columns[0];
    for (const [gi, parity] of [[0, 0], [1, 1]] as const) {
      const b = [...base, ...base].filter((_, i) => i % 2 === parity);
      expectNear(c.groups[gi].center!, ss.mean(b) * unit, 1e-13);
      expectNear(c.groups[gi].scale!, ss.sampleStandardDeviation(b) * unit, 1e-12);
      expectNear(describeColumn(c).groups[gi].median!, ss.median(b) * unit, 1e-13);
    }
  });
});

describe('GroupStats and descriptions are plain data', () => {
  const col = score([100, 102, 98, 101, 99, 103, 97, 100, 5000, 40, 41], ['A', 'A', 'A', 'A', 'A', 'A', 'A', 'A', 'A', 'B', 'B'], 'robust');
  const check = (g: GroupStats): void => {
    const json = JSON.parse(JSON.stringify(g)) as Record<string, unknown>;
    expect(Object.keys(json)).toEqual(ALL_FIELDS); // declaration order, every field
    for (const f of Object.keys(g)) expect(typeof Object.getOwnPropertyDescriptor(g, f)?.get).toBe('undefined');
  };
  it('JSON.stringify and Object.keys see every field of a group, and no field is computed on read', () => {
    check(col.groups[0]);
    check(col.groups[1]); // n = 2 < minimum: pooled
  });
  it('the whole column (`pooled`) too, and `pooled` itself is an own enumerable field of ColumnScores', () => {
    check(col.pooled);
    expect(Object.keys(col)).toContain('pooled');
    expect((JSON.parse(JSON.stringify({ pooled: col.pooled })) as { pooled: { n: number } }).pooled.n).toBe(11);
    expect(col.pooled).toBe(col.pooled); // built once, then cached
  });
  it("a small group's pooled rows are scored against the whole column's median and scaled MAD", () => {
    // R: median(c(100,102,98,101,99,103,97,100,5000,40,41)) = 100; mad(...) = 2.9652 (1.4826 x 2)
    const whole = describeColumn(col).whole;
    expect(whole.median).toBe(100);
    expectNear(whole.scaledMad!, 2.9652, 1e-12);
    expect(col.pooled.center).toBe(100);
    expectNear(col.pooled.scale!, 2.9652, 1e-12);
    expectNear(col.scores[9], (40 - 100) / 2.9652, 1e-12);
  });
  it('empty and one-value groups give null, not NaN', () => {
    const c = describeColumn(score(['x', 5], ['E', 'S'], 'classic', { minGroupSize: 1 }));
    for (const f of DESCRIPTIVE) expect(c.groups[0][f]).toBeNull();
    expect(c.groups[0].medcouple).toBeNull();
    expect(c.groups[1].sd).toBeNull();
    expect(c.groups[1].median).toBe(5);
  });
});

describe('grouping fast paths give the same groups as joining key texts (reference written here, row by row)', () => {
  const naive = (cols: RawCell[][], rows: number): { groupOf: number[]; keys: string[] } => {
    const byKey = new Map<string, number>();
    const keys: string[] = [];
    const groupOf: number[] = [];
    for (let r = 0; r < rows; r++) {
      const key = cols.map((c) => keyPart(c[r])).join(KEY_SEPARATOR);
      let g = byKey.get(key);
      if (g === undefined) {
        g = keys.length;
        keys.push(key);
        byKey.set(key, g);
      }
      groupOf.push(g);
    }
    return { groupOf, keys };
  };
  const r = rng(99);
  const cell = (i: number): RawCell => {
    const u = r();
    if (u < 0.05) return null;
    if (u < 0.1) return ` K${i} `; // padded text: same group as "K<i>"
    if (u < 0.2) return i; // a number: same group as the text "<i>"
    if (u < 0.25) return String(i);
    return `K${i}`;
  };
  for (const [label, columns, distinct, rows] of [
    ['one key column, shuffled', 1, 50, 3000],
    ['one key column, sorted runs', 1, 20, 3000],
    ['two key columns (direct table)', 2, 30, 3000],
    ['two key columns with many values (Map of pair codes)', 2, 400, 1000],
    ['three key columns', 3, 12, 3000],
  ] as const) {
    it(label, () => {
      const cols: RawCell[][] = Array.from({ length: columns }, () => []);
      for (let i = 0; i < rows; i++) {
        for (let c = 0; c < columns; c++) {
          const v = label.includes('sorted') ? Math.floor((i * distinct) / rows) : Math.floor(r() * distinct);
          cols[c].push(cell(v));
        }
      }
      const got = groupRows(cols.map((cells) => ({ cells })), rows);
      const want = naive(cols, rows);
      expect(Array.from(got.groupOf)).toEqual(want.groupOf);
      expect(got.keys).toEqual(want.keys);
      want.keys.forEach((_, g) => expect(got.start[g + 1] - got.start[g]).toBe(want.groupOf.filter((x) => x === g).length));
    });
  }
});
