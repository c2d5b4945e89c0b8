/**
 * "I can review N claims" (issue 9 item 8): the cutoff flags at most N distinct rows across every
 * value column, as close to N as ties allow, says so when ties stop it short, and is the engine's
 * exact number. Each count below is taken from the engine's own flags when scored at the cutoff
 * given (scoreTable's flag rule, independent of budget.ts), counted here row by row.
 */
import { describe, expect, it } from 'vitest';
import { cutoffForBudget, scoreTable, type MethodId, type RawCell, type ScoreResult } from '../../src/scoring/index.js';
import { cutoffForReviewBudget, describeBudget } from '../../src/pipeline/budget.js';
import { runPipeline } from '../../src/pipeline/run.js';
import { mulberry32 } from '../../src/demo/random.js';

/** Invented claims: 1,200 rows in 12 cost centres, a lognormal amount and an independent lognormal mileage. */
function claims(seed = 99): { cc: string[]; amount: number[]; mileage: number[] } {
  const rnd = mulberry32(seed);
  const normal = (): number => Math.sqrt(-2 * Math.log(1 - rnd())) * Math.cos(2 * Math.PI * rnd());
  const out = { cc: [] as string[], amount: [] as number[], mileage: [] as number[] };
  for (let i = 0; i < 1200; i++) {
    out.cc.push(`CC-${String(300 + (i % 12))}`);
    out.amount.push(Math.round(Math.exp(4 + 0.6 * normal()) * 100) / 100);
    out.mileage.push(Math.round(Math.exp(3 + 0.5 * normal()) * 10) / 10);
  }
  return out;
}

const data = claims();

function score(cutoff: number | undefined, method: MethodId = 'robust', columns: 1 | 2 = 2): ScoreResult {
  const valueColumns = [{ name: 'Amount', cells: data.amount as RawCell[] }, { name: 'Mileage', cells: data.mileage as RawCell[] }].slice(0, columns);
  return scoreTable(
    { valueColumns, groupColumns: [{ name: 'Cost centre', cells: data.cc }] },
    { method, direction: 'both', logScale: false, minGroupSize: 8, smallGroups: 'pool', ...(cutoff !== undefined ? { cutoff } : {}) },
  );
}

/** Rows flagged in at least one value column (counted here). */
function rowsFlagged(res: ScoreResult): number {
  let n = 0;
  for (let r = 0; r < res.rowCount; r++) if (res.columns.some((c) => c.flagged[r] === 1)) n++;
  return n;
}

describe('review budget across value columns', () => {
  for (const method of ['robust', 'skew', 'classic', 'iqr'] as const) {
    it(`${method}: two value columns, N = 100 flags at most 100 distinct rows, and exactly 100 without ties`, () => {
      const answer = cutoffForReviewBudget(score(undefined, method), 100);
      expect(answer.kind).toBe('cutoff');
      if (answer.kind !== 'cutoff') return;
      const flagged = rowsFlagged(score(answer.cutoff, method));
      expect(flagged).toBe(answer.flagged);
      expect(flagged).toBeLessThanOrEqual(100);
      if (answer.tied === 0) expect(flagged).toBe(100);
    });
  }
  it('the old rule (first value column only) goes over the budget with two columns: the issue\'s 116 for 100', () => {
    const first = score(undefined).columns[0];
    const old = cutoffForBudget(first, 100);
    const over = rowsFlagged(score(old));
    if (process.env.TAILMARK_PRINT_FIGURES) console.log(`first column only: ${over} rows flagged for a budget of 100`);
    expect(over).toBeGreaterThan(100);
    const answer = cutoffForReviewBudget(score(undefined), 100);
    expect(answer.kind === 'cutoff' && rowsFlagged(score(answer.cutoff)) <= 100).toBe(true);
  });
  it('ties: claims tied at the cutoff stop it short, and the answer says so', () => {
    // 40 ordinary claims around 100 and 12 per-diem claims of exactly 480 (a fixed allowance).
    const x = [...Array.from({ length: 40 }, (_, i) => 90 + (i % 20)), ...new Array<number>(12).fill(480), 900, 1200];
    const res = scoreTable(
      { valueColumns: [{ name: 'Amount', cells: x }], groupColumns: [] },
      { method: 'robust', direction: 'high', logScale: false, minGroupSize: 8, smallGroups: 'pool' },
    );
    const answer = cutoffForReviewBudget(res, 5);
    expect(answer.kind).toBe('cutoff');
    if (answer.kind !== 'cutoff') return;
    expect(answer.flagged).toBe(2); // 900 and 1200; the 12 tied claims of 480 cannot be split
    expect(answer.tied).toBe(12);
    const at = scoreTable(
      { valueColumns: [{ name: 'Amount', cells: x }], groupColumns: [] },
      { method: 'robust', direction: 'high', logScale: false, minGroupSize: 8, smallGroups: 'pool', cutoff: answer.cutoff },
    );
    expect(rowsFlagged(at)).toBe(2);
    expect(describeBudget(answer)).toContain('3 short of the budget: the next 12 claims are tied at exactly the cutoff');
  });
  it('rounding: the exact cutoff keeps the whole budget where a cutoff rounded up to 2 decimals would lose claims', () => {
    let lost = 0;
    for (let n = 20; n <= 200; n += 20) {
      const answer = cutoffForReviewBudget(score(undefined), n);
      if (answer.kind !== 'cutoff') continue;
      expect(rowsFlagged(score(answer.cutoff))).toBe(answer.flagged);
      const rounded = Math.ceil(answer.cutoff * 100) / 100; // what the pane's display used to run with
      lost = Math.max(lost, answer.flagged - rowsFlagged(score(rounded)));
    }
    if (process.env.TAILMARK_PRINT_FIGURES) console.log(`rounded up to 2 decimals: up to ${lost} claims of the budget lost`);
    expect(lost).toBeGreaterThan(0); // rounding did lose claims on this data; the exact cutoff does not
  });
  it('runPipeline with a review budget runs at that cutoff and the notes say what it did', () => {
    const run = runPipeline(
      {
        source: 'budget test', sheetName: 'Claims', headers: ['Cost centre', 'Amount', 'Mileage'],
        columns: [data.cc, data.amount, data.mileage], rowCount: data.amount.length, headerRow: 1, firstColumn: 0,
      },
      { valueColumns: ['Amount', 'Mileage'], groupColumns: ['Cost centre'], method: 'robust' },
      { when: new Date(Date.UTC(2026, 11, 2)), reviewBudget: 100 },
    );
    expect(run.budget?.kind).toBe('cutoff');
    expect(rowsFlagged(run.result)).toBeLessThanOrEqual(100);
    if (run.budget?.kind === 'cutoff') expect(run.result.options.cutoff).toBe(run.budget.cutoff);
    const line = run.plan.notes.sections.flatMap((s) => s.rows).find((row) => row[0] === 'Review budget');
    expect(String(line?.[1])).toMatch(/^Review budget 100: cutoff [\d.]+ \(exactly [\d.]+\) flags \d+ claims/);
  });
});
