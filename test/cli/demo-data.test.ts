import { describe, expect, it } from 'vitest';
import * as ss from 'simple-statistics';
import { demoClaims, DEMO_GROUPS, DEMO_HEADERS, DEMO_MIN_ROWS, formatThousands } from '../../src/demo/claims.js';
import type { RawCell } from '../../src/scoring/types.js';
import { keyPart } from '../../src/scoring/groups.js';

const H = (name: (typeof DEMO_HEADERS)[number]) => DEMO_HEADERS.indexOf(name);

function amountsOf(rows: RawCell[][], group: { costCentre: string; category: string }): RawCell[] {
  return rows.filter((r) => r[H('Cost centre')] === group.costCentre && r[H('Category')] === group.category).map((r) => r[H('Amount')]);
}

describe('demoClaims (invented scenario)', () => {
  const t = demoClaims();

  it('is deterministic for a seed and differs across seeds', () => {
    expect(demoClaims()).toEqual(t);
    expect(demoClaims({ seed: 7 })).not.toEqual(t);
  });

  it('has the documented columns and 600 rows by default; honours rows', () => {
    expect(t.headers).toEqual(['Claim ID', 'Employee', 'Cost centre', 'Category', 'Claim date', 'Amount', 'Notes']);
    expect(t.rows).toHaveLength(600);
    expect(demoClaims({ rows: 1000 }).rows).toHaveLength(1000);
    expect(() => demoClaims({ rows: DEMO_MIN_ROWS - 1 })).toThrow(RangeError);
    const ids = new Set(t.rows.map((r) => r[0]));
    expect(ids.size).toBe(600);
    expect(t.rows.every((r) => r[H('Claim date')] instanceof Date)).toBe(true);
  });

  it('contains the messy cells real sheets have', () => {
    const amounts = t.rows.map((r) => r[H('Amount')]);
    expect(amounts).toContain('1,234.50');
    expect(amounts.filter((a) => typeof a === 'string' && /^\(\d[\d,]*\.\d\d\)$/.test(a)).length).toBeGreaterThanOrEqual(3);
    expect(amounts).toContain('(120.00)');
    expect(amounts.filter((a) => a === null).length).toBeGreaterThanOrEqual(2);
    expect(amounts).toContainEqual({ kind: 'error', code: '#N/A' });
    expect(amounts).toContainEqual({ kind: 'error', code: '#VALUE!' });
    expect(amounts).toContain('see receipt');
    const notes = t.rows.map((r) => r[H('Notes')]);
    expect(notes.some((n) => typeof n === 'string' && n.startsWith('='))).toBe(true);
    expect(notes.some((n) => typeof n === 'string' && n.startsWith('+'))).toBe(true);
  });

  it('has several cost centres x categories', () => {
    const pairs = new Set(t.rows.map((r) => `${keyPart(r[H('Cost centre')])}|${keyPart(r[H('Category')])}`));
    expect(new Set(t.rows.map((r) => r[H('Cost centre')])).size).toBeGreaterThanOrEqual(4);
    expect(pairs.size).toBeGreaterThanOrEqual(20);
  });

  it('has a group of exactly three claims', () => {
    expect(amountsOf(t.rows, DEMO_GROUPS.trio)).toHaveLength(3);
  });

  it('has an allowance group whose MAD is 0 but which is not constant (simple-statistics MAD)', () => {
    const xs = amountsOf(t.rows, DEMO_GROUPS.allowance) as number[];
    expect(xs.every((x) => typeof x === 'number')).toBe(true);
    expect(ss.medianAbsoluteDeviation(xs)).toBe(0);
    expect(new Set(xs).size).toBeGreaterThan(1);
  });

  it('has a masking group: classic z stays below 3, robust z is far above 3.5 (simple-statistics)', () => {
    const xs = amountsOf(t.rows, DEMO_GROUPS.masking) as number[];
    const m = ss.mean(xs);
    const sd = ss.sampleStandardDeviation(xs);
    const med = ss.median(xs);
    const mad = ss.medianAbsoluteDeviation(xs) * 1.4826;
    const big = [...xs].sort((a, b) => b - a).slice(0, 3);
    for (const x of big) {
      expect((x - m) / sd).toBeLessThan(3);
      expect((x - med) / mad).toBeGreaterThan(3.5);
    }
  });

  it('formats thousands independently of the machine locale', () => {
    expect(formatThousands(1234.5)).toBe('1,234.50');
    expect(formatThousands(1234567)).toBe('1,234,567.00');
    expect(formatThousands(12)).toBe('12.00');
  });
});
