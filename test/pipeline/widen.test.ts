/**
 * Small groups compared with a wider peer group before the whole column (issue 9 item 6), on the
 * seeded invented claims of test/scoring/widenClaims.ts (30 cost centres x 6 categories whose
 * levels differ up to 40-fold; rare categories leave many cost centre x category groups below the
 * minimum of 8). Expected behaviour comes from how the data were made, not from the engine: a
 * clean claim is an ordinary draw from its category's lognormal, so a fair comparison should flag
 * about as few of the small groups' clean claims as of the claims scored in their own groups, and
 * the planted claims (6 x their category's level) should be caught.
 * Figures: TAILMARK_PRINT_FIGURES=1 npx vitest run test/pipeline/widen.test.ts
 */
import { describe, expect, it } from 'vitest';
import { explainRow, explainRowShort, scoreTable, type ColumnScores, type MethodId, type WidenOrder } from '../../src/scoring/index.js';
import { planToJson } from '../../src/report/json.js';
import { runPipeline } from '../../src/pipeline/run.js';
import { widenClaims } from '../scoring/widenClaims.js';

const data = widenClaims();
const planted = new Set(data.planted);

function score(widen: WidenOrder, method: MethodId = 'skew') {
  return scoreTable(
    {
      valueColumns: [{ name: 'Amount', cells: data.amount }],
      groupColumns: [{ name: 'Cost centre', cells: data.costCentre }, { name: 'Category', cells: data.category }],
    },
    { method, direction: 'both', logScale: false, minGroupSize: 8, smallGroups: 'pool', widen },
  );
}

/** Clean (not planted) rows by the population they were scored against: [rows, flagged]. */
function rates(col: ColumnScores): { own: [number, number]; small: [number, number]; caught: number } {
  const own: [number, number] = [0, 0];
  const small: [number, number] = [0, 0];
  let caught = 0;
  for (let r = 0; r < col.values.length; r++) {
    if (planted.has(r)) {
      caught += col.flagged[r];
      continue;
    }
    const p = col.population[r];
    const t = p === 1 ? own : p === 2 || p === 3 ? small : null;
    if (t) {
      t[0]++;
      t[1] += col.flagged[r];
    }
  }
  return { own, small, caught };
}

const pct = (t: [number, number]): number => (100 * t[1]) / t[0];

describe('small groups: a wider peer group before the whole column', () => {
  const before = rates(score('column').columns[0]);
  const after = rates(score('drop-first').columns[0]);
  if (process.env.TAILMARK_PRINT_FIGURES) {
    for (const method of ['skew', 'robust', 'iqr'] as const) {
      for (const widen of ['column', 'drop-first', 'drop-last'] as const) {
        const f = rates(score(widen, method).columns[0]);
        console.log(
          `${method} ${widen}: clean claims flagged, own group ${f.own[1]}/${f.own[0]} (${pct(f.own).toFixed(1)} %), ` +
          `small groups ${f.small[1]}/${f.small[0]} (${pct(f.small).toFixed(1)} %); planted caught ${f.caught}/${data.planted.length}`,
        );
      }
    }
  }
  it('the data reproduce the problem: pooled with the whole column, far more small-group claims are flagged than in own groups', () => {
    expect(before.small[0]).toBeGreaterThan(200);
    expect(pct(before.small)).toBeGreaterThan(20); // measured 43.7 % (skew, the default)
    expect(pct(before.own)).toBeLessThan(2);
  });
  it('compared with the same category across cost centres, small groups are flagged about as rarely as own groups, and the planted claims are still caught', () => {
    expect(after.small[0]).toBe(before.small[0]); // the same rows, held against another population
    expect(pct(after.small)).toBeLessThanOrEqual(pct(after.own) + 2);
    expect(after.caught).toBe(data.planted.length);
  });
  it('the order is the reviewer\'s: the same cost centre across categories mixes levels again', () => {
    const other = rates(score('drop-last').columns[0]);
    expect(pct(other.small)).toBeGreaterThan(pct(after.small) + 10);
  });
  it('each small group says which population it was held against; the wider groups carry their own fit', () => {
    const col = score('drop-first').columns[0];
    const small = col.groups.filter((g) => g.n > 0 && g.n < 8);
    expect(small.length).toBeGreaterThan(30);
    for (const g of small) {
      const category = g.keyParts[1];
      expect(g.population).toBe('wider');
      expect(g.fallbacks).toContain('small-widened');
      expect(g.comparedWith).toBe(`${category} (every Cost centre)`);
      const w = col.wider[col.widerOf[col.groups.indexOf(g)]];
      expect(w.label).toBe(g.comparedWith);
      // Its n: every usable claim of that category (counted here from the data).
      expect(w.n).toBe(data.category.filter((c) => c === category).length);
      expect(g.center).toBe(w.center);
    }
  });
  it('a row\'s explanation names the wider peer group; a group too small even there goes on to the whole column', () => {
    const res = score('drop-first');
    const col = res.columns[0];
    const r = col.population.indexOf(3);
    const g = col.groups[col.groupOf[r]];
    expect(explainRow(res, col, r)).toContain(`Compared with the wider peer group "${g.comparedWith}"`);
    expect(explainRowShort(res, col, r)).toContain(`(vs ${g.comparedWith})`);
    // Two cost centres with one Parking claim each: the Parking wider group has 2 < 8 claims.
    const tiny = scoreTable(
      {
        valueColumns: [{ name: 'Amount', cells: [...data.amount, 12, 14] }],
        groupColumns: [{ name: 'Cost centre', cells: [...data.costCentre, 'CC-200', 'CC-201'] }, { name: 'Category', cells: [...data.category, 'Parking', 'Parking'] }],
      },
      { method: 'skew', direction: 'both', logScale: false, minGroupSize: 8, smallGroups: 'pool', widen: 'drop-first' },
    ).columns[0];
    const last = tiny.values.length - 1;
    expect(tiny.population[last]).toBe(2);
    expect(tiny.groups[tiny.groupOf[last]].comparedWith).toBe('(whole column)');
  });
});

describe('the notes sheet and --json say it too', () => {
  const run = runPipeline(
    {
      source: 'widen test', sheetName: 'Claims', headers: ['Cost centre', 'Category', 'Amount'],
      columns: [data.costCentre, data.category, data.amount], rowCount: data.amount.length, headerRow: 1, firstColumn: 0,
    },
    { valueColumns: ['Amount'], groupColumns: ['Cost centre', 'Category'] },
    { when: new Date(Date.UTC(2026, 11, 2)) },
  );
  it('settings line, a table of the wider peer groups, and "Compared with" per group', () => {
    const sections = run.plan.notes.sections;
    const settings = sections.flatMap((s) => s.rows).find((row) => row[0] === 'Smaller groups');
    expect(settings?.[1]).toBe('compared with the same Category across every Cost centre, then the whole column (the first with enough claims)');
    const wider = sections.find((s) => s.title === 'Wider peer groups: Amount');
    expect(wider?.rows.map((row) => row[0])).toEqual(['Wider peer group', ...run.result.columns[0].wider.map((w) => w.label)]);
    const groups = sections.find((s) => s.title === 'Groups: Amount');
    const header = groups!.rows[0];
    const at = header.indexOf('Compared with');
    expect(groups!.rows.some((row) => row[at] === 'the wider peer group Flights (every Cost centre)')).toBe(true);
  });
  it('--json groups carry "comparedWith"', () => {
    const json = planToJson(run.plan);
    const small = json.groups.filter((g) => typeof g.n === 'number' && g.n > 0 && g.n < 8);
    expect(small.length).toBeGreaterThan(30);
    for (const g of small) expect(g.comparedWith).toBe(`${String(g.key).split(' / ')[1]} (every Cost centre)`);
    const meals = json.groups.find((g) => g.key === 'CC-200 / Meals');
    expect(meals?.comparedWith).toBe('CC-200 / Meals');
  });
});
