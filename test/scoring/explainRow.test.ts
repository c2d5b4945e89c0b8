import { describe, expect, it } from 'vitest';
import { explainRow, explainRowShort, formatCutoff, formatNumber, formatScore, scoreTable, type RawCell, type ScoreOptions } from '../../src/scoring/index.js';

// Invented claims: cost centre / category groups.
const cc: RawCell[] = [];
const cat: RawCell[] = [];
const amt: RawCell[] = [];
const add = (c: string, k: string, a: RawCell): void => { cc.push(c); cat.push(k); amt.push(a); };
[200, 210, 190, 205, 215, 195, 220, 185, 212, 208, 1840].forEach((a) => add('CC-410', 'Travel', a));
[30, 30, 30, 30, 30, 30, 30, 30, 31, 45].forEach((a) => add('CC-520', 'Meals', a));
[12, 14, 'n/a'].forEach((a) => add('CC-777', 'Books', a));
const input = { valueColumns: [{ name: 'Amount', cells: amt }], groupColumns: [{ name: 'Cost centre', cells: cc }, { name: 'Category', cells: cat }] };
const opts = (o: Partial<ScoreOptions> = {}): ScoreOptions => ({ method: 'robust', direction: 'both', logScale: false, minGroupSize: 8, smallGroups: 'pool', ...o });

describe('formatNumber / formatScore / formatCutoff', () => {
  it('thousands separators, fixed decimals, minus sign, n/a', () => {
    expect(formatNumber(1840)).toBe('1,840.00');
    expect(formatNumber(-1234567.891, 1)).toBe('-1,234,567.9');
    expect(formatNumber(0.004)).toBe('0.00');
    expect(formatNumber(-0.004)).toBe('0.00');
    expect(formatNumber(999.995)).toBe('1,000.00');
    expect(formatNumber(NaN)).toBe('n/a');
    expect(formatScore(6.24)).toBe('6.2');
    expect(formatScore(0.456)).toBe('0.46');
    expect(formatCutoff(3.5)).toBe('3.5');
    expect(formatCutoff(3)).toBe('3');
    expect(formatCutoff(100)).toBe('100');
  });
});

describe('explainRow', () => {
  const res = scoreTable(input, opts());
  const col = res.columns[0];
  it('flagged row: value, score, side, group label, centre, scale, n, cutoff, direction', () => {
    const g = col.groups[0];
    const text = explainRow(res, col, 10);
    expect(text).toBe(
      `Amount 1,840.00 is ${formatScore(col.scores[10])} robust z above the median of its group "CC-410 / Travel" ` +
      `(median ${formatNumber(g.center!)}, scaled MAD ${formatNumber(g.scale!)}, n = 11); cutoff 3.5, both directions. Flagged.`,
    );
  });
  it('mentions the MAD = 0 fallback', () => {
    const text = explainRow(res, col, 20);
    expect(text).toMatch(/^Amount 45\.00 is [\d.,]+ robust z above the median of its group "CC-520 \/ Meals"/);
    expect(text).toContain('1.2533');
    expect(text).toContain('MAD = 0');
  });
  it('pooled row: compared with the whole column because the group had n < min', () => {
    const text = explainRow(res, col, 21);
    expect(text).toContain('the whole column "Amount"');
    expect(text).toContain('its group "CC-777 / Books" has n = 2 < 8');
  });
  it('excluded row: says why', () => {
    expect(explainRow(res, col, 23)).toBe('Amount not scored: text that is not a number (group "CC-777 / Books").');
  });
  it('skipped row: left unscored', () => {
    const r2 = scoreTable(input, opts({ smallGroups: 'skip' }));
    expect(explainRow(r2, r2.columns[0], 21)).toBe('Amount 12.00 was left unscored: its group "CC-777 / Books" has n = 2 usable values, fewer than the minimum 8.');
  });
  it('classic, IQR and a row inside the bounds', () => {
    const c = scoreTable(input, opts({ method: 'classic', direction: 'high' }));
    expect(explainRow(c, c.columns[0], 0)).toMatch(/classic z below the mean of its group "CC-410 \/ Travel" \(mean [\d,.]+, SD [\d,.]+, n = 11\); cutoff 3, high side only\. Not flagged\./);
    const q = scoreTable(input, opts({ method: 'iqr' }));
    expect(explainRow(q, q.columns[0], 10)).toMatch(/IQRs above the upper fence of its group "CC-410 \/ Travel" \(Q1 [\d,.]+, Q3 [\d,.]+, IQR [\d,.]+, fences [\d,.]+ to [\d,.]+, n = 11\); k = 1\.5, both directions\. Flagged\./);
    expect(explainRow(q, q.columns[0], 1)).toContain('lies between the fences');
  });
  it('log scale: says so, gives the centre back in amounts and the scale in ln units', () => {
    const l = scoreTable(input, opts({ logScale: true }));
    const text = explainRow(l, l.columns[0], 10);
    expect(text).toMatch(/^Amount 1,840\.00 is [\d.]+ robust z \(log scale\) above the median of its group "CC-410 \/ Travel" \(median [\d,.]+ \(ln [\d.]+\), scaled MAD [\d.]+ in ln units, n = 11\)/);
  });
  it('a row outside the table gets a message, not an exception', () => {
    expect(explainRow(res, col, 999)).toContain('outside the table');
  });
});

describe('explainRowShort', () => {
  it('says the score, side and centre in a few words, the same figures as the full sentence', () => {
    const r = scoreTable(input, opts({ cutoff: 3.5 }));
    const col = r.columns[0];
    const big = amt.indexOf(1840);
    const z = col.scores[big];
    // The figures come from the full sentence, so the two can never disagree.
    const median = /median ([\d,]+\.\d+)/.exec(explainRow(r, col, big))![1];
    expect(explainRowShort(r, col, big)).toBe(`${formatScore(z)} robust z above median ${median}`);
    expect(explainRowShort(r, col, amt.indexOf('n/a'))).toMatch(/^not scored: /);
    for (let i = 0; i < amt.length; i++) expect(explainRowShort(r, col, i).length, `row ${i}`).toBeLessThanOrEqual(60);
    const classic = scoreTable(input, opts({ method: 'classic', cutoff: 2 }));
    expect(explainRowShort(classic, classic.columns[0], big)).toMatch(/^[\d.]+ z above mean [\d,.]+$/);
    const iqr = scoreTable(input, opts({ method: 'iqr', cutoff: 1.5 }));
    expect(explainRowShort(iqr, iqr.columns[0], big)).toMatch(/^[\d.]+ IQRs above upper fence [\d,.]+$/);
  });
});
