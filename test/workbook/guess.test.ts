import { describe, expect, it } from 'vitest';
import { guessColumn } from '../../src/workbook/guess.js';
import type { RawCell } from '../../src/scoring/types.js';

// Issue 8 item 3, rules of thumb (common practice, no source): amounts are money-like numbers, peer
// groups are repeated short labels. Invented sample columns, 40 rows each.
const n = 40;
const col = (f: (i: number) => RawCell): RawCell[] => Array.from({ length: n }, (_, i) => f(i));
const guess = (header: string, cells: RawCell[]) => guessColumn(0, header, cells).guess;

describe('guessColumn', () => {
  it('money-like numbers are amounts, in either decimal style', () => {
    expect(guess('Amount', col((i) => 40 + ((i * 37) % 90) + 0.25))).toBe('amount');
    expect(guess('Betrag', col((i) => `${40 + ((i * 37) % 90)},50`))).toBe('amount');
    expect(guess('Spent', col((i) => `€${(12.5 + i).toFixed(2)}`))).toBe('amount');
  });
  it('reference codes are never amounts (they are ids or keys)', () => {
    expect(guess('Claim', col((i) => `CLM-${String(i + 1).padStart(4, '0')}`))).toBe('id');
    expect(guess('Cost centre', col((i) => `KST-${10 + (i % 4) * 10}`))).toBe('key');
  });
  it('sequential whole numbers are ids, years and repeated whole-number codes are not amounts', () => {
    expect(guess('Line', col((i) => 1001 + i))).toBe('id');
    expect(guess('Year', col((i) => 2020 + (i % 5)))).toBe('key');
    expect(guess('Centre', col((i) => 4100 + (i % 4) * 100))).toBe('key');
  });
  it('dates written as text are dates; free-text notes are not peer groups', () => {
    expect(guess('Claim date', col((i) => `2025-01-${String(1 + (i % 28)).padStart(2, '0')}`))).toBe('date');
    const notes = col((i) => (i % 2 ? 'Taxi from the airport to the client office after the late flight was delayed' : 'Dinner with the visiting project team after the quarterly planning workshop'));
    expect(guess('Notes', notes)).toBe('text');
    expect(guess('Category', col((i) => ['Travel', 'Meals', 'Lodging'][i % 3]))).toBe('key');
  });
});
