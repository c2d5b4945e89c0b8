/**
 * The JSON sink's shape: a plan's numbers for scripts (`tailmark score --json`). Pure. `planJsonChunks`
 * gives the same document as text a chunk at a time, so the batch command streams it at any size
 * (a full-height sheet never holds one object per row or the whole text); `planToJson` is the object.
 */
import { describeGroupRule, type Description } from '../scoring/index.js';
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

type Column = Plan['result']['columns'][number];

/** One row of one value column as the JSON sink gives it. */
function rowEntry(col: Column, r: number, ids: readonly RawCell[] | null, multi: boolean): Record<string, unknown> {
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
  return entry;
}

/** One group of one value column as the JSON sink gives it. */
function groupEntry(col: Column, g: Column['groups'][number], d: Description, multi: boolean): Record<string, unknown> {
  const entry: Record<string, unknown> = {
    key: g.label,
    n: g.n,
    center: g.center,
    scale: g.scale,
    lower: g.lower,
    upper: g.upper,
    flagged: g.flagged,
    medcouple: d.medcouple,
    rule: describeGroupRule(col.method, g.medcouple ?? d.medcouple),
    chanceRate: g.chanceRate,
    unreachable: g.unreachable,
  };
  if (multi) entry.column = col.column;
  return entry;
}

function idCells(plan: Plan): readonly RawCell[] | null {
  const idIndex = plan.idColumn === null ? -1 : plan.table.headers.indexOf(plan.idColumn);
  return idIndex >= 0 ? plan.table.columns[idIndex] : null;
}

function decimalOf(plan: Plan): PlanJson['decimal'] {
  return Object.fromEntries(plan.result.columns.map((c) => [c.column, { separator: c.decimal.separator, how: c.decimal.how }]));
}

/** Rows (one per data row and value column) and groups of a plan, unrounded. */
export function planToJson(plan: Plan): PlanJson {
  const { result } = plan;
  const multi = result.columns.length > 1;
  const ids = idCells(plan);
  const rows: Record<string, unknown>[] = [];
  const groups: Record<string, unknown>[] = [];
  result.columns.forEach((col, c) => {
    for (let r = 0; r < result.rowCount; r++) rows.push(rowEntry(col, r, ids, multi));
    col.groups.forEach((g, i) => groups.push(groupEntry(col, g, plan.descriptions[c].groups[i], multi)));
  });
  return { method: result.options.method, cutoff: result.options.cutoff, decimal: decimalOf(plan), rows, groups };
}

const CHUNK_CHARS = 1 << 20;

/**
 * The JSON document of `planToJson(plan)` as text in chunks of about 1 MB (rows one per line).
 * JSON.parse of the joined chunks equals planToJson(plan) (NaN and infinities become null either way).
 */
export function* planJsonChunks(plan: Plan): Generator<string> {
  const { result } = plan;
  const multi = result.columns.length > 1;
  const ids = idCells(plan);
  let buf = `{\n  "method": ${JSON.stringify(result.options.method)},\n  "cutoff": ${JSON.stringify(result.options.cutoff)},\n  "decimal": ${JSON.stringify(decimalOf(plan))},\n  "rows": [`;
  let first = true;
  for (const col of result.columns) {
    for (let r = 0; r < result.rowCount; r++) {
      buf += `${first ? '\n' : ',\n'}    ${JSON.stringify(rowEntry(col, r, ids, multi))}`;
      first = false;
      if (buf.length >= CHUNK_CHARS) {
        yield buf;
        buf = '';
      }
    }
  }
  buf += `${first ? '' : '\n  '}],\n  "groups": [`;
  first = true;
  for (const [c, col] of result.columns.entries()) {
    for (const [i, g] of col.groups.entries()) {
      buf += `${first ? '\n' : ',\n'}    ${JSON.stringify(groupEntry(col, g, plan.descriptions[c].groups[i], multi))}`;
      first = false;
    }
  }
  yield `${buf}${first ? '' : '\n  '}]\n}\n`;
}
