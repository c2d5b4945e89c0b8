/**
 * Issue 7: the IQR = 0 fallback was described three ways (notes: "fences sit at Q1 and Q3"; row
 * explanation: the column's IQR is the unit; bounds: computed with the column's IQR). Now one
 * description, and the bounds printed beside it match it.
 *
 * Expected bounds are computed here from the definition: type-7 quartiles (Hyndman & Fan 1996,
 * what QUARTILE.INC computes), fences Q1 - 1.5 x IQR_column and Q3 + 1.5 x IQR_column (Tukey 1977
 * with the project's documented IQR = 0 choice, src/scoring/methods/iqr.ts).
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

describe('IQR = 0 fallback: one description for notes, bounds and row explanation', () => {
  const a = [5, 5, 5, 5, 5, 5, 5, 5, 5, 50];
  const b = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];
  const table = {
    source: 'test',
    sheetName: 'S',
    headers: ['Team', 'Amount'],
    columns: [[...a.map(() => 'A'), ...b.map(() => 'B')], [...a, ...b]],
    rowCount: 20,
    headerRow: 1,
    firstColumn: 0,
  };
  const run = runPipeline(table, { valueColumns: ['Amount'], groupColumns: ['Team'], method: 'iqr', minGroupSize: 5 }, { when: new Date(0) });
  const colIqr = q7([...a, ...b], 0.75) - q7([...a, ...b], 0.25);
  const groupTable = run.plan.notes.sections.find((s) => s.title === 'Groups: Amount')!.rows;
  const header = groupTable[0];
  const rowA = groupTable.find((r) => r[0] === 'A')!;
  const cell = (name: string) => rowA[header.indexOf(name)];

  it('the bounds are the group quartiles -/+ 1.5 x the column IQR', () => {
    expect(q7(a, 0.75) - q7(a, 0.25)).toBe(0);
    expect(cell('Lower bound')).toBeCloseTo(5 - 1.5 * colIqr, 2);
    expect(cell('Upper bound')).toBeCloseTo(5 + 1.5 * colIqr, 2);
  });

  it('the notes and the row explanation say the same about it, and what the bounds say', () => {
    const notesWords = String(cell('Fallbacks'));
    expect(notesWords).toMatch(/whole column's IQR/);
    expect(notesWords).not.toMatch(/fences sit at Q1 and Q3/);
    // The row's full explanation (the pane shows it; the cell holds the short form of explainRowShort).
    const reason = explainRow(run.result, run.result.columns[0], 9);
    expect(reason).toContain(notesWords);
    expect(String(run.plan.columns.find((c) => c.kind === 'reason')!.values[9])).toMatch(/IQRs above upper fence/);
  });
});
