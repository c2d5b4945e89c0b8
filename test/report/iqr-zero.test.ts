/**
 * Issue 7 and issue 9 (item 5): the IQR = 0 fallback is described once (notes, row explanation,
 * bounds agree), and it no longer borrows the whole column's IQR: a group whose middle half is one
 * amount is measured in the ignore-within amount, or not scored without one.
 *
 * Expected bounds are computed here from the definition: type-7 quartiles (Hyndman & Fan 1996,
 * what QUARTILE.INC computes), fences Q1 - 1.5 x floor and Q3 + 1.5 x floor (Tukey 1977 with the
 * project's documented IQR = 0 choice, src/scoring/methods/iqr.ts).
 */
import { describe, expect, it } from 'vitest';
import { runPipeline } from '../../src/pipeline/index.js';
import { explainRow } from '../../src/scoring/index.js';

/** Type-7 quantile, written independently of src/scoring. */
function q7(values: readonly number[], p: number): number {
  const x = [...values].sort((a, b) => a - b);
  const h = (x.length - 1) * p;
  const lo = Math.floor(h);
  return x[lo] + (h - lo) * ((x[Math.min(lo + 1, x.length - 1)] ?? x[lo]) - x[lo]);
}

const a = [5, 5, 5, 5, 5, 5, 5, 5, 5, 50];
const b = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];

function run(groups: readonly (readonly number[])[], ignoreWithin: number) {
  const labels = ['A', 'B', 'C'];
  const table = {
    source: 'test',
    sheetName: 'S',
    headers: ['Team', 'Amount'],
    columns: [groups.flatMap((g, i) => g.map(() => labels[i])), groups.flat()],
    rowCount: groups.flat().length,
    headerRow: 1,
    firstColumn: 0,
  };
  return runPipeline(table, { valueColumns: ['Amount'], groupColumns: ['Team'], method: 'iqr', minGroupSize: 5, ignoreWithin }, { when: new Date(0) });
}

describe('IQR = 0 fallback: the group\'s own quartiles, the ignore-within amount as the unit', () => {
  const withFloor = run([a, b], 1);
  const groupTable = withFloor.plan.notes.sections.find((s) => s.title === 'Groups: Amount')!.rows;
  const header = groupTable[0];
  const rowA = groupTable.find((r) => r[0] === 'A')!;
  const cell = (name: string) => rowA[header.indexOf(name)];

  it('the bounds are the group quartiles -/+ 1.5 x the ignore-within amount, and the far claim is flagged', () => {
    expect(q7(a, 0.75) - q7(a, 0.25)).toBe(0);
    expect(cell('Lower bound')).toBe(q7(a, 0.25) - 1.5 * 1);
    expect(cell('Upper bound')).toBe(q7(a, 0.75) + 1.5 * 1);
    expect(withFloor.result.columns[0].flagged[9]).toBe(1);
  });

  it('the notes and the row explanation say the same about it, and what the bounds say', () => {
    const notesWords = String(cell('Fallbacks'));
    expect(notesWords).toMatch(/ignore-within amount/);
    expect(notesWords).not.toMatch(/whole column/);
    const reason = explainRow(withFloor.result, withFloor.result.columns[0], 9);
    expect(reason).toContain(notesWords);
    expect(String(withFloor.plan.columns.find((c) => c.kind === 'reason')!.values[9])).toMatch(/IQRs above upper fence/);
  });

  it('the fences do not move when unrelated groups are added or removed (nothing borrowed)', () => {
    const alone = run([a], 1).result.columns[0].groups[0];
    const crowd = run([a, b, b.map((v) => v * 1000)], 1).result.columns[0].groups.find((g) => g.label === 'A')!;
    expect([crowd.lower, crowd.upper]).toEqual([alone.lower, alone.upper]);
  });

  it('without an ignore-within amount the group is not scored, and says so', () => {
    const none = run([a, b], 0);
    const g = none.result.columns[0].groups.find((x) => x.label === 'A')!;
    expect(g.fallbacks).toEqual(['iqr-zero', 'no-spread']);
    expect(none.result.columns[0].flagged[9]).toBe(0);
    expect(explainRow(none.result, none.result.columns[0], 9)).toMatch(/no ignore-within amount is set/);
  });
});
