import { describe, expect, it } from 'vitest';
import { scoreTable } from '../../src/scoring/index.js';
import type { RawCell, ScoreOptions, SourceTable } from '../../src/scoring/types.js';
import {
  buildPlan,
  CAUTION,
  HIGHLIGHT_RULES,
  isTailmarkFormula,
  NOTES_SHEET_NAME,
  PALETTE,
  REVIEW_STATUSES,
  ruleFormula,
} from '../../src/report/index.js';
import type { Plan, PlanCell } from '../../src/report/types.js';

// A small invented table: group "=G1" (a label that looks like a formula) of 10 claims with one
// large amount, and group "B" of 3 claims (below the minimum group size of 8).
const groupCells: RawCell[] = [...new Array<RawCell>(10).fill('=G1'), 'B', 'B', 'B', '=G1'];
const amountCells: RawCell[] = [10, 11, 12, 13, 14, 15, 16, 17, 18, 500, 20, 21, 22, null];
const table: SourceTable = {
  source: 'invented.xlsx, sheet Claims, B2:C16',
  sheetName: 'Claims',
  headers: ['Group', 'Amount'],
  columns: [groupCells, amountCells],
  rowCount: groupCells.length,
  headerRow: 2,
  firstColumn: 1,
};
const options: ScoreOptions = { method: 'robust', direction: 'both', logScale: false, minGroupSize: 8, smallGroups: 'pool' };

function plan(opts: ScoreOptions = options): Plan {
  const result = scoreTable(
    { valueColumns: [{ name: 'Amount', cells: amountCells }], groupColumns: [{ name: 'Group', cells: groupCells }] },
    opts,
  );
  return buildPlan(result, { source: table.source, when: new Date(Date.UTC(2025, 3, 1, 9, 30)), table, idColumn: null });
}

function section(p: Plan, title: RegExp) {
  const s = p.notes.sections.find((x) => title.test(x.title));
  expect(s, `section ${title}`).toBeDefined();
  return s!;
}

/** WCAG 2.1 relative luminance and contrast ratio (W3C, Success Criterion 1.4.3 definitions). */
function contrast(a: string, b: string): number {
  const lum = (hex: string) => {
    const [r, g, bl] = [0, 2, 4].map((i) => {
      const c = parseInt(hex.slice(i, i + 2), 16) / 255;
      return c <= 0.03928 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
    });
    return 0.2126 * r + 0.7152 * g + 0.0722 * bl;
  };
  const [hi, lo] = [lum(a), lum(b)].sort((x, y) => y - x);
  return (hi + 0.05) / (lo + 0.05);
}

describe('buildPlan: result columns', () => {
  const p = plan();

  it('has score, flag and reason per value column, then one status and one note column', () => {
    expect(p.columns.map((c) => c.kind)).toEqual(['score', 'flag', 'reason', 'status', 'note']);
    expect(p.columns.map((c) => c.header)).toEqual([
      'Amount · tail score',
      'Amount · tail flag',
      'Amount · why',
      'Tailmark status',
      'Tailmark note',
    ]);
    for (const c of p.columns) expect(c.values).toHaveLength(table.rowCount);
    expect(p.columns[0].numberFormat).toBe('0.00');
  });

  it('scores equal a robust z computed here by hand, rounded to 2 decimals', () => {
    // Group "=G1" amounts: 10..18 and 500 (n = 10). Median = (14 + 15) / 2 = 14.5.
    // |x - 14.5| = 4.5 3.5 2.5 1.5 0.5 0.5 1.5 2.5 3.5 485.5 -> sorted middle pair 2.5, 2.5 -> MAD = 2.5.
    // Robust z of 500 = (500 - 14.5) / (1.4826 x 2.5) = 485.5 / 3.7065 = 130.986...
    const z = (500 - 14.5) / (1.4826 * 2.5);
    expect(p.columns[0].values[9]).toBe(Math.round(z * 100) / 100);
    expect(p.columns[0].values[0]).toBe(Math.round(((10 - 14.5) / (1.4826 * 2.5)) * 100) / 100);
    expect(p.columns[0].numberFormat).toBe('0.00');
    expect(p.columns[0].values[13]).toBeNull(); // blank amount: not scored
  });

  it('flags the large claim with our word, defaults its status to the open label, leaves others empty', () => {
    expect(p.columns[1].values[9]).toBe('▲ above peers');
    expect(p.columns[3].values[9]).toBe(REVIEW_STATUSES.find((s) => s.id === 'open')!.label);
    expect(p.columns[1].values[0]).toBeNull();
    expect(p.columns[3].values[0]).toBeNull();
    expect(p.columns[4].values.filter((v) => v !== null)).toEqual([]);
  });

  it('writes a short reason for every row (the full sentence, naming the group, is explainRow: the pane shows it)', () => {
    const why = p.columns[2].values[9];
    expect(typeof why).toBe('string');
    expect(why as string).toMatch(/robust z (above|below) median/);
    expect((why as string).length).toBeLessThanOrEqual(60);
    expect(typeof p.columns[2].values[13]).toBe('string');
  });

  it('marks low outliers with the low word', () => {
    const cells: RawCell[] = [100, 101, 102, 103, 104, 105, 106, 107, 108, -400];
    const g: RawCell[] = cells.map(() => 'A');
    const r = scoreTable({ valueColumns: [{ name: 'Amount', cells }], groupColumns: [{ name: 'G', cells: g }] }, options);
    const t: SourceTable = { ...table, columns: [g, cells], rowCount: cells.length };
    const lp = buildPlan(r, { source: 'x', when: new Date(0), table: t });
    expect(lp.columns[1].values[9]).toBe('▼ below peers');
  });
});

describe('highlight rules', () => {
  const refs = { firstDataRow: 3, flagColumns: ['E'], statusColumn: 'G' };

  it('one rule per review state, each with our marker and our palette', () => {
    expect(HIGHLIGHT_RULES.map((r) => r.state).sort()).toEqual(['asked', 'cleared', 'escalated', 'open']);
    for (const r of HIGHLIGHT_RULES) {
      expect(r.id).toBe(`tailmark:${r.state}`);
      expect(r.swatch).toEqual(PALETTE[r.state]);
    }
    expect(new Set(HIGHLIGHT_RULES.map((r) => r.priority)).size).toBe(4);
  });

  it('formulas use absolute columns and rows relative to the first data row', () => {
    const open = HIGHLIGHT_RULES.find((r) => r.state === 'open')!;
    expect(ruleFormula(open, refs)).toBe('=AND(ISTEXT("tailmark:open"),$E3<>"",OR($G3="",$G3="To look at"))');
    const asked = HIGHLIGHT_RULES.find((r) => r.state === 'asked')!;
    expect(ruleFormula(asked, refs)).toBe('=AND(ISTEXT("tailmark:asked"),$G3="Asked claimant")');
    expect(ruleFormula(open, { firstDataRow: 2, flagColumns: ['H', 'K'], statusColumn: 'N' })).toBe(
      '=AND(ISTEXT("tailmark:open"),OR($H2<>"",$K2<>""),OR($N2="",$N2="To look at"))',
    );
  });

  it('every formula is recognisably ours; other formulas are not', () => {
    for (const r of HIGHLIGHT_RULES) expect(isTailmarkFormula(ruleFormula(r, refs))).toBe(true);
    expect(isTailmarkFormula('=$A2>100')).toBe(false);
    expect(isTailmarkFormula('=ISTEXT($A2)')).toBe(false);
  });

  it('doubles quotes inside labels and rejects bad references', () => {
    const rule = { ...HIGHLIGHT_RULES[0], statusLabels: ['Say "hi"'] };
    expect(ruleFormula(rule, refs)).toContain('$G3="Say ""hi"""');
    expect(() => ruleFormula(rule, { ...refs, statusColumn: 'G3' })).toThrow(RangeError);
    expect(() => ruleFormula(rule, { ...refs, firstDataRow: 0 })).toThrow(RangeError);
  });
});

describe('palette and statuses', () => {
  // Excel's built-in highlight presets (fill/font pairs) that we must not reuse.
  const PRESETS = ['FFC7CE', '9C0006', 'FFEB9C', '9C5700', 'C6EFCE', '006100'];

  it('uses none of the preset colours', () => {
    for (const sw of Object.values(PALETTE)) {
      expect(PRESETS).not.toContain(sw.fill.toUpperCase());
      expect(PRESETS).not.toContain(sw.font.toUpperCase());
    }
  });

  it('keeps dark text on soft fills readable: contrast at least 7:1 (WCAG 2.1 enhanced, SC 1.4.6)', () => {
    for (const sw of Object.values(PALETTE)) expect(contrast(sw.fill, sw.font)).toBeGreaterThanOrEqual(7);
  });

  it('has four short statuses without commas (they form an Excel list)', () => {
    expect(REVIEW_STATUSES.map((s) => s.id)).toEqual(['open', 'asked', 'cleared', 'escalated']);
    for (const s of REVIEW_STATUSES) {
      expect(s.label).not.toContain(',');
      expect(s.label.length).toBeLessThanOrEqual(16);
      expect(s.meaning.length).toBeGreaterThan(10);
    }
  });
});

describe('notes sheet', () => {
  const p = plan();

  it('has the sections in plain words', () => {
    expect(p.notes.name).toBe(NOTES_SHEET_NAME);
    for (const t of [/what was done/i, /cutoff was chosen/i, /parameters/i, /groups: amount/i, /cells left out/i, /cannot be reached/i, /source and time/i, /caution/i, /review statuses/i]) {
      section(p, t);
    }
  });

  it('explains the cutoff and its origin', () => {
    const s = section(p, /cutoff was chosen/i);
    const text = s.rows.flat().join(' ');
    expect(text).toMatch(/3\.5/);
    expect(text).toMatch(/Iglewicz and Hoaglin/);
  });

  it('per-group table has the documented columns and the hand-computed median and MAD', () => {
    const s = section(p, /groups: amount/i);
    expect(s.table).toBe(true);
    expect(s.rows[0]).toEqual([
      'Group', 'Rows', 'n (amounts used)', 'Median', 'MAD', 'Scaled MAD (1.4826 x MAD)', 'Mean', 'SD', 'Q1', 'Q3',
      'Lower bound', 'Upper bound', 'Flagged', 'Fallbacks', 'Compared with', 'Medcouple (skew)', 'Rule applied and why', 'Claims flagged by chance at this size',
      'Past the cutoff but within the ignore-within amount',
    ]);
    const g1 = s.rows.find((r) => r[0] === '=G1')!;
    expect(g1).toBeDefined();
    expect(g1[1]).toBe(11); // rows incl. the blank
    expect(g1[2]).toBe(10);
    expect(g1[3]).toBe(14.5);
    expect(g1[4]).toBe(2.5);
    const b = s.rows.find((r) => r[0] === 'B')!;
    expect(b[13]).toMatch(/minimum size.*whole column/);
    expect(b[14]).toBe('the whole column');
  });

  it('counts excluded cells by reason', () => {
    const s = section(p, /cells left out/i);
    expect(s.rows).toContainEqual(['Amount', 'blank cell', 1]);
  });

  it('lists classic-z groups where the cutoff is unreachable (Shiffler 1988: (n-1)/sqrt(n))', () => {
    const cp = plan({ ...options, method: 'classic', minGroupSize: 2 });
    const s = section(cp, /cannot be reached/i);
    // Group B has n = 3: (3 - 1)/sqrt(3) = 1.1547 < 3, so it is listed.
    const row = s.rows.find((r) => r[1] === 'B');
    expect(row).toBeDefined();
    expect(row![2]).toBe(3);
    expect(row![3]).toBeCloseTo(2 / Math.sqrt(3), 3);
  });

  it('records source, range and time of run, and the caution', () => {
    const s = section(p, /source and time/i);
    const flat = s.rows.flat();
    expect(flat).toContain('invented.xlsx, sheet Claims, B2:C16');
    expect(flat).toContain('B2:C16');
    expect(flat).toContain('2025-04-01T09:30:00.000Z');
    expect(section(p, /caution/i).rows.flat()).toContain(CAUTION);
    expect(p.caution).toBe(CAUTION);
    expect(CAUTION).toMatch(/look here/);
    expect(CAUTION).toMatch(/not misconduct/);
    expect(CAUTION).toMatch(/policy and local law/);
    expect(CAUTION).toMatch(/personal data/);
  });

  it('keeps formula-like text as plain strings and holds only plain cell values', () => {
    const cells: PlanCell[] = p.notes.sections.flatMap((s) => s.rows.flat());
    expect(cells).toContain('=G1');
    for (const c of cells) expect(['string', 'number', 'boolean'].includes(typeof c) || c === null).toBe(true);
  });

  it('has a log entry', () => {
    expect(p.log).toEqual({
      when: '2025-04-01T09:30:00.000Z',
      source: table.source,
      method: 'robust z (median/MAD)',
      cutoff: 3.5,
      rowsScored: 13,
      flagged: p.columns[3].values.filter((v) => v !== null).length,
      // Iglewicz and Hoaglin's 3.5 for robust z (the method's default, src/scoring/cutoff.ts).
      defaultCutoff: 3.5,
    });
    expect(p.log.flagged).toBeGreaterThanOrEqual(1);
  });
});
