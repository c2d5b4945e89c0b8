/**
 * The JSON sink's shape: a plan's numbers for scripts (`tailmark score --json`). Pure; the batch
 * command prints what this returns.
 */
import { describeGroupRule } from '../scoring/index.js';
import { POPULATIONS, type RawCell } from '../scoring/types.js';
import type { Plan } from './types.js';

function finite(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}

function rawText(v: RawCell): string | null {
  if (v === null || v === undefined) return null;
  if (v instanceof Date) return v.toISOString();
  if (typeof v === 'object') return v.code;
  return String(v);
}

export interface PlanJson {
  readonly method: string;
  readonly cutoff: number;
  readonly decimal: Record<string, { readonly separator: string; readonly how: string }>;
  readonly rows: Record<string, unknown>[];
  readonly groups: Record<string, unknown>[];
}

/** Rows (one per data row and value column) and groups of a plan, unrounded. */
export function planToJson(plan: Plan): PlanJson {
  const { result, table } = plan;
  const multi = result.columns.length > 1;
  const idIndex = plan.idColumn === null ? -1 : table.headers.indexOf(plan.idColumn);
  const ids = idIndex >= 0 ? table.columns[idIndex] : null;
  const rows: Record<string, unknown>[] = [];
  const groups: Record<string, unknown>[] = [];
  for (const col of result.columns) {
    for (let r = 0; r < result.rowCount; r++) {
      const g = col.groups[col.groupOf[r]];
      const entry: Record<string, unknown> = {
        row: r + 1,
        group: g ? g.label : null,
        value: finite(col.values[r]),
        score: finite(col.scores[r]),
        flagged: col.flagged[r] === 1,
      };
      if (ids) entry.id = rawText(ids[r]);
      if (multi) entry.column = col.column;
      entry.comparedWith = POPULATIONS[col.population[r]];
      rows.push(entry);
    }
    for (const g of col.groups) {
      const entry: Record<string, unknown> = {
        key: g.label,
        n: g.n,
        center: g.center,
        scale: g.scale,
        lower: g.lower,
        upper: g.upper,
        flagged: g.flagged,
        medcouple: g.medcouple,
        rule: describeGroupRule(col.method, g.medcouple),
        chanceRate: g.chanceRate,
        unreachable: g.unreachable,
      };
      if (multi) entry.column = col.column;
      groups.push(entry);
    }
  }
  const decimal = Object.fromEntries(result.columns.map((c) => [c.column, { separator: c.decimal.separator, how: c.decimal.how }]));
  return { method: result.options.method, cutoff: result.options.cutoff, decimal, rows, groups };
}
