/** Review marks across runs (src/report/marks.ts); expected values are the test's own bookkeeping. */
import { describe, expect, it } from 'vitest';
import { GONE_TITLE, MARKS_TITLE, mergeMarks, priorMarksOf, readMarkRecords, statusLabel, type Plan } from '../../src/report/index.js';

function planOf(rows: number, flagged: readonly number[]): Plan {
  const status = Array.from({ length: rows }, (_, r) => (flagged.includes(r) ? statusLabel('open') : null));
  return {
    columns: [
      { header: 'S', kind: 'status', valueColumn: null, values: status },
      { header: 'N', kind: 'note', valueColumn: null, values: Array<null>(rows).fill(null) },
    ],
    notes: { name: 'n', sections: [{ title: 'Caution', rows: [['c']] }] },
  } as unknown as Plan;
}

describe('mergeMarks', () => {
  const cleared = statusLabel('cleared');
  const asked = statusLabel('asked');

  it('keeps each row\'s own mark and lists them; our default "open" is not a mark', () => {
    const prior = priorMarksOf(['Id', 'Tailmark status', 'Tailmark note'], [['a', 'b', 'c'], [cleared, statusLabel('open'), ''], ['', '', 'why?']], 3);
    expect(prior).not.toBeNull();
    const out = mergeMarks(planOf(3, [1]), prior, ['a', 'b', 'c'], []);
    expect(out.kept).toBe(2);
    expect(out.plan.columns[0].values).toEqual([cleared, statusLabel('open'), null]);
    expect(out.plan.columns[1].values).toEqual([null, null, 'why?']);
    const marks = out.plan.notes.sections.find((s) => s.title === MARKS_TITLE)!;
    expect(marks.rows).toEqual([['Claim', 'Status', 'Note'], ['a', cleared, ''], ['c', '', 'why?']]);
    expect(out.plan.notes.sections.at(-1)!.title).toBe('Caution');
  });

  it('without our columns in the data, marks come back by claim ID from the previous list; gone claims are reported', () => {
    const grid = [['Tailmark notes · workbook format 1'], [MARKS_TITLE], ['Claim', 'Status', 'Note'], ['b', asked, 'mail 3 May'], ['z', cleared, ''], [''], ['Next']];
    const previous = readMarkRecords(grid);
    expect(previous).toEqual([{ claim: 'b', status: asked, note: 'mail 3 May' }, { claim: 'z', status: cleared, note: '' }]);
    // The fresh export has the claims in another order.
    const out = mergeMarks(planOf(3, []), null, ['c', 'b', 'a'], previous);
    expect(out.restored).toBe(1);
    expect(out.plan.columns[0].values).toEqual([null, asked, null]);
    expect(out.plan.columns[1].values).toEqual([null, 'mail 3 May', null]);
    expect(out.gone).toEqual([{ claim: 'z', status: cleared, note: '' }]);
    expect(out.plan.notes.sections.find((s) => s.title === GONE_TITLE)!.rows).toEqual([['Claim', 'Status', 'Note'], ['z', cleared, '']]);
  });
});
